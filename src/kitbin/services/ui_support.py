"""Small read services the terminal UI needs and the command line does not.

Each function opens one unit of work on a :class:`kitbin.store.Store` and returns
plain dicts and lists (SI floats), built from the inventory service's own shapes.
No domain rule lives here: evidence comes from
:func:`kitbin.services.inventory.bin_evidence`, markings from
:func:`kitbin.services.inventory.decode_marking`.
"""

from __future__ import annotations

import math
from typing import Any

from kitbin.errors import KitbinError
from kitbin.quantities import NOMINAL_QUANTITY, QUANTITIES
from kitbin.services import inventory
from kitbin.store import Store, queries


def _num(value: float | None) -> float | None:
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def shelf_rows(store: Store) -> list[dict[str, Any]]:
    """One row per bin for the shelf view, by label.

    Returns
    -------
    list of dict
        Keys: ``label``, ``kind``, ``kit``, ``nominal`` (SI or None),
        ``nominal_dimension``, ``marking``, ``package``, ``location``, ``notes``,
        ``qty``, ``qty_reserved``, and ``evidence``: a list of dicts (``quantity``,
        ``dimension``, ``grade``, ``typical``, ``conservative``, ``text``) for the
        kind's key quantities (:data:`kitbin.services.inventory.KEY_QUANTITIES`).
    """
    out: list[dict[str, Any]] = []
    with store.transaction() as session:
        for b in queries.bins(session, with_readings=True):
            wanted = list(inventory.KEY_QUANTITIES.get(b.kind, ()))
            nominal_q = NOMINAL_QUANTITY.get(b.kind)
            if nominal_q and nominal_q not in wanted:
                wanted.insert(0, nominal_q)
            evidence = inventory.bin_evidence(b, wanted)
            out.append(
                {
                    "label": b.label,
                    "kind": b.kind,
                    "kit": b.kit.name if b.kit is not None else None,
                    "nominal": _num(b.nominal),
                    "nominal_dimension": (QUANTITIES[nominal_q].dimension if nominal_q else None),
                    "marking": b.marking,
                    "package": b.package,
                    "location": b.location,
                    "notes": b.notes,
                    "qty": b.qty,
                    "qty_reserved": b.qty_reserved,
                    "evidence": [
                        {
                            "quantity": name,
                            "dimension": ev.dimension,
                            "grade": ev.grade,
                            "typical": _num(ev.typical()),
                            "conservative": _num(ev.conservative()),
                            "text": ev.describe(),
                        }
                        for name, ev in evidence.items()
                    ],
                }
            )
    return out


def bin_page(store: Store, label: str) -> dict[str, Any]:
    """Everything the bin view shows: :func:`kitbin.services.inventory.show_bin`, plus
    the decoded marking and each capture's curves.

    Returns
    -------
    dict
        ``show_bin`` keys plus ``marking_decoded`` (one line, or None),
        ``marking_problem`` (the decoding error's line, or None) and ``curves``
        (capture id -> the stored curve dict, e.g. ``{"i": [...], "l": [...]}``
        in A and H).
    """
    data = inventory.show_bin(store, label)
    data["marking_decoded"] = None
    data["marking_problem"] = None
    if data.get("marking"):
        try:
            decoded = inventory.decode_marking(data["kind"], data["marking"])
        except KitbinError as error:
            data["marking_problem"] = error.msg
        else:
            if decoded is not None:
                data["marking_decoded"] = decoded.describe()
    curves: dict[int, dict[str, Any]] = {}
    with store.transaction() as session:
        b = inventory.get_bin(session, label)
        for capture in b.captures:
            if capture.curve:
                curves[capture.id] = dict(capture.curve)
    data["curves"] = curves
    return data


def heat_trace(store: Store, capture_id: int, points: int = 400) -> dict[str, Any]:
    """A saved heating log and its fitted curve, for drawing.

    The log is read back from the capture and fitted again with the parameters it
    was saved with (:func:`kitbin.services.bench.analyse_heat_bytes`).

    Returns
    -------
    dict
        ``t_s``, ``temp_C`` (the log, thinned to about ``points``), ``fit_C`` (the
        fitted curve at the same times), ``t_amb_C``, ``rise_ss_K``, ``tau_s``.

    Raises
    ------
    NotFoundError
        When there is no heating capture with this id.
    """
    import zlib

    from kitbin.errors import NotFoundError
    from kitbin.services import bench
    from kitbin.store.models import Capture

    with store.transaction() as session:
        capture = session.get(Capture, capture_id)
        if capture is None or capture.kind != "heat":
            raise NotFoundError(f"no heating capture #{capture_id}")
        content = zlib.decompress(capture.content)
        params = dict(capture.params or {})
        name = capture.file_name or f"capture #{capture_id}"
    known = {f for f in bench.HeatParams.__dataclass_fields__}
    heat_params = bench.HeatParams(**{k: v for k, v in params.items() if k in known})
    cap, column, fit = bench.analyse_heat_bytes(content, heat_params, source=name)
    step = max(1, cap.n // points)
    t = cap.time[::step]
    temps = cap.channels[column][::step]
    return {
        "t_s": [float(v) for v in t],
        "temp_C": [float(v) for v in temps],
        "fit_C": [float(v) for v in fit.temperature(t)],
        "t_amb_C": float(fit.t_amb_C),
        "rise_ss_K": float(fit.rise_ss_K),
        "tau_s": float(fit.tau_s),
    }


def plan_page(
    store: Store,
    name: str,
    *,
    boards: int = 1,
    use: dict[str, str] | None = None,
    top: int = 10,
    sense: float = 0.1,
) -> dict[str, Any]:
    """What the plan view shows: the plan with corners and demands, the ranked bins
    per role, and the pick list with its bring-up sheet for the overrides in ``use``.

    Returns
    -------
    dict
        ``plan`` (:func:`kitbin.services.plans.show_plan`), ``match``
        (:class:`kitbin.services.matching.MatchResult`), ``sheet``
        (:class:`kitbin.picking.PickSheet`, nothing reserved), ``boards``, ``use``.
    """
    from kitbin.services import matching, picking, plans

    detail = plans.show_plan(store, name)
    result = matching.match_plan(store, name, top=top, boards=boards)
    sheet, _chosen, _m = picking.build_sheet(store, name, boards=boards, use=use or {}, sense=sense)
    return {
        "plan": detail,
        "match": result,
        "sheet": sheet,
        "boards": boards,
        "use": dict(use or {}),
    }


def reserve_pick(
    store: Store,
    name: str,
    *,
    boards: int = 1,
    use: dict[str, str] | None = None,
    sense: float = 0.1,
) -> Any:
    """Build the pick list and reserve its stock, as ``kitbin pick --reserve`` does.

    Returns
    -------
    PickSheet
        In state ``reserved`` with its ``pick_id``, counting its own hold as its own.

    Raises
    ------
    StockError
        When a role has no bin or too few parts are free; nothing is written.
    """
    from dataclasses import replace

    from kitbin.services import picking

    sheet, chosen, m = picking.build_sheet(store, name, boards=boards, use=use or {}, sense=sense)
    pick_id = picking.reserve_sheet(store, sheet, chosen, m.plan_id)
    lines = tuple(
        replace(ln, held_by_this=ln.qty_total, reserved=ln.reserved + ln.qty_total)
        for ln in sheet.lines
    )
    return replace(sheet, pick_id=pick_id, state="reserved", lines=lines)


def export_sheet(sheet: Any, fmt: str, path: str) -> str:
    """Write a pick sheet as ``text``, ``csv``, ``md`` or ``html`` to ``path``; the path.

    Raises
    ------
    KitbinError
        For an unknown format or a file that cannot be written.
    """
    from pathlib import Path

    from kitbin.picking import RENDERERS, render

    if fmt not in RENDERERS:
        raise KitbinError(f"format {fmt!r}: expected one of {', '.join(RENDERERS)}")
    target = Path(path).expanduser()
    text = render(sheet, fmt)
    try:
        target.write_text(text, encoding="utf-8")
    except OSError as e:
        raise KitbinError(f"{target}: cannot write the pick list ({e.strerror})") from None
    return str(target)


__all__ = ["bin_page", "export_sheet", "heat_trace", "plan_page", "reserve_pick", "shelf_rows"]

"""Small read services the terminal UI needs and the command line does not.

Each function opens one unit of work on a :class:`kitbin.store.Store` and returns
plain dicts and lists (SI floats), built from the inventory service's own shapes.
No domain rule lives here: evidence comes from
:func:`kitbin.services.inventory.bin_evidence`, markings from
:func:`kitbin.services.inventory.decode_marking`.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import Any

from kitbin.errors import KitbinError
from kitbin.quantities import NOMINAL_QUANTITY, PART_KINDS, QUANTITIES
from kitbin.services import inventory
from kitbin.store import Store


def _num(value: float | None) -> float | None:
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _shelf_quantities() -> list[str]:
    names: list[str] = []
    for kind, quantities in inventory.KEY_QUANTITIES.items():
        nominal_q = NOMINAL_QUANTITY.get(kind)
        for q in ((nominal_q,) if nominal_q else ()) + tuple(quantities):
            if q not in names:
                names.append(q)
    return names


class ShelfEvidence:
    """Evidence tables of every bin, kept to describe one bin on demand.

    Describing all 10,000 bins up front took 0.6 s; one bin's lines cost microseconds.
    """

    def __init__(self, tables: dict[str, Any], kinds: list[str]) -> None:
        self.tables = tables
        self.kinds = kinds

    def lines(self, row: int) -> list[str]:
        """One line per key quantity of the bin in stock row ``row`` (grade and interval;
        specimen counts and property sources are in the bin view)."""
        kind = self.kinds[row]
        wanted = list(inventory.KEY_QUANTITIES.get(kind, ()))
        nominal_q = NOMINAL_QUANTITY.get(kind)
        if nominal_q and nominal_q not in wanted:
            wanted.insert(0, nominal_q)
        out = []
        for q in wanted:
            if q not in self.tables:
                continue
            ev = self.tables[q].row(row)
            if q != nominal_q:
                # the tables keep no property source: say none rather than a wrong one
                ev = replace(ev, source="")
            out.append(ev.describe())
        return out


def shelf_rows(store: Store) -> tuple[list[dict[str, Any]], ShelfEvidence]:
    """One row per bin for the shelf view, by label, and their evidence for describing.

    Evidence comes from the matcher's set-based loader
    (:func:`kitbin.services.matching.load_stock`): a few queries and array
    operations instead of one ORM object per bin and reading.

    Returns
    -------
    rows : list of dict
        Keys: ``label``, ``kind``, ``kit``, ``nominal`` (SI or None),
        ``nominal_dimension``, ``marking``, ``package``, ``location``, ``qty``,
        ``qty_reserved``, ``row`` (index for :meth:`ShelfEvidence.lines`) and
        ``evidence``: a list of dicts (``quantity``, ``dimension``, ``grade``,
        ``typical``, ``conservative``) for the kind's key quantities
        (:data:`kitbin.services.inventory.KEY_QUANTITIES`).
    evidence : ShelfEvidence
    """
    from kitbin.match.evidence import GRADES
    from kitbin.services.matching import load_stock
    from kitbin.store import matchreads

    quantities = _shelf_quantities()
    with store.transaction() as session:
        stock = load_stock(session, PART_KINDS, quantities)
        details = matchreads.bin_details(session, [int(i) for i in stock.ids])
    columns = {
        q: (
            t.grade.tolist(),
            t.typical().tolist(),
            t.conservative().tolist(),
            QUANTITIES[q].dimension,
        )
        for q, t in stock.tables.items()
    }
    kinds = [str(k) for k in stock.kinds]
    out: list[dict[str, Any]] = []
    for row, bin_id in enumerate(stock.ids.tolist()):
        d = details[int(bin_id)]
        kind = kinds[row]
        nominal_q = NOMINAL_QUANTITY.get(kind)
        wanted = list(inventory.KEY_QUANTITIES.get(kind, ()))
        if nominal_q and nominal_q not in wanted:
            wanted.insert(0, nominal_q)
        evidence = []
        for q in wanted:
            grades, typical, conservative, dim = columns[q]
            evidence.append(
                {
                    "quantity": q,
                    "dimension": dim,
                    "grade": GRADES[int(grades[row])],
                    "typical": _num(typical[row]),
                    "conservative": _num(conservative[row]),
                }
            )
        out.append(
            {
                "label": d["label"],
                "kind": kind,
                "kit": d["kit"],
                "nominal": _num(d["nominal"]),
                "nominal_dimension": QUANTITIES[nominal_q].dimension if nominal_q else None,
                "marking": d["marking"],
                "package": d["package"],
                "location": d["location"],
                "qty": int(d["qty"]),
                "qty_reserved": int(d["qty_reserved"]),
                "row": row,
                "evidence": evidence,
            }
        )
    out.sort(key=lambda r: r["label"])
    return out, ShelfEvidence(stock.tables, kinds)


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
    sheet, _chosen, _m = picking.build_sheet(
        store, name, boards=boards, use=use or {}, sense=sense, matched=result
    )
    return {
        "plan": detail,
        "match": result,
        "sheet": sheet,
        "boards": boards,
        "use": dict(use or {}),
    }


__all__ = [
    "ShelfEvidence",
    "bin_page",
    "heat_trace",
    "plan_page",
    "shelf_rows",
]

"""Pick lists: choose a bin per role, save a draft, reserve the stock, take it or give
it back.

``kitbin pick PLAN`` builds a :class:`kitbin.picking.PickSheet` from the matcher
(the top verified bin per role unless ``--use ROLE=LABEL`` says otherwise) and a
bring-up sheet from the power stage with the chosen parts. The states of a stored
pick list: ``draft`` → ``reserved`` → ``picked``, and ``draft`` or ``reserved`` →
``cancelled``.

With ``--save`` the pick list is stored as a ``draft``: its lines and quantities,
no stock held (shortfalls and empty roles allowed). ``kitbin picks reserve ID``
holds a draft's stock; with ``--reserve`` the list is stored in state ``reserved``
at once. Either way each bin's ``qty_reserved`` goes up in the same transaction as
the state. ``kitbin picks done ID`` takes the parts (state ``picked``, one logged
stock move per line carrying the pick list id) and ``kitbin picks cancel ID``
releases them, or just cancels a draft (state ``cancelled``). Each change is one
transaction: a conditional UPDATE of the state and the store's conditional-update
stock functions, so two benches at once can neither lose a move nor reserve or take
a list twice.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from kitbin.errors import KitbinError, NotFoundError, StockError
from kitbin.picking import (
    BringUpSheet,
    CornerExpectation,
    PickLine,
    PickSheet,
    describe_part,
    recognise,
    sheet_dict,
)
from kitbin.services.matching import (
    DIVIDER_ROLE,
    DividerMatch,
    MatchResult,
    RoleMatch,
    match_plan,
)
from kitbin.stage.spec import spec_summary
from kitbin.store import matchreads

if TYPE_CHECKING:
    from kitbin.stage.spec import Spec
    from kitbin.store import Store

#: Sense resistor the bring-up ripple is shown across when none is given, Ω
#: (a common shunt for small converters; common practice, no source).
DEFAULT_SENSE = 0.1
DIVIDER_LINES = ("divider_top", "divider_bottom")


@dataclass
class Chosen:
    """The bin chosen for one pick line (before the display fields are loaded)."""

    role: str
    bin_id: int | None
    label: str | None
    per_board: int
    verdict: str
    note: str
    figures: dict[str, float] = field(default_factory=dict)


def parse_use(items: Sequence[str]) -> dict[str, str]:
    """``ROLE=LABEL`` items as a dict.

    Raises
    ------
    KitbinError
        For an item without ``=``.
    """
    out: dict[str, str] = {}
    for item in items:
        role, sep, label = item.partition("=")
        if not sep or not role.strip() or not label.strip():
            raise KitbinError(f"--use {item!r}: expected ROLE=LABEL, e.g. inductor=L-07")
        out[role.strip()] = label.strip()
    return out


def _row_of(rm: RoleMatch, label: str) -> int | None:
    labels = rm.verdicts.candidates.labels
    key = label.lower()
    for k, lab in enumerate(labels):
        if lab == label:
            return k
    for k, lab in enumerate(labels):
        if lab.lower() == key:
            return k
    return None


def _choose_role(rm: RoleMatch, spec: Spec, use: Mapping[str, str], boards: int) -> Chosen:
    from kitbin.match.ranking import VERDICTS, rank_one

    wanted = use.get(rm.role)
    if wanted is None and rm.role == "controller" and getattr(spec, "controller", None):
        wanted = spec.controller
        via = "the plan's controller"
    else:
        via = "--use"
    if wanted is not None:
        k = _row_of(rm, wanted)
        if k is None:
            raise NotFoundError(
                f"bin {wanted!r} is not a candidate for role {rm.role!r}",
                f"it must be a stocked {' or '.join(rm.kinds)} bin",
            )
        row = rank_one(rm.verdicts, spec, k, needed=boards)
        return Chosen(
            rm.role,
            int(rm.bin_ids[k]),
            row.label,
            1,
            row.verdict,
            f"chosen by {via}: {row.verdict}; {row.summary}",
            dict(row.figures),
        )
    best = rm.best
    if best is None:
        return Chosen(rm.role, None, None, 1, "none", "no stocked bin of this kind")
    if best.verdict == VERDICTS[2]:
        return Chosen(
            rm.role,
            None,
            None,
            1,
            "none",
            f"nothing in stock passes; best was {best.label} ({best.summary}); "
            f"force it with --use {rm.role}={best.label}",
        )
    total = sum(rm.counts.values())
    return Chosen(
        rm.role,
        int(rm.bin_ids[best.row]),
        best.label,
        1,
        best.verdict,
        f"top {best.verdict} of {total}: {best.summary}",
        dict(best.figures),
    )


def _divider_lines(d: DividerMatch, use: Mapping[str, str], ids: Mapping[str, int]) -> list[Chosen]:
    out: list[Chosen] = []
    if any(k in use for k in DIVIDER_LINES):
        for role in DIVIDER_LINES:
            label = use.get(role)
            if label is None:
                raise KitbinError(
                    "give both --use divider_top=LABEL and --use divider_bottom=LABEL"
                )
            if label not in ids:
                raise NotFoundError(f"bin {label!r} is not a stocked resistor bin")
            out.append(Chosen(role, ids[label], label, 1, "unverified", "chosen by --use"))
        return out
    if d.result is None:
        return [Chosen(DIVIDER_ROLE, None, None, 1, "none", d.note)]
    for role, leg in zip(DIVIDER_LINES, (d.result.top, d.result.bottom), strict=True):
        counts: dict[str, int] = {}
        for p in leg.parts:
            counts[p] = counts.get(p, 0) + 1
        how = "" if leg.connection == "single" else f" ({leg.connection}: {leg.describe()})"
        for label, n in counts.items():
            out.append(
                Chosen(role, ids.get(label), label, n, d.verdict, f"{d.verdict}{how}: {d.note}")
            )
    return out


def build_sheet(
    store: Store,
    plan: str,
    *,
    boards: int = 1,
    use: Mapping[str, str] | None = None,
    sense: float = DEFAULT_SENSE,
    matched: MatchResult | None = None,
) -> tuple[PickSheet, list[Chosen], MatchResult]:
    """A pick list with its bring-up sheet for a plan × boards (nothing is written).

    ``matched`` is :func:`match_plan` of this plan and ``boards`` when the caller
    has it already (any ``top``); otherwise the matcher runs here.

    Raises
    ------
    NotFoundError
        Unknown plan, or a ``--use`` label that is not a candidate of its role.
    KitbinError
        Bad ``--boards``/``--use``/``--sense``.
    """
    use = dict(use or {})
    if boards < 1:
        raise KitbinError(f"--boards {boards}: expected 1 or more")
    if not (sense > 0 and math.isfinite(sense)):
        raise KitbinError(f"--sense {sense!r}: expected a positive resistance")
    # a copy: a shortfall below may swap in a one-board divider
    m = replace(matched) if matched is not None else match_plan(store, plan, top=1, boards=boards)
    known_roles = set(m.roles) | ({*DIVIDER_LINES, DIVIDER_ROLE} if m.divider else set())
    unknown = [r for r in use if r not in known_roles]
    if unknown:
        raise NotFoundError(
            f"--use {unknown[0]}=...: plan {m.plan!r} has no role {unknown[0]!r}",
            "roles: " + ", ".join(sorted(known_roles)),
        )
    chosen = [_choose_role(rm, m.spec, use, boards) for rm in m.roles.values()]
    if m.set_network is not None and "set_resistor" not in use:
        chosen = [c for c in chosen if c.role != "set_resistor"]
        net_labels = list(m.set_network.leg.parts)
    no_divider = m.divider is not None and m.divider.result is None
    if (no_divider or any(c.bin_id is None for c in chosen)) and boards > 1:
        # nothing has enough parts for every board: take the best bin that passes for
        # one board, and show the shortfall rather than leave the role empty
        m1 = match_plan(store, plan, top=1, boards=1)
        if no_divider and m1.divider is not None and m1.divider.result is not None:
            m.divider = m1.divider
        for i, c in enumerate(chosen):
            if c.bin_id is None and c.role in m1.roles:
                alt = _choose_role(m1.roles[c.role], m1.spec, use, boards)
                if alt.bin_id is not None:
                    alt.note = f"not enough for {boards} boards in any bin; {alt.note}"
                    chosen[i] = alt
    with store.transaction() as session:
        if m.set_network is not None and "set_resistor" not in use:
            n = m.set_network
            for label in dict.fromkeys(net_labels):
                chosen.append(
                    Chosen(
                        "set_resistor",
                        matchreads.bin_id_for_label(session, label),
                        label,
                        net_labels.count(label),
                        n.verdict,
                        f"{n.verdict}: no single resistor fits; {n.note}",
                    )
                )
        if m.divider is not None:
            labels = [use[k] for k in DIVIDER_LINES if k in use]
            if m.divider.result is not None:
                labels += [*m.divider.result.top.parts, *m.divider.result.bottom.parts]
            ids = {}
            for lab in dict.fromkeys(labels):
                bid = matchreads.bin_id_for_label(session, lab)
                if bid is not None:
                    ids[lab] = bid
            chosen += _divider_lines(m.divider, use, ids)
        details = matchreads.bin_details(session, [c.bin_id for c in chosen if c.bin_id])
    lines = []
    for c in chosen:
        det = details.get(c.bin_id or -1)
        if det is None:
            lines.append(
                PickLine(
                    c.role,
                    None,
                    _role_part(c.role),
                    c.per_board,
                    boards,
                    verdict="none",
                    note=c.note,
                )
            )
            continue
        tol = det["tol_minus"]
        lines.append(
            PickLine(
                role=c.role,
                label=det["label"],
                description=describe_part(det["kind"], det["nominal"]),
                qty_per_board=c.per_board,
                boards=boards,
                on_hand=int(det["qty"]),
                reserved=int(det["qty_reserved"]),
                kit=det["kit"] or "",
                location=det["location"] or "",
                recognise=recognise(
                    det["kind"], det["nominal"], tol, det["marking"], det["package"]
                ),
                verdict=c.verdict,
                note=c.note,
            )
        )
    lines = _merge_same_bin(lines)
    sheet = PickSheet(
        plan=m.plan,
        topology=m.spec.topology,
        boards=boards,
        lines=tuple(lines),
        bring_up=bring_up(m, chosen, sense),
        summary=spec_summary(m.spec),
    )
    return sheet, chosen, m


def _merge_same_bin(lines: list[PickLine]) -> list[PickLine]:
    """One bin used by two lines (e.g. the same capacitor in and out) must be free for both."""

    need: dict[str, int] = {}
    for ln in lines:
        if ln.label:
            need[ln.label] = need.get(ln.label, 0) + ln.qty_total
    out = []
    for ln in lines:
        if ln.label and need[ln.label] > ln.qty_total:
            others = need[ln.label] - ln.qty_total
            out.append(
                replace(
                    ln,
                    reserved=ln.reserved + others,
                    note=(ln.note + f"; {others} more from this bin on another line").strip("; "),
                )
            )
        else:
            out.append(ln)
    return out


def _role_part(role: str) -> str:
    return {
        "inductor": "inductor",
        "output_capacitor": "capacitor",
        "input_capacitor": "capacitor",
        "catch_diode": "diode",
        "controller": "controller",
        "set_resistor": "resistor",
        DIVIDER_ROLE: "resistors",
    }.get(role, "part")


def bring_up(m: MatchResult, chosen: Sequence[Chosen], sense: float) -> BringUpSheet:
    """What to expect at first power-up with the chosen parts.

    Duty, ripple and peak at each full-load input corner come from
    :func:`kitbin.stage.operating.operate` with the chosen inductor's typical
    inductance and DCR (REFERENCES 1.1-1.3); the lowest load for CCM is the largest
    boundary over the corners; the output band is the divider's worst case; the
    temperature rise and the saturation margin are the matcher's worst-case figures.
    """
    from kitbin.errors import SpecError
    from kitbin.stage.operating import Parts, corner_points, operate

    spec = m.spec
    notes: list[str] = []
    ind = next((c for c in chosen if c.role == "inductor"), None)
    corners: list[CornerExpectation] = []
    rise = sat = None
    if ind is not None and ind.bin_id is not None:
        rm = m.roles["inductor"]
        k = int(np.flatnonzero(rm.bin_ids == ind.bin_id)[0])
        t_l = rm.verdicts.candidates.tables.get("inductance")
        t_d = rm.verdicts.candidates.tables.get("dcr")
        l_typ = float(t_l.typical()[k]) if t_l is not None else math.nan
        dcr_typ = float(t_d.typical()[k]) if t_d is not None else math.nan
        if math.isnan(dcr_typ):
            dcr_typ = 0.0
            notes.append("inductor DCR unknown: the expectations take 0 Ω")
        if l_typ > 0:
            try:
                for _name, vin, io in corner_points(spec):
                    if io != spec.iout_max:
                        continue
                    c = operate(spec, Parts(inductance=l_typ, dcr=dcr_typ), vin, io)
                    corners.append(
                        CornerExpectation(vin, c.duty, c.ripple_pp, c.i_peak, c.ccm_min_load)
                    )
            except SpecError as error:
                notes.append(f"operating points not computed: {error}")
        f = ind.figures
        r = f.get("rise", math.nan)
        rise = r if math.isfinite(r) else None
        pk, isat = f.get("i_peak", math.nan), f.get("isat_low", math.nan)
        if math.isfinite(pk) and pk > 0 and math.isfinite(isat):
            sat = isat / pk
        notes.append(
            "duty and ripple use the chosen inductor's typical L and DCR; the temperature "
            "rise and the saturation margin use the worst case of its evidence"
        )
    else:
        notes.append("no inductor chosen: operating points not computed")
    v_nom = v_lo = v_hi = None
    d = m.divider
    if d is not None and d.result is not None:
        v_nom, v_lo, v_hi = d.result.vout, d.result.vout_low, d.result.vout_high
    return BringUpSheet(
        vout_nominal=v_nom,
        vout_low=v_lo,
        vout_high=v_hi,
        corners=tuple(corners),
        sense_resistance=sense,
        temp_rise=rise,
        sat_margin=sat,
        notes=tuple(notes),
    )


# -- storing, taking, releasing --------------------------------------------------------


def _bin_ids(chosen: Sequence[Chosen]) -> dict[str, int]:
    """Chosen bin id by label (also by lower-case label: ``--use`` is case-insensitive)."""
    ids: dict[str, int] = {}
    for c in chosen:
        if c.label and c.bin_id is not None:
            ids.setdefault(c.label, c.bin_id)
            ids.setdefault(c.label.lower(), c.bin_id)
    return ids


def _line_bin(ids: Mapping[str, int], label: str | None) -> int | None:
    if not label:
        return None
    return ids.get(label, ids.get(label.lower()))


def _store_sheet(
    session: Any, sheet: PickSheet, ids: Mapping[str, int], plan_id: int, state: str
) -> int:
    """Add a pick list in ``state`` with one pick line per sheet line; return its id.

    A line without a bin (a role nothing in stock fits) is stored with ``bin_id``
    NULL. The sheet as ``kitbin pick --json`` shows it, with this id and state, is
    frozen in the list's ``snapshot``.
    """

    from kitbin.store.models import PickLine as PickLineRow
    from kitbin.store.models import PickList

    pl = PickList(plan_id=plan_id, boards=sheet.boards, state=state)
    session.add(pl)
    session.flush()
    pl.snapshot = sheet_dict(replace(sheet, pick_id=int(pl.id), state=state))
    for ln in sheet.lines:
        session.add(
            PickLineRow(
                pick_list_id=pl.id,
                role=ln.role,
                bin_id=_line_bin(ids, ln.label),
                qty_per_board=ln.qty_per_board,
                qty_total=ln.qty_total,
            )
        )
    session.flush()
    return int(pl.id)


def reserve_sheet(store: Store, sheet: PickSheet, chosen: Sequence[Chosen], plan_id: int) -> int:
    """Store a pick list in state ``reserved`` and hold its stock (one transaction).

    Raises
    ------
    StockError
        When a role has no bin or a bin has too few free parts; nothing is written.
    """
    from kitbin.store.stock import reserve

    missing = [ln for ln in sheet.lines if not ln.label]
    if missing:
        raise StockError(
            f"cannot reserve: nothing chosen for {', '.join(ln.role for ln in missing)}",
            "pick a bin with --use ROLE=LABEL",
        )
    short = sheet.shortfalls
    if short:
        what = ", ".join(f"{ln.label} short by {ln.shortfall}" for ln in short)
        raise StockError(f"cannot reserve: {what}")
    ids = _bin_ids(chosen)
    with store.transaction() as session:
        pick_id = _store_sheet(session, sheet, ids, plan_id, "reserved")
        # bins in id order, as every transaction touching several bins must (no deadlock)
        for ln in sorted(sheet.lines, key=lambda x: _line_bin(ids, x.label) or 0):
            reserve(session, _line_bin(ids, ln.label), ln.qty_total)
        return pick_id


def reserve(
    store: Store,
    name: str,
    *,
    boards: int = 1,
    use: Mapping[str, str] | None = None,
    sense: float = DEFAULT_SENSE,
) -> PickSheet:
    """Build the pick list of a plan, store it as ``reserved`` and hold its stock.

    The command line (``kitbin pick --reserve``) and the terminal UI both call this.

    Returns
    -------
    PickSheet
        In state ``reserved`` with its ``pick_id``; each line counts its own hold.

    Raises
    ------
    StockError
        When a role has no bin or too few parts are free; nothing is written.
    """

    sheet, chosen, m = build_sheet(store, name, boards=boards, use=dict(use or {}), sense=sense)
    pick_id = reserve_sheet(store, sheet, chosen, m.plan_id)
    lines = tuple(
        replace(ln, held_by_this=ln.qty_total, reserved=ln.reserved + ln.qty_total)
        for ln in sheet.lines
    )
    return replace(sheet, pick_id=pick_id, state="reserved", lines=lines)


def save_draft(
    store: Store,
    plan: str,
    *,
    boards: int = 1,
    use: Mapping[str, str] | None = None,
    sense: float = DEFAULT_SENSE,
) -> PickSheet:
    """Build the pick list of a plan as :func:`build_sheet` does and store it as a
    ``draft`` (one transaction). No stock is held.

    A draft may have shortfalls, and roles with no bin chosen (stored with no bin);
    both are refused later, when the draft is reserved with :func:`reserve_draft`.
    The command line (``kitbin pick --save``) and the terminal UI both call this.

    Returns
    -------
    PickSheet
        In state ``draft`` with its ``pick_id``.

    Raises
    ------
    NotFoundError, KitbinError
        As :func:`build_sheet`; nothing is written.
    """

    sheet, chosen, m = build_sheet(store, plan, boards=boards, use=dict(use or {}), sense=sense)
    with store.transaction() as session:
        pick_id = _store_sheet(session, sheet, _bin_ids(chosen), m.plan_id, "draft")
    return replace(sheet, pick_id=pick_id, state="draft")


def reserve_draft(store: Store, pick_id: int) -> dict[str, Any]:
    """Reserve a draft pick list: state ``reserved`` and its stock held, in one
    transaction.

    The quantities stored with the draft are reserved as they are (what was saved is
    what gets held; the chosen bins are not re-ranked); whether they are free is
    checked now. The state changes by one conditional UPDATE from ``draft``, then
    each bin's total over the list's lines is held, bins in id order.

    Returns
    -------
    dict
        ``id``, ``state`` (``reserved``), ``plan``, ``boards`` and ``held``: per bin
        ``bin``, ``reserved`` (held by this list), ``on_hand``, ``qty_reserved`` (all
        lists) and ``available`` (on hand − reserved).

    Raises
    ------
    NotFoundError
        No such pick list.
    StockError
        The list is not a draft (reserved already, perhaps by another bench a moment
        ago), a line has no bin, or a bin has too few free parts. Nothing is changed:
        the list stays a draft and no stock is held.
    """
    from kitbin.store.stock import reserve as hold

    with store.transaction() as session:
        pl = _load(session, pick_id)
        if pl.state != "draft":
            raise StockError(f"pick list {pick_id} is {pl.state}, not draft; cannot reserve it")
        empty = [ln.role for ln in pl.lines if ln.bin_id is None]
        if empty:
            raise StockError(
                f"cannot reserve pick list {pick_id}: nothing chosen for {', '.join(empty)}",
                f"save a new draft with --use ROLE=LABEL and cancel this one "
                f"with `kitbin picks cancel {pick_id}`",
            )
        if not matchreads.set_pick_state(session, pick_id, "draft", "reserved"):
            raise StockError(f"pick list {pick_id} was changed by someone else; not reserved")
        need: dict[int, int] = {}
        for ln in pl.lines:
            need[int(ln.bin_id)] = need.get(int(ln.bin_id), 0) + ln.qty_total
        held = []
        # bins in id order, as every transaction touching several bins must (no deadlock)
        for bin_id in sorted(need):
            try:
                res = hold(session, bin_id, need[bin_id])
            except StockError as error:  # rolls the whole transaction back
                raise StockError(
                    f"cannot reserve pick list {pick_id}: {error.msg}",
                    "it stays a draft; nothing was held",
                ) from None
            held.append(
                {
                    "bin": res.label,
                    "reserved": need[bin_id],
                    "on_hand": res.qty,
                    "qty_reserved": res.qty_reserved,
                    "available": res.qty - res.qty_reserved,
                }
            )
        return {
            "id": pick_id,
            "state": "reserved",
            "plan": pl.plan.name,
            "boards": pl.boards,
            "held": held,
        }


def check_writable(path: str | os.PathLike[str]) -> Path:
    """The target of ``--out`` as a Path, refused before anything is reserved.

    Raises
    ------
    KitbinError
        When the path is a folder or its folder does not exist or is not writable.
    """
    target = Path(path).expanduser()
    parent = target.parent if str(target.parent) else Path(".")
    if target.is_dir() or not parent.is_dir() or not os.access(parent, os.W_OK):
        raise KitbinError(f"cannot write {target}: expected a file in an existing folder")
    return target


def write_sheet(sheet: PickSheet, fmt: str, path: str | os.PathLike[str]) -> Path:
    """Write a pick sheet as ``text``, ``csv``, ``md`` or ``html`` to ``path``.

    Raises
    ------
    KitbinError
        For an unknown format or a file that cannot be written.
    """
    from kitbin.picking import RENDERERS, render

    if fmt not in RENDERERS:
        raise KitbinError(f"format {fmt!r}: expected one of {', '.join(RENDERERS)}")
    target = check_writable(path)
    try:
        target.write_text(render(sheet, fmt), encoding="utf-8")
    except OSError as error:
        raise KitbinError(f"cannot write {target}: {error.strerror}") from None
    return target


def _load(session: Any, pick_id: int) -> Any:
    pl = matchreads.pick_list(session, pick_id)
    if pl is None:
        raise NotFoundError(f"no pick list {pick_id}", "see `kitbin picks list`")
    return pl


def take(store: Store, pick_id: int) -> dict[str, Any]:
    """Take a reserved pick list's parts out of stock: state ``picked``, one stock move
    per line (with the pick list id), all in one transaction.

    A draft is refused: it holds no stock, so it is reserved first
    (:func:`reserve_draft`, which checks that its parts are free).

    Raises
    ------
    NotFoundError
        No such pick list.
    StockError
        The list is a draft, or not reserved (already picked or cancelled, perhaps by
        another bench a moment ago); nothing is changed.
    """
    from kitbin.store.stock import consume_reserved

    with store.transaction() as session:
        pl = _load(session, pick_id)
        if pl.state == "draft":
            raise StockError(
                f"pick list {pick_id} is a draft and holds no stock; cannot pick it",
                f"reserve it first with `kitbin picks reserve {pick_id}`",
            )
        if pl.state != "reserved":
            raise StockError(f"pick list {pick_id} is {pl.state}, not reserved; cannot pick it")
        if not matchreads.set_pick_state(session, pick_id, "reserved", "picked"):
            raise StockError(f"pick list {pick_id} was changed by someone else; not picked")
        moves = []
        # bins in id order, as every transaction touching several bins must (no deadlock)
        for ln in sorted(pl.lines, key=lambda x: (x.bin_id or 0, x.id)):
            if ln.bin_id is None:
                continue
            res = consume_reserved(
                session,
                ln.bin_id,
                ln.qty_total,
                f"pick list {pick_id}: {ln.role} for {pl.plan.name} × {pl.boards}",
                pick_list_id=pick_id,
            )
            moves.append({"bin": res.label, "delta": res.delta, "qty_after": res.qty})
        return {"id": pick_id, "state": "picked", "moves": moves}


def cancel(store: Store, pick_id: int) -> dict[str, Any]:
    """Cancel a draft or reserved pick list: state ``cancelled`` (one transaction).

    A reserved list's parts are released; a draft held none, so no stock changes.
    The result's ``was`` is the state the list had (``draft`` or ``reserved``).

    Raises
    ------
    NotFoundError
        No such pick list.
    StockError
        The list is already picked or cancelled (perhaps by another bench a moment
        ago); nothing is changed.
    """
    from kitbin.store.stock import release

    with store.transaction() as session:
        pl = _load(session, pick_id)
        was = pl.state
        if was not in ("draft", "reserved"):
            raise StockError(
                f"pick list {pick_id} is {was}, not draft or reserved; cannot cancel it"
            )
        if not matchreads.set_pick_state(session, pick_id, was, "cancelled"):
            raise StockError(f"pick list {pick_id} was changed by someone else; not cancelled")
        released = []
        if was == "reserved":
            for ln in sorted(pl.lines, key=lambda x: (x.bin_id or 0, x.id)):
                if ln.bin_id is None:
                    continue
                res = release(session, ln.bin_id, ln.qty_total)
                released.append(
                    {"bin": res.label, "released": ln.qty_total, "qty_reserved": res.qty_reserved}
                )
        return {"id": pick_id, "state": "cancelled", "was": was, "released": released}


def list_picks(store: Store, state: str | None = None) -> list[dict[str, Any]]:
    """Stored pick lists, newest first (keys: id, plan, boards, state, created_at,
    updated_at, lines: [{role, bin, total}])."""
    from kitbin.store.models import PICK_STATES

    if state is not None and state not in PICK_STATES:
        raise KitbinError(f"state {state!r}: expected one of {', '.join(PICK_STATES)}")
    with store.transaction() as session:
        rows = matchreads.pick_lists(session, [state] if state else None)
        labels = matchreads.bin_details(
            session, [ln.bin_id for pl in rows for ln in pl.lines if ln.bin_id]
        )
        return [
            {
                "id": pl.id,
                "plan": pl.plan.name,
                "boards": pl.boards,
                "state": pl.state,
                "created_at": pl.created_at.isoformat() if pl.created_at else None,
                "updated_at": pl.updated_at.isoformat() if pl.updated_at else None,
                "lines": [
                    {
                        "role": ln.role,
                        "bin": labels.get(ln.bin_id, {}).get("label") if ln.bin_id else None,
                        "total": ln.qty_total,
                    }
                    for ln in pl.lines
                ],
            }
            for pl in rows
        ]


__all__ = [
    "DEFAULT_SENSE",
    "Chosen",
    "bring_up",
    "build_sheet",
    "cancel",
    "list_picks",
    "parse_use",
    "reserve",
    "reserve_draft",
    "reserve_sheet",
    "save_draft",
    "take",
]


# -- demo workshop: a plan to walk, and the tour step -----------------------------------

#: The invented demo plan: a 9-13.2 V to 5 V, 1 A buck on the demo's set-resistor
#: controller U-02 (its properties fill vref, fsw, the current-limit gain ...).
DEMO_PLAN = "demo-5v"
DEMO_PLAN_FIELDS: dict[str, Any] = {
    "topology": "buck",
    "vin_min": 9.0,
    "vin_max": 13.2,
    "vout": 5.0,
    "iout_max": 1.0,
    "fsw": 1.2e6,
}


def demo_build_plan(store: Store, workshop: Any = None, rng: Any = None) -> None:
    """Demo build step: save the invented plan ``demo-5v`` unless one exists.

    Signature of :data:`kitbin.services.demo.BUILD_STEPS` entries.
    """
    from kitbin.errors import NotFoundError as _NotFound
    from kitbin.services import plans

    with store.transaction() as session:
        if matchreads.plan_by_name(session, DEMO_PLAN) is not None:
            return
    try:
        plans.new_plan(
            store,
            DEMO_PLAN,
            dict(DEMO_PLAN_FIELDS),
            controller="U-02",
            notes="invented demo plan: a 5 V, 1 A bench supply from a 12 V adaptor",
        )
    except _NotFound:  # a workshop without the demo controller: plan without it
        plans.new_plan(store, DEMO_PLAN, {**DEMO_PLAN_FIELDS, "vref": 1.25})


def tour_match_and_pick(store: Store) -> Any:
    """Demo tour step: the plan, the ranked inductors with reasons, the divider, and a
    pick list with its bring-up sheet. Returns a ``TourSection`` (or None without the
    plan). Signature of :data:`kitbin.services.demo.TOUR_STEPS` entries."""
    from kitbin.services.demo import TourSection

    demo_build_plan(store)
    try:
        m = match_plan(store, DEMO_PLAN, top=3)
        sheet, _chosen, _m = build_sheet(store, DEMO_PLAN, boards=2)
    except KitbinError as error:
        return TourSection("Plan, match and pick", [f"not available: {error}"])
    lines = [f"kitbin plan show {DEMO_PLAN}: {spec_summary(m.spec)}"]
    lines.append(f"kitbin match {DEMO_PLAN} --role inductor --top 3:")
    ind = m.roles.get("inductor")
    if ind is not None:
        counts = ", ".join(f"{v} {k}" for k, v in ind.counts.items())
        lines.append(f"  {len(ind.verdicts.candidates)} inductor bins judged: {counts}")
        for row in ind.rows:
            lines.append(f"  {row.rank}. {row.label} {row.verdict}: {row.summary}")
    if m.divider is not None:
        lines.append(f"feedback divider ({m.divider.verdict}): {m.divider.note}")
    if m.set_network is not None:
        lines.append(f"set resistor ({m.set_network.verdict}): {m.set_network.note}")
    lines.append(f"kitbin pick {DEMO_PLAN} --boards 2:")
    for ln in sheet.lines:
        short = f", SHORT by {ln.shortfall}" if ln.shortfall else ""
        where = f" ({ln.location})" if ln.location else ""
        lines.append(
            f"  {ln.role}: {ln.label or '—'}{where} × {ln.qty_total}{short} [{ln.verdict}]"
        )
    if sheet.bring_up is not None:
        from kitbin.picking import bring_up_rows

        lines.append("bring-up sheet:")
        lines += [f"  {k}: {v}" for k, v in bring_up_rows(sheet.bring_up) if k != "note"]
        lines.append("  safety: " + sheet.bring_up.cautions[-1])
    lines.append(
        f"Try: kitbin pick {DEMO_PLAN} --boards 2 --format html --out pick.html "
        "(add --reserve to hold the parts)"
    )
    return TourSection("Plan, match and pick (invented demo plan)", lines)

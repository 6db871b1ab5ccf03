"""Matching a saved plan against the stock: load evidence in bulk, judge, rank.

Used by ``kitbin match``, ``kitbin pick`` and the terminal UI. Evidence is loaded
with a few set-based queries (bins of the roles' kinds, readings and properties of
only the quantities the demands read, stored L(i) curves), turned into numpy
evidence tables, and judged for every candidate at once
(:mod:`kitbin.match.verdicts`). Only the rows shown are turned into objects.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from kitbin.errors import KitbinError, NotFoundError, SpecError
from kitbin.match.divider import DividerResult, Leg, StockArrays, best_divider
from kitbin.match.evidence import GRADES, grade_of_source
from kitbin.match.evidence_table import EvidenceTable, evidence_table
from kitbin.match.ranking import RankedRow, order, rows_at, scores, status_counts
from kitbin.match.verdicts import (
    Candidates,
    Check,
    RoleVerdicts,
    generic_verdicts,
    inductor_verdicts,
    kinds_for,
    quantities_for,
)
from kitbin.quantities import NOMINAL_QUANTITY, QUANTITIES
from kitbin.store import matchreads as bulk

if TYPE_CHECKING:
    from sqlalchemy.orm import Session

    from kitbin.stage.demands import Demand
    from kitbin.stage.spec import Spec
    from kitbin.store import Store

#: Roles judged bin by bin (the feedback divider is a search over pairs instead).
DIVIDER_ROLE = "feedback_divider"


@dataclass(frozen=True)
class RawEvidence:
    """What a :class:`Stock`'s evidence tables are built from (SI values).

    Per reading and per property: the bin's row in the stock, the index of its
    quantity in ``quantities`` (``names`` for properties, which adds the ``<q>_tol``
    names), the value, and the lower-bound flag or the grade code of the source.
    Per bin: the nominal, its tolerances, and which quantity the nominal describes
    (its index in ``quantities``, -1 for none of them).
    """

    quantities: tuple[str, ...]
    names: tuple[str, ...]
    reading_row: np.ndarray
    reading_quantity: np.ndarray
    reading_value: np.ndarray
    reading_bound: np.ndarray
    prop_row: np.ndarray
    prop_name: np.ndarray
    prop_value: np.ndarray
    prop_grade: np.ndarray
    nominal: np.ndarray
    tol_minus: np.ndarray
    tol_plus: np.ndarray
    nominal_quantity: np.ndarray

    @functools.cached_property
    def _readings_of(self) -> dict[int, np.ndarray]:
        """Reading indices by quantity index, in reading order."""
        return _indices_by_code(self.reading_quantity)

    @functools.cached_property
    def _properties_of(self) -> dict[int, np.ndarray]:
        """Property indices by name index, in property-id order."""
        return _indices_by_code(self.prop_name)

    def tables(self, rows: np.ndarray, quantities: Iterable[str]) -> dict[str, EvidenceTable]:
        """Evidence tables of ``quantities`` for the bins at ``rows`` (ascending), row
        ``k`` of each table being bin ``rows[k]``."""
        where = np.full(self.nominal.size, -1, dtype=np.int64)
        where[rows] = np.arange(rows.size)
        none = np.empty(0, dtype=np.int64)

        def of(index: dict[int, np.ndarray], code: int, row_of: np.ndarray):
            """(indices, rows in the table) of the entries of ``code`` on these bins."""
            at = index.get(code, none)
            table_row = where[row_of[at]]
            keep = table_row >= 0
            return at[keep], table_row[keep]

        nom, tm, tp = self.nominal[rows], self.tol_minus[rows], self.tol_plus[rows]
        nominal_q = self.nominal_quantity[rows]
        out: dict[str, EvidenceTable] = {}
        for q in quantities:
            if q not in self.quantities:
                continue
            qi = self.quantities.index(q)
            r_idx, r_row = of(self._readings_of, qi, self.reading_row)
            p_idx, p_row = of(self._properties_of, qi, self.prop_row)
            prop_tol = np.zeros(p_idx.size)
            tol_name = f"{q}_tol"
            if tol_name in self.names and p_idx.size:
                t_idx, t_row = of(self._properties_of, self.names.index(tol_name), self.prop_row)
                if t_idx.size:
                    tol_by_row = np.zeros(rows.size)
                    tol_by_row[t_row] = self.prop_value[t_idx]
                    prop_tol = tol_by_row[p_row]
            has_nominal = nominal_q == qi
            out[q] = evidence_table(
                q,
                rows.size,
                reading_row=r_row,
                reading_value=self.reading_value[r_idx],
                reading_bound=self.reading_bound[r_idx],
                nominal=np.where(has_nominal, nom, np.nan) if has_nominal.any() else None,
                tol_minus=tm,
                tol_plus=tp,
                prop_row=p_row,
                prop_value=self.prop_value[p_idx],
                prop_grade=self.prop_grade[p_idx],
                prop_tol=prop_tol,
            )
        return out


def _indices_by_code(codes: np.ndarray) -> dict[int, np.ndarray]:
    """Positions of each value of a small-integer array, each in ascending order."""
    if not codes.size:
        return {}
    order = np.argsort(codes, kind="stable")
    values, starts = np.unique(codes[order], return_index=True)
    ends = [*starts[1:], order.size]
    return {int(v): order[s:e] for v, s, e in zip(values, starts, ends, strict=True)}


@dataclass
class Stock:
    """The bins of some kinds (rows in id order) and their evidence.

    Evidence tables are built for the rows a role asks for (:meth:`subset`), so a
    quantity that only one kind has is not tabulated for every other bin.
    """

    ids: np.ndarray
    labels: np.ndarray
    kinds: np.ndarray
    nominal: np.ndarray
    available: np.ndarray
    raw: RawEvidence
    curves: dict[int, tuple[np.ndarray, np.ndarray]] = field(default_factory=dict)

    @functools.cached_property
    def tables(self) -> dict[str, EvidenceTable]:
        """Evidence tables of every loaded quantity over every row."""
        return self.raw.tables(np.arange(self.ids.size), self.raw.quantities)

    def subset(
        self, kinds: Sequence[str], quantities: Iterable[str] | None = None
    ) -> tuple[np.ndarray, Candidates]:
        """Rows of the given kinds, as :class:`Candidates` (and their row indices), with
        the tables of ``quantities`` only (all loaded quantities when None)."""
        rows = np.flatnonzero(np.isin(self.kinds, list(kinds)))
        tables = self.raw.tables(rows, self.raw.quantities if quantities is None else quantities)
        if rows.size == self.ids.size:
            return rows, Candidates(self.labels, self.available, tables, self.curves)
        where = np.searchsorted(rows, np.fromiter(self.curves, dtype=np.int64))
        curves = {
            int(w): c
            for w, (r, c) in zip(where, self.curves.items(), strict=True)
            if w < rows.size and rows[w] == r
        }
        return rows, Candidates(self.labels[rows], self.available[rows], tables, curves)


def _grade_code(source: str) -> int:
    """The evidence grade of a property's source text as its index in GRADES."""
    return GRADES.index(grade_of_source(source))


_EMPTY_READINGS = np.empty(0, dtype=bulk.READING_FIELDS)
_EMPTY_PROPERTIES = np.empty(0, dtype=bulk.PROPERTY_FIELDS)


def load_stock(session: Session, kinds: Iterable[str], quantities: Iterable[str]) -> Stock:
    """Bins of ``kinds`` with the evidence of ``quantities`` (three or four queries).

    Readings give ``measured``; the bin's nominal and tolerance give ``marked`` for
    the quantity its marking describes (inductance, resistance, capacitance);
    properties count by their source (:func:`kitbin.match.evidence.grade_of_source`),
    with a property ``<name>_tol`` as the tolerance of ``<name>``.
    """
    kinds = tuple(dict.fromkeys(kinds))
    quantities = tuple(q for q in dict.fromkeys(quantities) if q in QUANTITIES)
    bins = bulk.candidate_bins(session, kinds)
    n = bins.size
    ids_a = bins["id"]
    kind_a = np.asarray(kinds, dtype=object)[bins["kind"]] if n else np.empty(0, dtype=object)

    reads = bulk.reading_rows(session, quantities) if n and quantities else _EMPTY_READINGS
    r_row, r_keep = _rows_of(ids_a, reads["bin_id"])
    reads = reads[r_keep]

    names = quantities + tuple(f"{q}_tol" for q in quantities if f"{q}_tol" in QUANTITIES)
    props = bulk.property_rows(session, names, _grade_code) if n else _EMPTY_PROPERTIES
    p_row, p_keep = _rows_of(ids_a, props["bin_id"])
    props = props[p_keep]
    p_grade = props["source"]

    marked = [NOMINAL_QUANTITY.get(k) for k in kinds]
    nominal_q = np.array([quantities.index(q) if q in quantities else -1 for q in marked], np.int8)
    raw = RawEvidence(
        quantities=quantities,
        names=names,
        reading_row=r_row,
        reading_quantity=reads["quantity"],
        reading_value=reads["value"],
        reading_bound=reads["lower_bound"],
        prop_row=p_row,
        prop_name=props["name"],
        prop_value=props["value"],
        prop_grade=p_grade,
        nominal=bins["nominal"],
        tol_minus=bins["tol_minus"],
        tol_plus=bins["tol_plus"],
        nominal_quantity=nominal_q[bins["kind"]] if n else np.empty(0, dtype=np.int8),
    )
    curves: dict[int, tuple[np.ndarray, np.ndarray]] = {}
    if "inductor" in kinds and n:
        for bin_id, curve in bulk.curve_rows(session, ["inductor"]):
            parsed = _curve(curve)
            if parsed is not None:
                curves[int(np.searchsorted(ids_a, bin_id))] = parsed
    return Stock(ids_a, bins["label"], kind_a, bins["nominal"], bins["available"], raw, curves)


def _rows_of(ids: np.ndarray, bin_ids: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Row index in ``ids`` (sorted) of each bin id, and which ids are among them."""
    b = bin_ids.astype(np.int64)
    pos = np.searchsorted(ids, b)
    pos_c = np.clip(pos, 0, max(ids.size - 1, 0))
    keep = (ids.size > 0) & (ids[pos_c] == b) if ids.size else np.zeros(b.size, dtype=bool)
    return pos_c[keep], keep


def _curve(data: Any) -> tuple[np.ndarray, np.ndarray] | None:
    """(currents, inductances) from a stored curve ({"i_A", "L_H"} or {"i", "l"})."""
    if not isinstance(data, dict):
        return None
    for ki, kl in (("i_A", "L_H"), ("i", "l"), ("current", "inductance")):
        if ki in data and kl in data:
            i = np.asarray(data[ki], dtype=float)
            lv = np.asarray(data[kl], dtype=float)
            ok = np.isfinite(i) & np.isfinite(lv) & (lv > 0)
            if ok.sum() >= 2 and i.shape == lv.shape:
                return i[ok], lv[ok]
    return None


# -- plans ------------------------------------------------------------------------------


def load_plan(session: Session, name: str) -> tuple[int, str, Spec]:
    """(id, name, spec) of a saved plan.

    Raises
    ------
    NotFoundError
        When there is no plan of that name.
    """
    from kitbin.services.plans import spec_of

    plan = bulk.plan_by_name(session, name)
    if plan is None:
        raise NotFoundError(f"no plan named {name!r}", "see `kitbin plan list`")
    try:
        spec = spec_of(dict(plan.spec or {}))
    except SpecError as error:
        raise SpecError(f"plan {plan.name!r} is not a valid spec: {error}") from None
    return plan.id, plan.name, spec


# -- results ----------------------------------------------------------------------------


@dataclass
class RoleMatch:
    """Ranked candidates of one role."""

    role: str
    kinds: tuple[str, ...]
    rows: list[RankedRow]
    counts: dict[str, int]
    notes: tuple[str, ...]
    verdicts: RoleVerdicts
    bin_ids: np.ndarray

    @property
    def best(self) -> RankedRow | None:
        """The top row, or None when the role has no candidates."""
        return self.rows[0] if self.rows else None


@dataclass
class DividerMatch:
    """The feedback divider chosen from stock, with its checks."""

    result: DividerResult | None
    checks: tuple[Check, ...]
    verdict: str
    note: str
    vref: float | None
    stock: StockArrays | None = None
    #: The (low, high) range the bottom leg was searched in, Ω (the plan's rbottom).
    rbottom_range: list[float] | None = None


@dataclass
class MatchResult:
    """Everything ``kitbin match`` shows."""

    plan_id: int
    plan: str
    spec: Spec
    roles: dict[str, RoleMatch]
    divider: DividerMatch | None
    notes: tuple[str, ...] = ()
    set_network: NetworkMatch | None = None


@dataclass
class NetworkMatch:
    """A set resistor made of two stocked resistors, when no single one passes."""

    leg: Leg
    checks: tuple[Check, ...]
    verdict: str
    note: str


def match_plan(
    store: Store,
    plan: str,
    *,
    role: str | None = None,
    top: int | None = 5,
    boards: int = 1,
) -> MatchResult:
    """Rank the stock for every role of a plan (or one role).

    Parameters
    ----------
    store
        The open inventory.
    plan
        Plan name.
    role
        Only this role (``inductor``, ``output_capacitor``, ``feedback_divider`` ...).
    top
        Rows to keep per role (None: all).
    boards
        Boards to be built: stock must hold this many parts per board.

    Raises
    ------
    NotFoundError
        Unknown plan or role.
    """
    from kitbin.stage.demands import demands

    if boards < 1:
        raise KitbinError(f"boards {boards}: expected 1 or more")
    if top is not None and top < 1:
        raise KitbinError(f"--top {top}: expected 1 or more")
    with store.transaction() as session:
        plan_id, plan_name, spec = load_plan(session, plan)
        all_demands = demands(spec)
        wanted = [d for d in all_demands if role is None or d.role == role]
        if role is not None and not wanted:
            roles = ", ".join(d.role for d in all_demands)
            raise NotFoundError(f"plan {plan_name!r} has no role {role!r}", f"roles: {roles}")
        kinds: list[str] = []
        quantities: list[str] = []
        for d in wanted:
            kinds += kinds_for(d.role, d)
            quantities += quantities_for(d.role, d, spec)
            if d.role == DIVIDER_ROLE:
                quantities.append("resistance")
        stock = load_stock(session, kinds, quantities)
        roles: dict[str, RoleMatch] = {}
        divider = None
        for d in wanted:
            if d.role == DIVIDER_ROLE:
                _, cands = stock.subset(kinds_for(d.role, d), ["resistance"])
                divider = choose_divider(spec, d, cands, boards=boards)
                continue
            # judged inside the transaction: the specimen counts of the rows shown are
            # read from the same snapshot as the evidence
            roles[d.role] = judge_role(
                spec, d, stock, top=top, boards=boards, specimens=SpecimenReader(session)
            )
    network = None
    rm = roles.get("set_resistor")
    if rm is not None and (rm.best is None or rm.best.verdict != "verified"):
        _, cands = stock.subset(rm.kinds, ["resistance"])
        d = next(x for x in wanted if x.role == "set_resistor")
        network = choose_set_network(d, cands, boards=boards)
        order = ("verified", "unverified", "fails")
        single = order.index(rm.best.verdict) if rm.best is not None else 3
        if network is not None and order.index(network.verdict) >= single:
            network = None  # the best single resistor is as good: keep one part
    return MatchResult(plan_id, plan_name, spec, roles, divider, set_network=network)


def choose_set_network(demand: Demand, cands: Candidates, *, boards: int) -> NetworkMatch | None:
    """Two stocked resistors in series or parallel whose worst case fits the set-resistor
    window (:func:`kitbin.match.divider.best_leg_within`)."""
    from kitbin.match.divider import best_leg_within
    from kitbin.match.evidence import weakest
    from kitbin.match.ranking import VERDICTS

    lo = max((c.limit for c in demand.constraints if c.op == ">="), default=None)
    hi = min((c.limit for c in demand.constraints if c.op == "<="), default=None)
    if lo is None or hi is None or not 0 < lo <= hi:
        return None
    stock = resistor_stock(cands, boards)
    leg = best_leg_within(stock, lo, hi, boards=boards)
    if leg is None:
        return None
    grades = dict(zip(stock.labels, stock.grade, strict=True))
    grade = weakest(grades.get(p, "unknown") for p in leg.parts)
    checks = []
    for c in demand.constraints:
        have = leg.low if c.op == ">=" else leg.high
        ok = c.holds(have)
        side = " (low end)" if c.op == ">=" else " (high end)"
        checks.append(
            Check(
                c.quantity + side,
                c.quantity,
                c.op,
                c.limit,
                have,
                grade,
                "pass" if ok else "fail",
                c.margin(have),
                c.reason,
                c.source,
            )
        )
    verdict = VERDICTS[0] if all(ch.status == "pass" for ch in checks) else VERDICTS[2]
    from kitbin.units import format_quantity

    def r(v: float) -> str:
        return format_quantity(v, "resistance", 4)

    note = (
        f"{leg.describe()} ({leg.connection}) = {r(leg.value)}, worst case "
        f"{r(leg.low)} … {r(leg.high)}; window {r(lo)} … {r(hi)}"
    )
    return NetworkMatch(leg, tuple(checks), verdict, note)


class SpecimenReader:
    """Reads how many specimens stand behind the readings of the rows a role shows.

    Counting distinct specimens for every candidate would add a column to the
    matcher's largest read (measured: +0.05 s on 300,000 readings) for a number only
    the shown rows print ("4 readings on 2 specimens"), so it is read for those rows
    alone, in the same transaction as the evidence.
    """

    def __init__(self, session: Session) -> None:
        self.session = session

    def __call__(
        self, bin_ids: np.ndarray, rows: np.ndarray, quantities: Iterable[str]
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """``quantity -> (rows, counts)`` for the candidates at ``rows``, whose bin ids
        are ``bin_ids[rows]``."""
        rows = np.asarray(rows, dtype=np.int64)
        if not rows.size:
            return {}
        row_of = {int(b): int(r) for b, r in zip(bin_ids[rows], rows, strict=True)}
        found = bulk.specimen_counts(self.session, list(quantities), row_of)
        by_q: dict[str, tuple[list[int], list[int]]] = {}
        for bin_id, q, count in found:
            r, n = by_q.setdefault(q, ([], []))
            r.append(row_of[bin_id])
            n.append(count)
        return {q: (np.array(r, dtype=np.int64), np.array(n)) for q, (r, n) in by_q.items()}


def judge_role(
    spec: Spec,
    demand: Demand,
    stock: Stock,
    *,
    top: int | None,
    boards: int,
    specimens: SpecimenReader | None = None,
) -> RoleMatch:
    """Judge and rank one role's candidates (``specimens``: reads the specimen counts
    of the rows kept, for their evidence lines)."""
    kinds = kinds_for(demand.role, demand)
    wanted_q = quantities_for(demand.role, demand, spec)
    rows_idx, cands = stock.subset(kinds, wanted_q)
    if demand.role == "inductor":
        rv = inductor_verdicts(spec, demand, cands, per_board=boards)
    else:
        rv = generic_verdicts(demand, cands, per_board=boards)
    score = scores(rv, spec, boards)
    shown = order(rv, score)
    if top is not None:
        shown = shown[:top]
    if specimens is not None:
        rv = rv.with_specimens(specimens(stock.ids[rows_idx], shown, wanted_q))
    ranked = rows_at(rv, spec, shown, score)
    return RoleMatch(
        demand.role,
        kinds,
        ranked,
        status_counts(rv),
        demand.notes,
        rv,
        stock.ids[rows_idx],
    )


def choose_divider(spec: Spec, demand: Demand, cands: Candidates, *, boards: int) -> DividerMatch:
    """The best stocked feedback divider for the plan, single resistors first.

    A divider of two single resistors is taken when its worst-case band meets the
    demand; otherwise legs of two resistors in series or in parallel are searched
    too and the better of the two is taken.
    """
    from kitbin.match.ranking import VERDICTS
    from kitbin.stage.demands import divider_window

    if spec.vref is None:
        note = "controller reference voltage unknown: no divider searched (give the plan a vref)"
        rbot_range = [spec.rbottom_min, spec.rbottom_max]
        return DividerMatch(None, (), "fails", note, None, rbottom_range=rbot_range)
    stock = resistor_stock(cands, boards)
    tol = spec.vref_tol or 0.0
    ifb = spec.ifb or 0.0
    rbot = (spec.rbottom_min, spec.rbottom_max)
    kw = {"vref_tol": tol, "ifb": ifb, "boards": boards, "rbot_range": rbot}
    lo_ratio, hi_ratio, _share = divider_window(spec)
    best = best_divider(stock, spec.vref, spec.vout, **kw)
    checks = _divider_checks(demand, best, stock)
    if best is None or any(c.status == "fail" for c in checks):
        combo = best_divider(stock, spec.vref, spec.vout, connections=CONNECTIONS_ALL, **kw)
        combo_checks = _divider_checks(demand, combo, stock)
        if combo is not None and _better(combo_checks, checks, combo, best):
            best, checks = combo, combo_checks
    if best is None:
        from kitbin.units import format_quantity

        span = " … ".join(format_quantity(v, "resistance") for v in rbot)
        note = f"no resistor or pair of resistors in stock for the bottom leg in {span}"
        return DividerMatch(None, (), "fails", note, spec.vref, rbottom_range=list(rbot))
    group = (
        2
        if any(c.status == "fail" for c in checks)
        else (1 if any(c.status == "unverified" for c in checks) else 0)
    )
    note = (
        f"Rtop {best.top.describe()}, Rbot {best.bottom.describe()}: "
        f"{best.vout:.4g} V ({best.error_pct:+.2f} %), worst case "
        f"{best.vout_low:.4g} … {best.vout_high:.4g} V; allowed ratio "
        f"{lo_ratio:.4g} … {hi_ratio:.4g}"
    )
    grades = dict(zip(stock.labels, stock.grade, strict=True))
    marked = [p for p in (*best.top.parts, *best.bottom.parts) if grades.get(p) != "measured"]
    if group == 2 and marked and lo_ratio <= best.top.value / best.bottom.value <= hi_ratio:
        note += (
            "; the nominal ratio fits but the marked tolerance does not: measure "
            + ", ".join(dict.fromkeys(marked))
            + " to narrow the band"
        )
    return DividerMatch(best, checks, VERDICTS[group], note, spec.vref, stock, list(rbot))


def resistor_stock(cands: Candidates, boards: int) -> StockArrays:
    """Resistor bins usable in a divider: known resistance, enough free parts.

    Value: the mean of the readings when measured, else the nominal; interval: the
    evidence interval (worst-case ends).
    """
    t = cands.tables.get("resistance")
    if t is None:
        return StockArrays([], np.empty(0), np.empty(0), np.empty(0), np.empty(0, np.int64), [])
    typ = t.typical()
    ok = (
        (t.grade != GRADES.index("unknown"))
        & (t.low > 0)
        & np.isfinite(t.high)
        & (typ > 0)
        & (cands.available >= boards)
    )
    rows = np.flatnonzero(ok)
    labels = np.asarray(cands.labels, dtype=object)[rows]
    return StockArrays(
        labels=labels.tolist(),
        value=typ[rows],
        low=t.low[rows],
        high=t.high[rows],
        available=cands.available[rows],
        grade=[GRADES[g] for g in t.grade[rows].tolist()],
    )


CONNECTIONS_ALL = ("single", "series", "parallel")


def _better(
    a: tuple[Check, ...], b: tuple[Check, ...], ra: DividerResult, rb: DividerResult | None
) -> bool:
    if rb is None:
        return True
    fa = sum(c.status == "fail" for c in a)
    fb = sum(c.status == "fail" for c in b)
    if fa != fb:
        return fa < fb
    return _band_dev(ra) < _band_dev(rb)


def _band_dev(r: DividerResult) -> float:
    """Largest worst-case deviation of the output from the target (fraction)."""
    return max(abs(r.vout_low / r.target - 1), abs(r.vout_high / r.target - 1))


def _divider_checks(
    demand: Demand, res: DividerResult | None, stock: StockArrays | None = None
) -> tuple[Check, ...]:
    """The divider demand's constraints judged on the chosen legs' worst-case ends."""
    from kitbin.match.evidence import weakest

    if res is None:
        return ()
    by_label = dict(zip(stock.labels, stock.grade, strict=True)) if stock is not None else {}
    grade = weakest(by_label.get(p, "unknown") for p in (*res.top.parts, *res.bottom.parts))
    out = []
    ratio_lo = res.top.low / res.bottom.high
    ratio_hi = res.top.high / res.bottom.low
    total = res.top.high + res.bottom.high
    for c in demand.constraints:
        if c.quantity == "divider_ratio":
            have = ratio_lo if c.op == ">=" else ratio_hi
        elif c.quantity == "divider_sum":
            have = total
        else:
            continue
        ok = have >= c.limit if c.op == ">=" else have <= c.limit
        margin = c.margin(have)
        side = " (low end)" if c.op == ">=" else " (high end)"
        if c.quantity == "divider_sum":
            side = ""
        out.append(
            Check(
                c.quantity + side,
                c.quantity,
                c.op,
                c.limit,
                have,
                grade,
                "pass" if ok else "fail",
                margin,
                c.reason,
                c.source,
            )
        )
    return tuple(out)


# -- JSON -------------------------------------------------------------------------------


def _num(value: float | None) -> float | None:
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def check_dict(c: Check) -> dict[str, Any]:
    """A check as JSON: name, quantity, op, required, have, grade, status, margin, reason."""
    return {
        "name": c.name,
        "quantity": c.quantity,
        "op": c.op,
        "required": _num(c.required),
        "have": _num(c.have),
        "grade": c.grade,
        "status": c.status,
        "margin": _num(c.margin),
        "reason": c.reason,
        "evidence": c.evidence,
    }


def row_dict(r: RankedRow) -> dict[str, Any]:
    """A ranked row as JSON (keys: bin, rank, verdict, score, summary, checks, notes)."""
    return {
        "bin": r.label,
        "rank": r.rank,
        "verdict": r.verdict,
        "score": round(r.score, 3),
        "summary": r.summary,
        "checks": [check_dict(c) for c in r.checks],
        "notes": list(r.notes),
        "figures": {k: _num(v) for k, v in r.figures},
    }


def divider_dict(d: DividerMatch) -> dict[str, Any]:
    """The divider as JSON (rtop, rbottom, vout_V, error_pct, vout_band_V, ...)."""
    if d.result is None:
        return {
            "rtop": None,
            "rbottom": None,
            "vout_V": None,
            "error_pct": None,
            "vout_band_V": None,
            "rbottom_range_ohm": d.rbottom_range,
            "verdict": d.verdict,
            "note": d.note,
            "checks": [],
        }
    r = d.result
    return {
        "rtop": r.top.describe(),
        "rbottom": r.bottom.describe(),
        "rtop_ohm": r.top.value,
        "rbottom_ohm": r.bottom.value,
        "vout_V": r.vout,
        "error_pct": r.error_pct,
        "vout_band_V": [r.vout_low, r.vout_high],
        "vref_V": d.vref,
        "rbottom_range_ohm": d.rbottom_range,
        "verdict": d.verdict,
        "note": d.note,
        "checks": [check_dict(c) for c in d.checks],
    }


def match_dict(m: MatchResult) -> dict[str, Any]:
    """The documented ``kitbin match --json`` shape."""
    return {
        "plan": m.plan,
        "roles": {name: [row_dict(r) for r in rm.rows] for name, rm in m.roles.items()},
        "counts": {name: rm.counts for name, rm in m.roles.items()},
        "divider": divider_dict(m.divider) if m.divider is not None else None,
        "set_resistor_network": network_dict(m.set_network) if m.set_network else None,
    }


def network_dict(n: NetworkMatch) -> dict[str, Any]:
    """A two-resistor set resistor as JSON (parts, connection, value_ohm, band_ohm, ...)."""
    return {
        "parts": list(n.leg.parts),
        "connection": n.leg.connection,
        "value_ohm": n.leg.value,
        "band_ohm": [n.leg.low, n.leg.high],
        "verdict": n.verdict,
        "note": n.note,
        "checks": [check_dict(c) for c in n.checks],
    }


__all__ = [
    "DividerMatch",
    "MatchResult",
    "RoleMatch",
    "Stock",
    "check_dict",
    "choose_divider",
    "divider_dict",
    "judge_role",
    "load_plan",
    "load_stock",
    "match_dict",
    "match_plan",
    "row_dict",
]

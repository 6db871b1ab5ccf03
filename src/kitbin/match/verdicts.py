"""Verdicts: every stocked bin of a role judged against the plan's demand.

For each role and each candidate bin, every constraint of the demand is judged on
the worst-case end of the bin's evidence (:mod:`kitbin.match.evidence_table`):
``pass``, ``fail`` or ``unverified``, with the required and available value, the
margin and the evidence grade behind it.

The inductor is special: a candidate's own L sets its ripple and peak, so the Isat
it needs is computed per candidate (:func:`kitbin.match.inductor.worst_full_load`,
the array twin of :func:`kitbin.stage.demands.inductor_duty`). Where a bin has a
measured L(i) curve, ``inductor_duty`` steps the current through it
(saturation-aware) and that peak decides; an inductor whose L collapses below its
peak shows it as a larger peak, or as runaway.

Everything is arrays over the candidates; :meth:`CheckMatrix.checks` turns one row
into :class:`Check` objects with sentences for display.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace

import numpy as np

from kitbin.match.evidence import GRADES
from kitbin.match.evidence_table import (
    FAIL,
    PASS,
    STATUSES,
    UNKNOWN,
    UNVERIFIED,
    EvidenceTable,
)
from kitbin.match.inductor import InductorArrays, predicted_rise, worst_full_load
from kitbin.quantities import QUANTITIES
from kitbin.stage.demands import Constraint, Demand, inductor_duty
from kitbin.stage.spec import Spec
from kitbin.units import format_quantity

_OPS = {">=": "≥", "<=": "≤"}

#: Grade names shown for checks that are not evidence of a part's value.
GRADE_NAMES: tuple[str, ...] = (*GRADES, "counted")
COUNTED = len(GRADES)

#: Which kinds of part can fill each role.
ROLE_KINDS: dict[str, tuple[str, ...]] = {
    "inductor": ("inductor",),
    "output_capacitor": ("capacitor",),
    "input_capacitor": ("capacitor",),
    "catch_diode": ("diode",),
    "feedback_divider": ("resistor",),
    "set_resistor": ("resistor",),
    "controller": ("controller",),
}

#: Kinds for an extra fixed part, guessed from the quantity it constrains.
QUANTITY_KINDS: dict[str, tuple[str, ...]] = {
    "inductance": ("inductor",),
    "dcr": ("inductor",),
    "resistance": ("resistor",),
    "capacitance": ("capacitor",),
    "esr": ("capacitor",),
    "rated_voltage": ("capacitor", "diode", "resistor", "other"),
    "vrrm": ("diode",),
    "vf": ("diode",),
    "if_avg": ("diode",),
}

#: Lower-drop Isat values are conservative stand-ins for a higher drop (L has
#: fallen 10 % before it falls 20 %): used when the plan's own Isat is unknown.
ISAT_FALLBACK: dict[str, tuple[str, ...]] = {
    "isat_10": (),
    "isat_20": ("isat_10",),
    "isat_30": ("isat_20", "isat_10"),
}


def kinds_for(role: str, demand: Demand | None = None) -> tuple[str, ...]:
    """Kinds of part that can fill a role (an ``extra:`` role by its quantity)."""
    if role in ROLE_KINDS:
        return ROLE_KINDS[role]
    if demand is not None and demand.constraints:
        return QUANTITY_KINDS.get(demand.constraints[0].quantity, ("other",))
    return ("other",)


def quantities_for(role: str, demand: Demand, spec: Spec | None = None) -> tuple[str, ...]:
    """Recorded quantities a role's verdicts read (derived ones resolved to their inputs)."""
    out: list[str] = []
    for c in demand.constraints:
        if c.quantity == "rise_load":
            out += ["dcr", "r_th"]
        elif c.quantity in ISAT_FALLBACK:
            out += [c.quantity, *ISAT_FALLBACK[c.quantity]]
        elif c.quantity in QUANTITIES:
            out.append(c.quantity)
    if role == "inductor":
        out += ["inductance", "dcr"]
    if role == "controller" and "ilim" in out:
        out.append("ilim_gain")
    return tuple(dict.fromkeys(out))


@dataclass(frozen=True)
class Requirement:
    """One constraint as the judge applies it: a limit per candidate or one for all."""

    name: str
    quantity: str
    op: str
    limit: np.ndarray | float
    reason: str
    source: str = ""


@dataclass(frozen=True)
class Check:
    """One constraint judged for one bin.

    ``required`` and ``have`` in SI units of the quantity (``have`` is the
    worst-case end of the evidence, nan when unknown); ``margin`` is the relative
    margin (positive passes; nan when unknown).
    """

    name: str
    quantity: str
    op: str
    required: float
    have: float
    grade: str
    status: str
    margin: float
    reason: str
    source: str = ""
    evidence: str = ""
    #: True when ``have`` is only a lower bound ("not reached up to", e.g. Isat).
    lower_bound: bool = False

    def sentence(self) -> str:
        """One line: what was needed, what the bin has, and the verdict."""
        dim = QUANTITIES[self.quantity].dimension if self.quantity in QUANTITIES else ""
        need = _fmt(self.required, dim)
        if self.grade == "unknown" or math.isnan(self.have):
            return f"{self.name}: needs {_OPS[self.op]} {need}; no evidence → {self.status}"
        # An infinite "have" is a limit the part lets you set (a resistor-set ilim).
        have = "settable" if math.isinf(self.have) else _fmt(self.have, dim)
        if self.lower_bound:
            have = f"≥ {have}"
        m = (
            ""
            if math.isnan(self.margin) or math.isinf(self.margin)
            else (f", margin {100 * self.margin:+.0f} %")
        )
        need = f"{_OPS[self.op]} {need}"
        return f"{self.name}: has {have} ({self.grade}), needs {need} → {self.status}{m}"


@dataclass(frozen=True)
class CheckMatrix:
    """Every requirement judged for every candidate: arrays of shape (n, m)."""

    requirements: tuple[Requirement, ...]
    status: np.ndarray
    have: np.ndarray
    required: np.ndarray
    grade: np.ndarray
    margin: np.ndarray
    #: The evidence table each requirement read (None where there was none).
    tables: tuple[EvidenceTable | None, ...] = field(default=())
    #: Pairs of columns that are alternative ways to show the same thing (e.g. the
    #: i_rise rating or the predicted rise): either passing is enough.
    alternatives: tuple[tuple[int, int], ...] = ()

    @property
    def n(self) -> int:
        """Number of candidates."""
        return int(self.status.shape[0])

    def effective_status(self) -> np.ndarray:
        """Statuses with each alternative pair resolved: pass if either passes, else
        fail if either fails, else unverified (both columns get the result)."""
        st = self.status.copy()
        for a, b in self.alternatives:
            sa, sb = st[:, a], st[:, b]
            comb = np.where(
                (sa == PASS) | (sb == PASS),
                PASS,
                np.where((sa == FAIL) | (sb == FAIL), FAIL, UNVERIFIED),
            ).astype(np.int8)
            st[:, a] = comb
            st[:, b] = comb
        return st

    def group(self) -> np.ndarray:
        """0 verified feasible, 1 feasible with unverified checks, 2 fails."""
        if self.status.shape[1] == 0:
            return np.zeros(self.n, dtype=np.int8)
        st = self.effective_status()
        fails = (st == FAIL).any(axis=1)
        unver = (st == UNVERIFIED).any(axis=1)
        return np.where(fails, 2, np.where(unver, 1, 0)).astype(np.int8)

    def checks(self, k: int) -> tuple[Check, ...]:
        """The checks of candidate ``k`` as objects."""
        out = []
        for j, r in enumerate(self.requirements):
            ev = self._evidence(j, k)
            out.append(
                Check(
                    name=r.name,
                    quantity=r.quantity,
                    op=r.op,
                    required=float(self.required[k, j]),
                    have=float(self.have[k, j]),
                    grade=GRADE_NAMES[int(self.grade[k, j])],
                    status=STATUSES[int(self.status[k, j])],
                    margin=float(self.margin[k, j]),
                    reason=r.reason,
                    source=r.source,
                    evidence=ev,
                    lower_bound=self._lower_bound(j, k),
                )
            )
        return tuple(out)

    def _lower_bound(self, j: int, k: int) -> bool:
        t = self.tables[j] if j < len(self.tables) else None
        return bool(t is not None and t.lower_bound_only[k])

    def _evidence(self, j: int, k: int) -> str:
        """One line on the evidence behind check ``j`` of candidate ``k``."""
        t = self.tables[j] if j < len(self.tables) else None
        r = self.requirements[j]
        if t is None:
            return "no evidence"
        if r.quantity == "stock":
            return f"{int(self.have[k, j])} free (on hand − reserved)"
        if int(t.grade[k]) == UNKNOWN:
            return "no evidence"
        if r.quantity == "rise_load":
            return f"predicted from DCR and R_th ({GRADE_NAMES[int(t.grade[k])]})"
        text = t.row(k).describe()
        return text.split(": ", 1)[1] if ": " in text else text


def judge(
    requirements: Sequence[Requirement], tables: Mapping[str, EvidenceTable], n: int
) -> CheckMatrix:
    """Judge every requirement on every candidate.

    Parameters
    ----------
    requirements
        The requirements, each naming the table (quantity) it reads.
    tables
        Evidence tables by quantity (a missing quantity counts as unknown).
    n
        Number of candidates.
    """
    m = len(requirements)
    status = np.full((n, m), UNVERIFIED, dtype=np.int8)
    have = np.full((n, m), np.nan)
    req = np.full((n, m), np.nan)
    grade = np.full((n, m), UNKNOWN, dtype=np.int8)
    used: list[EvidenceTable | None] = []
    for j, r in enumerate(requirements):
        limit = np.broadcast_to(np.asarray(r.limit, dtype=float), (n,))
        req[:, j] = limit
        t = tables.get(r.quantity)
        used.append(t)
        if t is None:
            continue
        limit_known = ~np.isnan(limit)
        if r.op == ">=":
            st = t.at_least(limit)
            h = t.low
        else:
            st = t.at_most(limit)
            h = t.high
        st = np.where(limit_known, st, UNVERIFIED).astype(np.int8)
        status[:, j] = st
        have[:, j] = h
        grade[:, j] = t.grade
    with np.errstate(invalid="ignore", divide="ignore"):
        rel = have / req - 1.0
        ops = np.array([1.0 if r.op == ">=" else -1.0 for r in requirements])
        margin = rel * ops if m else rel
    margin = np.where(req == 0, np.nan, margin)
    return CheckMatrix(tuple(requirements), status, have, req, grade, margin, tuple(used))


def counted_table(quantity: str, available: np.ndarray) -> EvidenceTable:
    """Stock counts as an evidence-like table (grade ``counted``)."""
    a = np.asarray(available, dtype=float)
    return EvidenceTable(
        quantity=quantity,
        grade=np.full(a.size, COUNTED, dtype=np.int8),
        low=a,
        high=a,
        closed_low=a,
        closed_high=a,
        max_low=a,
        mean=a,
        spread=np.zeros(a.size),
        n=np.ones(a.size, dtype=np.int64),
        lower_bound_only=np.zeros(a.size, dtype=bool),
        higher_is_better=True,
    )


def derived_table(quantity: str, value: np.ndarray, grade: np.ndarray) -> EvidenceTable:
    """A computed quantity as a point-interval table with the weakest input grade."""
    v = np.asarray(value, dtype=float)
    g = np.where(np.isnan(v), UNKNOWN, grade).astype(np.int8)
    return EvidenceTable(
        quantity=quantity,
        grade=g,
        low=v,
        high=v,
        closed_low=np.where(np.isnan(v), np.inf, v),
        closed_high=np.where(np.isnan(v), -np.inf, v),
        max_low=np.where(np.isnan(v), -np.inf, v),
        mean=v,
        spread=np.zeros(v.size),
        n=np.zeros(v.size, dtype=np.int64),
        lower_bound_only=np.zeros(v.size, dtype=bool),
        higher_is_better=QUANTITIES[quantity].higher_is_better if quantity in QUANTITIES else True,
    )


def with_fallback(
    primary: EvidenceTable | None, fallbacks: Sequence[EvidenceTable | None]
) -> EvidenceTable | None:
    """Rows unknown in ``primary`` taken from the first fallback that knows them."""
    if primary is None:
        known = [f for f in fallbacks if f is not None]
        if not known:
            return None
        primary, fallbacks = known[0], known[1:]
    fields_ = (
        "grade",
        "low",
        "high",
        "closed_low",
        "closed_high",
        "max_low",
        "mean",
        "spread",
        "n",
        "lower_bound_only",
    )
    cur = {f: getattr(primary, f).copy() for f in fields_}
    for fb in fallbacks:
        if fb is None:
            continue
        take = (cur["grade"] == UNKNOWN) & (fb.grade != UNKNOWN)
        for f in fields_:
            cur[f][take] = getattr(fb, f)[take]
    return replace(primary, **cur)


@dataclass(frozen=True)
class Candidates:
    """The stocked bins of one role's kinds, as the judge sees them.

    Parameters
    ----------
    labels
        Bin labels, row order.
    available
        Free parts per bin (on hand minus reserved).
    tables
        Evidence tables by quantity, rows aligned with ``labels``.
    curves
        Row -> (currents A, incremental inductances H) of a measured L(i) curve.
    """

    labels: Sequence[str]
    available: np.ndarray
    tables: Mapping[str, EvidenceTable]
    curves: Mapping[int, tuple[np.ndarray, np.ndarray]] = field(default_factory=dict)

    def __len__(self) -> int:
        return len(self.labels)


@dataclass(frozen=True)
class RoleVerdicts:
    """The judged candidates of one role, with what the score needs.

    ``extras`` holds per-candidate arrays such as ``i_peak``, ``ripple_ratio``,
    ``p_copper`` for the inductor; ``notes`` per-row notes (stepping, runaway).
    """

    role: str
    candidates: Candidates
    matrix: CheckMatrix
    extras: Mapping[str, np.ndarray] = field(default_factory=dict)
    row_notes: Mapping[int, tuple[str, ...]] = field(default_factory=dict)
    demand_notes: tuple[str, ...] = ()

    def with_specimens(self, counts: Mapping[str, tuple[np.ndarray, np.ndarray]]) -> RoleVerdicts:
        """A copy whose evidence tables know specimen counts: ``counts[quantity]`` is
        (candidate rows, distinct specimens behind each row's readings of that
        quantity). Every table of that quantity gets them, the ones the checks read
        included (such as the Isat table the inductor checks build)."""
        new: dict[int, EvidenceTable] = {}

        def counted(t: EvidenceTable | None) -> EvidenceTable | None:
            if t is None or t.quantity not in counts:
                return t
            if id(t) not in new:
                rows, n = counts[t.quantity]
                new[id(t)] = t.with_specimens(rows, n) if np.size(rows) else t
            return new[id(t)]

        tables = {q: counted(t) for q, t in self.candidates.tables.items()}
        matrix_tables = tuple(counted(t) for t in self.matrix.tables)
        return replace(
            self,
            candidates=replace(self.candidates, tables=tables),
            matrix=replace(self.matrix, tables=matrix_tables),
        )


def _stock_requirement(per_board: int) -> Requirement:
    return Requirement(
        "in stock",
        "stock",
        ">=",
        float(per_board),
        f"{per_board} part{'s' if per_board != 1 else ''} per board free (on hand − reserved)",
    )


def generic_verdicts(demand: Demand, cands: Candidates, *, per_board: int = 1) -> RoleVerdicts:
    """Verdicts for a role whose constraints have fixed limits (capacitors, diode, ...)."""
    reqs = [
        Requirement(_name(c), c.quantity, c.op, c.limit, c.reason, c.source)
        for c in demand.constraints
    ]
    reqs.append(_stock_requirement(per_board))
    tables = dict(cands.tables)
    tables["stock"] = counted_table("stock", cands.available)
    for c in demand.constraints:
        if c.quantity in ISAT_FALLBACK:
            tables[c.quantity] = with_fallback(
                cands.tables.get(c.quantity),
                [cands.tables.get(q) for q in ISAT_FALLBACK[c.quantity]],
            )
    gain = cands.tables.get("ilim_gain")
    if demand.role == "controller" and gain is not None and "ilim" in [r.quantity for r in reqs]:
        # A limit set by a resistor (ilim = ilim_gain / Rset) can be set to what the
        # plan needs; the set_resistor role judges the resistor that sets it.
        settable = derived_table(
            "ilim", np.where(gain.grade != UNKNOWN, np.inf, np.nan), gain.grade
        )
        tables["ilim"] = with_fallback(cands.tables.get("ilim"), [settable])
    matrix = judge(reqs, {k: v for k, v in tables.items() if v is not None}, len(cands))
    return RoleVerdicts(demand.role, cands, matrix, demand_notes=demand.notes)


def inductor_verdicts(
    spec: Spec, demand: Demand, cands: Candidates, *, per_board: int = 1
) -> RoleVerdicts:
    """Verdicts for the inductor role: each candidate's own L sets its currents.

    The candidate's worst-case L (low end) and DCR (high end; 0 when unknown, the
    worst case for ripple) give its worst full-load ripple, peak and RMS current
    (array twin of ``inductor_duty``); a measured L(i) curve is stepped through by
    ``inductor_duty`` itself. Then: inductance ≥ the ripple-target minimum, Isat ≥
    margin × its own peak, Isat ≥ the current limit (if the plan must survive a
    short), i_rise ≥ its RMS current, predicted rise ≤ the plan's limit.
    """
    n = len(cands)
    t_l = cands.tables.get("inductance")
    t_dcr = cands.tables.get("dcr")
    l_low = t_l.low if t_l is not None else np.full(n, np.nan)
    l_known = ~np.isnan(l_low) & (l_low > 0)
    dcr_high = t_dcr.high if t_dcr is not None else np.full(n, np.nan)
    dcr_use = np.where(np.isfinite(dcr_high), dcr_high, 0.0)
    arr = worst_full_load(spec, np.where(l_known, l_low, 1.0), dcr_use)
    arr = _mask(arr, l_known)
    row_notes: dict[int, tuple[str, ...]] = {}
    arr = _step_curves(spec, cands, l_low, dcr_use, arr, row_notes)

    isat_q = spec.isat_quantity
    isat = with_fallback(
        cands.tables.get(isat_q), [cands.tables.get(q) for q in ISAT_FALLBACK.get(isat_q, ())]
    )
    limit = arr.current_limit
    by_q = {c.quantity: c for c in demand.constraints}
    c_l = by_q.get("inductance")
    reqs: list[Requirement] = []
    if c_l is not None:
        reqs.append(
            Requirement("inductance", "inductance", ">=", c_l.limit, c_l.reason, c_l.source)
        )
    plan_isat = next(
        (c for c in demand.constraints if c.quantity == isat_q and "peak" in c.reason), None
    )
    reqs.append(
        Requirement(
            f"{isat_q} vs own peak",
            "isat",
            ">=",
            np.where(
                l_known, spec.isat_margin * arr.i_peak, plan_isat.limit if plan_isat else np.nan
            ),
            f"{spec.isat_margin:g} × this part's own worst full-load peak (its own L sets the "
            f"ripple); Isat at a {spec.isat_drop} % drop",
            plan_isat.source if plan_isat else "",
        )
    )
    if spec.survive_short and limit is not None:
        reqs.append(
            Requirement(
                f"{isat_q} vs current limit",
                "isat",
                ">=",
                float(limit),
                f"an overload or short drives the current to the limit {_fmt(limit, 'current')}",
                plan_isat.source if plan_isat else "",
            )
        )
    c_rise = by_q.get("i_rise")
    reqs.append(
        Requirement(
            "i_rise vs own RMS",
            "i_rise",
            ">=",
            arr.i_rms,
            f"this part's worst full-load RMS current must not exceed the current giving "
            f"{spec.rise_max:g} K rise",
            c_rise.source if c_rise else "",
        )
    )
    # predicted rise from DCR (high end) and R_th (high end)
    t_rth = cands.tables.get("r_th")
    rise = np.full(n, np.nan)
    rise_grade = np.full(n, UNKNOWN, dtype=np.int8)
    if t_dcr is not None and t_rth is not None:
        ok = np.isfinite(dcr_high) & np.isfinite(t_rth.high) & ~np.isnan(arr.i_rms)
        rise = np.where(ok, predicted_rise(arr.i_rms, dcr_use, t_rth.high, spec.t_ambient), np.nan)
        rise_grade = np.maximum(t_dcr.grade, t_rth.grade)
    c_rl = by_q.get("rise_load")
    reqs.append(
        Requirement(
            "predicted rise",
            "rise_load",
            "<=",
            spec.rise_max,
            f"steady rise at this part's RMS current, ambient {spec.t_ambient:g} °C, from its "
            "DCR and R_th with the copper tempco",
            c_rl.source if c_rl else "",
        )
    )
    reqs.append(_stock_requirement(per_board))

    tables = {k: v for k, v in cands.tables.items() if v is not None}
    if isat is not None:
        tables["isat"] = replace(isat, quantity=isat_q)
    tables["rise_load"] = derived_table("rise_load", rise, rise_grade)
    tables["stock"] = counted_table("stock", cands.available)
    matrix = judge(reqs, tables, n)
    # "isat" is the plan's Isat quantity: name it so in the checks
    reqs_named = tuple(replace(r, quantity=isat_q) if r.quantity == "isat" else r for r in reqs)
    names = [r.name for r in reqs]
    pair = (names.index("i_rise vs own RMS"), names.index("predicted rise"))
    matrix = replace(matrix, requirements=reqs_named, alternatives=(pair,))
    p_copper = np.where(np.isfinite(dcr_high), arr.i_rms**2 * dcr_use, np.nan)
    extras = {
        "l_low": l_low,
        "dcr_high": dcr_high,
        "i_peak": arr.i_peak,
        "i_rms": arr.i_rms,
        "ripple_pp": arr.ripple_pp,
        "ripple_ratio": arr.ripple_ratio,
        "p_copper": p_copper,
        "rise": rise,
        "isat_low": isat.low if isat is not None else np.full(n, np.nan),
        "isat_required": np.where(l_known, arr.isat_required, np.nan),
    }
    for k in np.flatnonzero(~l_known):
        row_notes[int(k)] = (
            *row_notes.get(int(k), ()),
            "inductance unknown: currents not computed",
        )
    for k in np.flatnonzero(l_known & ~arr.feasible):
        row_notes[int(k)] = (
            *row_notes.get(int(k), ()),
            "the output cannot be reached with this DCR at the lowest input",
        )
    return RoleVerdicts("inductor", cands, matrix, extras, row_notes, demand.notes)


def _mask(arr: InductorArrays, known: np.ndarray) -> InductorArrays:
    def m(a: np.ndarray) -> np.ndarray:
        return np.where(known, a, np.nan)

    return replace(
        arr,
        ripple_pp=m(arr.ripple_pp),
        ripple_ratio=m(arr.ripple_ratio),
        i_peak=m(arr.i_peak),
        i_rms=m(arr.i_rms),
        i_avg=m(arr.i_avg),
        isat_required=m(arr.isat_required),
        feasible=arr.feasible | ~known,
    )


def _step_curves(
    spec: Spec,
    cands: Candidates,
    l_low: np.ndarray,
    dcr_use: np.ndarray,
    arr: InductorArrays,
    row_notes: dict[int, tuple[str, ...]],
) -> InductorArrays:
    """Replace the currents of bins with a measured L(i) curve by stepped ones."""
    if not cands.curves:
        return arr
    from kitbin.errors import KitbinError

    cols = {
        k: getattr(arr, k).copy()
        for k in ("ripple_pp", "ripple_ratio", "i_peak", "i_rms", "i_avg", "isat_required")
    }
    feasible = arr.feasible.copy()
    for row, (ci, cl) in cands.curves.items():
        l0 = float(l_low[row]) if np.isfinite(l_low[row]) else float(np.max(cl))
        try:
            op = inductor_duty(spec, l0, float(dcr_use[row]), l_of_i=(ci, cl))
        except (KitbinError, ValueError, ImportError) as error:
            row_notes[row] = (*row_notes.get(row, ()), f"L(i) curve not used: {error}")
            continue
        cols["ripple_pp"][row] = op.ripple_pp
        cols["ripple_ratio"][row] = op.ripple_ratio
        cols["i_peak"][row] = op.i_peak
        cols["i_rms"][row] = op.i_rms
        cols["i_avg"][row] = op.i_avg
        cols["isat_required"][row] = op.isat_required
        notes = [f"peak from stepping the measured L(i) curve: {_fmt(op.i_peak, 'current')}"]
        if op.runaway:
            notes.append("the current runs away: L collapses below the peak (saturation)")
            cols["i_peak"][row] = np.inf
            cols["isat_required"][row] = np.inf
            feasible[row] = False
        notes += list(op.notes)
        row_notes[row] = (*row_notes.get(row, ()), *notes)
    return replace(arr, feasible=feasible, **cols)


def _name(c: Constraint) -> str:
    side = ""
    if c.quantity in ("divider_ratio", "resistance", "fsw"):
        side = " (low end)" if c.op == ">=" else " (high end)"
    return c.quantity + side


def _fmt(value: float, dim: str) -> str:
    if value is None or math.isnan(value):
        return "?"
    if dim == "" or dim not in {
        "inductance",
        "resistance",
        "capacitance",
        "current",
        "voltage",
        "frequency",
        "time",
        "power",
        "temperature_rise",
        "thermal_resistance",
        "ratio",
    }:
        return f"{value:.4g}"
    if dim == "ratio" and abs(value) > 1.5:
        return f"{value:.4g}"
    return format_quantity(value, dim)

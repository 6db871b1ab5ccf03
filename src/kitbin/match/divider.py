"""Resistor-network search: the feedback divider and single set resistors from stock.

The output of a converter with a feedback divider is (REFERENCES section 7, as in
regulator data sheets' "setting the output voltage" sections)::

    Vout = Vref * (1 + Rtop / Rbot) + I_FB * Rtop

For one bottom leg, Vout is linear in Rtop, so the best top leg is the stocked leg
nearest to Rtop* = (Vtarget - Vref) / (Vref / Rbot + I_FB). The search sorts every
candidate top leg once and finds, for every candidate bottom leg at the same time,
the two neighbours of Rtop* with :func:`numpy.searchsorted`. That is the true
optimum over the search space (single stocked resistors, and optionally two in
series or in parallel per leg), in O(n log n) for n candidate legs.

Each stocked resistor carries its evidence interval (measured readings, or marking
± tolerance). The worst-case output band combines the leg intervals with the
reference tolerance and I_FB (worst-case circuit analysis, common practice, no
source; the corner formulas are REFERENCES section 7).

Pure: plain dataclasses and numpy arrays in and out.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

#: Default range for the bottom resistor, Ω: 1 kΩ ... 100 kΩ (common practice, no
#: source: low enough that I_FB and pick-up are small, high enough to waste little power).
RBOT_RANGE: tuple[float, float] = (1e3, 100e3)

CONNECTIONS = ("single", "series", "parallel")


@dataclass(frozen=True)
class StockResistor:
    """One stocked resistor bin as the search sees it.

    Parameters
    ----------
    label
        The bin label.
    value
        Best estimate, Ω (mean of readings when measured, else the nominal).
    low, high
        The evidence interval, Ω (worst-case ends).
    available
        Parts free to use (on hand minus reserved).
    grade
        Evidence grade of ``value`` (``measured``, ``marked`` ...).
    """

    label: str
    value: float
    low: float
    high: float
    available: int = 1_000_000
    grade: str = "marked"

    def __post_init__(self) -> None:
        if not (self.value > 0 and self.low > 0 and self.high >= self.low):
            raise ValueError(f"resistor {self.label!r}: needs 0 < low <= high and value > 0")


@dataclass(frozen=True, eq=False)
class StockArrays:
    """Stocked resistors as arrays (the same fields as :class:`StockResistor`).

    For large stocks: building one object per bin costs more than the search.
    """

    labels: Sequence[str]
    value: np.ndarray
    low: np.ndarray
    high: np.ndarray
    available: np.ndarray
    grade: Sequence[str] = ()

    @classmethod
    def of(cls, stock: Sequence[StockResistor] | StockArrays) -> StockArrays:
        """Arrays from a list of :class:`StockResistor` (or the arrays themselves)."""
        if isinstance(stock, StockArrays):
            return stock
        return cls(
            labels=[r.label for r in stock],
            value=np.array([r.value for r in stock], dtype=float),
            low=np.array([r.low for r in stock], dtype=float),
            high=np.array([r.high for r in stock], dtype=float),
            available=np.array([r.available for r in stock], dtype=np.int64),
            grade=[r.grade for r in stock],
        )

    def __len__(self) -> int:
        return int(self.value.size)


@dataclass(frozen=True)
class Leg:
    """One leg of a divider: one stocked resistor, or two in series or in parallel.

    ``value``, ``low`` and ``high`` are in Ω.
    """

    parts: tuple[str, ...]
    connection: str
    value: float
    low: float
    high: float

    def describe(self) -> str:
        """E.g. ``R-12`` or ``R-12 + R-40`` or ``R-12 ∥ R-40``."""
        sep = {"single": "", "series": " + ", "parallel": " ∥ "}[self.connection]
        return sep.join(self.parts) if sep else self.parts[0]


@dataclass(frozen=True)
class DividerResult:
    """The best divider found and its output band.

    Voltages in V, errors as fractions (``error`` is signed: Vout/Vtarget − 1).
    """

    top: Leg
    bottom: Leg
    vout: float
    target: float
    error: float
    vout_low: float
    vout_high: float
    divider_current: float
    searched: int

    @property
    def error_pct(self) -> float:
        """Signed error in percent."""
        return 100.0 * self.error

    @property
    def band_pct(self) -> tuple[float, float]:
        """Worst-case band relative to the target, percent (low, high)."""
        return (
            100.0 * (self.vout_low / self.target - 1.0),
            100.0 * (self.vout_high / self.target - 1.0),
        )


def divider_vout(vref: float, rtop: float, rbot: float, ifb: float = 0.0) -> float:
    """Vout = Vref·(1 + Rtop/Rbot) + I_FB·Rtop, V (REFERENCES section 7)."""
    return vref * (1.0 + rtop / rbot) + ifb * rtop


def divider_band(
    vref_low: float,
    vref_high: float,
    top: tuple[float, float],
    bottom: tuple[float, float],
    ifb: tuple[float, float] = (0.0, 0.0),
) -> tuple[float, float]:
    """Worst-case output band, V.

    Vout,max = Vref,hi·(1 + Rtop,hi/Rbot,lo) + I_FB,hi·Rtop,hi and
    Vout,min = Vref,lo·(1 + Rtop,lo/Rbot,hi) + I_FB,lo·Rtop,lo (REFERENCES section 7).

    Parameters
    ----------
    vref_low, vref_high
        Reference interval, V.
    top, bottom
        (low, high) of each leg, Ω.
    ifb
        (low, high) of the feedback-pin current flowing out of the divider node, A.
    """
    t_lo, t_hi = top
    b_lo, b_hi = bottom
    i_lo, i_hi = ifb
    vmax = vref_high * (1.0 + t_hi / b_lo) + max(i_hi * t_hi, i_hi * t_lo)
    vmin = vref_low * (1.0 + t_lo / b_hi) + min(i_lo * t_lo, i_lo * t_hi)
    return vmin, vmax


@dataclass(frozen=True)
class _Legs:
    value: np.ndarray
    low: np.ndarray
    high: np.ndarray
    a: np.ndarray  # index of first part
    b: np.ndarray  # index of second part, -1 for a single
    kind: np.ndarray  # 0 single, 1 series, 2 parallel


def _build_legs(stock: StockArrays, connections: Sequence[str], boards: int) -> _Legs:
    v, lo, hi = stock.value, stock.low, stock.high
    avail = np.asarray(stock.available, dtype=np.int64)
    parts_v, parts_lo, parts_hi, pa, pb, pk = [], [], [], [], [], []
    if "single" in connections:
        ok = np.flatnonzero(avail >= boards)
        parts_v.append(v[ok])
        parts_lo.append(lo[ok])
        parts_hi.append(hi[ok])
        pa.append(ok)
        pb.append(np.full(ok.size, -1))
        pk.append(np.zeros(ok.size, dtype=np.int8))
    pair = [c for c in connections if c in ("series", "parallel")]
    if pair and len(stock):
        ia, ib = np.triu_indices(len(stock))
        ok = np.where(
            ia == ib, avail[ia] >= 2 * boards, (avail[ia] >= boards) & (avail[ib] >= boards)
        )
        ia, ib = ia[ok], ib[ok]
        for name in pair:
            if name == "series":
                parts_v.append(v[ia] + v[ib])
                parts_lo.append(lo[ia] + lo[ib])
                parts_hi.append(hi[ia] + hi[ib])
                code = 1
            else:
                parts_v.append(v[ia] * v[ib] / (v[ia] + v[ib]))
                parts_lo.append(lo[ia] * lo[ib] / (lo[ia] + lo[ib]))
                parts_hi.append(hi[ia] * hi[ib] / (hi[ia] + hi[ib]))
                code = 2
            pa.append(ia)
            pb.append(ib)
            pk.append(np.full(ia.size, code, dtype=np.int8))
    if not parts_v:
        empty = np.empty(0)
        return _Legs(
            empty, empty, empty, empty.astype(int), empty.astype(int), empty.astype(np.int8)
        )
    return _Legs(
        np.concatenate(parts_v),
        np.concatenate(parts_lo),
        np.concatenate(parts_hi),
        np.concatenate(pa),
        np.concatenate(pb),
        np.concatenate(pk),
    )


def _usage_ok(
    avail: np.ndarray, boards: int, top: tuple[int, int], bottom: tuple[int, int]
) -> bool:
    counts: dict[int, int] = {}
    for i in (*top, *bottom):
        if i >= 0:
            counts[i] = counts.get(i, 0) + 1
    return all(avail[i] >= c * boards for i, c in counts.items())


def best_divider(
    stock: Sequence[StockResistor] | StockArrays,
    vref: float,
    target: float,
    *,
    vref_tol: float = 0.0,
    vref_interval: tuple[float, float] | None = None,
    ifb: float = 0.0,
    ifb_interval: tuple[float, float] | None = None,
    rbot_range: tuple[float, float] = RBOT_RANGE,
    connections: Sequence[str] = ("single",),
    boards: int = 1,
) -> DividerResult | None:
    """The stocked divider whose nominal output is nearest the target.

    Parameters
    ----------
    stock
        Stocked resistors with their evidence intervals.
    vref
        Controller reference voltage (best estimate), V.
    target
        Wanted output voltage magnitude, V (must exceed ``vref``).
    vref_tol
        Reference tolerance as a fraction, used when ``vref_interval`` is not given.
    vref_interval
        Explicit (low, high) reference interval, V.
    ifb
        Feedback-pin current flowing out of the divider node, A (best estimate).
    ifb_interval
        (low, high) of that current for the band, A; defaults to ``(ifb, ifb)``.
    rbot_range
        Allowed bottom-leg range, Ω (default 1 kΩ ... 100 kΩ).
    connections
        Leg forms searched: any of ``"single"``, ``"series"``, ``"parallel"``.
    boards
        Number of boards: a bin must hold this many parts per use.

    Returns
    -------
    DividerResult or None
        None when no pair fits (no resistor in the bottom range, or no stock).

    Raises
    ------
    ValueError
        When the target is not above the reference, or an option is out of range.
    """
    if not target > vref > 0:
        raise ValueError(f"target {target!r} V must exceed the reference {vref!r} V")
    bad = [c for c in connections if c not in CONNECTIONS]
    if bad or not connections:
        raise ValueError(f"connections must be among {CONNECTIONS}, got {list(connections)}")
    if boards < 1:
        raise ValueError("boards must be at least 1")
    lo_b, hi_b = rbot_range
    stock = StockArrays.of(stock)
    legs = _build_legs(stock, connections, boards)
    if legs.value.size == 0:
        return None
    order = np.argsort(legs.value)
    tv = legs.value[order]
    # bottoms in range are one slice of the sorted legs, so Rtop* comes out sorted too
    # and the search over it runs in cache order
    i0 = int(np.searchsorted(tv, lo_b * (1 - 1e-12), "left"))
    i1 = int(np.searchsorted(tv, hi_b * (1 + 1e-12), "right"))
    if i1 <= i0:
        return None
    bidx = order[i0:i1]
    rb = tv[i0:i1]
    slope = vref / rb + ifb  # dVout/dRtop for each bottom leg, V/Ω
    rt_star = (target - vref) / slope
    pos = np.searchsorted(tv, rt_star)
    left = np.clip(pos - 1, 0, tv.size - 1)
    right = np.clip(pos, 0, tv.size - 1)
    err_l = np.abs(tv[left] - rt_star) * slope
    err_r = np.abs(tv[right] - rt_star) * slope
    pick = np.where(err_r < err_l, right, left)
    err = np.minimum(err_l, err_r)  # |Vout - target| for the nearest top of each bottom, V
    key = _candidate_order(err, target, legs.b[bidx] >= 0, legs.b[order[pick]] >= 0, rb)
    avail = np.asarray(stock.available, dtype=np.int64)

    best: tuple[float, int, int] | None = None  # (abs error, bottom leg, top leg)
    for k in key:
        e_k = float(err[k])
        if best is not None and e_k > best[0] * (1 + 1e-12) + 1e-15:
            break
        b_leg = int(bidx[k])
        bottom_parts = (int(legs.a[b_leg]), int(legs.b[b_leg]))
        found = _nearest_feasible_top(
            tv,
            order,
            legs,
            float(rt_star[k]),
            float(slope[k]),
            int(pos[k]),
            bottom_parts,
            avail,
            boards,
            best[0] if best else math.inf,
        )
        if found is not None and (best is None or found[0] < best[0] * (1 - 1e-12) - 1e-15):
            best = (found[0], b_leg, found[1])
            key.best = best[0]
    if best is None:
        return None
    _, b_leg, t_leg = best
    top = _leg(stock, legs, t_leg)
    bottom = _leg(stock, legs, b_leg)
    vout = divider_vout(vref, top.value, bottom.value, ifb)
    vr = vref_interval or (vref * (1 - vref_tol), vref * (1 + vref_tol))
    ib = ifb_interval or (ifb, ifb)
    v_lo, v_hi = divider_band(vr[0], vr[1], (top.low, top.high), (bottom.low, bottom.high), ib)
    return DividerResult(
        top=top,
        bottom=bottom,
        vout=vout,
        target=target,
        error=vout / target - 1.0,
        vout_low=v_lo,
        vout_high=v_hi,
        divider_current=vout / (top.value + bottom.value),
        searched=int(bidx.size) * int(tv.size),
    )


def _candidate_order(
    err: np.ndarray, target: float, b_pair: np.ndarray, t_pair: np.ndarray, rb: np.ndarray
) -> _LazyOrder:
    """Bottom legs in the order to try: least error first; among equal errors (to 1e-12
    of the target) fewer parts, then higher Rbot.

    Only the near-best few are sorted up front (the search nearly always stops at the
    first); the rest follow by error, sorted only if the walk gets that far.
    """
    e_min = float(err.min())
    near = np.flatnonzero(err <= e_min * (1 + 1e-9) + 1e-12 * target)
    parts = b_pair[near].astype(int) + t_pair[near].astype(int)
    head = near[np.lexsort((-rb[near], parts, np.round(err[near] / target, 12)))]
    rest = np.setdiff1d(np.arange(err.size), near, assume_unique=True)
    return _LazyOrder(head, rest, err)


class _LazyOrder:
    """Iterate ``head``, then ``rest`` sorted by error — sorted only when the caller has
    not yet found a feasible pair at least as good as the best of ``rest``."""

    def __init__(self, head: np.ndarray, rest: np.ndarray, err: np.ndarray) -> None:
        self.head, self.rest, self.err = head, rest, err
        self.rest_min = float(err[rest].min()) if rest.size else math.inf
        self.best = math.inf

    def __iter__(self):  # -> Iterator[int]
        yield from self.head.tolist()
        if self.rest.size and self.best > self.rest_min * (1 + 1e-12) + 1e-15:
            yield from self.rest[np.argsort(self.err[self.rest], kind="stable")].tolist()


def _nearest_feasible_top(
    tv: np.ndarray,
    order: np.ndarray,
    legs: _Legs,
    rt_star: float,
    slope: float,
    pos: int,
    bottom_parts: tuple[int, int],
    avail: np.ndarray,
    boards: int,
    bound: float,
) -> tuple[float, int] | None:
    """Walk outward from Rtop* to the nearest top leg whose parts are in stock with the bottom."""
    i, j = pos - 1, pos
    n = tv.size
    while i >= 0 or j < n:
        ei = (rt_star - tv[i]) * slope if i >= 0 else math.inf
        ej = (tv[j] - rt_star) * slope if j < n else math.inf
        if ei <= ej:
            e, idx = ei, i
            i -= 1
        else:
            e, idx = ej, j
            j += 1
        if e > bound:
            return None
        leg = int(order[idx])
        if _usage_ok(avail, boards, (int(legs.a[leg]), int(legs.b[leg])), bottom_parts):
            return float(e), leg
    return None


def _leg(stock: StockArrays, legs: _Legs, i: int) -> Leg:
    a, b, kind = int(legs.a[i]), int(legs.b[i]), int(legs.kind[i])
    names = (stock.labels[a],) if b < 0 else (stock.labels[a], stock.labels[b])
    return Leg(
        parts=names,
        connection=CONNECTIONS[kind],
        value=float(legs.value[i]),
        low=float(legs.low[i]),
        high=float(legs.high[i]),
    )


def nearest_leg(
    stock: Sequence[StockResistor] | StockArrays,
    target: float,
    *,
    connections: Sequence[str] = ("single",),
    boards: int = 1,
) -> Leg | None:
    """The stocked leg (single, or two in series/parallel) nearest a target resistance.

    Used for set resistors (e.g. a current-limit resistor Rset = ilim_gain / Ilim).
    Nearness is by relative error |R/target − 1|.

    Parameters
    ----------
    target
        Wanted resistance, Ω.
    """
    if not target > 0:
        raise ValueError("target resistance must be positive")
    stock = StockArrays.of(stock)
    legs = _build_legs(stock, connections, boards)
    if legs.value.size == 0:
        return None
    rel = np.abs(legs.value / target - 1.0)
    parts = (legs.b >= 0).astype(int)
    i = int(np.lexsort((parts, np.round(rel, 12)))[0])
    return _leg(stock, legs, i)


def best_leg_within(
    stock: Sequence[StockResistor] | StockArrays,
    low: float,
    high: float,
    *,
    connections: Sequence[str] = CONNECTIONS,
    boards: int = 1,
) -> Leg | None:
    """The leg whose whole evidence interval fits a resistance window, Ω.

    For a set resistor (e.g. Rset = ilim_gain / Ilim with Ilim in a window): among
    the legs (single, series, parallel) whose [low, high] lies inside [``low``,
    ``high``], the one with the fewest parts, then nearest the window's geometric
    middle. When none fits, the leg that leaves the window least (relative to the
    middle), so the caller can say by how much.

    Raises
    ------
    ValueError
        When the window is empty or not positive.
    """
    if not 0 < low <= high:
        raise ValueError(f"resistance window {low!r} ... {high!r} is empty")
    stock = StockArrays.of(stock)
    legs = _build_legs(stock, connections, boards)
    if legs.value.size == 0:
        return None
    mid = math.sqrt(low * high)
    parts = (legs.b >= 0).astype(int)
    off = np.abs(np.log(legs.value / mid))
    inside = (legs.low >= low) & (legs.high <= high)
    if inside.any():
        idx = np.flatnonzero(inside)
        i = int(idx[np.lexsort((off[idx], parts[idx]))[0]])
    else:
        excess = np.maximum(low - legs.low, legs.high - high) / mid
        i = int(np.lexsort((parts, np.round(excess, 12)))[0])
    return _leg(stock, legs, i)

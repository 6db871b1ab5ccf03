"""Evidence for many bins at once, as numpy arrays.

The same rules as :func:`kitbin.match.evidence.build_evidence`, applied to every
bin of an inventory in a few array operations, so that a matcher over 100,000 bins
never builds 100,000 Python objects. ``tests/property/test_match_props.py`` checks
that a row of an :class:`EvidenceTable` equals the scalar evidence of that bin.

Grades are coded 0 measured, 1 marked, 2 assumed, 3 unknown (:data:`GRADES` order);
statuses 0 pass, 1 fail, 2 unverified (:data:`STATUSES` order).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from kitbin.match.evidence import GRADES, Evidence
from kitbin.quantities import QUANTITIES

STATUSES: tuple[str, ...] = ("pass", "fail", "unverified")
PASS, FAIL, UNVERIFIED = 0, 1, 2
MEASURED, MARKED, ASSUMED, UNKNOWN = 0, 1, 2, 3


@dataclass(frozen=True)
class EvidenceTable:
    """Evidence of one quantity for ``n`` bins (row ``k`` is bin ``k`` of the caller).

    Every array has length ``n``; values SI, ``nan`` where unknown.
    """

    quantity: str
    grade: np.ndarray
    low: np.ndarray
    high: np.ndarray
    closed_low: np.ndarray
    closed_high: np.ndarray
    max_low: np.ndarray
    mean: np.ndarray
    spread: np.ndarray
    n: np.ndarray
    lower_bound_only: np.ndarray
    higher_is_better: bool
    #: Distinct specimens behind each row's readings; -1 where not counted (the
    #: matcher counts them only for the rows it shows). None: not counted at all.
    specimens: np.ndarray | None = None

    def __len__(self) -> int:
        return int(self.grade.size)

    def conservative(self) -> np.ndarray:
        """Worst-case end per bin (low when more is better, else high)."""
        return self.low if self.higher_is_better else self.high

    def typical(self) -> np.ndarray:
        """Mean of readings, else the middle of a finite interval, else the low end."""
        mid = np.where(np.isinf(self.high), self.low, 0.5 * (self.low + self.high))
        return np.where(np.isnan(self.mean), mid, self.mean)

    def at_least(self, required: np.ndarray | float) -> np.ndarray:
        """Status codes of "value >= required" (see :meth:`Evidence.at_least`)."""
        req = np.asarray(required, dtype=float)
        out = np.full(self.grade.shape, UNVERIFIED, dtype=np.int8)
        known = self.grade != UNKNOWN
        out[known & (self.closed_low < req)] = FAIL
        out[known & (self.low >= req)] = PASS
        return out

    def at_most(self, required: np.ndarray | float) -> np.ndarray:
        """Status codes of "value <= required" (see :meth:`Evidence.at_most`)."""
        req = np.asarray(required, dtype=float)
        out = np.full(self.grade.shape, UNVERIFIED, dtype=np.int8)
        known = self.grade != UNKNOWN
        out[known & ((self.closed_high > req) | (self.max_low > req))] = FAIL
        out[known & (self.high <= req)] = PASS
        return out

    def with_specimens(self, rows: np.ndarray, counts: np.ndarray) -> EvidenceTable:
        """A copy that knows the specimen count of ``rows`` (others stay as they were)."""
        known = np.full(len(self), -1, dtype=np.int64) if self.specimens is None else self.specimens
        known = known.copy()
        known[np.asarray(rows, dtype=np.int64)] = counts
        return replace(self, specimens=known)

    def row(self, k: int, specimens: int = 0, source: str = "") -> Evidence:
        """The scalar :class:`Evidence` of row ``k`` (``specimens``: its specimen count,
        when the table does not know it)."""
        if not specimens and self.specimens is not None:
            specimens = max(int(self.specimens[k]), 0)
        g = GRADES[int(self.grade[k])]
        if g == "unknown":
            return Evidence(self.quantity, "unknown", higher_is_better=self.higher_is_better)
        src = (
            source
            or {"measured": "readings", "marked": "marking", "assumed": "an assumed default"}[g]
        )
        return Evidence(
            quantity=self.quantity,
            grade=g,  # type: ignore[arg-type]
            low=float(self.low[k]),
            high=float(self.high[k]),
            n=int(self.n[k]),
            mean=float(self.mean[k]),
            spread=float(self.spread[k]),
            specimens=specimens,
            lower_bound_only=bool(self.lower_bound_only[k]),
            closed_low=float(self.closed_low[k]),
            closed_high=float(self.closed_high[k]),
            max_low=float(self.max_low[k]),
            source=src,
            higher_is_better=self.higher_is_better,
        )


def evidence_table(
    quantity: str,
    n: int,
    *,
    reading_row: np.ndarray | None = None,
    reading_value: np.ndarray | None = None,
    reading_bound: np.ndarray | None = None,
    nominal: np.ndarray | None = None,
    tol_minus: np.ndarray | None = None,
    tol_plus: np.ndarray | None = None,
    prop_row: np.ndarray | None = None,
    prop_value: np.ndarray | None = None,
    prop_grade: np.ndarray | None = None,
    prop_tol: np.ndarray | None = None,
    assumed: float | None = None,
    assumed_tol: float = 0.0,
) -> EvidenceTable:
    """Evidence of ``quantity`` for ``n`` bins from flat arrays.

    Parameters
    ----------
    quantity
        Quantity name.
    n
        Number of bins (rows 0 .. n-1).
    reading_row, reading_value, reading_bound
        One entry per reading: the bin's row, the SI value, True for a lower
        bound (``>=``).
    nominal, tol_minus, tol_plus
        Per bin: the marked value (nan when none) and tolerances (fractions; nan = 0).
    prop_row, prop_value, prop_grade, prop_tol
        One entry per bin property of this quantity: row, SI value, grade code
        (0 measured, 1 marked, 2 assumed, 3 unknown) and tolerance fraction.
    assumed, assumed_tol
        A default for every bin with nothing better (visible as grade ``assumed``).
    """
    kind = QUANTITIES[quantity]
    grade = np.full(n, UNKNOWN, dtype=np.int8)
    low = np.full(n, np.nan)
    high = np.full(n, np.nan)
    closed_low = np.full(n, np.inf)
    closed_high = np.full(n, -np.inf)
    max_low = np.full(n, -np.inf)
    mean = np.full(n, np.nan)
    spread = np.full(n, np.nan)
    count = np.zeros(n, dtype=np.int64)
    lbo = np.zeros(n, dtype=bool)

    def fill(mask: np.ndarray, g: int, lo: np.ndarray, hi: np.ndarray, nn: int = 0) -> None:
        mask = mask & (grade == UNKNOWN)
        lo_m, hi_m = np.minimum(lo, hi)[mask], np.maximum(lo, hi)[mask]
        grade[mask] = g
        low[mask] = lo_m
        high[mask] = hi_m
        closed_low[mask] = lo_m
        closed_high[mask] = hi_m
        max_low[mask] = lo_m
        count[mask] = nn

    # 1. readings: measured
    if reading_row is not None and reading_row.size:
        rows = np.asarray(reading_row, dtype=np.int64)
        val = np.asarray(reading_value, dtype=float)
        bnd = (
            np.zeros(rows.size, dtype=bool)
            if reading_bound is None
            else np.asarray(reading_bound, dtype=bool)
        )
        exact = ~bnd
        count[:] = np.bincount(rows, minlength=n)
        n_exact = np.bincount(rows, weights=exact, minlength=n)
        has = count > 0
        lo_all = np.full(n, np.inf)
        np.minimum.at(lo_all, rows, val)
        hi_all = np.full(n, -np.inf)
        np.maximum.at(hi_all, rows, val)
        ex_lo = np.full(n, np.inf)
        np.minimum.at(ex_lo, rows[exact], val[exact])
        ex_hi = np.full(n, -np.inf)
        np.maximum.at(ex_hi, rows[exact], val[exact])
        sums = np.bincount(rows[exact], weights=val[exact], minlength=n)
        any_bound = np.bincount(rows[bnd], minlength=n) > 0
        grade[has] = MEASURED
        low[has] = lo_all[has]
        high[has] = np.where(any_bound, np.inf, ex_hi)[has]
        closed_low[has] = ex_lo[has]
        closed_high[has] = ex_hi[has]
        max_low[has] = hi_all[has]
        with np.errstate(invalid="ignore", divide="ignore"):
            m = sums / n_exact
        sel = has & (n_exact > 0)
        mean[sel] = m[sel]
        spread[sel] = (ex_hi - ex_lo)[sel]
        lbo[has] = n_exact[has] == 0
    # 2. properties by grade, then the nominal (marked), then the default (assumed)
    props = prop_row is not None and prop_row.size > 0
    for g in (MEASURED, MARKED, ASSUMED):
        if props:
            pr = np.asarray(prop_row, dtype=np.int64)
            pg = np.asarray(prop_grade, dtype=np.int8)
            pv = np.asarray(prop_value, dtype=float)
            pt = np.zeros(pr.size) if prop_tol is None else np.nan_to_num(prop_tol)
            sel = pg == g
            if sel.any():
                # first property of this grade per bin (as the scalar builder does)
                r, first = np.unique(pr[sel], return_index=True)
                v = pv[sel][first]
                t = pt[sel][first]
                mask = np.zeros(n, dtype=bool)
                mask[r] = True
                lo = np.full(n, np.nan)
                hi = np.full(n, np.nan)
                lo[r] = v * (1 - t)
                hi[r] = v * (1 + t)
                fill(mask, g, lo, hi, 1 if g == MEASURED else 0)
        if g == MARKED and nominal is not None:
            nom = np.asarray(nominal, dtype=float)
            tm = np.zeros(n) if tol_minus is None else np.nan_to_num(np.asarray(tol_minus, float))
            tp = tm if tol_plus is None else np.asarray(tol_plus, float)
            tp = np.where(np.isnan(tp), tm, tp)
            mask = ~np.isnan(nom)
            was = mask & (grade == UNKNOWN)
            fill(mask, MARKED, nom * (1 - tm), nom * (1 + tp))
            mean[was] = nom[was]
        if g == ASSUMED and assumed is not None:
            v = float(assumed)
            fill(
                np.ones(n, dtype=bool),
                ASSUMED,
                np.full(n, v * (1 - assumed_tol)),
                np.full(n, v * (1 + assumed_tol)),
            )
    return EvidenceTable(
        quantity=quantity,
        grade=grade,
        low=low,
        high=high,
        closed_low=closed_low,
        closed_high=closed_high,
        max_low=max_low,
        mean=mean,
        spread=spread,
        n=count,
        lower_bound_only=lbo,
        higher_is_better=kind.higher_is_better,
    )


def status_name(code: int) -> str:
    """``pass``, ``fail`` or ``unverified`` for a status code."""
    return STATUSES[int(code)]


def nan_or(value: float, default: float) -> float:
    """``default`` when ``value`` is nan."""
    return default if math.isnan(value) else value

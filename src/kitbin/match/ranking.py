"""Ranking judged candidates, and the words that explain each row.

Order: verified feasible first (every check passes), then feasible with unverified
checks (none fails), then failures; within a group by a score, highest first, then
by label. The score (points, higher is better; the weights are common practice,
no source, chosen so that each term can move a part past a neighbour of similar
quality but none dominates):

* 100 base;
* margins: 20 × the mean over the checks with a known margin of the margin
  clipped to [−1, +0.5] (more than 50 % margin earns nothing more);
* evidence: −2 per unverified check (fewer unknowns rank higher);
* stock left: up to +5, 5 × min(free / (4 × parts needed), 1);
* inductor only: −2 per percent of the output power lost in the winding
  (IL,rms² × DCR; an unknown DCR counts as 5 %), and −20 × |r − r_target| / r_target
  for the ripple ratio away from the plan's target.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from kitbin.match.evidence_table import FAIL, UNVERIFIED
from kitbin.match.verdicts import Check, RoleVerdicts
from kitbin.stage.spec import Spec
from kitbin.units import format_quantity

_OPS = {">=": "≥", "<=": "≤"}
VERDICTS: tuple[str, ...] = ("verified", "unverified", "fails")
#: Copper loss assumed, as a percent of output power, when the DCR is unknown.
UNKNOWN_LOSS_PCT = 5.0


@dataclass(frozen=True)
class RankedRow:
    """One ranked candidate with its checks and explanation."""

    rank: int
    row: int
    label: str
    verdict: str
    score: float
    checks: tuple[Check, ...]
    summary: str
    notes: tuple[str, ...] = ()
    figures: tuple[tuple[str, float], ...] = ()

    def figure(self, name: str) -> float:
        """A named figure (e.g. ``i_peak``), nan when absent."""
        return dict(self.figures).get(name, math.nan)


def scores(rv: RoleVerdicts, spec: Spec | None = None, needed: int = 1) -> np.ndarray:
    """The score of every candidate of a role (see the module docstring).

    Parameters
    ----------
    rv
        The role's verdicts.
    spec
        The plan (for the inductor's loss and ripple terms).
    needed
        Parts needed for all boards.
    """
    mtx = rv.matrix
    n = mtx.n
    keep = np.array([r.quantity != "stock" for r in mtx.requirements], dtype=bool)
    score = np.full(n, 100.0)
    if keep.any():
        mg = mtx.margin[:, keep]
        finite = np.isfinite(mg)
        clipped = np.where(finite, np.clip(np.where(finite, mg, 0.0), -1.0, 0.5), 0.0)
        count = finite.sum(axis=1)
        with np.errstate(invalid="ignore", divide="ignore"):
            mean = np.where(count > 0, clipped.sum(axis=1) / np.maximum(count, 1), 0.0)
        score += 20.0 * mean
        score -= 2.0 * (mtx.effective_status()[:, keep] == UNVERIFIED).sum(axis=1)
    avail = rv.candidates.available.astype(float)
    score += 5.0 * np.minimum(avail / (4.0 * max(needed, 1)), 1.0)
    if rv.role == "inductor" and spec is not None:
        po = spec.vout * spec.iout_max
        p = rv.extras.get("p_copper", np.full(n, np.nan))
        loss_pct = np.where(np.isnan(p), UNKNOWN_LOSS_PCT, 100.0 * p / po)
        r = rv.extras.get("ripple_ratio", np.full(n, np.nan))
        dev = np.where(np.isnan(r), 1.0, np.abs(r - spec.ripple_ratio) / spec.ripple_ratio)
        score -= 2.0 * np.minimum(loss_pct, 50.0) + 20.0 * np.minimum(dev, 5.0)
    return score


def order(rv: RoleVerdicts, score: np.ndarray) -> np.ndarray:
    """Row indices best first: by group, then score (high first), then label."""
    group = rv.matrix.group()
    labels = np.array(rv.candidates.labels, dtype=object)
    # lexsort sorts by the last key first
    return np.lexsort((labels, -np.round(score, 9), group)) if len(labels) else np.array([], int)


def rank(
    rv: RoleVerdicts,
    spec: Spec | None = None,
    *,
    top: int | None = None,
    needed: int = 1,
) -> list[RankedRow]:
    """Ranked rows of a role, best first (only the first ``top`` when given)."""
    sc = scores(rv, spec, needed)
    idx = order(rv, sc)
    return rows_at(rv, spec, idx if top is None else idx[:top], sc)


def rows_at(
    rv: RoleVerdicts, spec: Spec | None, idx: np.ndarray, score: np.ndarray
) -> list[RankedRow]:
    """The ranked rows of candidates ``idx``, which are the first rows of :func:`order`
    (ranks 1, 2, ... in that order); ``score`` as :func:`scores` gave it."""
    group = rv.matrix.group()
    return [_row(rv, spec, int(k), pos, score, group) for pos, k in enumerate(idx, 1)]


def rank_one(rv: RoleVerdicts, spec: Spec | None, k: int, *, needed: int = 1) -> RankedRow:
    """The ranked row of candidate ``k`` (e.g. one chosen by the user), with its rank."""
    sc = scores(rv, spec, needed)
    idx = order(rv, sc)
    pos = int(np.flatnonzero(idx == k)[0]) + 1
    return _row(rv, spec, k, pos, sc, rv.matrix.group())


def _row(
    rv: RoleVerdicts, spec: Spec | None, k: int, pos: int, sc: np.ndarray, group: np.ndarray
) -> RankedRow:
    checks = rv.matrix.checks(k)
    verdict = VERDICTS[int(group[k])]
    figures = tuple((name, float(arr[k])) for name, arr in rv.extras.items() if arr.size > k)
    return RankedRow(
        rank=pos,
        row=k,
        label=rv.candidates.labels[k],
        verdict=verdict,
        score=float(sc[k]),
        checks=checks,
        summary=explain(rv.role, verdict, checks, dict(figures), spec),
        notes=tuple(rv.row_notes.get(k, ())),
        figures=figures,
    )


def explain(
    role: str,
    verdict: str,
    checks: tuple[Check, ...],
    figures: dict[str, float],
    spec: Spec | None,
) -> str:
    """One sentence saying why a row sits where it does."""
    fails = [c for c in checks if c.status == "fail"]
    unver = [c for c in checks if c.status == "unverified"]
    if role == "inductor":
        # the i_rise rating and the predicted rise are alternatives: one pass covers both
        thermal = {"i_rise", "rise_load"}
        if any(c.status == "pass" for c in checks if c.quantity in thermal):
            unver = [c for c in unver if c.quantity not in thermal]
            fails = [c for c in fails if c.quantity not in thermal]
    if verdict == "verified":
        weakest = min(
            (c for c in checks if math.isfinite(c.margin) and c.quantity != "stock"),
            key=lambda c: c.margin,
            default=None,
        )
        head = "every check passes on the worst case"
        if weakest is not None:
            head += f"; tightest: {weakest.name} with {100 * weakest.margin:+.0f} % margin"
    elif verdict == "unverified":
        head = "nothing fails, but unverified: " + ", ".join(
            f"{c.name} ({'no evidence' if c.grade == 'unknown' else 'lower bound only'})"
            for c in unver
        )
    else:
        head = "fails " + "; ".join(_why_fail(c) for c in fails)
    tail = []
    if role == "inductor" and spec is not None:
        pk = figures.get("i_peak", math.nan)
        r = figures.get("ripple_ratio", math.nan)
        p = figures.get("p_copper", math.nan)
        if math.isfinite(pk):
            tail.append(f"own peak {format_quantity(pk, 'current')}")
        elif pk == math.inf:
            tail.append("current runs away")
        if math.isfinite(r):
            tail.append(f"r = {r:.2f} (target {spec.ripple_ratio:g})")
        if math.isfinite(p):
            po = spec.vout * spec.iout_max
            tail.append(f"copper loss {format_quantity(p, 'power')} ({100 * p / po:.1f} % of Po)")
        else:
            tail.append("copper loss unknown (no DCR)")
    return head + ("; " + ", ".join(tail) if tail else "")


def _why_fail(c: Check) -> str:
    from kitbin.quantities import QUANTITIES

    dim = QUANTITIES[c.quantity].dimension if c.quantity in QUANTITIES else ""
    if c.quantity == "stock":
        return f"in stock ({int(c.have)} free, needs {int(c.required)})"

    def f(v: float) -> str:
        if math.isinf(v):
            return "∞"
        if dim in ("", "ratio") and abs(v) > 1.5:
            return f"{v:.4g}"
        return format_quantity(v, dim) if dim else f"{v:.4g}"

    return f"{c.name} (has {f(c.have)}, needs {_OPS[c.op]} {f(c.required)})"


def status_counts(rv: RoleVerdicts) -> dict[str, int]:
    """How many candidates are verified, unverified and failing."""
    g = rv.matrix.group()
    return {v: int((g == i).sum()) for i, v in enumerate(VERDICTS)}


def any_fail(rv: RoleVerdicts) -> np.ndarray:
    """Per candidate: True when some check fails."""
    return (rv.matrix.status == FAIL).any(axis=1)

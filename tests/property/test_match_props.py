"""Properties of the matcher's building blocks (hypothesis).

* The array evidence builder agrees row by row with the scalar one (the scalar
  rules are hand-worked in tests/unit/match/test_evidence.py).
* Judgements are monotone: raising a minimum can only move pass -> unverified/fail.
* The divider search equals an itertools brute force (reference: exhaustive
  enumeration with the Python standard library) on random small stocks.
"""

from __future__ import annotations

import itertools
import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from kitbin.match.divider import StockResistor, best_divider
from kitbin.match.evidence import (
    GRADES,
    Nominal,
    PropertyValue,
    ReadingValue,
    build_evidence,
    grade_of_source,
)
from kitbin.match.evidence_table import STATUSES, evidence_table

_value = st.floats(0.1, 10.0, allow_nan=False)
_reading = st.tuples(_value, st.booleans(), st.one_of(st.none(), st.integers(1, 3)))
_prop = st.tuples(
    _value, st.sampled_from(["measured", "listing", "assumed"]), st.sampled_from([0.0, 0.01, 0.1])
)
_bin = st.fixed_dictionaries(
    {
        "readings": st.lists(_reading, max_size=4),
        "nominal": st.one_of(st.none(), st.tuples(_value, st.sampled_from([0.0, 0.05, 0.2]))),
        "props": st.lists(_prop, max_size=3),
    }
)


@settings(max_examples=150, deadline=None)
@given(
    bins=st.lists(_bin, min_size=1, max_size=6),
    assumed=st.one_of(st.none(), _value),
    req=_value,
    quantity=st.sampled_from(["isat_20", "dcr", "inductance"]),
    shown=st.sets(st.integers(0, 5)),
)
def test_table_rows_equal_scalar_evidence(bins, assumed, req, quantity, shown) -> None:
    rr, rv, rb, pr, pv, pg, pt = [], [], [], [], [], [], []
    nom = np.full(len(bins), np.nan)
    tol = np.full(len(bins), np.nan)
    for k, b in enumerate(bins):
        for v, is_bound, _ in b["readings"]:
            rr.append(k), rv.append(v), rb.append(is_bound)
        if b["nominal"] is not None:
            nom[k], tol[k] = b["nominal"]
        for v, src, t in b["props"]:
            pr.append(k), pv.append(v), pg.append(GRADES.index(grade_of_source(src))), pt.append(t)
    table = evidence_table(
        quantity,
        len(bins),
        reading_row=np.array(rr, dtype=int),
        reading_value=np.array(rv),
        reading_bound=np.array(rb, dtype=bool),
        nominal=nom,
        tol_minus=tol,
        prop_row=np.array(pr, dtype=int),
        prop_value=np.array(pv),
        prop_grade=np.array(pg, dtype=np.int8),
        prop_tol=np.array(pt),
        assumed=assumed,
    )
    # the matcher counts specimens only for the rows it shows
    shown_rows = sorted(k for k in shown if k < len(bins))
    counts = [len({sp for _, _, sp in bins[k]["readings"] if sp is not None}) for k in shown_rows]
    table = table.with_specimens(np.array(shown_rows, dtype=int), np.array(counts, dtype=int))
    least = table.at_least(req)
    most = table.at_most(req)
    for k, b in enumerate(bins):
        ev = build_evidence(
            quantity,
            [ReadingValue(v, ">=" if is_b else "=", sp) for v, is_b, sp in b["readings"]],
            nominal=Nominal(*b["nominal"]) if b["nominal"] else None,
            properties=[PropertyValue(v, s, t) for v, s, t in b["props"]],
            assumed=assumed,
        )
        row = table.row(k)
        assert row.grade == ev.grade
        for name in ("low", "high", "closed_low", "closed_high", "max_low", "mean", "spread"):
            a, e = getattr(row, name), getattr(ev, name)
            assert (math.isnan(a) and math.isnan(e)) or math.isclose(a, e, rel_tol=1e-12), name
        assert row.n == ev.n and row.lower_bound_only == ev.lower_bound_only
        if k in shown_rows and ev.grade == "measured" and b["readings"]:
            assert row.specimens == ev.specimens and row.describe() == ev.describe()
        assert STATUSES[least[k]] == ev.at_least(req)
        assert STATUSES[most[k]] == ev.at_most(req)


@settings(max_examples=100, deadline=None)
@given(readings=st.lists(_reading, min_size=1, max_size=5), a=_value, b=_value)
def test_at_least_is_monotone(readings, a, b) -> None:
    lo, hi = sorted((a, b))
    ev = build_evidence("isat_20", [ReadingValue(v, ">=" if x else "=", s) for v, x, s in readings])
    order = {"pass": 0, "unverified": 1, "fail": 2}
    # a harder requirement is never judged better than an easier one
    assert order[ev.at_least(hi)] >= order[ev.at_least(lo)] or ev.at_least(lo) == "fail"
    if ev.at_least(hi) == "pass":
        assert ev.at_least(lo) == "pass"
    assert ev.conservative() <= ev.optimistic()


@settings(max_examples=60, deadline=None)
@given(
    values=st.lists(st.integers(300, 300_000), min_size=2, max_size=6, unique=True),
    target=st.floats(1.0, 15.0),
    vref=st.sampled_from([0.6, 0.8, 1.25]),
    pairs=st.booleans(),
)
def test_divider_equals_brute_force(values, target, vref, pairs) -> None:
    stock = [
        StockResistor(f"R{i}", float(v), float(v), float(v), available=2)
        for i, v in enumerate(values)
    ]
    conns = ("single", "series", "parallel") if pairs else ("single",)
    legs = [((i,), float(v)) for i, v in enumerate(values)]
    if pairs:
        for i, j in itertools.combinations_with_replacement(range(len(values)), 2):
            a, b = float(values[i]), float(values[j])
            legs += [((i, j), a + b), ((i, j), a * b / (a + b))]
    best = math.inf
    for (tp, rt), (bp, rbv) in itertools.product(legs, legs):
        use = {}
        for k in tp + bp:
            use[k] = use.get(k, 0) + 1
        if 1e3 <= rbv <= 100e3 and all(c <= 2 for c in use.values()):
            best = min(best, abs(vref * (1 + rt / rbv) - target))
    if target <= vref:
        return
    got = best_divider(stock, vref, target, connections=conns)
    if math.isinf(best):
        assert got is None
    else:
        assert got is not None
        assert math.isclose(abs(got.vout - target), best, rel_tol=1e-9, abs_tol=1e-12)


@settings(max_examples=80, deadline=None)
@given(
    isat=st.lists(st.one_of(st.none(), st.tuples(st.floats(0.2, 5.0), st.booleans())),
                  min_size=1, max_size=8),
    stock=st.lists(st.integers(0, 30), min_size=8, max_size=8),
)  # fmt: skip
def test_ranking_groups_then_scores(isat, stock) -> None:
    # Order rule (kitbin.match.ranking): verified, then unverified, then fails; within a
    # group by score, highest first. Checked on random inductor evidence.
    from kitbin.match.ranking import VERDICTS, rank
    from kitbin.match.verdicts import Candidates, inductor_verdicts
    from kitbin.stage.demands import demand_for, demands
    from kitbin.stage.spec import Spec

    spec = Spec("buck", 12.0, 12.0, 5.0, 1.0, 500e3, vf=0.0, survive_short=False)
    n = len(isat)
    rows = [k for k, x in enumerate(isat) if x is not None]
    tables = {
        "inductance": evidence_table("inductance", n, nominal=np.full(n, 22e-6),
                                     tol_minus=np.full(n, 0.1)),
        "isat_20": evidence_table(
            "isat_20", n, reading_row=np.array(rows, dtype=int),
            reading_value=np.array([isat[k][0] for k in rows]),
            reading_bound=np.array([isat[k][1] for k in rows], dtype=bool),
        ),
        "i_rise": evidence_table("i_rise", n, reading_row=np.arange(n),
                                 reading_value=np.full(n, 3.0)),
    }  # fmt: skip
    cands = Candidates(tuple(f"L{k}" for k in range(n)), np.array(stock[:n]), tables)
    ranked = rank(inductor_verdicts(spec, demand_for(demands(spec), "inductor"), cands), spec)
    keys = [(VERDICTS.index(r.verdict), round(-r.score, 6)) for r in ranked]
    assert keys == sorted(keys)
    assert sorted(r.label for r in ranked) == sorted(cands.labels)

"""The divider search against outside references.

* The true optimum is checked against an independent brute force: every pair of legs
  enumerated with :mod:`itertools` (reference: the Python standard library; the
  brute force shares no code with the vectorised search).
* Best pairs from E-series stock are REFERENCES section 7 ("Picking from series"),
  computed there by exhaustive search over three decades; the series values come
  from the ``eseries`` package (IEC 60063 tables).
* Output bands are REFERENCES section 7 worked examples F1-F3 (worst-case corner
  formulas; data-sheet form Vout = Vref(1 + Rtop/Rbot) + I_FB*Rtop).
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from eseries import E24, E96, E192, erange

from kitbin.match.divider import (
    StockResistor,
    best_divider,
    best_leg_within,
    divider_band,
    divider_vout,
    nearest_leg,
)


def _stock(values, tol=0.01, available=10):
    return [
        StockResistor(f"R-{i:03d}", v, v * (1 - tol), v * (1 + tol), available=available)
        for i, v in enumerate(values)
    ]


def _brute(stock, vref, target, ifb, rbot_range, connections, boards=1):
    """Every (top, bottom) pair of legs, enumerated; returns the least |Vout - target|."""
    legs = []
    n = len(stock)
    if "single" in connections:
        legs += [((i,), stock[i].value) for i in range(n)]
    for i, j in itertools.combinations_with_replacement(range(n), 2):
        a, b = stock[i].value, stock[j].value
        if "series" in connections:
            legs.append(((i, j), a + b))
        if "parallel" in connections:
            legs.append(((i, j), a * b / (a + b)))
    best = math.inf
    for (tp, rt), (bp, rb) in itertools.product(legs, legs):
        if not rbot_range[0] <= rb <= rbot_range[1]:
            continue
        use: dict[int, int] = {}
        for k in tp + bp:
            use[k] = use.get(k, 0) + 1
        if any(stock[k].available < c * boards for k, c in use.items()):
            continue
        best = min(best, abs(vref * (1 + rt / rb) + ifb * rt - target))
    return best


@pytest.mark.parametrize("seed", range(12))
@pytest.mark.parametrize(
    "connections", [("single",), ("single", "series"), ("single", "series", "parallel")]
)
def test_search_matches_brute_force(seed: int, connections: tuple[str, ...]) -> None:
    rng = np.random.default_rng(seed)
    n = int(rng.integers(3, 9))
    values = np.round(10 ** rng.uniform(2.5, 5.5, n), 0)
    avail = rng.integers(1, 4, n)
    stock = [
        StockResistor(f"R{i}", float(v), float(v) * 0.99, float(v) * 1.01, available=int(a))
        for i, (v, a) in enumerate(zip(values, avail, strict=True))
    ]
    vref = float(rng.choice([0.6, 0.8, 1.25]))
    target = float(rng.uniform(1.5, 12.0))
    ifb = float(rng.choice([0.0, 100e-9]))
    ref = _brute(stock, vref, target, ifb, (1e3, 100e3), connections)
    got = best_divider(stock, vref, target, ifb=ifb, connections=connections)
    if math.isinf(ref):
        assert got is None
        return
    assert got is not None
    assert abs(got.vout - target) == pytest.approx(ref, rel=1e-9, abs=1e-12)
    # the reported Vout is what the reported legs give
    assert got.vout == pytest.approx(divider_vout(vref, got.top.value, got.bottom.value, ifb))
    assert 1e3 <= got.bottom.value <= 100e3


def test_two_boards_need_two_parts_per_bin() -> None:
    # Only R1 (10 k, 1 on hand) and R0 (33 k, 3 on hand) and R2 (10 k, 2 on hand):
    # for 2 boards the 10 k bottom must come from R2.
    stock = [
        StockResistor("R0", 33e3, 33e3, 33e3, available=3),
        StockResistor("R1", 10e3, 10e3, 10e3, available=1),
        StockResistor("R2", 10e3, 10e3, 10e3, available=2),
    ]
    got = best_divider(stock, 0.8, 0.8 * 4.3, boards=2)
    assert got is not None and got.bottom.parts == ("R2",) and got.top.parts == ("R0",)
    assert _brute(stock, 0.8, 0.8 * 4.3, 0.0, (1e3, 100e3), ("single",), boards=2) == (
        pytest.approx(abs(got.vout - 0.8 * 4.3), abs=1e-12)
    )


def test_shared_bin_limited_by_stock() -> None:
    # Ratio 1 is exact with the same bin on both legs, which needs 2 parts: with
    # only one on hand the search must take the next best pair (brute force agrees).
    stock = [
        StockResistor("A", 10e3, 10e3, 10e3, available=1),
        StockResistor("B", 12e3, 12e3, 12e3, available=1),
    ]
    got = best_divider(stock, 1.0, 2.0)
    assert got is not None and {got.top.parts, got.bottom.parts} == {("A",), ("B",)}
    assert abs(got.vout - 2.0) == pytest.approx(
        _brute(stock, 1.0, 2.0, 0.0, (1e3, 100e3), ("single",))
    )
    stock2 = [StockResistor("A", 10e3, 10e3, 10e3, available=2), stock[1]]
    got2 = best_divider(stock2, 1.0, 2.0)
    assert got2 is not None and got2.error == pytest.approx(0.0, abs=1e-12)


def _series_stock(series):
    # Three decades, 1 kOhm ... 976 kOhm, as the search in REFERENCES section 7.
    return _stock([v for v in erange(series, 1e3, 1e6) if v < 1e6 * (1 - 1e-9)])


def test_e24_3v3_from_0v8_is_exact() -> None:
    # REFERENCES section 7: E24 has 7.5 k / 2.4 k (ratio 3.125) -> exactly 3.300 V.
    got = best_divider(_series_stock(E24), 0.8, 3.3, rbot_range=(1e3, 1e6))
    assert got is not None
    assert got.error == pytest.approx(0.0, abs=1e-12)
    assert got.top.value / got.bottom.value == pytest.approx(3.125)


def test_e96_3v3_from_0v8_best_is_357k_over_115k() -> None:
    # REFERENCES section 7: E96 best is 357 k / 115 k = 3.283 V (-0.50 %).
    got = best_divider(_series_stock(E96), 0.8, 3.3, rbot_range=(1e3, 1e6))
    assert got is not None
    assert got.vout == pytest.approx(3.283, abs=5e-4)
    assert got.error_pct == pytest.approx(-0.50, abs=0.005)
    assert got.top.value / got.bottom.value == pytest.approx(357 / 115)


def test_e192_3v3_from_0v8_is_exact() -> None:
    # REFERENCES section 7: E192 has 4.75 k / 1.52 k (ratio 3.125) -> exact.
    got = best_divider(_series_stock(E192), 0.8, 3.3, rbot_range=(1e3, 1e6))
    assert got is not None and got.error == pytest.approx(0.0, abs=1e-12)


def test_e24_5v_from_0v8() -> None:
    # REFERENCES section 7: E24, 43 k / 8.2 k = 4.995 V (-0.098 %).
    got = best_divider(_series_stock(E24), 0.8, 5.0, rbot_range=(1e3, 1e6))
    assert got is not None
    assert got.vout == pytest.approx(4.995, abs=5e-4)
    assert got.error_pct == pytest.approx(-0.098, abs=0.001)


def test_series_leg_beats_e96_singles() -> None:
    # With two E96 parts in series or parallel allowed, the search can only do at
    # least as well as the -0.50 % of singles (the singles are in its search space).
    stock = [s for s in _series_stock(E96) if s.value <= 200e3]
    single = best_divider(stock, 0.8, 3.3)
    combo = best_divider(stock, 0.8, 3.3, connections=("single", "series", "parallel"))
    assert single is not None and combo is not None
    assert abs(combo.error) <= abs(single.error)
    assert abs(combo.error) < 1e-3


@pytest.mark.parametrize(
    ("vref", "e", "rtop", "rbot", "t", "ifb", "vnom", "vmax", "vmin"),
    [
        # F1: Vref 0.800 V +-1 %, 52.3 k / 10.0 k, 1 % -> 4.984 V, 5.119 / 4.852 V
        (0.800, 0.01, 52.3e3, 10.0e3, 0.01, 0.0, 4.984, 5.119, 4.852),
        # F2: Vref 1.250 V +-2 %, 16 k / 10 k, 5 %, I_FB 100 nA -> 3.252, 3.531 / 3.000 V
        (1.250, 0.02, 16e3, 10e3, 0.05, 100e-9, 3.252, 3.531, 3.000),
        # F3: Vref 0.600 V +-1.5 %, 100 k / 22.1 k, 0.1 % -> 3.315, 3.370 / 3.260 V
        (0.600, 0.015, 100e3, 22.1e3, 0.001, 0.0, 3.315, 3.370, 3.260),
    ],
)
def test_worst_case_band_reference_f1_f3(vref, e, rtop, rbot, t, ifb, vnom, vmax, vmin) -> None:
    # REFERENCES section 7, F1-F3 (4 significant figures).
    assert divider_vout(vref, rtop, rbot, ifb) == pytest.approx(vnom, abs=6e-4)
    lo, hi = divider_band(
        vref * (1 - e),
        vref * (1 + e),
        (rtop * (1 - t), rtop * (1 + t)),
        (rbot * (1 - t), rbot * (1 + t)),
        (ifb, ifb),
    )
    assert hi == pytest.approx(vmax, abs=6e-4)
    assert lo == pytest.approx(vmin, abs=6e-4)
    # The search over exactly these two parts finds this divider and the same band.
    stock = _stock([rtop, rbot], tol=t, available=1)
    got = best_divider(stock, vref, vnom, vref_tol=e, ifb=ifb)
    assert got is not None
    assert (got.top.value, got.bottom.value) == (pytest.approx(rtop), pytest.approx(rbot))
    assert (got.vout_low, got.vout_high) == (pytest.approx(lo), pytest.approx(hi))


def test_nearest_leg_for_a_set_resistor() -> None:
    # Rset = 2.4 V / 1.5 A... as a resistance target 1.6 kOhm from E24 singles: 1.6 k
    # itself; with only 1.0 k and 3.3 k stocked, the nearest of {1.0 k, 3.3 k, 4.3 k
    # series, 767 Ohm parallel, 2 k, 6.6 k, 500 Ohm, 1.65 k} is 1.65 k (3.3 k || 3.3 k).
    stock = _stock([1.0e3, 3.3e3], tol=0.05, available=4)
    leg = nearest_leg(stock, 1.6e3, connections=("single", "series", "parallel"))
    assert leg is not None
    assert leg.value == pytest.approx(1.65e3) and leg.connection == "parallel"
    assert leg.describe() == "R-001 ∥ R-001"


def test_bad_input() -> None:
    stock = _stock([10e3, 20e3])
    with pytest.raises(ValueError):
        best_divider(stock, 1.0, 0.5)
    with pytest.raises(ValueError):
        best_divider(stock, 0.8, 3.3, connections=("triangle",))
    assert best_divider(stock, 0.8, 3.3, rbot_range=(1.0, 10.0)) is None
    assert best_divider([], 0.8, 3.3) is None


def test_best_leg_within_a_window_matches_enumeration() -> None:
    # Reference: every single, series and parallel leg enumerated with itertools; the
    # chosen leg must fit the window with its whole tolerance interval and have the
    # fewest parts among those that fit. Rset window for Ilim 1.4375 ... 1.58 A with a
    # 100 kV gain: 63.3 ... 69.6 kOhm.
    lo, hi = 100e3 / 1.58, 100e3 / 1.4375
    for values, parts in (([10e3, 22e3, 33e3, 47e3, 68e3, 100e3], 1),
                          ([10e3, 22e3, 33e3, 47e3, 100e3], 2)):  # fmt: skip
        stock = _stock(values, tol=0.01, available=4)
        leg = best_leg_within(stock, lo, hi)
        assert leg is not None and lo <= leg.low and leg.high <= hi
        fits = [1 for v in values if lo <= 0.99 * v and 1.01 * v <= hi]
        for i, j in itertools.combinations_with_replacement(range(len(values)), 2):
            a, b = values[i], values[j]
            for v in (a + b, a * b / (a + b)):
                if lo <= 0.99 * v and 1.01 * v <= hi:
                    fits.append(2)
        assert len(leg.parts) == min(fits) == parts
    # 5 % parts cannot fit a window narrower than +-5 %: the nearest miss is returned
    wide = best_leg_within(_stock([33e3, 68e3], tol=0.05), lo, hi)
    assert wide is not None and not (lo <= wide.low and wide.high <= hi)


def test_best_leg_within_reports_the_nearest_miss() -> None:
    stock = _stock([10e3], tol=0.05, available=1)
    leg = best_leg_within(stock, 63e3, 70e3, connections=("single",))
    assert leg is not None and leg.parts == ("R-000",)
    with pytest.raises(ValueError):
        best_leg_within(stock, 5.0, 1.0)

"""Evidence intervals and grades, worked by hand.

The rule under test is the project's worst-case convention (DESIGN.md, "Numbers
inside"): a matcher relies on the conservative end of each interval. The direction
comes from ``QuantityKind.higher_is_better``. Interval arithmetic here is plain
arithmetic on the stated numbers; each test says how its expected value follows.
"""

from __future__ import annotations

import math

import pytest

from kitbin.match.evidence import (
    Evidence,
    Nominal,
    PropertyValue,
    ReadingValue,
    build_evidence,
    grade_of_source,
    weakest,
)


def test_measured_inductance_worst_case_is_the_lowest_specimen() -> None:
    # Three specimens read 4.62, 4.71, 4.66 uH: the interval is [4.62, 4.71] uH,
    # the mean (4.62+4.71+4.66)/3 = 4.6633 uH, the spread 0.09 uH. More inductance is
    # the safe side (less ripple), so the conservative value is the lowest, 4.62 uH.
    rs = [ReadingValue(v * 1e-6, specimen=i) for i, v in enumerate((4.62, 4.71, 4.66), 1)]
    ev = build_evidence("inductance", rs, nominal=Nominal(4.7e-6, 0.2))
    assert ev.grade == "measured"
    assert (ev.low, ev.high) == (pytest.approx(4.62e-6), pytest.approx(4.71e-6))
    assert ev.n == 3 and ev.specimens == 3
    assert ev.mean == pytest.approx(4.663333e-6, rel=1e-6)
    assert ev.spread == pytest.approx(0.09e-6)
    assert ev.conservative() == pytest.approx(4.62e-6)
    assert not ev.lower_bound_only


def test_dcr_worst_case_is_the_highest_reading() -> None:
    # DCR: less is better (QuantityKind dcr higher_is_better=False), so the
    # conservative value is the highest of 31 and 35 mohm.
    ev = build_evidence("dcr", [ReadingValue(31e-3), ReadingValue(35e-3)])
    assert ev.conservative() == pytest.approx(35e-3)
    assert ev.optimistic() == pytest.approx(31e-3)
    # A limit of 40 mohm is met by both; 33 mohm is broken by the 35 mohm reading.
    assert ev.at_most(40e-3) == "pass"
    assert ev.at_most(33e-3) == "fail"


def test_marked_nominal_with_tolerance() -> None:
    # 10 uH +-20 % marking: the interval is [8, 12] uH; nothing is measured, so the
    # grade is "marked" and the conservative inductance is 8 uH.
    ev = build_evidence("inductance", [], nominal=Nominal(10e-6, 0.2, marking="100"))
    assert ev.grade == "marked"
    assert ev.low == pytest.approx(8e-6) and ev.high == pytest.approx(12e-6)
    assert ev.conservative() == pytest.approx(8e-6)
    assert ev.typical() == pytest.approx(10e-6)
    assert "marking 100" in ev.describe() and "20 %" in ev.describe()


def test_asymmetric_tolerance() -> None:
    # -20/+80 % on 1 uF: [0.8, 1.8] uF.
    ev = build_evidence("capacitance", [], nominal=Nominal(1e-6, 0.2, 0.8))
    assert (ev.low, ev.high) == (pytest.approx(0.8e-6), pytest.approx(1.8e-6))


def test_lower_bound_reading_passes_below_and_is_unverified_above() -> None:
    # "No saturation seen up to 3 A": Isat >= 3 A, interval [3 A, inf).
    # A need of 2.6 A is certainly met; a need of 3.4 A may or may not be: the
    # test never went that far, so the check is unverified, not failed.
    ev = build_evidence("isat_20", [ReadingValue(3.0, bound=">=")])
    assert ev.lower_bound_only
    assert ev.low == 3.0 and math.isinf(ev.high)
    assert ev.at_least(2.6) == "pass"
    assert ev.at_least(3.4) == "unverified"
    assert "≥" in ev.describe()


def test_mixed_exact_and_bound_readings() -> None:
    # Specimen 1 saturates at 3.2 A (exact); specimen 2 not up to 2.9 A (bound).
    # Need 3.0 A: specimen 1 passes, specimen 2 is unknown above 2.9 A -> unverified.
    # Need 3.3 A: specimen 1 is measured below it -> fail.
    rs = [ReadingValue(3.2, specimen=1), ReadingValue(2.9, ">=", specimen=2)]
    ev = build_evidence("isat_20", rs)
    assert ev.low == 2.9 and math.isinf(ev.high)
    assert not ev.lower_bound_only
    assert ev.at_least(2.8) == "pass"
    assert ev.at_least(3.0) == "unverified"
    assert ev.at_least(3.3) == "fail"


def test_lower_bound_on_a_lower_is_better_quantity() -> None:
    # A DCR reading ">= 50 mohm" (meter over range) cannot show a 40 mohm limit is met,
    # and it proves a 45 mohm limit is broken (the true value is at least 50 mohm);
    # a 60 mohm limit stays unverified.
    ev = build_evidence("dcr", [ReadingValue(50e-3, ">=")])
    assert math.isinf(ev.conservative())
    assert ev.at_most(45e-3) == "fail"
    assert ev.at_most(60e-3) == "unverified"


def test_tolerance_straddling_a_requirement_fails_on_worst_case() -> None:
    # Marked 4.7 uH +-20 % is [3.76, 5.64] uH; a need of at least 4 uH is not met at
    # the low end of the tolerance, so on the worst case it fails (not unverified:
    # the marking itself allows a part below the need).
    ev = build_evidence("inductance", [], nominal=Nominal(4.7e-6, 0.2))
    assert ev.at_least(4e-6) == "fail"
    assert ev.at_least(3.7e-6) == "pass"


def test_property_sources_and_precedence() -> None:
    # A stated rating from a listing is "marked"; a default is "assumed"; a measured
    # property outranks both; readings outrank every property.
    listing = PropertyValue(2.0, "listing")
    default = PropertyValue(1.0, "assumed")
    ev = build_evidence("isat_20", [], properties=[default, listing])
    assert ev.grade == "marked" and ev.low == 2.0
    ev = build_evidence("isat_20", [], properties=[default])
    assert ev.grade == "assumed" and ev.low == 1.0
    ev = build_evidence("isat_20", [], properties=[listing, PropertyValue(2.5, "measured")])
    assert ev.grade == "measured" and ev.low == 2.5 and ev.n == 1
    ev = build_evidence("isat_20", [ReadingValue(2.2)], properties=[listing])
    assert ev.grade == "measured" and ev.low == 2.2


def test_reference_voltage_with_tolerance_property() -> None:
    # Vref 0.800 V +-1 % stated in a data sheet: [0.792, 0.808] V.
    ev = build_evidence("vref", [], properties=[PropertyValue(0.8, "datasheet", tol=0.01)])
    assert ev.grade == "marked"
    assert ev.low == pytest.approx(0.792) and ev.high == pytest.approx(0.808)


def test_assumed_default_is_visible() -> None:
    # An assumed Schottky vf of 0.45 V is used, and says so.
    ev = build_evidence("vf", [], assumed=0.45)
    assert ev.grade == "assumed" and ev.conservative() == 0.45
    assert "assumed" in ev.describe()


def test_unknown_is_unverified_both_ways() -> None:
    ev = build_evidence("isat_20")
    assert ev.grade == "unknown" and not ev.known
    assert ev.at_least(1.0) == "unverified" and ev.at_most(1.0) == "unverified"
    assert math.isnan(ev.conservative())
    assert "unknown" in ev.describe()


def test_describe_measured_mentions_count_and_spread() -> None:
    rs = [ReadingValue(10e-6, specimen=1), ReadingValue(11e-6, specimen=2)]
    text = build_evidence("inductance", rs).describe()
    # spread (11-10)/10.5 = 9.5 %
    assert "2 readings on 2 specimens" in text and "9.5 %" in text


def test_bad_reading_bound_is_rejected() -> None:
    with pytest.raises(ValueError):
        ReadingValue(1.0, bound="<=")
    with pytest.raises(ValueError):
        ReadingValue(math.nan)


def test_conditions_mapping_is_frozen_to_tuple() -> None:
    r = ReadingValue(1e-6, conditions={"freq": 1e5, "bias": 0.0})
    assert r.conditions == (("bias", 0.0), ("freq", 1e5))
    hash(r)


def test_grade_helpers() -> None:
    assert grade_of_source("Datasheet") == "marked"
    assert grade_of_source("default") == "assumed"
    assert grade_of_source("") == "unknown"
    assert grade_of_source("bench") == "measured"
    assert weakest(["measured", "assumed", "marked"]) == "assumed"
    assert weakest([]) == "measured"


def test_unknown_quantity_raises() -> None:
    with pytest.raises(KeyError):
        build_evidence("flux_capacity")


def test_evidence_is_frozen() -> None:
    ev = build_evidence("dcr", [ReadingValue(0.1)])
    assert isinstance(ev, Evidence)
    with pytest.raises(AttributeError):
        ev.low = 0.0  # type: ignore[misc]

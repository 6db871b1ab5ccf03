"""kitbin.markings checked against outside sources.

Sources, named beside each check:

* the ``eseries`` package (reference library for IEC 60063 tables, nearest values,
  neighbours, ranges and usual tolerances);
* IEC 60063:2015 "Preferred number series for resistors and capacitors" (year from
  memory), as quoted in the project's REFERENCES.md section 8.4;
* IEC 60062:2016 (Ed. 6.0) + Amd 1:2019 "Marking codes for resistors and
  capacitors", as quoted in REFERENCES.md sections 8.1-8.3 (clause numbers there
  follow the publisher's abstract; values flagged "from memory" there are flagged
  here too).
"""

from __future__ import annotations

import math

import eseries
import pytest

from kitbin.markings import (
    E3,
    E6,
    E12,
    E24,
    E48,
    E96,
    E192,
    SERIES,
    decode_marking,
    decode_tolerance_letter,
    encode_marking,
    is_preferred,
    nearest_preferred,
    preferred_neighbours,
    series_tolerance,
    series_values,
)
from kitbin.markings.colour import DIGIT, MULTIPLIER, TCR, TOLERANCE

_ESERIES_KEY = {
    "E3": eseries.E3,
    "E6": eseries.E6,
    "E12": eseries.E12,
    "E24": eseries.E24,
    "E48": eseries.E48,
    "E96": eseries.E96,
    "E192": eseries.E192,
}


# -- IEC 60063 tables ---------------------------------------------------------------


@pytest.mark.parametrize("name", list(SERIES))
def test_series_tables_match_eseries_package(name: str) -> None:
    # reference library: eseries.series() gives the IEC 60063 tables as integers
    ref = eseries.series(_ESERIES_KEY[name])
    scale = 10 if len(ref) <= 24 else 100
    assert [round(v * scale) for v in SERIES[name]] == list(ref)


def test_e3_to_e24_literal_tables_from_iec60063() -> None:
    # IEC 60063:2015 tables as quoted in REFERENCES.md 8.4
    assert E3 == (1.0, 2.2, 4.7)
    assert E6 == (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
    assert E12 == (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
    assert E24 == (
        1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
        3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1,
    )  # fmt: skip
    # E12 = every second E24 value, E6 every fourth, E3 every eighth (IEC 60063)
    assert E24[::2] == E12 and E24[::4] == E6 and E24[::8] == E3


@pytest.mark.parametrize(
    ("n", "standard", "formula_rounded"),
    # IEC 60063 E24 values that are not the rounded geometric series (REFERENCES.md 8.4)
    [(10, 2.7, 2.6), (11, 3.0, 2.9), (12, 3.3, 3.2), (13, 3.6, 3.5), (14, 3.9, 3.8),
     (15, 4.3, 4.2), (16, 4.7, 4.6), (22, 8.2, 8.3)],
)  # fmt: skip
def test_e24_deviations_from_geometric_series(n: int, standard: float, formula_rounded: float):
    assert round(10 ** (n / 24), 1) == formula_rounded
    assert E24[n] == standard


def test_e24_other_values_are_the_rounded_geometric_series() -> None:
    # IEC 60063: only n = 10..16 and 22 deviate (REFERENCES.md 8.4)
    deviating = {10, 11, 12, 13, 14, 15, 16, 22}
    for n in range(24):
        if n not in deviating:
            assert E24[n] == round(10 ** (n / 24), 1)


def test_three_figure_series_and_the_e192_exception() -> None:
    # IEC 60063: E48/E96/E192 = round(10^(n/N), 2) except E192 n = 185 (9.20, not 9.19)
    assert round(10 ** (185 / 192), 2) == 9.19
    assert E192[185] == 9.20
    for name, series in (("E48", E48), ("E96", E96), ("E192", E192)):
        n_values = len(series)
        for k, value in enumerate(series):
            if (name, k) != ("E192", 185):
                assert value == round(10 ** (k / n_values), 2)
    # E48 = every second E96 value, E96 = every second E192 value (IEC 60063)
    assert E96[::2] == E48
    assert E192[::2] == E96


@pytest.mark.parametrize("name", list(SERIES))
def test_usual_tolerance_matches_eseries_package(name: str) -> None:
    # reference library: eseries.tolerance(); the E6 … E192 pairing is also the
    # "usual tolerance pairing" of REFERENCES.md 8.4 (common practice)
    assert series_tolerance(name) == pytest.approx(eseries.tolerance(_ESERIES_KEY[name]))


@pytest.mark.parametrize(
    ("name", "low", "high"),
    [("E6", 1e3, 1e4), ("E12", 0.5, 50.0), ("E24", 0.9e-6, 1.1e-3), ("E96", 100.0, 1e4),
     ("E192", 0.1, 1.0), ("E3", 1e-12, 1e-9)],
)  # fmt: skip
def test_range_matches_eseries_erange(name: str, low: float, high: float) -> None:
    # reference library: eseries.erange (inclusive of both ends)
    ref = list(eseries.erange(_ESERIES_KEY[name], low, high))
    ours = series_values(name, low, high)
    assert ours == pytest.approx(ref, rel=1e-12)


_PROBES = [4.8e3, 1.07, 9.99, 1.234e-6, 47e3, 5.5, 3.14159, 2.05e-9, 7.77e5, 1.5, 123.0]


@pytest.mark.parametrize("name", list(SERIES))
@pytest.mark.parametrize("value", _PROBES)
def test_neighbours_match_eseries(name: str, value: float) -> None:
    # reference library: eseries.find_less_than_or_equal / find_greater_than_or_equal
    key = _ESERIES_KEY[name]
    below, above = preferred_neighbours(value, name)
    assert below == pytest.approx(eseries.find_less_than_or_equal(key, value), rel=1e-12)
    assert above == pytest.approx(eseries.find_greater_than_or_equal(key, value), rel=1e-12)


@pytest.mark.parametrize("name", list(SERIES))
@pytest.mark.parametrize("value", _PROBES)
def test_nearest_matches_eseries_outside_the_ratio_gap(name: str, value: float) -> None:
    # reference library: eseries.find_nearest measures distance linearly; kitbin by
    # ratio. They must agree except for values between the geometric and the
    # arithmetic mean of the two neighbours, where kitbin picks the upper one.
    key = _ESERIES_KEY[name]
    below, above = preferred_neighbours(value, name)
    ours = nearest_preferred(value, name)
    ref = eseries.find_nearest(key, value)
    if math.sqrt(below * above) < value < (below + above) / 2:
        assert ours == pytest.approx(above) and ref == pytest.approx(below)
    else:
        assert ours == pytest.approx(ref, rel=1e-12)


def test_stack_notes_example_for_eseries() -> None:
    # reference library: eseries.find_nearest(E24, 4.8e3) -> 4700 (STACK-NOTES.md 10)
    assert nearest_preferred(4.8e3, "E24") == eseries.find_nearest(eseries.E24, 4.8e3) == 4700.0


@pytest.mark.parametrize("name", list(SERIES))
def test_every_eseries_value_is_a_member(name: str) -> None:
    # reference library: every value eseries lists over three decades is a member
    for v in eseries.erange(_ESERIES_KEY[name], 1.0, 1000.0):
        assert is_preferred(v, name)
        assert is_preferred(v * 1e-9, name)


# -- IEC 60062 colour code (REFERENCES.md 8.1) --------------------------------------


def test_colour_digits_and_multipliers_iec60062() -> None:
    # IEC 60062:2016 subclause 3.2 colour table: digits 0-9, gold 10^-1, silver 10^-2,
    # pink 10^-3 (new in the 2016 edition)
    order = [
        "black",
        "brown",
        "red",
        "orange",
        "yellow",
        "green",
        "blue",
        "violet",
        "grey",
        "white",
    ]
    assert [DIGIT[c] for c in order] == list(range(10))
    assert [MULTIPLIER[c] for c in order] == list(range(10))
    assert (MULTIPLIER["gold"], MULTIPLIER["silver"], MULTIPLIER["pink"]) == (-1, -2, -3)


def test_colour_tolerances_iec60062() -> None:
    # IEC 60062:2016 subclause 3.2 (verified values in REFERENCES.md 8.1)
    verified = {
        "brown": 0.01,
        "red": 0.02,
        "green": 0.005,
        "blue": 0.0025,
        "violet": 0.001,
        "gold": 0.05,
        "silver": 0.10,
    }
    for c, t in verified.items():
        assert TOLERANCE[c] == pytest.approx(t)
    # from memory in REFERENCES.md 8.1: orange ±0.05 % (W), yellow ±0.02 % (P),
    # grey ±0.01 % (L) in the newer lists (older tables: ±0.05 %)
    assert TOLERANCE["orange"] == pytest.approx(0.0005)
    assert TOLERANCE["yellow"] == pytest.approx(0.0002)
    assert TOLERANCE["grey"] == pytest.approx(0.0001)


def test_no_hobby_table_tolerances() -> None:
    # REFERENCES.md 8.1: the hobby-table orange ±3 % / yellow ±4 % are not IEC 60062
    assert 0.03 not in TOLERANCE.values() and 0.04 not in TOLERANCE.values()
    for t in (0.03, 0.04):
        with pytest.raises(Exception, match="no IEC 60062 tolerance colour"):
            encode_marking(4700.0, "resistor", "colour", t)


def test_colour_tcr_iec60062() -> None:
    # IEC 60062:2016 subclause 3.4; brown 100, red 50, orange 15, yellow 25, blue 10,
    # violet 5 verified; black 250, green 20, grey 1 from memory (REFERENCES.md 8.1)
    assert {c: TCR[c] for c in ("brown", "red", "orange", "yellow", "blue", "violet")} == {
        "brown": 100,
        "red": 50,
        "orange": 15,
        "yellow": 25,
        "blue": 10,
        "violet": 5,
    }
    assert (TCR["black"], TCR["green"], TCR["grey"]) == (250, 20, 1)  # from memory


@pytest.mark.parametrize(
    ("bands", "value", "tol", "tcr"),
    [
        # test vectors of REFERENCES.md 8.1 (refcalc.py section 8), IEC 60062:2016 3.3/3.4
        ("yellow violet red gold", 4.70e3, 0.05, None),
        ("brown black black brown brown", 1.00e3, 0.01, None),
        ("red red black brown brown red", 2.20e3, 0.01, 50),
        ("orange white gold gold", 3.9, 0.05, None),
    ],
)
def test_resistor_colour_vectors(bands: str, value: float, tol: float, tcr: int | None) -> None:
    m = decode_marking(bands, "resistor")
    assert m.value == pytest.approx(value, rel=1e-12)
    assert m.tol_minus == pytest.approx(tol) and m.tol_plus == pytest.approx(tol)
    assert m.tcr_ppm == tcr
    # and the same value and tolerance encode back to these bands
    assert encode_marking(value, "resistor", "colour", tol, tcr_ppm=tcr) == bands


@pytest.mark.parametrize(
    ("bands", "value"),
    [
        # colour-banded axial inductors, µH (REFERENCES.md 8.1, common practice)
        ("brown black black silver", 10e-6),
        ("yellow violet gold silver", 4.7e-6),
    ],
)
def test_inductor_colour_vectors(bands: str, value: float) -> None:
    m = decode_marking(bands, "inductor")
    assert m.value == pytest.approx(value, rel=1e-12)
    assert (m.tol_minus, m.tol_plus) == (0.10, 0.10)
    assert encode_marking(value, "inductor", "colour", 0.10) == bands


def test_describe_of_the_inductor_vector() -> None:
    # REFERENCES.md 8.1: brown-black-black-silver = 10 µH ±10 %
    assert decode_marking("brown black black silver", "inductor").describe() == (
        "10 µH ±10 % (colour bands)"
    )


def test_gold_silver_pink_cannot_start_a_code() -> None:
    # REFERENCES.md 8.1 (common practice): gold/silver/pink cannot be a first digit,
    # which resolves the reading direction
    m = decode_marking("gold red violet yellow", "resistor")
    assert m.reversed and m.value == 4700.0
    m = decode_marking("gold pink violet yellow", "resistor")
    assert m.reversed and m.value == pytest.approx(0.047)


# -- IEC 60062 numeric, letter-digit and E96 codes (REFERENCES.md 8.2) ---------------


@pytest.mark.parametrize(
    ("text", "kind", "value"),
    [
        # capacitors in pF; 8 = ×0.01, 9 = ×0.1 and bare two digits: common practice
        ("104", "capacitor", 100e-9),
        ("472", "capacitor", 4.7e-9),
        ("220", "capacitor", 22e-12),
        ("109", "capacitor", 1.0e-12),
        ("47", "capacitor", 47e-12),
        # resistors in Ω (E24 three digits, E96 four digits)
        ("472", "resistor", 4.7e3),
        ("4701", "resistor", 4.70e3),
        ("1002", "resistor", 10.0e3),
        # inductors in µH: not standardised, common practice, no source
        ("100", "inductor", 10e-6),
        ("101", "inductor", 100e-6),
        ("471", "inductor", 470e-6),
    ],
)
def test_numeric_code_vectors(text: str, kind: str, value: float) -> None:
    m = decode_marking(text, kind)
    assert m.scheme == "numeric"
    assert m.value == pytest.approx(value, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "value"),
    [
        # IEC 60062:2016 Annex A three-character code; letters from memory
        ("01C", 10.0e3),
        ("68X", 49.9),
    ],
)
def test_e96_code_vectors(text: str, value: float) -> None:
    m = decode_marking(text, "resistor")
    assert m.scheme == "e96"
    assert m.value == pytest.approx(value, rel=1e-12)
    assert encode_marking(value, "resistor", "e96") == text


@pytest.mark.parametrize(
    ("letter", "power"),
    # IEC 60062:2016 Annex A multiplier letters, all from memory (REFERENCES.md 8.2)
    [("Z", -3), ("Y", -2), ("R", -2), ("X", -1), ("S", -1), ("A", 0), ("B", 1), ("H", 1),
     ("C", 2), ("D", 3), ("E", 4), ("F", 5)],
)  # fmt: skip
def test_e96_multiplier_letters(letter: str, power: int) -> None:
    # index 01 = 100; R is read as RKM unless the E96 scheme is asked for
    m = decode_marking("01" + letter, "resistor", scheme="e96")
    assert m.value == pytest.approx(100 * 10.0**power, rel=1e-12)


def test_e96_index_is_the_e96_table() -> None:
    # IEC 60062:2016 Annex A: the two digits index the E96 list of IEC 60063
    for index, mantissa in enumerate(eseries.series(eseries.E96), start=1):
        m = decode_marking(f"{index:02d}A", "resistor")
        assert m.value == pytest.approx(mantissa, rel=1e-12)  # eseries package


@pytest.mark.parametrize(
    ("text", "kind", "value"),
    [
        # IEC 60062 clause 4 (2004 numbering) RKM examples of REFERENCES.md 8.2
        ("R47", "resistor", 0.47),
        ("4R7", "resistor", 4.7),
        ("470R", "resistor", 470.0),
        ("4K7", "resistor", 4.7e3),
        ("47K3", "resistor", 47.3e3),
        ("2M2", "resistor", 2.2e6),
        ("4p7", "capacitor", 4.7e-12),
        ("470n", "capacitor", 470e-9),
        ("1u0", "capacitor", 1.0e-6),
        ("1µ0", "capacitor", 1.0e-6),
        # inductors: non-standard, common practice, no source
        ("4R7", "inductor", 4.7e-6),
        ("R47", "inductor", 0.47e-6),
        ("2N2", "inductor", 2.2e-9),
        # L = mΩ is the 2016 edition, from memory
        ("4L7", "resistor", 4.7e-3),
        ("1G0", "resistor", 1e9),
    ],
)
def test_rkm_vectors(text: str, kind: str, value: float) -> None:
    m = decode_marking(text, kind)
    assert m.scheme == "rkm"
    assert m.value == pytest.approx(value, rel=1e-12)


def test_kind_not_case_decides_the_unit() -> None:
    # REFERENCES.md 8.2: upper case usually resistors, lower case capacitors, but the
    # part kind decides
    assert decode_marking("4r7", "resistor").value == pytest.approx(4.7)
    assert decode_marking("4R7", "inductor").value == pytest.approx(4.7e-6)
    assert decode_marking("470N", "capacitor").value == pytest.approx(470e-9)
    assert decode_marking("2n2", "inductor").value == pytest.approx(2.2e-9)


# -- IEC 60062 tolerance letters (REFERENCES.md 8.3) ---------------------------------


@pytest.mark.parametrize(
    ("letter", "minus", "plus"),
    [
        # seen
        ("B", 0.001, 0.001),
        ("C", 0.0025, 0.0025),
        ("D", 0.005, 0.005),
        ("F", 0.01, 0.01),
        ("G", 0.02, 0.02),
        ("J", 0.05, 0.05),
        ("K", 0.10, 0.10),
        ("M", 0.20, 0.20),
        ("N", 0.30, 0.30),
        ("Z", 0.20, 0.80),
        # from memory
        ("E", 0.00005, 0.00005),
        ("L", 0.0001, 0.0001),
        ("P", 0.0002, 0.0002),
        ("W", 0.0005, 0.0005),
        ("S", 0.20, 0.50),
        ("T", 0.10, 0.50),
        ("Q", 0.10, 0.30),
    ],
)
def test_tolerance_letters_on_resistors(letter: str, minus: float, plus: float) -> None:
    assert decode_tolerance_letter(letter, "resistor") == pytest.approx((minus, plus))


def test_p_on_capacitors_is_plus_100() -> None:
    # REFERENCES.md 8.3: older capacitor usage P = +100/−0 % (seen on older tables)
    assert decode_tolerance_letter("P", "capacitor", 100e-9) == (0.0, 1.0)


@pytest.mark.parametrize(("letter", "pf"), [("B", 0.1), ("C", 0.25), ("D", 0.5), ("F", 1.0)])
def test_small_capacitor_letters_are_picofarads(letter: str, pf: float) -> None:
    # REFERENCES.md 8.3: B/C/D (and F) are ±pF on capacitors below 10 pF (seen)
    minus, plus = decode_tolerance_letter(letter, "capacitor", 2.2e-12)
    assert minus == plus == pytest.approx(pf / 2.2)
    assert decode_marking("2p2" + letter, "capacitor").tol_plus == pytest.approx(pf / 2.2)

"""Property tests of kitbin.markings: round trips over E-series values and decades,
and decoding arbitrary text fails only with MarkingError.

The round trips take their values from the IEC 60063 tables as listed by the
``eseries`` package (reference library), not from kitbin's own tables.
"""

from __future__ import annotations

import math
import os

import eseries
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from kitbin.errors import MarkingError
from kitbin.markings import (
    KINDS,
    SERIES,
    decode_bands,
    decode_marking,
    encode_marking,
    is_preferred,
    nearest_preferred,
    preferred_neighbours,
)
from kitbin.markings.colour import COLOURS, TCR, TOLERANCE
from kitbin.markings.tolerance import ASYMMETRIC, SYMMETRIC

# Mantissas from the eseries package: two-figure series scaled to 10..99, three-figure
# series to 100..999 (integers, so values are built exactly).
TWO_FIGURE = sorted({v for k in (eseries.E6, eseries.E12, eseries.E24) for v in eseries.series(k)})
THREE_FIGURE = sorted(
    {v for k in (eseries.E48, eseries.E96, eseries.E192) for v in eseries.series(k)}
)
E96_MANTISSAS = list(eseries.series(eseries.E96))

kinds = st.sampled_from(KINDS)

# Deterministic runs (the suite must be); set KITBIN_HYPOTHESIS_RANDOM=1 to explore.
DERANDOMIZE = os.environ.get("KITBIN_HYPOTHESIS_RANDOM") != "1"


def exact(significand: int, exponent: int) -> float:
    return float(f"{significand}e{exponent}")


# Base unit of the colour code per kind (Ω, µH, pF) as a power of ten.
COLOUR_EXP = {"resistor": 0, "inductor": -6, "capacitor": -12}


@settings(max_examples=300, deadline=None, derandomize=DERANDOMIZE)
@given(
    kind=kinds,
    mantissa=st.sampled_from(TWO_FIGURE),
    exponent=st.integers(min_value=-3, max_value=9),
    tolerance=st.sampled_from([None, 0.05, 0.10]),
)
def test_two_digit_colour_round_trip(kind, mantissa, exponent, tolerance) -> None:
    value = exact(mantissa, exponent + COLOUR_EXP[kind])
    bands = encode_marking(value, kind, "colour", tolerance)
    back = decode_marking(bands, kind)
    expected_tol = 0.20 if tolerance is None else tolerance
    if back.reversed:
        # allowed only where the written order is not a preferred value and the
        # other end is: the text is then the bands turned round
        assert back.text.split() == bands.split()[::-1]
    else:
        assert back.value == pytest.approx(value, rel=1e-12)
        assert back.tol_plus == pytest.approx(expected_tol)
        assert back.text == bands


@settings(max_examples=300, deadline=None, derandomize=DERANDOMIZE)
@given(
    kind=kinds,
    series_key=st.sampled_from([eseries.E24, eseries.E48, eseries.E96, eseries.E192]),
    data=st.data(),
    exponent=st.integers(min_value=-3, max_value=8),
    tolerance=st.sampled_from([0.02, 0.01, 0.005, 0.0025, 0.001]),
    tcr=st.sampled_from([None, *sorted(TCR.values())]),
)
def test_three_digit_colour_round_trip(kind, series_key, data, exponent, tolerance, tcr) -> None:
    # values of E24 and of the series matching the tolerance are preferred values for
    # that tolerance, so the bands must read back exactly as written
    mantissas = eseries.series(series_key)
    mantissa = data.draw(st.sampled_from(mantissas))
    significand = mantissa * 10 if series_key == eseries.E24 else mantissa
    value = exact(significand, exponent + COLOUR_EXP[kind])
    # only E24 and the tolerance's own series (or finer) count as preferred
    ok_series = {0.02: "E48", 0.01: "E96"}.get(tolerance, "E192")
    preferred = is_preferred(value, "E24") or is_preferred(value, ok_series)
    bands = encode_marking(value, kind, "colour", tolerance, tcr_ppm=tcr, n_bands=6 if tcr else 5)
    back = decode_marking(bands, kind)
    if preferred:
        assert not back.reversed
    if not back.reversed:
        assert back.value == pytest.approx(value, rel=1e-12)
        assert back.tol_minus == back.tol_plus == pytest.approx(tolerance)
        assert back.tcr_ppm == tcr


@settings(max_examples=300, deadline=None, derandomize=DERANDOMIZE)
@given(
    mantissa=st.sampled_from(TWO_FIGURE),
    exponent=st.integers(min_value=-2, max_value=7),
    letter=st.sampled_from([None, "J", "K", "M", "Z"]),
)
def test_capacitor_numeric_round_trip(mantissa, exponent, letter) -> None:
    # three-digit code in pF, 8 = ×0.01 and 9 = ×0.1 (common practice)
    value = exact(mantissa, exponent - 12)
    tol = None if letter is None else SYMMETRIC.get(letter) or ASYMMETRIC[letter]
    if isinstance(tol, float):
        tol = (tol, tol)
    code = encode_marking(value, "capacitor", "numeric", tol)
    assert len(code) == 3 + (letter is not None)
    back = decode_marking(code, "capacitor")
    assert back.scheme == "numeric"
    assert back.value == pytest.approx(value, rel=1e-12)
    if tol is not None:
        assert (back.tol_minus, back.tol_plus) == pytest.approx(tol)


@settings(max_examples=300, deadline=None, derandomize=DERANDOMIZE)
@given(
    kind=st.sampled_from(["resistor", "inductor"]),
    three=st.booleans(),
    data=st.data(),
    exponent=st.integers(min_value=0, max_value=6),
)
def test_resistor_and_inductor_numeric_round_trip(kind, three, data, exponent) -> None:
    # resistors: 3 digits (E24) or 4 digits (E96) in Ω; inductors: 3 digits in µH
    if three and kind == "resistor":
        significand = data.draw(st.sampled_from(THREE_FIGURE))
    else:
        significand = data.draw(st.sampled_from(TWO_FIGURE))
    value = exact(significand, exponent + (-6 if kind == "inductor" else 0))
    code = encode_marking(value, kind, "numeric")
    back = decode_marking(code, kind)
    assert back.scheme == "numeric"
    assert back.value == pytest.approx(value, rel=1e-12)


@settings(max_examples=400, deadline=None, derandomize=DERANDOMIZE)
@given(
    kind=kinds,
    significand=st.sampled_from(TWO_FIGURE + THREE_FIGURE),
    exponent=st.integers(min_value=-16, max_value=12),
    letter=st.sampled_from([None, *SYMMETRIC, *ASYMMETRIC]),
)
def test_rkm_round_trip(kind, significand, exponent, letter) -> None:
    value = exact(significand, exponent)
    if letter is None:
        tol = None
    elif letter in ASYMMETRIC:
        tol = ASYMMETRIC[letter]
    else:
        tol = (SYMMETRIC[letter], SYMMETRIC[letter])
    try:
        code = encode_marking(value, kind, "rkm", tol)
    except MarkingError:
        # a tolerance that has no letter on this part (P on an inductor, say)
        assert tol is not None
        code = encode_marking(value, kind, "rkm")
        tol = None
    back = decode_marking(code, kind)
    assert back.scheme == "rkm"
    assert back.value == pytest.approx(value, rel=1e-12)
    if tol is not None:
        assert (back.tol_minus, back.tol_plus) == pytest.approx(tol)
    # decoding the normalised text gives the same marking again
    assert decode_marking(back.text, kind) == back


@settings(max_examples=200, deadline=None, derandomize=DERANDOMIZE)
@given(mantissa=st.sampled_from(E96_MANTISSAS), exponent=st.integers(min_value=-3, max_value=5))
def test_e96_round_trip(mantissa, exponent) -> None:
    value = exact(mantissa, exponent)
    code = encode_marking(value, "resistor", "e96")
    assert len(code) == 3
    back = decode_marking(code, "resistor")
    assert back.scheme == "e96"
    assert back.value == pytest.approx(value, rel=1e-12)


_WORDS = [*COLOURS, "gray", "purple", "brn", "blk", "sil", "none", "beige"]
_CHARS = "0123456789RKMGTLpnuµmFHJZXYCABDESWQ.-/ Ωohm"


@settings(max_examples=500, deadline=None, derandomize=DERANDOMIZE)
@given(
    text=st.one_of(
        st.text(max_size=20),
        st.text(alphabet=_CHARS, max_size=8),
        st.lists(st.sampled_from(_WORDS), max_size=8).map(" ".join),
    ),
    kind=st.sampled_from([*KINDS, "Resistor", "diode"]),
    scheme=st.sampled_from([None, "colour", "numeric", "rkm", "e96", "bogus"]),
)
def test_decode_raises_only_marking_error(text, kind, scheme) -> None:
    try:
        m = decode_marking(text, kind, scheme)
    except MarkingError as error:
        assert "\n" not in str(error)
        return
    assert math.isfinite(m.value) and m.value >= 0
    assert m.scheme in ("colour", "numeric", "rkm", "e96")
    if scheme is not None:
        assert m.scheme == scheme  # a forced scheme is kept or refused, never swapped
    for t in (m.tol_minus, m.tol_plus):
        assert t is None or t >= 0
    assert m.describe()
    # a decoded marking's normalised text decodes to the same value
    assert decode_marking(m.text, kind, m.scheme).value == m.value


@settings(max_examples=300, deadline=None, derandomize=DERANDOMIZE)
@given(
    value=st.floats(allow_nan=True, allow_infinity=True),
    kind=kinds,
    scheme=st.sampled_from(["colour", "numeric", "rkm", "e96"]),
    tolerance=st.one_of(st.none(), st.sampled_from([*TOLERANCE.values(), 0.2, 0.03])),
)
def test_encode_raises_only_marking_error(value, kind, scheme, tolerance) -> None:
    try:
        text = encode_marking(value, kind, scheme, tolerance)
    except MarkingError:
        return
    back = decode_marking(text, kind)
    if back.reversed:
        # the bands are also a valid, preferred code turned round; read as written
        # they give the value
        written = decode_bands(text, reverse=False)
        assert written.value * 10.0 ** COLOUR_EXP[kind] == pytest.approx(value, rel=1e-9)
    else:
        assert back.value == pytest.approx(value, rel=1e-9)


@settings(max_examples=300, deadline=None, derandomize=DERANDOMIZE)
@given(
    name=st.sampled_from(list(SERIES)),
    value=st.floats(min_value=1e-13, max_value=1e12, allow_nan=False, allow_infinity=False),
)
def test_neighbours_bracket_and_match_eseries(name, value) -> None:
    below, above = preferred_neighbours(value, name)
    if is_preferred(value, name):
        # within the 1 ppm membership tolerance the value is its own neighbour
        assert below == above == nearest_preferred(value, name)
        assert below == pytest.approx(value, rel=1e-6)
        return
    assert below <= value * (1 + 1e-9) and above >= value * (1 - 1e-9)
    assert is_preferred(below, name) and is_preferred(above, name)
    assert nearest_preferred(value, name) in (below, above)
    # reference library: eseries.find_less_than_or_equal / find_greater_than_or_equal
    key = getattr(eseries, name)
    assert below == pytest.approx(eseries.find_less_than_or_equal(key, value), rel=1e-9)
    assert above == pytest.approx(eseries.find_greater_than_or_equal(key, value), rel=1e-9)

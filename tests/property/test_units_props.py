"""Property tests of kitbin.units: round trips, agreement with pint, no crash on any text."""

import math

from hypothesis import given, settings
from hypothesis import strategies as st

from kitbin.errors import QuantityError
from kitbin.units import DIMENSIONS, format_quantity, parse_quantity, registry

PREFIXED = ["inductance", "resistance", "capacitance", "current", "voltage", "frequency", "time"]
values = st.floats(min_value=1e-14, max_value=1e11, allow_nan=False, allow_infinity=False)


@given(value=values, dimension=st.sampled_from(PREFIXED))
def test_format_then_parse_round_trips_to_shown_precision(value: float, dimension: str) -> None:
    shown = format_quantity(value, dimension, digits=6)
    assert math.isclose(parse_quantity(shown, dimension), value, rel_tol=1e-5)


PINT_UNITS = {
    "inductance": ("H", "henry"),
    "resistance": ("ohm", "ohm"),
    "capacitance": ("F", "farad"),
    "current": ("A", "ampere"),
    "voltage": ("V", "volt"),
    "frequency": ("Hz", "hertz"),
}
PREFIXES = ["p", "n", "u", "m", "", "k", "M"]


@settings(max_examples=200)
@given(
    mantissa=st.floats(min_value=0.001, max_value=999.0),
    prefix=st.sampled_from(PREFIXES),
    dimension=st.sampled_from(sorted(PINT_UNITS)),
)
def test_fast_path_agrees_with_pint(mantissa: float, prefix: str, dimension: str) -> None:
    # Reference library: pint 0.25 (PyPI), which parses the same text independently.
    symbol, pint_unit = PINT_UNITS[dimension]
    text = f"{mantissa!r} {prefix}{symbol}"
    expected = registry().Quantity(text).m_as(pint_unit)
    assert math.isclose(parse_quantity(text, dimension), expected, rel_tol=1e-12)


@settings(max_examples=300)
@given(text=st.text(max_size=30), dimension=st.sampled_from(sorted(DIMENSIONS)))
def test_arbitrary_text_parses_or_raises_quantity_error(text: str, dimension: str) -> None:
    try:
        value = parse_quantity(text, dimension)
    except QuantityError as error:
        assert "\n" not in str(error)
    else:
        assert math.isfinite(value)

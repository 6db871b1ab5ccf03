"""Unit parsing and formatting (kitbin.units)."""

import math

import pytest

from kitbin.errors import QuantityError
from kitbin.units import format_quantity, parse_quantity, parse_range

# Expected SI values: the SI prefixes are those of the SI Brochure, 9th ed. (BIPM 2019),
# table 7; the RKM letter code is IEC 60062 clause 4 (2004 numbering, examples in
# REFERENCES.md section 8.2). "R as decimal point in µH for inductors" is common
# practice, no source.
CASES = [
    ("4.7uH", "inductance", 4.7e-6),
    ("4.7 µH", "inductance", 4.7e-6),  # micro sign U+00B5
    ("4.7μH", "inductance", 4.7e-6),  # Greek mu U+03BC
    ("4u7", "inductance", 4.7e-6),
    ("4R7", "inductance", 4.7e-6),
    ("R47", "inductance", 0.47e-6),
    ("4k7", "resistance", 4700.0),
    ("4K7", "resistance", 4700.0),
    ("47K3", "resistance", 47300.0),
    ("2M2", "resistance", 2.2e6),
    ("4R7", "resistance", 4.7),
    ("0R1", "resistance", 0.1),
    ("R47", "resistance", 0.47),
    ("470R", "resistance", 470.0),
    ("10mΩ", "resistance", 0.01),
    ("10 mohm", "resistance", 0.01),
    ("10 MOhm", "resistance", 10e6),
    ("2.2 kΩ", "resistance", 2200.0),
    ("2 kohms", "resistance", 2000.0),
    ("470", "resistance", 470.0),
    ("100n", "capacitance", 100e-9),
    ("100nF", "capacitance", 100e-9),
    ("4p7", "capacitance", 4.7e-12),
    ("1u0", "capacitance", 1.0e-6),
    ("3A", "current", 3.0),
    ("0.5 mA", "current", 0.5e-3),
    ("500kHz", "frequency", 500e3),
    ("1MHz", "frequency", 1e6),
    ("3.2us", "time", 3.2e-6),
    ("1 min", "time", 60.0),
    ("25degC", "temperature", 25.0),
    ("25 °C", "temperature", 25.0),
    ("298.15K", "temperature", 25.0),
    ("40K", "temperature_rise", 40.0),
    ("60K/W", "thermal_resistance", 60.0),
    ("20%", "ratio", 0.20),
    ("0.2", "ratio", 0.20),
    ("4V7", "voltage", 4.7),
    ("−5 V", "voltage", -5.0),  # Unicode minus
    ("4,7uH", "inductance", 4.7e-6),  # decimal comma
    ("4.7 microhenry", "inductance", 4.7e-6),  # goes through pint
]


@pytest.mark.parametrize(("text", "expect", "si"), CASES)
def test_parse_quantity_gives_si(text: str, expect: str, si: float) -> None:
    assert math.isclose(parse_quantity(text, expect), si, rel_tol=1e-12)


@pytest.mark.parametrize(
    ("text", "expect", "fragment"),
    [
        ("10uF", "inductance", "expected an inductance (H), got '10uF' which is a capacitance (F)"),
        ("1 h", "inductance", "which is a time (s)"),  # pint: h is an hour, not a henry
        ("5V", "temperature", "which is a voltage (V)"),
        ("abc", "resistance", "'abc' is not a quantity: expected a resistance"),
        ("10", "inductance", "'10' has no unit"),
        ("", "voltage", "is empty"),
        ("nan V", "voltage", "not a finite number"),
        ("2 kg", "voltage", "another kind of quantity"),
    ],
)
def test_parse_quantity_rejects_with_one_clear_line(text: str, expect: str, fragment: str) -> None:
    with pytest.raises(QuantityError) as info:
        parse_quantity(text, expect)
    message = str(info.value)
    assert fragment in message
    assert "\n" not in message


def test_wrong_dimension_error_is_a_value_error_with_fields() -> None:
    with pytest.raises(ValueError) as info:
        parse_quantity("10uF", "inductance")
    assert info.value.expected == "inductance"
    assert info.value.got == "capacitance"


def test_parse_range() -> None:
    assert parse_range("11..15V", "voltage") == (11.0, 15.0)
    assert parse_range("11V..15V", "voltage") == (11.0, 15.0)
    assert parse_range("11 .. 15 V", "voltage") == (11.0, 15.0)
    assert parse_range("1.5..3A", "current") == (1.5, 3.0)
    assert parse_range("5V", "voltage") == (5.0, 5.0)
    # a code on the right (IEC 60062 RKM): its letter is shared, not its digits
    assert parse_range("1k..4k7", "resistance") == (1e3, 4.7e3)
    assert parse_range("1..4k7", "resistance") == (1e3, 4.7e3)
    assert parse_range("0..4k7", "resistance") == (0.0, 4.7e3)
    assert parse_range("1..4R7", "resistance") == (1.0, 4.7)
    assert parse_range("10..100k", "resistance") == (10e3, 100e3)
    assert parse_range("4k7..47k", "resistance") == (4.7e3, 47e3)
    assert parse_range("1u..4u7", "inductance") == pytest.approx((1e-6, 4.7e-6))
    with pytest.raises(QuantityError, match="written backwards"):
        parse_range("15..11V", "voltage")
    with pytest.raises(QuantityError):
        parse_range("11..x V", "voltage")


@pytest.mark.parametrize(
    ("value", "dimension", "shown"),
    [
        (4.7e-6, "inductance", "4.70 µH"),
        (0.031, "resistance", "31.0 mΩ"),
        (100e-9, "capacitance", "100 nF"),
        (999.6, "resistance", "1.00 kΩ"),
        (2.5e6, "frequency", "2.50 MHz"),
        (-5.0, "voltage", "-5.00 V"),
        (25.0, "temperature", "25 °C"),
        (40.0, "temperature_rise", "40 K"),
        (0.2, "ratio", "20 %"),
        (None, "current", "—"),
        (float("inf"), "current", "∞ A"),
        (1.5, "A", "1.50 A"),
    ],
)
def test_format_quantity_engineering_notation(value, dimension: str, shown: str) -> None:
    assert format_quantity(value, dimension) == shown


def test_unknown_dimension_is_a_programming_error() -> None:
    with pytest.raises(ValueError, match="unknown dimension"):
        parse_quantity("1V", "volts")

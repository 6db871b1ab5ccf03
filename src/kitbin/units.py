"""Quantities at the edges: parse what people type and what parts are marked with, show SI.

Inside kitbin every value is an SI float (H, Ω, F, A, V, Hz, s, W; °C for a
temperature, K for a temperature rise, K/W for a thermal resistance, a plain
fraction for a ratio). This module turns text into those floats and back.

Parsing takes a fast path first: a number, an optional SI prefix and one of the
unit symbols of :data:`DIMENSIONS`, or an RKM code (``4k7``, ``4R7``, ``0R1``,
``4u7``), or a number with a lone prefix (``100n`` when a capacitance is
expected). Anything else goes to the one pint registry, created on first use
(building it costs ~100 ms, see STACK-NOTES section 2), so ``kitbin --help``
never pays for it.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from kitbin.errors import QuantityError


@dataclass(frozen=True)
class Dimension:
    """One physical dimension kitbin parses: its SI unit and how to name it in messages."""

    name: str
    unit: str
    noun: str
    pint_unit: str
    #: Whether SI prefixes are used when showing a value (not for °C, K, K/W).
    prefixed: bool = True
    #: Whether a bare number (no unit) is accepted, read in the SI unit.
    bare_ok: bool = True


DIMENSIONS: dict[str, Dimension] = {
    d.name: d
    for d in (
        Dimension("inductance", "H", "an inductance", "henry", bare_ok=False),
        Dimension("resistance", "Ω", "a resistance", "ohm"),
        Dimension("capacitance", "F", "a capacitance", "farad", bare_ok=False),
        Dimension("current", "A", "a current", "ampere"),
        Dimension("voltage", "V", "a voltage", "volt"),
        Dimension("frequency", "Hz", "a frequency", "hertz"),
        Dimension("time", "s", "a time", "second"),
        Dimension("power", "W", "a power", "watt"),
        Dimension("temperature", "°C", "a temperature", "degC", prefixed=False),
        Dimension("temperature_rise", "K", "a temperature rise", "kelvin", prefixed=False),
        Dimension(
            "thermal_resistance", "K/W", "a thermal resistance", "kelvin / watt", prefixed=False
        ),
        Dimension("ratio", "%", "a ratio", "dimensionless", prefixed=False),
    )
}

#: An example of each dimension, used in error messages.
_EXAMPLES = {
    "inductance": "4.7uH",
    "resistance": "4k7 or 10mohm",
    "capacitance": "100nF",
    "current": "2A",
    "voltage": "5V",
    "frequency": "500kHz",
    "time": "3.2us",
    "power": "0.5W",
    "temperature": "25degC",
    "temperature_rise": "40K",
    "thermal_resistance": "60K/W",
    "ratio": "20%",
}

_PREFIXES: dict[str, float] = {
    "f": 1e-15,
    "p": 1e-12,
    "n": 1e-9,
    "u": 1e-6,
    "µ": 1e-6,  # micro sign U+00B5
    "μ": 1e-6,  # Greek mu U+03BC
    "m": 1e-3,
    "k": 1e3,
    "K": 1e3,
    "M": 1e6,
    "G": 1e9,
    "T": 1e12,
}

#: Unit symbols of the fast path, each with its dimension and factor to SI.
_SYMBOLS: dict[str, tuple[str, float]] = {
    "H": ("inductance", 1.0),
    "henry": ("inductance", 1.0),
    "Ω": ("resistance", 1.0),
    "\u2126": ("resistance", 1.0),  # ohm sign, as distinct from the Greek capital omega
    "ohm": ("resistance", 1.0),
    "ohms": ("resistance", 1.0),
    "Ohm": ("resistance", 1.0),
    "Ohms": ("resistance", 1.0),
    "F": ("capacitance", 1.0),
    "A": ("current", 1.0),
    "V": ("voltage", 1.0),
    "Hz": ("frequency", 1.0),
    "s": ("time", 1.0),
    "W": ("power", 1.0),
    "K/W": ("thermal_resistance", 1.0),
    "°C/W": ("thermal_resistance", 1.0),
    "degC/W": ("thermal_resistance", 1.0),
    "%": ("ratio", 0.01),
    "ppm": ("ratio", 1e-6),
}

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_NUMBER_UNIT = re.compile(rf"^({_NUMBER})\s*(.*?)$")
# RKM code: digits, one letter standing for the decimal point, digits (IEC 60062 clause 4).
_RKM = re.compile(r"^(\d*)([pnuµμmRrkKMGTLVA])(\d*)$")
_RANGE = re.compile(r"^(.*?)\s*(?:\.\.|…)\s*(.*?)$")
_TEMPERATURE_UNITS = {"degC": 0.0, "°C": 0.0, "C": 0.0, "K": -273.15}
_RISE_UNITS = {"K", "degC", "°C", "C", "delta_degC"}


def parse_quantity(text: str, expect: str) -> float:
    """Parse a quantity of an expected dimension into an SI float.

    Parameters
    ----------
    text
        What the user typed or the part is marked with: ``"4.7uH"``, ``"4.7 µH"``,
        ``"4u7"``, ``"4k7"``, ``"4R7"``, ``"0R1"``, ``"10mΩ"``, ``"10 mohm"``,
        ``"100n"`` (with ``expect="capacitance"``), ``"3A"``, ``"500kHz"``,
        ``"25degC"``, ``"20%"``.
    expect
        A dimension name from :data:`DIMENSIONS`.

    Returns
    -------
    float
        The value in the SI unit of ``expect`` (°C for a temperature, a fraction
        for a ratio).

    Raises
    ------
    QuantityError
        When the text is not a quantity, or is one of another dimension.
    """
    dim = _dimension(expect)
    raw = text
    text = _normalise(text)
    if not text:
        raise _error(raw, dim, "is empty")
    value = _fast_path(text, dim, raw)
    if value is None:
        value = _pint_path(text, dim, raw)
    if not math.isfinite(value):
        raise _error(raw, dim, "is not a finite number")
    return value


def parse_range(text: str, expect: str) -> tuple[float, float]:
    """Parse ``"11..15V"`` (or ``"11V..15V"``, or a single value) into ``(low, high)``.

    A unit written only after the second number applies to both; after a code such
    as ``4k7`` its letter does (``"1..4k7"`` is 1 kΩ to 4.7 kΩ). A single value gives
    ``(value, value)``.

    Raises
    ------
    QuantityError
        When either end does not parse, or the range is written backwards.
    """
    dim = _dimension(expect)
    match = _RANGE.match(_normalise(text))
    if match is None:
        value = parse_quantity(text, expect)
        return value, value
    left, right = match.group(1), match.group(2)
    right_unit = _NUMBER_UNIT.match(right)
    left_unit = _NUMBER_UNIT.match(left)
    right_rkm = _RKM.match(right)
    if left_unit and not left_unit.group(2):
        if right_rkm and right_rkm.group(3):
            # "1..4k7": the code letter is the prefix (or unit) both ends share; the
            # digits after it belong to the second number alone
            left = left + right_rkm.group(2)
        elif right_unit and right_unit.group(2):
            left = left + right_unit.group(2)
    low, high = parse_quantity(left, expect), parse_quantity(right, expect)
    if low > high:
        raise QuantityError(
            f"range '{_shown(text)}' is written backwards: write it low..high ({dim.noun})",
            text=text,
            expected=dim.name,
        )
    return low, high


def format_quantity(value: float | None, dimension_or_unit: str, digits: int = 3) -> str:
    """Show an SI value in engineering notation with an SI prefix: ``"4.70 µH"``, ``"31.0 mΩ"``.

    Parameters
    ----------
    value
        The SI value (``None`` shows as ``"—"``).
    dimension_or_unit
        A dimension name from :data:`DIMENSIONS` or a unit symbol (``"H"``, ``"Ω"``).
    digits
        Significant digits shown.
    """
    if value is None:
        return "—"
    dim = DIMENSIONS.get(dimension_or_unit)
    unit = dim.unit if dim else dimension_or_unit
    prefixed = dim.prefixed if dim else True
    if math.isnan(value):
        return "—"
    if math.isinf(value):
        return f"{'-' if value < 0 else ''}∞ {unit}"
    if dim is not None and dim.name == "ratio":
        return f"{_significant(value * 100, digits)} %"
    if not prefixed or value == 0:
        return f"{_significant(value, digits)} {unit}"
    exponent = int(math.floor(math.log10(abs(value)) / 3) * 3)
    exponent = max(-15, min(12, exponent))
    mantissa = float(f"{value / 10**exponent:.{digits}g}")
    if abs(mantissa) >= 1000 and exponent < 12:
        exponent += 3
        mantissa = float(f"{value / 10**exponent:.{digits}g}")
    prefix = _PREFIX_FOR_EXPONENT[exponent]
    return f"{_fixed(mantissa, digits)} {prefix}{unit}"


def dimension_of(text: str) -> str | None:
    """The dimension name a quantity text belongs to, or None when it is not one we know."""
    text = _normalise(text)
    match = _NUMBER_UNIT.match(text)
    if match is None:
        return None
    found = _symbol(match.group(2))
    return found[0] if found else None


# -- internals -------------------------------------------------------------------------

_PREFIX_FOR_EXPONENT = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M"}
_PREFIX_FOR_EXPONENT.update({9: "G", 12: "T"})


def _dimension(expect: str) -> Dimension:
    try:
        return DIMENSIONS[expect]
    except KeyError:
        raise ValueError(f"unknown dimension {expect!r}") from None


def _normalise(text: str) -> str:
    text = str(text).strip().replace("−", "-").replace("\u202f", " ").replace("\u00a0", " ")
    # A decimal comma ("4,7uH") when there is no decimal point.
    if "," in text and "." not in text and text.count(",") == 1:
        text = text.replace(",", ".")
    return text


def _significant(value: float, digits: int) -> str:
    return f"{value:.{digits}g}"


def _fixed(mantissa: float, digits: int) -> str:
    """Mantissa in [1, 1000) with ``digits`` significant digits, trailing zeros kept."""
    magnitude = abs(mantissa)
    integer_digits = 1 if magnitude < 10 else 2 if magnitude < 100 else 3
    decimals = max(0, digits - integer_digits)
    return f"{mantissa:.{decimals}f}"


@lru_cache(maxsize=512)
def _symbol(unit: str) -> tuple[str, float] | None:
    """(dimension, factor to SI) for a unit text such as ``"mΩ"``, or None if unknown."""
    unit = unit.strip()
    if unit in _SYMBOLS:
        return _SYMBOLS[unit]
    if len(unit) > 1 and unit[0] in _PREFIXES and unit[1:] in _SYMBOLS:
        dim, factor = _SYMBOLS[unit[1:]]
        if dim in ("ratio", "thermal_resistance"):
            return None
        return dim, factor * _PREFIXES[unit[0]]
    return None


def _fast_path(text: str, dim: Dimension, raw: str) -> float | None:
    """Parse the common forms without pint; None when the text needs pint."""
    rkm = _RKM.match(text)
    if rkm and (rkm.group(1) or rkm.group(3)) and rkm.group(3):
        return _rkm_value(rkm, dim, raw)
    match = _NUMBER_UNIT.match(text)
    if match is None:
        return None
    number, unit = float(match.group(1)), match.group(2).strip()
    if dim.name in ("temperature", "temperature_rise"):
        return _temperature(number, unit, dim, raw)
    if not unit:
        if not dim.bare_ok:
            raise _error(raw, dim, f"has no unit (write e.g. {match.group(1)}{_unit_hint(dim)})")
        return number
    if dim.name == "ratio" and unit == "%":
        return number / 100
    if unit in _PREFIXES:
        return number * _PREFIXES[unit]
    if unit in ("R", "r") and dim.name == "resistance":
        return number
    found = _symbol(unit)
    if found is None:
        return None
    found_dim, factor = found
    if found_dim != dim.name:
        raise _wrong_dimension(raw, dim, DIMENSIONS[found_dim])
    return number * factor


def _rkm_value(match: re.Match[str], dim: Dimension, raw: str) -> float:
    """An RKM code: the letter is both the decimal point and the multiplier (IEC 60062)."""
    whole, letter, fraction = match.group(1) or "0", match.group(2), match.group(3)
    number = float(f"{whole}.{fraction}")
    if letter in ("R", "r"):
        # R is the decimal point in the unit of the kind: Ω for resistors; µH for
        # inductors and pF for capacitors (common practice, no source).
        scale = {"inductance": 1e-6, "capacitance": 1e-12}.get(dim.name, 1.0)
        return number * scale
    if letter == "L" and dim.name == "resistance":
        return number * 1e-3  # L = milliohm (IEC 60062:2016, from memory)
    if letter in ("V", "A"):
        want = "voltage" if letter == "V" else "current"
        if dim.name != want:
            raise _wrong_dimension(raw, dim, DIMENSIONS[want])
        return number
    if letter == "K" and dim.name in ("temperature", "temperature_rise"):
        raise _error(raw, dim, "is not a temperature")
    if letter not in _PREFIXES:
        raise _error(raw, dim, "is not a letter code")
    return number * _PREFIXES[letter]


def _temperature(number: float, unit: str, dim: Dimension, raw: str) -> float:
    if not unit:
        return number
    if dim.name == "temperature_rise":
        if unit in _RISE_UNITS:
            return number
    elif unit in _TEMPERATURE_UNITS:
        return number + _TEMPERATURE_UNITS[unit]
    found = _symbol(unit)
    if found is not None:
        raise _wrong_dimension(raw, dim, DIMENSIONS[found[0]])
    raise _error(raw, dim, f"has unit '{unit}'")


@lru_cache(maxsize=1)
def registry() -> Any:
    """The one pint registry of the application, built on first use."""
    import pint

    return pint.UnitRegistry(autoconvert_offset_to_baseunit=True)


def _pint_path(text: str, dim: Dimension, raw: str) -> float:
    import pint

    ureg = registry()
    try:
        quantity = ureg.Quantity(text)
    except (pint.PintError, ValueError, TypeError, AttributeError, KeyError, SyntaxError):
        raise _error(raw, dim, "is not a quantity") from None
    except Exception:  # pint's parser can raise odd errors on odd text
        raise _error(raw, dim, "is not a quantity") from None
    if not isinstance(quantity, ureg.Quantity):
        if dim.bare_ok:
            return float(quantity)
        raise _error(raw, dim, "has no unit")
    target = ureg.Unit(dim.pint_unit)
    if quantity.dimensionality != target.dimensionality:
        raise _wrong_dimension(raw, dim, _dimension_named(quantity.dimensionality, ureg))
    try:
        return float(quantity.to(target).magnitude)
    except pint.PintError:
        raise _error(raw, dim, "cannot be converted") from None


def _dimension_named(dimensionality: Any, ureg: Any) -> Dimension | None:
    for candidate in DIMENSIONS.values():
        if candidate.name in ("temperature_rise", "ratio"):
            continue
        if ureg.Unit(candidate.pint_unit).dimensionality == dimensionality:
            return candidate
    return None


def _unit_hint(dim: Dimension) -> str:
    return {"inductance": "uH", "capacitance": "nF"}.get(dim.name, dim.unit)


def _shown(raw: str, limit: int = 40) -> str:
    """The user's text as it may appear in a one-line message: control characters escaped."""
    text = "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in str(raw))
    return text if len(text) <= limit else text[: limit - 1] + "…"


def _error(raw: str, dim: Dimension, problem: str) -> QuantityError:
    return QuantityError(
        f"'{_shown(raw)}' {problem}: "
        f"expected {dim.noun} ({dim.unit}) such as {_EXAMPLES[dim.name]}",
        text=str(raw),
        expected=dim.name,
    )


def _wrong_dimension(raw: str, dim: Dimension, got: Dimension | None) -> QuantityError:
    got_text = f"{got.noun} ({got.unit})" if got else "another kind of quantity"
    return QuantityError(
        f"expected {dim.noun} ({dim.unit}), got '{_shown(raw)}' which is {got_text}",
        text=str(raw),
        expected=dim.name,
        got=got.name if got else "",
    )

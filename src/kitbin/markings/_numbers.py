"""Exact decimal helpers and SI-prefix formatting for marking values.

Markings are decimal by nature (47 × 10² Ω), so values are built from an integer
significand and a power of ten with :mod:`decimal` and turned into a float once.
This keeps 4.7 kΩ exactly ``4700.0`` rather than ``4699.999...``.
"""

from __future__ import annotations

import math
from decimal import Decimal

from kitbin.errors import MarkingError

#: Symbol of the base SI unit for each part kind.
UNIT_SYMBOL = {"resistor": "Ω", "capacitor": "F", "inductor": "H"}

_PREFIXES = [
    (-15, "f"),
    (-12, "p"),
    (-9, "n"),
    (-6, "µ"),
    (-3, "m"),
    (0, ""),
    (3, "k"),
    (6, "M"),
    (9, "G"),
    (12, "T"),
]


def from_digits(significand: int, exponent: int) -> float:
    """``significand × 10**exponent`` as the nearest float, computed exactly first."""
    return float(Decimal(significand).scaleb(exponent))


def to_decimal(value: float) -> Decimal:
    """A float as a decimal, rounded to 12 significant figures to drop float noise."""
    return Decimal(format(value, ".11e")).normalize()


def split_digits(value: float, figures: int) -> tuple[int, int]:
    """Write a positive value as ``significand × 10**exponent`` with ``figures`` digits.

    Parameters
    ----------
    value
        Positive value in any unit.
    figures
        Number of significant digits the code carries (2 or 3).

    Returns
    -------
    tuple[int, int]
        ``(significand, exponent)`` with ``10**(figures-1) <= significand < 10**figures``.

    Raises
    ------
    MarkingError
        When the value needs more significant digits than ``figures``.
    """
    if not (value > 0 and math.isfinite(value)):
        raise MarkingError(f"{value!r} cannot be marked: expected a positive finite value")
    d = to_decimal(value)
    _sign, digits, exp = d.as_tuple()
    digits_str = "".join(map(str, digits)).rstrip("0") or "0"
    exp = int(exp) + (len(digits) - len(digits_str))
    if len(digits_str) > figures:
        raise MarkingError(
            f"{format_si(value, '')!s} cannot be marked with {figures} significant digits"
        )
    pad = figures - len(digits_str)
    return int(digits_str) * 10**pad, exp - pad


def format_number(x: float, figures: int = 4) -> str:
    """A number with at most ``figures`` significant digits and no trailing zeros."""
    text = f"{x:.{figures}g}"
    if "e" in text:  # only for values outside the prefix range
        return text
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def format_si(value: float, unit: str, figures: int = 4) -> str:
    """A value with an SI prefix: ``4700.0, 'Ω'`` -> ``'4.7 kΩ'``.

    Parameters
    ----------
    value
        Value in the base SI unit (Ω, F, H).
    unit
        Unit symbol appended after the prefix ("" for none).
    figures
        At most this many significant digits are shown; trailing zeros are dropped.
    """
    if value == 0:
        return f"0 {unit}".rstrip()
    d = to_decimal(abs(value))
    exp10 = d.adjusted()
    power = max(min((exp10 // 3) * 3, 12), -15)
    prefix = dict(_PREFIXES)[power]
    mantissa = float(d.scaleb(-power))
    if round(mantissa, max(figures - 3, 0)) >= 1000 and power < 12:
        power += 3
        prefix = dict(_PREFIXES)[power]
        mantissa = float(d.scaleb(-power))
    sign = "-" if value < 0 else ""
    return f"{sign}{format_number(mantissa, figures)} {prefix}{unit}".rstrip()


def format_percent(fraction: float) -> str:
    """A fraction as a percentage without trailing zeros: ``0.005`` -> ``'0.5'``."""
    return format_number(fraction * 100, 3)

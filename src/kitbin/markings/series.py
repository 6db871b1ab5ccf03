"""IEC 60063 preferred-number series (E3 … E192).

E3, E6, E12 and E24 are literal tables: several E24 values (2.7, 3.0, 3.3, 3.6,
3.9, 4.3, 4.7, 8.2) are not the rounded geometric series 10^(n/24), so they are
never generated. E48, E96 and E192 are round(10^(n/N), 2) with the single E192
exception 9.20 where the formula gives 9.19 (n = 185).

All functions take and return plain floats in whatever unit the caller uses; the
series are scale free (one mantissa table per series, repeated each decade).
"""

from __future__ import annotations

import math
from bisect import bisect_left

from kitbin.errors import MarkingError
from kitbin.markings._numbers import to_decimal

E3: tuple[float, ...] = (1.0, 2.2, 4.7)
E6: tuple[float, ...] = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
E12: tuple[float, ...] = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
E24: tuple[float, ...] = (
    1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
    3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1,
)  # fmt: skip


def _three_figure_series(n: int) -> tuple[float, ...]:
    values = [round(10 ** (k / n), 2) for k in range(n)]
    if n == 192:
        # IEC 60063: 9.20 where round(10^(185/192), 2) gives 9.19.
        values[185] = 9.20
    return tuple(values)


E48: tuple[float, ...] = _three_figure_series(48)
E96: tuple[float, ...] = _three_figure_series(96)
E192: tuple[float, ...] = _three_figure_series(192)

#: Mantissas (1 <= m < 10) of each series, by name.
SERIES: dict[str, tuple[float, ...]] = {
    "E3": E3,
    "E6": E6,
    "E12": E12,
    "E24": E24,
    "E48": E48,
    "E96": E96,
    "E192": E192,
}

#: Usual tolerance of parts sold in each series (fraction). E6 … E192 as commonly
#: paired (common practice, no source); E3 ±40 % as in the ``eseries`` package
#: (IEC 60063 keeps E3 for tolerances wider than ±20 %, from memory). E192 also
#: serves ±0.25 % and ±0.1 % parts.
SERIES_TOLERANCE: dict[str, float] = {
    "E3": 0.40,
    "E6": 0.20,
    "E12": 0.10,
    "E24": 0.05,
    "E48": 0.02,
    "E96": 0.01,
    "E192": 0.005,
}

_REL_TOL = 1e-6


def _series(name: str) -> tuple[float, ...]:
    key = name.strip().upper()
    if not key.startswith("E"):
        key = "E" + key
    try:
        return SERIES[key]
    except KeyError:
        raise MarkingError(
            f"{name!r} is not an E series: expected one of {', '.join(SERIES)}"
        ) from None


def _check_positive(value: float) -> None:
    if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
        raise MarkingError(f"{value!r} is not a preferred-number value: expected a positive number")


def _decade(value: float) -> tuple[float, int]:
    """``value = mantissa × 10**exponent`` with 1 <= mantissa < 10 (exactly decimal)."""
    d = to_decimal(value)
    exponent = d.adjusted()
    return float(d.scaleb(-exponent)), exponent


def _scaled(mantissa: float, exponent: int) -> float:
    return float(to_decimal(mantissa).scaleb(exponent))


def series_tolerance(name: str) -> float:
    """The usual tolerance (fraction) of parts in a series: ``'E24'`` -> ``0.05``."""
    return SERIES_TOLERANCE[_series_name(name)]


def _series_name(name: str) -> str:
    values = _series(name)
    return next(k for k, v in SERIES.items() if v is values)


def series_values(name: str, low: float, high: float) -> list[float]:
    """Every value of a series from ``low`` to ``high`` inclusive, over as many decades as needed.

    Parameters
    ----------
    name
        Series name, ``'E3'`` … ``'E192'`` (``'24'`` also works).
    low, high
        Range limits in any unit (positive); values within 1 ppm of a limit count.

    Returns
    -------
    list[float]
        Ascending values in the same unit, e.g. ``series_values('E6', 1e3, 1e4)``
        -> ``[1000.0, 1500.0, 2200.0, 3300.0, 4700.0, 6800.0, 10000.0]``.
    """
    table = _series(name)
    _check_positive(low)
    _check_positive(high)
    if high < low:
        raise MarkingError(f"range {low!r}..{high!r} is empty: expected low <= high")
    if high / low > 1e30:
        raise MarkingError(f"range {low!r}..{high!r} spans too many decades: expected at most 30")
    _, first = _decade(low)
    _, last = _decade(high)
    out = []
    for exponent in range(first - 1, last + 1):
        for m in table:
            v = _scaled(m, exponent)
            if low * (1 - _REL_TOL) <= v <= high * (1 + _REL_TOL):
                out.append(v)
    return out


def is_preferred(value: float, name: str, rel_tol: float = _REL_TOL) -> bool:
    """True when ``value`` is a member of the series, within ``rel_tol`` (default 1 ppm)."""
    table = _series(name)
    _check_positive(value)
    below, above = _neighbours(value, table, rel_tol)
    return below == above


def _neighbours(
    value: float, table: tuple[float, ...], rel_tol: float = _REL_TOL
) -> tuple[float, float]:
    """``(below, above)``; a value within ``rel_tol`` of a member gets that member twice."""
    mantissa, exponent = _decade(value)
    i = bisect_left(table, mantissa)
    below = _scaled(*((table[i - 1], exponent) if i > 0 else (table[-1], exponent - 1)))
    above = _scaled(*((table[i], exponent) if i < len(table) else (table[0], exponent + 1)))
    if abs(above / value - 1) <= rel_tol:
        return above, above
    if abs(value / below - 1) <= rel_tol:
        return below, below
    return below, above


def preferred_neighbours(value: float, name: str) -> tuple[float, float]:
    """The series values just below and just above ``value``.

    Returns ``(below, above)`` with ``below <= value <= above``; both are ``value``
    itself when it is a member of the series.
    """
    table = _series(name)
    _check_positive(value)
    return _neighbours(value, table)


def nearest_preferred(value: float, name: str) -> float:
    """The series value nearest to ``value`` by ratio (distance on a log scale).

    A preferred value is the centre of a tolerance band, so "nearest" is measured
    as a ratio: between 1.0 and 1.2 the change-over is at sqrt(1.2) = 1.095, not at
    the arithmetic mean 1.1. Ties go to the lower value.
    """
    below, above = preferred_neighbours(value, name)
    return below if value / below <= above / value else above


def series_containing(value: float) -> str | None:
    """The smallest E series (E3 first … E192) that has ``value`` (within 1 ppm), or None."""
    _check_positive(value)
    for name, table in SERIES.items():
        below, above = _neighbours(value, table)
        if below == above:
            return name
    return None

"""Text a user types for the inventory, turned into checked SI values.

Pure functions shared by the command line, the import and the terminal UI (which
can call them as the user types). Each raises :class:`kitbin.errors.QuantityError`
with one line naming the input and what was expected.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from kitbin.errors import QuantityError
from kitbin.quantities import (
    CONDITION_ALIASES,
    CONDITIONS,
    NOMINAL_QUANTITY,
    PART_KINDS,
    QUANTITIES,
    quantity_kind,
)
from kitbin.units import dimension_of, parse_quantity

_ASSIGNMENT = re.compile(r"^\s*([A-Za-z][A-Za-z0-9_]*)\s*(>=|=)\s*(.*?)\s*$")
_LABEL = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._\-/+#]{0,63}$")


@dataclass(frozen=True)
class Assignment:
    """One ``QUANTITY=VALUE`` (or ``QUANTITY>=VALUE``) item, parsed.

    ``value`` is SI; ``bound`` is ``"="`` or ``">="`` ("not reached up to").
    """

    quantity: str
    bound: str
    value: float


def quantity_name(name: str) -> str:
    """The canonical quantity name for a name or alias (``L`` -> ``inductance``).

    Raises
    ------
    QuantityError
        For a name :mod:`kitbin.quantities` does not know.
    """
    try:
        return quantity_kind(name).name
    except KeyError:
        known = ", ".join(sorted(QUANTITIES))
        raise QuantityError(
            f"unknown quantity '{name}'", f"known: {known}", text=name, expected="a quantity name"
        ) from None


def _split(item: str, what: str) -> tuple[str, str, str]:
    m = _ASSIGNMENT.match(item)
    if m is None or not m.group(3):
        raise QuantityError(
            f"'{item}' is not NAME=VALUE",
            f"write e.g. {what}",
            text=item,
            expected="NAME=VALUE",
        )
    return m.group(1), m.group(2), m.group(3)


def parse_value(name: str, text: str, item: str | None = None) -> float:
    """Parse ``text`` as a value of quantity ``name`` (SI float), naming ``item`` on error."""
    kind = QUANTITIES[name]
    try:
        value = parse_quantity(text, kind.dimension)
    except QuantityError as e:
        raise QuantityError(
            f"{item or name + '=' + text}: {e.msg}", e.hint, text=text, expected=kind.dimension
        ) from None
    return value


def parse_assignment(item: str) -> Assignment:
    """Parse ``inductance=9.6uH``, ``dcr=31mohm`` or ``isat_20>=3A``.

    Raises
    ------
    QuantityError
        For a malformed item, an unknown quantity, an unparsable value or a
        value of the wrong dimension (``inductance=10uF``).
    """
    name, bound, text = _split(item, "inductance=4.7uH or isat_20>=3A")
    quantity = quantity_name(name)
    return Assignment(quantity, bound, parse_value(quantity, text, item))


def parse_property(item: str) -> tuple[str, float]:
    """Parse a bin property ``NAME=VALUE`` (``vrrm=40V``, ``vref=0.8V``) into (name, SI)."""
    name, bound, text = _split(item, "vrrm=40V")
    if bound != "=":
        raise QuantityError(f"'{item}': a property takes '=', not '{bound}'", text=item)
    quantity = quantity_name(name)
    return quantity, parse_value(quantity, text, item)


def parse_condition(item: str) -> tuple[str, float]:
    """Parse a test condition ``freq=100kHz``, ``temp=25degC``, ``bias=0.5A`` (SI).

    A name not in :data:`CONDITIONS` is accepted when its value's unit says what it
    is (``vgs=5V``); temperatures are kept in degrees Celsius.
    """
    name, bound, text = _split(item, "freq=100kHz")
    if bound != "=":
        raise QuantityError(f"'{item}': a condition takes '=', not '{bound}'", text=item)
    key = name.lower()
    key = CONDITION_ALIASES.get(key, key)
    dimension = CONDITIONS.get(key) or dimension_of(text)
    if dimension is None:
        known = ", ".join(sorted(CONDITIONS))
        raise QuantityError(
            f"unknown condition '{name}' in '{item}'",
            f"known: {known}; or give a value with a unit",
            text=item,
        )
    try:
        return key, parse_quantity(text, dimension)
    except QuantityError as e:
        raise QuantityError(f"{item}: {e.msg}", e.hint, text=text, expected=dimension) from None


def parse_conditions(items: list[str] | tuple[str, ...]) -> dict[str, float]:
    """Parse several conditions into one dict (a repeated name is an error)."""
    out: dict[str, float] = {}
    for item in items:
        key, value = parse_condition(item)
        if key in out:
            raise QuantityError(f"condition '{key}' given twice", text=item)
        out[key] = value
    return out


def parse_tolerance(text: str) -> tuple[float, float]:
    """Parse a tolerance into (minus, plus) fractions.

    Accepts ``20%``, ``0.2``, ``±5%``, ``-20%/+80%`` (asymmetric, minus first) and
    ``+80%/-20%``.
    """
    raw = text.strip().replace("±", "").replace("+/-", "")
    parts = [p.strip() for p in raw.split("/")] if "/" in raw else [raw]
    if len(parts) == 1:
        value = abs(_ratio(parts[0], text))
        return value, value
    if len(parts) == 2:
        first, second = (_ratio(p, text) for p in parts)
        if parts[0].startswith("+") and not parts[1].startswith("+"):
            return abs(second), abs(first)
        return abs(first), abs(second)
    raise QuantityError(f"'{text}' is not a tolerance", "write e.g. 20% or -20%/+80%", text=text)


def _ratio(part: str, whole: str) -> float:
    try:
        value = parse_quantity(part, "ratio")
    except QuantityError:
        raise QuantityError(
            f"'{whole}' is not a tolerance", "write e.g. 20% or -20%/+80%", text=whole
        ) from None
    if not abs(value) < 1.0 and not part.lstrip("+-").endswith("%"):
        raise QuantityError(f"'{whole}' is not a tolerance", "write e.g. 20% or 0.2", text=whole)
    return value


def parse_kind(text: str) -> str:
    """A part kind from :data:`kitbin.quantities.PART_KINDS` (case-insensitive)."""
    kind = text.strip().lower()
    if kind not in PART_KINDS:
        raise QuantityError(
            f"unknown kind '{text}'", f"use one of: {', '.join(PART_KINDS)}", text=text
        )
    return kind


def parse_nominal(kind: str, text: str) -> float:
    """Parse a bin's nominal value for its kind (inductance, resistance, capacitance)."""
    quantity = NOMINAL_QUANTITY.get(kind)
    if quantity is None:
        raise QuantityError(
            f"a {kind} bin has no nominal value",
            "record its ratings with --prop NAME=VALUE instead",
            text=text,
        )
    value = parse_value(quantity, text, f"--nominal {text}")
    if not value > 0:
        raise QuantityError(f"--nominal {text}: must be above zero", text=text)
    return value


def check_label(label: str) -> str:
    """A bin label, stripped and checked (letters, digits and ``._-/+#``; up to 64)."""
    text = label.strip()
    if not _LABEL.match(text):
        raise QuantityError(
            f"'{label}' is not a bin label",
            "use up to 64 letters, digits and . _ - / + #, e.g. L-07",
            text=label,
        )
    return text

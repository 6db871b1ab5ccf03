"""Checks run on every keystroke of the recording forms.

Each returns a :class:`Check`: ``ok`` is None for an empty field (nothing to say),
True with what the text was read as, or False with the error's one line. Values
are read by :func:`kitbin.units.parse_quantity` with the dimension of the quantity
from :mod:`kitbin.quantities`, so "10uF" typed for an inductance is refused here,
before anything is written.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from kitbin.errors import QuantityError
from kitbin.quantities import NOMINAL_QUANTITY, QUANTITIES, quantity_kind
from kitbin.units import DIMENSIONS, format_quantity, parse_quantity

#: Quantities the matcher derives for a candidate; they are never recorded.
DERIVED = ("rise_load", "divider_ratio", "divider_sum")


@dataclass(frozen=True)
class Check:
    """The verdict on one field: ``ok`` None (empty), True or False, and a message."""

    ok: bool | None
    message: str = ""
    #: The canonical name (quantity fields) or the item text (value fields).
    value: str = ""


def check_quantity(text: str) -> Check:
    """A quantity name or alias (``L``, ``dcr``, ``isat``)."""
    if not text.strip():
        return Check(None)
    try:
        kind = quantity_kind(text)
    except KeyError:
        return Check(False, f"unknown quantity '{text.strip()}' (see ? for the list)")
    if kind.name in DERIVED:
        return Check(False, f"{kind.name} is derived by the matcher, not recorded")
    unit = DIMENSIONS[kind.dimension].unit
    return Check(True, f"{kind.name}: {kind.meaning} [{unit}]", kind.name)


def check_value(quantity: str | None, text: str) -> Check:
    """A value for ``quantity`` (canonical name): ``9.6uH``, ``31mohm``, ``>=3A``.

    A leading ``>=`` records a lower bound ("not reached up to").
    """
    raw = text.strip()
    if not raw:
        return Check(None)
    if quantity is None:
        return Check(False, "name the quantity first")
    bound = "="
    if raw.startswith(">="):
        bound, raw = ">=", raw[2:].strip()
    dimension = QUANTITIES[quantity].dimension
    try:
        value = parse_quantity(raw, dimension)
    except QuantityError as error:
        return Check(False, error.msg)
    shown = format_quantity(value, dimension)
    return Check(
        True,
        f"{'≥ ' if bound == '>=' else '= '}{shown}",
        f"{quantity}{bound}{raw}",
    )


def check_specimen(text: str) -> Check:
    """A specimen number (1 or more), or empty."""
    raw = text.strip()
    if not raw:
        return Check(None)
    if not raw.isdigit() or int(raw) < 1:
        return Check(False, f"specimen '{raw}': a whole number from 1")
    return Check(True, f"specimen {int(raw)}", raw)


def check_conditions(text: str) -> Check:
    """Test conditions ``freq=100kHz temp=25degC bias=0.5A`` (space-separated)."""
    items = text.split()
    if not items:
        return Check(None)
    from kitbin.services.inputs import parse_conditions

    try:
        parsed = parse_conditions(items)
    except QuantityError as error:
        return Check(False, error.msg)
    from kitbin.tui.widgets.bin.text import conditions_text

    return Check(True, conditions_text(parsed), " ".join(items))


def check_delta(text: str) -> Check:
    """A stock change: ``+10`` adds, ``-3`` takes."""
    raw = text.strip().replace(" ", "")
    if not raw:
        return Check(None)
    try:
        delta = int(raw)
    except ValueError:
        return Check(False, f"'{raw}' is not a whole number (e.g. +10 or -3)")
    if delta == 0:
        return Check(False, "a change of 0 changes nothing")
    return Check(True, f"{'add' if delta > 0 else 'take'} {abs(delta)}", str(delta))


def reading_items(pairs: Sequence[tuple[str, str]]) -> tuple[list[str], list[str]]:
    """(items, problems) from (quantity text, value text) rows; rows without a value
    are skipped.

    ``items`` are ``QUANTITY=VALUE`` texts for
    :func:`kitbin.services.inventory.record_readings`; any problem means nothing
    may be written.
    """
    items: list[str] = []
    problems: list[str] = []
    for n, (qtext, vtext) in enumerate(pairs, start=1):
        if not vtext.strip():
            continue  # a quantity offered but left without a value records nothing
        q = check_quantity(qtext)
        if not q.ok:
            problems.append(f"row {n}: {q.message or 'name the quantity'}")
            continue
        v = check_value(q.value, vtext)
        if not v.ok:
            problems.append(f"row {n}: {v.message or 'give a value'}")
            continue
        items.append(v.value)
    if not items and not problems:
        problems.append("nothing to record: give a quantity and a value")
    return items, problems


# -- a bin's description (the edit form) -------------------------------------------


def check_nominal(kind: str, text: str) -> Check:
    """A bin's nominal value in the unit of its kind: ``10uH`` on an inductor, ``4k7``
    on a resistor; ``10uF`` on an inductor is refused."""
    raw = text.strip()
    if not raw:
        return Check(None)
    quantity = NOMINAL_QUANTITY.get(kind)
    if quantity is None:
        return Check(False, f"a {kind} bin has no nominal value (give its properties)")
    if raw.startswith(("<", ">")):
        return Check(False, f"nominal '{raw}': one value, no bound")
    checked = check_value(quantity, raw)
    return Check(checked.ok, checked.message, raw if checked.ok else "")


def check_tolerance(text: str) -> Check:
    """A tolerance: ``20%``, ``±5%``, ``-20%/+80%``."""
    raw = text.strip()
    if not raw:
        return Check(None)
    from kitbin.services.inputs import parse_tolerance

    try:
        minus, plus = parse_tolerance(raw)
    except QuantityError as error:
        return Check(False, error.msg)
    from kitbin.tui.widgets.bin.text import tolerance_text

    return Check(True, tolerance_text(minus, plus), raw)


def check_marking(kind: str, text: str) -> Check:
    """A marking as printed, decoded for the bin's kind (``4k7``, ``brown black red``)."""
    raw = text.strip()
    if not raw:
        return Check(None)
    from kitbin.errors import KitbinError
    from kitbin.services.inventory import decode_marking

    try:
        decoded = decode_marking(kind, raw)
    except KitbinError as error:
        return Check(False, error.msg)
    if decoded is None:
        return Check(True, f"kept as printed (a {kind} marking carries no value)", raw)
    return Check(True, decoded.describe(), raw)


def check_properties(text: str) -> Check:
    """Bin properties ``vrrm=40V if_avg=1A`` (space-separated ``NAME=VALUE`` items)."""
    items = text.split()
    if not items:
        return Check(None)
    from kitbin.services.inputs import parse_property

    shown = []
    for item in items:
        try:
            name, value = parse_property(item)
        except QuantityError as error:
            return Check(False, error.msg)
        shown.append(f"{name} {format_quantity(value, QUANTITIES[name].dimension)}")
    return Check(True, " · ".join(shown), " ".join(items))

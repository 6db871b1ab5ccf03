"""The bin edit form as plain data: its fields filled from a bin, and what changed.

The form shows a bin's description as text; saving passes only the fields whose
text changed to :func:`kitbin.services.inventory.edit_bin` (which reads the
values, units and markings itself). Properties are ``NAME=VALUE`` items; an item
removed from the text drops that property.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from kitbin.quantities import QUANTITIES
from kitbin.tui.widgets.record.check import (
    Check,
    check_marking,
    check_nominal,
    check_properties,
    check_tolerance,
)
from kitbin.tui.widgets.shelf.rows import compact

#: (field, label, hint) in the order shown.
EDIT_FIELDS: tuple[tuple[str, str, str], ...] = (
    ("location", "location", "e.g. cabinet A, drawer 3 (empty: none)"),
    ("marking", "marking", "as printed: 100, 4k7, brown black red gold"),
    ("nominal", "nominal", "e.g. 10uH, in the unit of the bin's kind"),
    ("tolerance", "tolerance", "e.g. 20% or -20%/+80%"),
    ("package", "package", "e.g. 0805, TO-220, radial 8x10 (empty: none)"),
    ("kit", "kit", "name of an existing kit (empty: loose)"),
    ("notes", "notes", "anything worth keeping (empty: none)"),
    ("props", "properties", "NAME=VALUE items, e.g. vrrm=40V if_avg=1A"),
)

#: Fields whose text is passed as typed; an empty one clears the stored text.
PLAIN_FIELDS = ("location", "marking", "package", "kit", "notes")


def _percent(fraction: float) -> str:
    return f"{fraction * 100:g}%"


def tolerance_input(minus: float | None, plus: float | None) -> str:
    """A stored tolerance as the form's text: ``20%`` or ``-20%/+80%`` ('' when none)."""
    if minus is None:
        return ""
    plus = minus if plus is None else plus
    if minus == plus:
        return _percent(minus)
    return f"-{_percent(minus)}/+{_percent(plus)}"


def form_values(page: Mapping[str, Any]) -> dict[str, str]:
    """The form's starting text per field, from a bin's dict
    (:func:`kitbin.services.inventory.show_bin`)."""
    values = {key: page.get(key) or "" for key in PLAIN_FIELDS}
    nq = page.get("nominal_quantity")
    nominal = page.get("nominal")
    values["nominal"] = compact(nominal, QUANTITIES[nq].dimension) if nominal and nq else ""
    values["tolerance"] = tolerance_input(page.get("tol_minus"), page.get("tol_plus"))
    items = []
    for p in page.get("properties") or ():
        if p.get("value") is not None and p["name"] in QUANTITIES:
            items.append(f"{p['name']}={compact(p['value'], QUANTITIES[p['name']].dimension)}")
    values["props"] = " ".join(items)
    return values


def field_check(kind: str, key: str, text: str) -> Check | None:
    """The as-you-type check of one field (None for free-text fields)."""
    if key == "nominal":
        return check_nominal(kind, text)
    if key == "tolerance":
        return check_tolerance(text)
    if key == "marking":
        return check_marking(kind, text)
    if key == "props":
        return check_properties(text)
    return None


def _items(text: str) -> dict[str, str]:
    """``NAME=VALUE`` items by lower-cased name (an item without ``=`` keys itself)."""
    return {item.split("=", 1)[0].strip().lower(): item for item in text.split()}


def edit_arguments(
    kind: str, before: Mapping[str, str], after: Mapping[str, str]
) -> tuple[dict[str, Any], list[str]]:
    """Keyword arguments of :func:`kitbin.services.inventory.edit_bin` for the fields
    that changed, and the problems that stop a write (any problem: write nothing).
    """
    args: dict[str, Any] = {}
    problems: list[str] = []
    changed = [
        key for key, *_ in EDIT_FIELDS if after.get(key, "").strip() != before.get(key, "").strip()
    ]
    for key in changed:
        text = after.get(key, "").strip()
        check = field_check(kind, key, text)
        if check is not None and check.ok is False:
            problems.append(f"{key}: {check.message}")
            continue
        if key in PLAIN_FIELDS:
            args[key] = text
        elif key in ("nominal", "tolerance"):
            if not text:
                problems.append(f"{key}: give a value (a stored {key} is not cleared)")
            else:
                args[key] = text
        elif key == "props":
            old, new = _items(before.get("props", "")), _items(text)
            props = [item for name, item in new.items() if old.get(name) != item]
            dropped = [name for name in old if name not in new]
            if props:
                args["props"] = props
            if dropped:
                args["drop_props"] = dropped
    if not changed and not problems:
        problems.append("no field changed")
    return args, problems

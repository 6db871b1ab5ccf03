"""Shelf rows: the cells shown per bin, the filter people type, and sort keys.

Plain functions over plain data (no Textual), so they are tested directly and the
grid only draws. Rows are shaped once when the shelf loads; a keystroke in the
filter then costs one pass over precomputed tuples (about 10 ms for 10,000 bins,
see ``benchmarks/bench_tui.py``).
"""

from __future__ import annotations

import math
import operator
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

from kitbin.errors import QuantityError
from kitbin.units import dimension_of, format_quantity, parse_quantity

#: The three evidence slots of the shelf, per kind: (value, rating, rating).
SLOTS: dict[str, tuple[str | None, str | None, str | None]] = {
    "inductor": ("inductance", "dcr", "isat_20"),
    "resistor": ("resistance", None, None),
    "capacitor": ("capacitance", "rated_voltage", None),
    "diode": (None, "vrrm", "if_avg"),
    "controller": (None, "vref", "fsw"),
    "other": (None, None, None),
}

#: One mark per evidence grade, shown after each value (legend in the help screen).
GRADE_MARK: dict[str, str] = {"measured": "✓", "marked": "≈", "assumed": "?", "unknown": ""}
GRADE_STYLE: dict[str, str] = {
    "measured": "green",
    "marked": "yellow",
    "assumed": "magenta",
    "unknown": "",
}

#: The value dimensions a unit-less value (``10u``, ``4k7``) may mean.
NOMINAL_DIMENSIONS = ("inductance", "capacitance", "resistance")

#: Relative window of an equality term (``10u`` finds 9.6 µH and 10.4 µH).
ABOUT = 0.05


@dataclass(frozen=True)
class Cell:
    """One shown value: the SI number (used for sorting and filtering), its dimension
    and grade; the text is formatted when first drawn (formatting all 30,000 values of
    a 10,000-bin shelf up front cost 0.4 s)."""

    number: float | None = None
    dimension: str | None = None
    grade: str = ""

    @property
    def text(self) -> str:
        """``9.60µH`` (empty when there is no value)."""
        return compact(self.number, self.dimension)

    @property
    def mark(self) -> str:
        """The grade's mark (empty when none)."""
        return GRADE_MARK.get(self.grade, "")


@dataclass(frozen=True)
class ShelfRow:
    """One bin as the shelf shows, filters and sorts it."""

    label: str
    kind: str
    kit: str
    nominal: Cell
    slots: tuple[Cell, Cell, Cell]
    free: int
    reserved: int
    qty: int
    location: str
    #: Lower-cased text searched by free-text filter terms.
    haystack: str
    #: Dimension name -> the SI values a value term may match.
    values: dict[str, tuple[float, ...]] = field(default_factory=dict)
    #: One line per key quantity, for the peek line under the grid (empty when the
    #: service describes them on demand).
    evidence_lines: tuple[str, ...] = ()
    #: The row's index in the service's evidence tables (-1 when none).
    row: int = -1


@lru_cache(maxsize=8192)
def compact(value: float | None, dimension: str | None) -> str:
    """``9.60µH``: :func:`kitbin.units.format_quantity` without the space."""
    if value is None or dimension is None:
        return ""
    return format_quantity(value, dimension).replace(" ", "")


def shape_row(data: dict[str, Any]) -> ShelfRow:
    """A :class:`ShelfRow` from one :func:`kitbin.services.ui_support.shelf_rows` dict."""
    kind = data["kind"]
    by_q = {e["quantity"]: e for e in data.get("evidence", ())}
    cells: list[Cell] = []
    values: dict[str, list[float]] = {}
    for slot, quantity in enumerate(SLOTS.get(kind, (None, None, None))):
        e = by_q.get(quantity) if quantity else None
        if e is None or e["grade"] == "unknown":
            cells.append(Cell())
            continue
        # The value slot shows the typical value (mean of readings, or nominal);
        # ratings show their worst-case end, the one a matcher relies on.
        number = e["typical"] if slot == 0 else e["conservative"]
        cells.append(Cell(number, e["dimension"], e["grade"]))
        if number is not None:
            values.setdefault(e["dimension"], []).append(number)
    nominal = data.get("nominal")
    ndim = data.get("nominal_dimension")
    if nominal is not None and ndim:
        values.setdefault(ndim, []).append(nominal)
    nominal_cell = Cell(nominal, ndim)
    text_fields = (
        data["label"],
        kind,
        data.get("kit"),
        data.get("marking"),
        data.get("package"),
        data.get("location"),
    )
    return ShelfRow(
        label=data["label"],
        kind=kind,
        kit=data.get("kit") or "",
        nominal=nominal_cell,
        slots=(cells[0], cells[1], cells[2]),
        free=int(data["qty"]) - int(data["qty_reserved"]),
        reserved=int(data["qty_reserved"]),
        qty=int(data["qty"]),
        location=data.get("location") or "",
        haystack=" ".join(t for t in text_fields if t).lower(),
        values={k: tuple(v) for k, v in values.items()},
        evidence_lines=tuple(e["text"] for e in data.get("evidence", ()) if e.get("text")),
        row=int(data.get("row", -1)),
    )


# -- the filter --------------------------------------------------------------------

_OPS: dict[str, Callable[[float, float], bool]] = {
    ">=": operator.ge,
    "<=": operator.le,
    ">": operator.gt,
    "<": operator.lt,
    "=": lambda a, b: math.isclose(a, b, rel_tol=ABOUT),
}
_TERM = re.compile(r"^(>=|<=|>|<|=)?(.*)$")
_KINDS = ("inductor", "resistor", "capacitor", "diode", "controller", "other")


@dataclass(frozen=True)
class ValueTerm:
    """A value condition: some value of one of ``dimensions`` compared with ``value``.

    ``dimensions`` maps each dimension the text may mean to its SI value.
    """

    op: str
    dimensions: tuple[tuple[str, float], ...]
    text: str

    def accepts(self, row: ShelfRow) -> bool:
        compare = _OPS[self.op]
        for dim, wanted in self.dimensions:
            for have in row.values.get(dim, ()):
                if compare(have, wanted):
                    return True
        return False


@dataclass(frozen=True)
class FreeTerm:
    """``>=10`` and friends: compare the free quantity (on hand minus reserved)."""

    op: str
    count: int

    def accepts(self, row: ShelfRow) -> bool:
        return _OPS[self.op](row.free, self.count) if self.op != "=" else row.free == self.count


@dataclass(frozen=True)
class KindTerm:
    """``kind:ind`` (or a bare kind word such as ``inductor``): kinds starting so."""

    prefix: str

    def accepts(self, row: ShelfRow) -> bool:
        return row.kind.startswith(self.prefix)


@dataclass(frozen=True)
class TextTerm:
    """Free text: found in label, kind, kit, marking, package or location."""

    text: str

    def accepts(self, row: ShelfRow) -> bool:
        return self.text in row.haystack


@dataclass(frozen=True)
class KitTerm:
    """``kit:NAME``: bins of a kit whose name contains NAME (``_`` stands for a space)."""

    text: str

    def accepts(self, row: ShelfRow) -> bool:
        return self.text in row.kit.lower()


Term = ValueTerm | FreeTerm | KindTerm | KitTerm | TextTerm


@dataclass(frozen=True)
class ShelfFilter:
    """Every term must hold (an empty filter keeps every row)."""

    terms: tuple[Term, ...] = ()
    #: Terms that could not be read, with the reason, shown under the filter box.
    problems: tuple[str, ...] = ()

    def accepts(self, row: ShelfRow) -> bool:
        return all(t.accepts(row) for t in self.terms)


def _value_term(op: str, text: str) -> ValueTerm | None:
    dim = dimension_of(text)
    if dim is not None:
        try:
            return ValueTerm(op, ((dim, parse_quantity(text, dim)),), text)
        except QuantityError:
            return None
    found = []
    for dim in NOMINAL_DIMENSIONS:
        try:
            found.append((dim, parse_quantity(text, dim)))
        except QuantityError:
            continue
    return ValueTerm(op, tuple(found), text) if found else None


def parse_filter(text: str) -> ShelfFilter:
    """Read what is typed in the shelf's filter box.

    Terms are separated by spaces and must all hold:

    - ``kind:ind`` or a kind word (``inductor``, ``diode``): bins of that kind;
    - ``10u``, ``4k7``, ``100nF``, ``=2.2uH``: a value of that size (within 5 %),
      nominal or evidence;
    - ``>=2A``, ``<50mohm``, ``>16V``: some evidence value of that dimension
      compared (ratings use their worst case: Isat's low end, DCR's high end);
    - ``>=10``: at least ten parts free;
    - ``kit:NAME``: bins of a kit whose name contains NAME (``_`` for a space);
    - anything else: text found in label, kind, kit, marking, package, location
      (case-insensitive).
    """
    terms: list[Term] = []
    problems: list[str] = []
    for token in text.split():
        low = token.lower()
        if low.startswith("kind:"):
            prefix = low[5:]
            if prefix and not any(k.startswith(prefix) for k in _KINDS):
                problems.append(f"no kind starts with '{prefix}'")
            terms.append(KindTerm(prefix))
            continue
        if low.startswith("kit:"):
            terms.append(KitTerm(low[4:].replace("_", " ")))
            continue
        if low in _KINDS:
            terms.append(KindTerm(low))
            continue
        m = _TERM.match(token)
        op, rest = (m.group(1) or "", m.group(2)) if m else ("", token)
        if op:
            if not rest:
                problems.append(f"'{token}': give a value after {op}")
                continue
            if rest.isdigit():
                terms.append(FreeTerm(op, int(rest)))
                continue
            term = _value_term(op, rest)
            if term is None:
                problems.append(f"'{token}' is not a value (try >=2A or <50mohm)")
                continue
            terms.append(term)
            continue
        if (token[:1].isdigit() or token[:1] == ".") and not token.isdigit():
            term = _value_term("=", token)
            if term is not None:
                terms.append(term)
                continue
        terms.append(TextTerm(low))
    return ShelfFilter(tuple(terms), tuple(problems))


def apply_filter(rows: Sequence[ShelfRow], shelf_filter: ShelfFilter) -> list[int]:
    """Indices of the rows the filter keeps, in the rows' order."""
    if not shelf_filter.terms:
        return list(range(len(rows)))
    accepts = shelf_filter.accepts
    return [i for i, row in enumerate(rows) if accepts(row)]


# -- sorting -----------------------------------------------------------------------

#: Sortable columns, in the order the sort key steps through them.
SORT_COLUMNS: tuple[str, ...] = (
    "label",
    "kind",
    "nominal",
    "value",
    "dcr_v",
    "isat_i",
    "free",
    "reserved",
    "location",
)


def _number_key(cell: Cell) -> tuple[int, float]:
    return (1, 0.0) if cell.number is None else (0, cell.number)


_SORT_KEYS: dict[str, Callable[[ShelfRow], Any]] = {
    "label": lambda r: r.label.lower(),
    "kind": lambda r: (r.kind, r.label.lower()),
    "nominal": lambda r: (_number_key(r.nominal), r.label.lower()),
    "value": lambda r: (_number_key(r.slots[0]), r.label.lower()),
    "dcr_v": lambda r: (_number_key(r.slots[1]), r.label.lower()),
    "isat_i": lambda r: (_number_key(r.slots[2]), r.label.lower()),
    "free": lambda r: (r.free, r.label.lower()),
    "reserved": lambda r: (r.reserved, r.label.lower()),
    "location": lambda r: (r.location.lower(), r.label.lower()),
}


def sort_order(rows: Sequence[ShelfRow], column: str, descending: bool = False) -> list[int]:
    """Row indices sorted by ``column`` (empty values last when ascending)."""
    key = _SORT_KEYS[column]
    return sorted(range(len(rows)), key=lambda i: key(rows[i]), reverse=descending)


def view(order: Sequence[int], kept: Sequence[int]) -> list[int]:
    """The rows to show: ``order`` restricted to the ``kept`` indices."""
    if len(kept) == len(order):
        return list(order)
    keep = set(kept)
    return [i for i in order if i in keep]

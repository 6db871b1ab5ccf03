"""CSV import and export of bins and readings.

An import is all or nothing: every row is checked first, and the first bad row
rejects the whole file with its line number (header = line 1) before anything is
written. Numbers go through :func:`kitbin.units.parse_quantity`, whose regex fast
path plus a per-import cache keep pint out of the loop (pint per row costs ~93 µs;
see STACK-NOTES section 4 and ``benchmarks/bench_import.py``).

Bin files have the columns ``label, kind, kit, nominal, tol_minus, tol_plus,
marking, package, location, qty, notes`` and one ``prop:NAME`` column per bin
property. Reading files have ``label, quantity, value, bound, specimen,
conditions, method, instrument, taken_at, note``. Numbers may be plain SI
(``1e-05``) or carry units (``10uH``, ``31mohm``, ``10%``).
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import json
import math
import os
import re
import sys
import tempfile
from collections.abc import Callable
from functools import lru_cache
from pathlib import Path
from typing import Any

from kitbin.errors import ImportRowError, KitbinError, NotFoundError, QuantityError
from kitbin.quantities import NOMINAL_QUANTITY, QUANTITIES
from kitbin.services import inputs
from kitbin.store import Store, bulk, queries
from kitbin.store.models import Bin, BinProperty, Kit, utcnow

BIN_COLUMNS = (
    "label",
    "kind",
    "kit",
    "nominal",
    "tol_minus",
    "tol_plus",
    "marking",
    "package",
    "location",
    "qty",
    "notes",
)
READING_COLUMNS = (
    "label",
    "quantity",
    "value",
    "bound",
    "specimen",
    "conditions",
    "method",
    "instrument",
    "taken_at",
    "note",
)
PROP_PREFIX = "prop:"
Progress = Callable[[int, int], None]

_PLAIN = re.compile(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$")


class _Row:
    """One CSV row with its line number; raises ImportRowError naming the line."""

    __slots__ = ("cells", "line")

    def __init__(self, line: int, cells: dict[str, str]) -> None:
        self.line = line
        self.cells = cells

    def get(self, column: str) -> str:
        return _unguard(self.cells.get(column, "")).strip()

    def fail(self, problem: str) -> ImportRowError:
        return ImportRowError(
            f"line {self.line}: {problem}", "nothing was imported", line=self.line
        )


def _number(text: str, dimension: str, row: _Row, column: str, parse: Callable) -> float:
    """A cell as an SI float: plain numbers directly, others by the cached parser."""
    if _PLAIN.match(text):
        value = float(text)
    else:
        try:
            value = parse(text, dimension)
        except QuantityError as e:
            raise row.fail(f"{column}: {e.msg}") from None
    if not math.isfinite(value):
        raise row.fail(f"{column} '{text}' is not a finite number")
    return value


def _cached_parser() -> Callable[[str, str], float]:
    from kitbin.units import parse_quantity

    return lru_cache(maxsize=4096)(parse_quantity)


def _read_table(path: str) -> tuple[list[str], list[_Row]]:
    """Read a CSV file into (columns, rows); columns lower-cased and stripped."""
    # pandas is imported here, not at module level: it costs ~280 ms to import
    # (STACK-NOTES section 2) and most commands never read a CSV.
    import pandas as pd

    file = Path(path)
    if not file.is_file():
        raise NotFoundError(f"no file '{path}'")
    try:
        frame = pd.read_csv(
            file,
            dtype=str,
            keep_default_na=False,
            skip_blank_lines=False,
            encoding="utf-8-sig",
        )
    except pd.errors.EmptyDataError:
        raise ImportRowError(f"{path}: the file is empty", line=1) from None
    except (pd.errors.ParserError, UnicodeDecodeError, ValueError) as e:
        first = (str(e).strip().splitlines() or ["unreadable"])[0]
        raise ImportRowError(f"{path}: not a readable CSV file ({first})") from None
    columns = [str(c).strip().lower() for c in frame.columns]
    if len(set(columns)) != len(columns):
        raise ImportRowError(f"{path}: line 1: a column name appears twice", line=1)
    data = {c: frame.iloc[:, i].tolist() for i, c in enumerate(columns)}
    rows = []
    for index in range(len(frame)):
        cells = {
            c: (v if isinstance(v, str) else "") for c, v in ((c, data[c][index]) for c in columns)
        }
        if any(v.strip() for v in cells.values()):
            rows.append(_Row(index + 2, cells))
    return columns, rows


def _detect(columns: list[str], what: str | None, path: str) -> str:
    if what is not None:
        what = what.strip().lower()
        if what not in ("bins", "readings"):
            raise KitbinError(f"--what {what}: expected bins or readings")
    elif "quantity" in columns and "value" in columns:
        what = "readings"
    elif "kind" in columns:
        what = "bins"
    else:
        raise ImportRowError(
            f"{path}: line 1: cannot tell bins from readings by the header",
            "a bin file has label and kind columns; a reading file label, quantity, value",
            line=1,
        )
    required = ("label", "kind") if what == "bins" else ("label", "quantity", "value")
    missing = [c for c in required if c not in columns]
    if missing:
        raise ImportRowError(f"{path}: line 1: missing column {', '.join(missing)}", line=1)
    known = set(BIN_COLUMNS if what == "bins" else READING_COLUMNS) | {"tolerance"}
    for column in columns:
        if column not in known and not (what == "bins" and column.startswith(PROP_PREFIX)):
            raise ImportRowError(f"{path}: line 1: unknown column '{column}'", line=1)
        if column.startswith(PROP_PREFIX):
            name = column[len(PROP_PREFIX) :]
            if name not in QUANTITIES:
                raise ImportRowError(f"{path}: line 1: unknown property '{name}'", line=1)
    return what


def import_csv(
    store: Store, path: str, *, what: str | None = None, progress: Progress | None = None
) -> dict[str, Any]:
    """Import a CSV file of bins or readings, all or nothing.

    Parameters
    ----------
    what
        ``"bins"`` or ``"readings"``; None tells them apart by the header.
    progress
        Called as ``progress(done, total)`` while rows are checked and written.

    Returns
    -------
    dict
        ``file``, ``what``, ``rows`` imported, ``kits_added`` (bin files).

    Raises
    ------
    ImportRowError
        For the first bad row, naming its line; nothing is written.
    """
    columns, rows = _read_table(path)
    kind = _detect(columns, what, path)
    report = progress or (lambda done, total: None)
    if kind == "bins":
        added, kits = _import_bins(store, rows, columns, report)
        return {"file": path, "what": "bins", "rows": added, "kits_added": kits}
    added = _import_readings(store, rows, report)
    return {"file": path, "what": "readings", "rows": added, "kits_added": 0}


def _import_bins(
    store: Store, rows: list[_Row], columns: list[str], report: Progress
) -> tuple[int, int]:
    parse = _cached_parser()
    prop_columns = [c for c in columns if c.startswith(PROP_PREFIX)]
    total = len(rows)
    checked: list[dict[str, Any]] = []
    seen: dict[str, int] = {}
    for i, row in enumerate(rows):
        checked.append(_check_bin_row(row, prop_columns, parse, seen))
        if i % 1000 == 0:
            report(i, 2 * total)
    now = utcnow()
    with store.transaction() as session:
        taken = queries.bin_ids_by_label(session)
        for data in checked:
            if data["label"] in taken:
                raise ImportRowError(
                    f"line {data['line']}: a bin labelled '{data['label']}' already exists",
                    "nothing was imported",
                    line=data["line"],
                )
        kits = {k.name: k for k in queries.kits(session)}
        new_kits = 0
        created: list[tuple[Bin, int]] = []
        for i, data in enumerate(checked):
            kit = None
            if data["kit"]:
                kit = kits.get(data["kit"])
                if kit is None:
                    kit = Kit(name=data["kit"])
                    session.add(kit)
                    kits[data["kit"]] = kit
                    new_kits += 1
            b = Bin(
                label=data["label"],
                kind=data["kind"],
                kit=kit,
                nominal=data["nominal"],
                tol_minus=data["tol_minus"],
                tol_plus=data["tol_plus"],
                marking=data["marking"],
                package=data["package"],
                location=data["location"],
                qty=data["qty"],
                qty_reserved=0,
                notes=data["notes"],
                properties=[
                    BinProperty(name=n, value=v, source="imported") for n, v in data["props"]
                ],
            )
            session.add(b)
            created.append((b, data["qty"]))
            if i % 1000 == 0:
                report(total + i, 2 * total)
        session.flush()
        bulk.insert_moves(
            session,
            [
                {
                    "bin_id": b.id,
                    "delta": qty,
                    "reason": "imported",
                    "pick_list_id": None,
                    "qty_after": qty,
                    "at": now,
                }
                for b, qty in created
                if qty
            ],
        )
    report(2 * total, 2 * total)
    return len(checked), new_kits


def _check_bin_row(
    row: _Row, prop_columns: list[str], parse: Callable, seen: dict[str, int]
) -> dict[str, Any]:
    try:
        label = inputs.check_label(row.get("label"))
        kind = inputs.parse_kind(row.get("kind"))
    except QuantityError as e:
        raise row.fail(e.msg) from None
    if label in seen:
        raise row.fail(f"label '{label}' appears again (first on line {seen[label]})")
    seen[label] = row.line
    nominal_q = NOMINAL_QUANTITY.get(kind)
    nominal = None
    text = row.get("nominal")
    if text:
        if nominal_q is None:
            raise row.fail(f"a {kind} bin has no nominal value (use a prop: column)")
        nominal = _number(text, QUANTITIES[nominal_q].dimension, row, "nominal", parse)
        if nominal <= 0:
            raise row.fail(f"nominal '{text}' must be above zero")
    tol_minus = tol_plus = None
    if row.get("tolerance"):
        try:
            tol_minus, tol_plus = inputs.parse_tolerance(row.get("tolerance"))
        except QuantityError as e:
            raise row.fail(e.msg) from None
    for column in ("tol_minus", "tol_plus"):
        cell = row.get(column)
        if cell:
            value = _number(cell, "ratio", row, column, parse)
            if not 0 <= value < 10:
                raise row.fail(f"{column} '{cell}' is not a tolerance (write 0.1 or 10%)")
            if column == "tol_minus":
                tol_minus = value
            else:
                tol_plus = value
    if (tol_minus is None) != (tol_plus is None):
        tol_minus = tol_plus = tol_minus if tol_minus is not None else tol_plus
    marking = row.get("marking") or None
    if marking and nominal_q is not None and nominal is None:
        from kitbin.markings import decode_marking

        try:
            decoded = decode_marking(marking, kind)
        except KitbinError as e:
            raise row.fail(f"marking: {e.msg}") from None
        nominal = decoded.value
        if tol_minus is None and decoded.tol_minus is not None:
            tol_minus, tol_plus = decoded.tol_minus, decoded.tol_plus
    qty_text = row.get("qty") or "0"
    try:
        qty = int(qty_text)
    except ValueError:
        raise row.fail(f"qty '{qty_text}' is not a whole number") from None
    if qty < 0:
        raise row.fail(f"qty {qty} is negative; a bin holds 0 or more parts")
    props = []
    for column in prop_columns:
        cell = row.get(column)
        if cell:
            name = column[len(PROP_PREFIX) :]
            props.append((name, _number(cell, QUANTITIES[name].dimension, row, column, parse)))
    return {
        "line": row.line,
        "label": label,
        "kind": kind,
        "kit": row.get("kit") or None,
        "nominal": nominal,
        "tol_minus": tol_minus,
        "tol_plus": tol_plus,
        "marking": marking,
        "package": row.get("package") or None,
        "location": row.get("location") or None,
        "qty": qty,
        "notes": row.get("notes") or None,
        "props": props,
    }


def _import_readings(store: Store, rows: list[_Row], report: Progress) -> int:
    parse = _cached_parser()
    total = len(rows)
    with store.transaction() as session:
        ids = queries.bin_ids_by_label(session)
        lower = {label.lower(): i for label, i in ids.items()}
        checked = []
        now = utcnow()
        for i, row in enumerate(rows):
            checked.append(_check_reading_row(row, ids, lower, parse, now))
            if i % 1000 == 0:
                report(i, total)
        bulk.insert_readings(session, checked)
    report(total, total)
    return len(checked)


def _check_reading_row(
    row: _Row, ids: dict[str, int], lower: dict[str, int], parse: Callable, now: dt.datetime
) -> dict[str, Any]:
    label = row.get("label")
    bin_id = ids.get(label) or lower.get(label.lower())
    if bin_id is None:
        raise row.fail(f"no bin labelled '{label}'")
    try:
        quantity = inputs.quantity_name(row.get("quantity"))
    except QuantityError as e:
        raise row.fail(e.msg) from None
    text = row.get("value")
    bound = row.get("bound") or "="
    if text.startswith(">="):
        bound, text = ">=", text[2:].strip()
    if bound not in ("=", ">="):
        raise row.fail(f"bound '{bound}' is not = or >=")
    if not text:
        raise row.fail("value is empty")
    value = _number(text, QUANTITIES[quantity].dimension, row, "value", parse)
    specimen = None
    if row.get("specimen"):
        try:
            specimen = int(row.get("specimen"))
        except ValueError:
            raise row.fail(f"specimen '{row.get('specimen')}' is not a whole number") from None
        if specimen < 1:
            raise row.fail(f"specimen {specimen}: specimens are numbered from 1")
    return {
        "bin_id": bin_id,
        "specimen": specimen,
        "quantity": quantity,
        "value": value,
        "bound": bound,
        "conditions": _conditions(row),
        "method": row.get("method") or None,
        "instrument": row.get("instrument") or None,
        "taken_at": _taken_at(row, now),
        "capture_id": None,
        "note": row.get("note") or None,
    }


def _conditions(row: _Row) -> dict[str, float]:
    text = row.get("conditions")
    if not text:
        return {}
    if text.startswith("{"):
        try:
            data = json.loads(text)
        except json.JSONDecodeError:
            raise row.fail(f"conditions '{text}' is not a JSON object") from None
        if not isinstance(data, dict) or not all(
            isinstance(v, (int, float)) and not isinstance(v, bool) for v in data.values()
        ):
            raise row.fail('conditions must map names to numbers, e.g. {"freq": 100000}')
        return {str(k): float(v) for k, v in data.items()}
    try:
        return dict(_conditions_text(text))
    except QuantityError as e:
        raise row.fail(e.msg) from None


@lru_cache(maxsize=1024)
def _conditions_text(text: str) -> tuple[tuple[str, float], ...]:
    """``freq=100kHz;temp=25degC`` parsed once per distinct text (files repeat them)."""
    parsed = inputs.parse_conditions([p for p in text.split(";") if p.strip()])
    return tuple(parsed.items())


def _taken_at(row: _Row, now: dt.datetime) -> dt.datetime:
    text = row.get("taken_at")
    if not text:
        return now
    try:
        when = dt.datetime.fromisoformat(text)
    except ValueError:
        raise row.fail(f"taken_at '{text}' is not an ISO date and time") from None
    if when.tzinfo is None:
        when = when.replace(tzinfo=dt.UTC)
    return when.astimezone(dt.UTC)


# -- export ------------------------------------------------------------------------


#: A text cell starting with one of these is run as a formula by common spreadsheet
#: programs; exports put an apostrophe in front (OWASP "CSV Injection", common
#: practice) and imports take it off again.
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def _cell(value: Any) -> str:
    """A value as CSV text: floats exactly (repr), formula-like text guarded."""
    if value is None:
        return ""
    if isinstance(value, float):
        return repr(value)
    if isinstance(value, int):
        return str(value)
    text = str(value)
    return "'" + text if text.startswith(FORMULA_STARTS) else text


def _unguard(text: str) -> str:
    """Undo :func:`_cell`'s guard on a text cell read back."""
    if len(text) > 1 and text[0] == "'" and text[1] in FORMULA_STARTS:
        return text[1:]
    return text


def export_csv(store: Store, path: str, *, what: str = "bins") -> int:
    """Write bins or readings as CSV (SI numbers, exact) to ``path`` (``-``: stdout).

    The file is written to a temporary name and renamed, so a failed export never
    leaves half a file. Returns the number of rows written.
    """
    what = what.strip().lower()
    if what not in ("bins", "readings"):
        raise KitbinError(f"--what {what}: expected bins or readings")
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    with store.transaction() as session:
        if what == "bins":
            bins = queries.bins(session)
            names = sorted({p.name for b in bins for p in b.properties})
            writer.writerow([*BIN_COLUMNS, *(PROP_PREFIX + n for n in names)])
            for b in bins:
                props = {p.name: p.value for p in b.properties}
                values = (
                    b.label,
                    b.kind,
                    b.kit.name if b.kit else None,
                    b.nominal,
                    b.tol_minus,
                    b.tol_plus,
                    b.marking,
                    b.package,
                    b.location,
                    b.qty,
                    b.notes,
                    *(props.get(n) for n in names),
                )
                writer.writerow([_cell(v) for v in values])
            n = len(bins)
        else:
            writer.writerow(READING_COLUMNS)
            rows = queries.readings(session)
            for label, r in rows:
                writer.writerow(
                    [
                        _cell(v)
                        for v in (
                            label,
                            r.quantity,
                            r.value,
                            r.bound,
                            r.specimen,
                            json.dumps(r.conditions, sort_keys=True) if r.conditions else "",
                            r.method,
                            r.instrument,
                            r.taken_at.isoformat() if r.taken_at else None,
                            r.note,
                        )
                    ]
                )
            n = len(rows)
    _write_text(path, buffer.getvalue())
    return n


def _write_text(path: str, text: str) -> None:
    if path == "-":
        sys.stdout.write(text)
        return
    target = Path(path)
    try:
        fd, tmp = tempfile.mkstemp(prefix=".kitbin-", suffix=".csv", dir=target.parent or ".")
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as f:
            f.write(text)
        os.replace(tmp, target)
    except OSError as e:
        raise KitbinError(f"cannot write {path}: {e.strerror}") from e

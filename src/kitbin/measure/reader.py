"""Read delimited-text bench captures (scope and logger exports) into SI numpy arrays.

The layout is sniffed from the first few kilobytes (delimiter, decimal mark,
metadata lines, header row, units in column names), then the numeric block is
parsed with one pandas ``read_csv`` call on the C engine. Nothing here is tied
to one instrument's export; the rules are generic:

* the data block is the longest run of lines, to the end of the sample, whose
  fields are all numbers (``.`` or ``,`` as decimal mark, or ``nan``);
* the line just above it is the header when it has the same number of fields
  and is not numeric; anything above is metadata;
* a unit in a column name, ``Time (s)``, ``CH1 [mV]``, ``t/us``, scales the
  column to SI (ms, us, ns to s; mV to V; mA to A; K and °F to °C);
* the time column is the one named like time, or else the first column when it
  increases steadily; without one, a sample interval ``dt`` is needed (given,
  or found in a metadata line such as ``interval, 1e-9``).

pandas is imported inside :func:`read_capture` (about 300 ms, STACK-NOTES §2).
"""

from __future__ import annotations

import io
import math
import os
import re
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import BinaryIO

import numpy as np

from kitbin.errors import CaptureError

#: Bytes looked at to sniff the layout.
SNIFF_BYTES = 8 * 1024
#: Files at least this large are handed to pandas by path, which parses them on
#: several threads (pandas 3 parallel read; its own threshold is 5 MiB).
PARALLEL_MIN_BYTES = 6 * 1024 * 1024
_NA_VALUES = ["nan", "NaN", "NAN", "-nan", "+nan"]
#: Non-numeric lines tolerated after the data (a footer).
_FOOTER_LINES = 20
#: Fewest samples an analysis can use.
MIN_SAMPLES = 16
#: Longest run of missing values that is bridged by linear interpolation (samples).
MAX_GAP = 2

_NUMBER = re.compile(r"^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?$")
_MISSING = {"", "nan", "NaN", "NAN", "-nan", "+nan"}
_LINE_END = re.compile(rb"\r\n|\n|\r")

#: Unit text found in column names -> (SI scale, offset, SI unit).
_UNITS: dict[str, tuple[float, float, str]] = {
    "s": (1.0, 0.0, "s"),
    "sec": (1.0, 0.0, "s"),
    "ms": (1e-3, 0.0, "s"),
    "us": (1e-6, 0.0, "s"),
    "µs": (1e-6, 0.0, "s"),
    "μs": (1e-6, 0.0, "s"),
    "ns": (1e-9, 0.0, "s"),
    "ps": (1e-12, 0.0, "s"),
    "min": (60.0, 0.0, "s"),
    "h": (3600.0, 0.0, "s"),
    "v": (1.0, 0.0, "V"),
    "mv": (1e-3, 0.0, "V"),
    "uv": (1e-6, 0.0, "V"),
    "µv": (1e-6, 0.0, "V"),
    "μv": (1e-6, 0.0, "V"),
    "kv": (1e3, 0.0, "V"),
    "a": (1.0, 0.0, "A"),
    "ma": (1e-3, 0.0, "A"),
    "ua": (1e-6, 0.0, "A"),
    "µa": (1e-6, 0.0, "A"),
    "μa": (1e-6, 0.0, "A"),
    "°c": (1.0, 0.0, "°C"),
    "degc": (1.0, 0.0, "°C"),
    "c": (1.0, 0.0, "°C"),
    "k": (1.0, -273.15, "°C"),
    "°f": (5.0 / 9.0, -32.0 * 5.0 / 9.0, "°C"),
    "degf": (5.0 / 9.0, -32.0 * 5.0 / 9.0, "°C"),
}
_UNIT_IN_NAME = re.compile(r"^(?P<base>.*?)\s*(?:[\(\[](?P<u1>[^\)\]]*)[\)\]]|/\s*(?P<u2>\S+))\s*$")
_TIME_NAMES = re.compile(r"^(?:t|time|times|sec|second|seconds|elapsed|timestamp)(?:[ _-]\w*)?$")
_INTERVAL_KEY = re.compile(
    r"(?:sample[ _-]?interval|sampling[ _-]?interval|time[ _-]?increment|x[ _-]?increment"
    r"|sample[ _-]?period|^\s*dt\s*$|^\s*interval\s*$|time[ _-]?per[ _-]?sample)",
    re.IGNORECASE,
)


@dataclass(frozen=True)
class Layout:
    """What the sniffer found about a capture's text layout."""

    delimiter: str
    decimal: str
    data_line: int
    data_offset: int
    n_fields: int
    names: tuple[str, ...]
    has_header: bool
    metadata: tuple[str, ...] = ()


@dataclass(frozen=True, eq=False)
class Capture:
    """A capture in SI units: a time base and named channels.

    Attributes
    ----------
    time
        Sample times (s), strictly increasing.
    channels
        Column name -> values in SI units (V, A, °C, ...), same length as ``time``.
    units
        Column name -> SI unit of that column ("" when the file named none).
    time_source
        ``"column NAME"`` or ``"dt"``: where the time base came from.
    layout
        The sniffed layout.
    notes
        What was assumed while reading (a time column without a unit, ...).
    """

    time: np.ndarray
    channels: dict[str, np.ndarray]
    units: dict[str, str]
    time_source: str
    layout: Layout
    notes: tuple[str, ...] = field(default=())

    @property
    def n(self) -> int:
        """Number of samples."""
        return int(self.time.shape[0])

    @property
    def dt(self) -> float:
        """Median sample interval (s)."""
        return float(np.median(np.diff(self.time[: min(self.n, 100_001)])))

    def channel(self, key: str | int | None = None) -> tuple[str, np.ndarray]:
        """One channel by name or 1-based file column number; the first one when None."""
        names = list(self.channels)
        if key is None:
            return names[0], self.channels[names[0]]
        name = _match_column(key, list(self.layout.names), self.channels)
        return name, self.channels[name]


def read_capture(
    content: bytes | str | BinaryIO | os.PathLike[str],
    *,
    columns: Sequence[str | int] | None = None,
    time_col: str | int | None = None,
    dt: float | None = None,
    source: str = "capture",
    min_samples: int = MIN_SAMPLES,
) -> Capture:
    """Parse a delimited-text capture.

    Parameters
    ----------
    content
        The file's bytes (or text); a seekable binary stream positioned at its
        start; or a path (``pathlib.Path``), which is only opened to read, and
        which lets pandas parse a large file on several threads (pandas 3 does so
        for a path, never for a stream: about 1.5× faster on 2 cores).
    columns
        Channels to keep, by column name (with or without its unit) or 1-based
        column number in the file; all non-time columns when None.
    time_col
        The time column by name or number; detected when None.
    dt
        Sample interval (s) for a capture without a time column. When given and
        ``time_col`` is not, the time base is built from it.
    source
        Name of the input, used in error messages.
    min_samples
        Fewest rows accepted.

    Returns
    -------
    Capture

    Raises
    ------
    CaptureError
        For an empty file, no numeric data, a missing column, time that does not
        increase, a run of missing values or too few samples.
    """
    if dt is not None and not (math.isfinite(dt) and dt > 0):
        raise CaptureError(f"{source}: sample interval must be a positive time, got {dt!r}")
    layout, columns_data = _load(content, source)
    n_rows = columns_data[0].shape[0]
    if n_rows < min_samples:
        raise CaptureError(
            f"{source}: only {n_rows} samples of numeric data, need at least {min_samples}"
        )

    # the numbers are not checked yet (inf, overflow): the checks below report them
    with np.errstate(all="ignore"):
        return _assemble(layout, columns_data, columns, time_col, dt, source)


def _assemble(
    layout: Layout,
    columns_data: list[np.ndarray],
    columns: Sequence[str | int] | None,
    time_col: str | int | None,
    dt: float | None,
    source: str,
) -> Capture:
    names = list(layout.names)
    scales = [_unit_of(nm) for nm in names]
    detected_time = _pick_time(names, columns_data, time_col, source)
    time_index = detected_time if dt is None or time_col is not None else None
    if columns:
        wanted = [_column_index(c, names, source) for c in columns]
    else:
        skip = {time_index, detected_time}
        if len(names) > 1 and _is_counter(columns_data[0]):
            skip.add(0)  # a leading sample-number column
        wanted = [k for k in range(len(names)) if k not in skip]
    if not wanted:
        raise CaptureError(
            f"{source}: no data column besides the time column (columns found: {_listing(names)})"
        )

    notes: list[str] = []
    if time_index is not None:
        scale, offset, _ = scales[time_index] or (1.0, 0.0, "s")
        time = columns_data[time_index]
        if scale != 1.0 or offset != 0.0:
            time = time * scale + offset
        time_source = f"column {names[time_index]!r}"
        if scales[time_index] is None:
            notes.append(f"time column {names[time_index]!r} names no unit: read as seconds")
    else:
        interval = dt if dt is not None else _interval_from_metadata(layout.metadata)
        if interval is None:
            raise CaptureError(
                f"{source}: no time column found (columns found: {_listing(names)})",
                "give the sample interval with --dt, or the time column with --time-col",
            )
        time = np.arange(columns_data[0].shape[0], dtype=float) * interval
        time_source = "dt" if dt is not None else "metadata interval"
        if dt is None:
            notes.append(f"sample interval {interval:.6g} s taken from the file's metadata")

    time = _bridge_gaps(time, names[time_index] if time_index is not None else "time", source)
    if not _increasing(time):
        row = int(np.flatnonzero(~(time[1:] > time[:-1]))[0]) + 1
        raise CaptureError(
            f"{source}: time does not increase at sample {row + 1} "
            f"({time[row - 1]:.6g} s then {time[row]:.6g} s)"
        )

    channels: dict[str, np.ndarray] = {}
    units: dict[str, str] = {}
    for k in wanted:
        scale, offset, unit = scales[k] or (1.0, 0.0, "")
        values = columns_data[k]
        if scale != 1.0 or offset != 0.0:
            values = values * scale + offset
        channels[names[k]] = _bridge_gaps(values, names[k], source)
        units[names[k]] = unit
    return Capture(
        time=time,
        channels=channels,
        units=units,
        time_source=time_source,
        layout=layout,
        notes=tuple(notes),
    )


def _load(content, source: str) -> tuple[Layout, list[np.ndarray]]:
    """Sniff the layout and parse the numeric block from bytes, text, a stream or a path."""
    if isinstance(content, os.PathLike):
        path = os.fspath(content)
        try:
            with open(path, "rb") as handle:
                head = _read_head(handle, source)
                if not head.strip():
                    raise CaptureError(f"{source}: the file is empty")
                layout = sniff(head, source=source)
                size = os.fstat(handle.fileno()).st_size
                if size >= PARALLEL_MIN_BYTES and b"\r" not in head.replace(b"\r\n", b""):
                    parsed = _parse_path(path, layout)
                    if parsed is not None:
                        return layout, parsed
                return layout, _parse_block(handle, layout.data_offset, layout, source)
        except FileNotFoundError:
            raise CaptureError(f"{source}: no such file") from None
        except IsADirectoryError:
            raise CaptureError(f"{source}: is a directory, expected a capture file") from None
        except OSError as e:
            raise CaptureError(f"{source}: cannot read ({e.strerror or e})") from None
    if isinstance(content, (bytes, bytearray, memoryview, str)):
        data = content.encode("utf-8") if isinstance(content, str) else bytes(content)
        buffer: BinaryIO = io.BytesIO(data)  # shares the bytes, no copy
        origin = 0
        head = data[: SNIFF_BYTES + 1]
        # stripping 50 MB costs ~20 ms: look at the head first
        empty = not head.strip() and not data.strip()
    else:
        buffer = content
        try:
            origin = buffer.tell()
        except (OSError, ValueError, AttributeError) as e:
            raise CaptureError(f"{source}: the capture stream cannot seek ({e})") from None
        head = _read_head(buffer, source)
        empty = not head.strip()
    if empty:
        raise CaptureError(f"{source}: the file is empty")
    layout = sniff(head, source=source)
    return layout, _parse_block(buffer, origin + layout.data_offset, layout, source)


def _parse_path(path: str, layout: Layout) -> list[np.ndarray] | None:
    """Fast path for a large file: pandas reads the path itself (in parallel).

    pandas' parallel reader needs a path, an integer ``skiprows`` and no
    ``usecols``; a trailing delimiter's empty column is dropped afterwards.
    None when the block does not parse cleanly (the caller takes the tolerant path).
    """
    import pandas as pd  # ~300 ms import, so only when a capture is read

    try:
        frame = pd.read_csv(
            path,
            sep=r"\s+" if layout.delimiter == " " else layout.delimiter,
            header=None,
            skiprows=layout.data_line,
            decimal=layout.decimal,
            dtype="float64",
            engine="c",
            skip_blank_lines=True,
            na_values=_NA_VALUES,
            keep_default_na=False,
        )
    except (ValueError, pd.errors.ParserError, IndexError):
        return None
    if frame.shape[1] < layout.n_fields:
        return None
    return [frame[c].to_numpy(dtype=float) for c in frame.columns[: layout.n_fields]]


def sniff(data: bytes, *, source: str = "capture") -> Layout:
    """Find delimiter, decimal mark, header and where the numeric block starts.

    Raises
    ------
    CaptureError
        When no block of numeric rows is found.
    """
    head = data[:SNIFF_BYTES]
    truncated = len(data) > SNIFF_BYTES
    offsets = [0]
    lines: list[str] = []
    for match in _LINE_END.finditer(head):
        lines.append(head[offsets[-1] : match.start()].decode("utf-8", "replace"))
        offsets.append(match.end())
    if not truncated and offsets[-1] < len(head):
        lines.append(head[offsets[-1] :].decode("utf-8", "replace"))
        offsets.append(len(head))
    if not lines and truncated:
        raise CaptureError(f"{source}: no line break in the first {SNIFF_BYTES} bytes")
    if lines:
        lines[0] = lines[0].lstrip("\ufeff")

    best: tuple[int, int, int, str, str] | None = None  # (rows, fields, -start, delim, dec)
    for delim in (",", ";", "\t", " "):
        found = _numeric_block(lines, delim)
        if found is None:
            continue
        start, n_fields, decimal, rows = found
        key = (rows, n_fields, -start, delim, decimal)
        if best is None or key[:3] > best[:3]:
            best = key
    if best is None:
        raise CaptureError(f"{source}: no numeric data found (expected rows of numbers)")
    _, n_fields, neg_start, delim, decimal = best
    start = -neg_start

    header_index = None
    for k in range(start - 1, -1, -1):
        if lines[k].strip():
            header_index = k
            break
    names: list[str] = []
    has_header = False
    if header_index is not None:
        fields = _split(lines[header_index], delim)
        if len(fields) == n_fields and not all(_is_numberish(f) for f in fields):
            names = [f.strip().strip("\"'").strip() for f in fields]
            has_header = True
            above = next((k for k in range(header_index - 1, -1, -1) if lines[k].strip()), None)
            if above is not None:
                prior = _split(lines[above], delim)
                if len(prior) == n_fields and all(_is_numberish(f) for f in prior):
                    raise CaptureError(
                        f"{source}: line {header_index + 1} inside the data is not numeric"
                    )
    if not has_header:
        names = [f"column {k + 1}" for k in range(n_fields)]
    names = _unique([nm or f"column {k + 1}" for k, nm in enumerate(names)])
    meta_end = header_index if has_header else start
    metadata = tuple(ln for ln in lines[:meta_end] if ln.strip())
    return Layout(
        delimiter=delim,
        decimal=decimal,
        data_line=start,
        data_offset=offsets[start],
        n_fields=n_fields,
        names=tuple(names),
        has_header=has_header,
        metadata=metadata,
    )


def _split(line: str, delim: str) -> list[str]:
    text = line.strip()
    if delim == " ":
        return text.split()
    parts = text.split(delim)
    if len(parts) > 1 and parts[-1].strip() == "":
        parts = parts[:-1]  # a trailing delimiter
    return parts


def _is_numberish(token: str) -> bool:
    tok = token.strip().strip("\"'")
    return tok in _MISSING or bool(_NUMBER.match(tok))


def _numeric_block(lines: list[str], delim: str) -> tuple[int, int, str, int] | None:
    """Start line, field count, decimal mark and row count of the trailing numeric block.

    Up to ``_FOOTER_LINES`` non-numeric lines after the block (a footer) are skipped.
    """
    start = None
    n_fields = None
    comma_decimal = False
    point_decimal = False
    count = 0
    skipped = 0
    for k in range(len(lines) - 1, -1, -1):
        line = lines[k]
        if not line.strip():
            continue
        fields = _split(line, delim)
        if delim != " " and len(fields) == 1 and delim not in line:
            fields_ok = False
        else:
            toks = [f.strip().strip("\"'") for f in fields]
            fields_ok = (
                (n_fields is None or len(toks) == n_fields)
                and all(t in _MISSING or _NUMBER.match(t) for t in toks)
                and any(t not in _MISSING for t in toks)
            )
            if fields_ok:
                # one decimal mark per block: commas and points never mix
                has_comma = any("," in t for t in toks)
                has_point = any("." in t for t in toks)
                fields_ok = not (
                    (has_comma and (has_point or point_decimal)) or (has_point and comma_decimal)
                )
        if not fields_ok:
            skipped += 1
            if count or skipped > _FOOTER_LINES:
                break
            continue
        n_fields = len(fields)
        if any("," in t for t in fields):
            comma_decimal = True
        if any("." in t for t in fields):
            point_decimal = True
        count += 1
        start = k
    if not count or start is None or n_fields is None:
        return None
    # one column with the delimiter absent is only accepted for the whitespace case
    if n_fields == 1 and delim != " ":
        return None
    return start, n_fields, "," if comma_decimal else ".", count


def _read_head(handle: BinaryIO, source: str) -> bytes:
    try:
        head = handle.read(SNIFF_BYTES + 1)
    except (OSError, ValueError) as e:
        raise CaptureError(f"{source}: cannot read ({e})") from None
    if isinstance(head, str):
        raise CaptureError(f"{source}: open the capture in binary mode")
    return head


def _parse_block(buffer: BinaryIO, offset: int, layout: Layout, source: str) -> list[np.ndarray]:
    import pandas as pd  # ~300 ms import, so only when a capture is read

    sep = r"\s+" if layout.delimiter == " " else layout.delimiter
    common = {
        "sep": sep,
        "header": None,
        "usecols": list(range(layout.n_fields)),
        "decimal": layout.decimal,
        "engine": "c",
        "skip_blank_lines": True,
        "na_values": _NA_VALUES,
        "keep_default_na": False,
    }
    # seeking past the head avoids copying the data block (50 MB for 2M rows)
    buffer.seek(offset)
    try:
        frame = pd.read_csv(buffer, dtype="float64", **common)
        # one contiguous array per column (views of pandas' block, no interleaving copy)
        table = [frame[c].to_numpy(dtype=float) for c in frame.columns]
    except (ValueError, pd.errors.ParserError, IndexError):
        # a footer, stray text or bytes that are not UTF-8: the tolerant, slower path
        buffer.seek(offset)
        table = _parse_tolerant(pd, buffer, {**common, "encoding": "latin-1"}, layout, source)
    if not table or table[0].shape[0] == 0:
        raise CaptureError(f"{source}: no numeric data found (expected rows of numbers)")
    return table


def _parse_tolerant(pd, buffer, common: dict, layout: Layout, source: str) -> list[np.ndarray]:
    """Slow path for a block with a footer or stray text: coerce, then drop a text tail."""
    try:
        frame = pd.read_csv(buffer, dtype=str, on_bad_lines="skip", **common)
    except (ValueError, pd.errors.ParserError, UnicodeError) as exc:
        raise CaptureError(
            f"{source}: the numeric data cannot be parsed ({_first_line(exc)})"
        ) from None
    cols = []
    for name in frame.columns:
        col = frame[name].str.strip()
        if layout.decimal == ",":
            col = col.str.replace(",", ".", regex=False)
        cols.append(pd.to_numeric(col, errors="coerce").to_numpy(dtype=float))
    if not cols:
        raise CaptureError(f"{source}: no numeric data found (expected rows of numbers)")
    table = np.column_stack(cols)
    good = ~np.isnan(table).all(axis=1)
    if not good.any():
        raise CaptureError(f"{source}: no numeric data found (expected rows of numbers)")
    last = int(np.flatnonzero(good)[-1])
    table = table[: last + 1]
    text_rows = np.flatnonzero(np.isnan(table).all(axis=1))
    if text_rows.size:
        row = layout.data_line + int(text_rows[0]) + 1
        raise CaptureError(f"{source}: line {row} inside the data is not numeric")
    return [np.ascontiguousarray(table[:, k]) for k in range(table.shape[1])]


def _first_line(exc: BaseException) -> str:
    text = str(exc).strip().splitlines()
    return text[0] if text else type(exc).__name__


def _bridge_gaps(values: np.ndarray, name: str, source: str) -> np.ndarray:
    """Interpolate runs of up to MAX_GAP missing samples; longer runs are an error."""
    if np.isfinite(values).all():  # the common case: one pass
        return values
    missing = np.isnan(values)
    if not missing.any():
        row = int(np.flatnonzero(~np.isfinite(values))[0])
        raise CaptureError(f"{source}: column {name!r} has an infinite value at sample {row + 1}")
    idx = np.flatnonzero(missing)
    # run lengths of consecutive missing samples
    breaks = np.flatnonzero(np.diff(idx) != 1)
    starts = np.concatenate(([idx[0]], idx[breaks + 1]))
    ends = np.concatenate((idx[breaks], [idx[-1]]))
    lengths = ends - starts + 1
    longest = int(np.argmax(lengths))
    if lengths[longest] > MAX_GAP or missing.all():
        raise CaptureError(
            f"{source}: column {name!r} has a run of {int(lengths[longest])} missing values "
            f"from sample {int(starts[longest]) + 1}"
        )
    good = np.flatnonzero(~missing)
    out = values.copy()
    out[idx] = np.interp(idx, good, values[good])
    if not np.isfinite(out).all():
        row = int(np.flatnonzero(~np.isfinite(out))[0])
        raise CaptureError(f"{source}: column {name!r} has an infinite value at sample {row + 1}")
    return out


def _unit_of(name: str) -> tuple[float, float, str] | None:
    match = _UNIT_IN_NAME.match(name.strip())
    if match:
        unit = (match.group("u1") or match.group("u2") or "").strip()
        found = _UNITS.get(unit.lower().replace(" ", ""))
        if found:
            return found
    return None


def _base_name(name: str) -> str:
    match = _UNIT_IN_NAME.match(name.strip())
    if match and _unit_of(name) is not None:
        return match.group("base").strip()
    return name.strip()


def _pick_time(
    names: list[str],
    table: list[np.ndarray],
    time_col: str | int | None,
    source: str,
) -> int | None:
    if time_col is not None:
        return _column_index(time_col, names, source)
    for k, name in enumerate(names):
        unit = _unit_of(name)
        if unit is not None and unit[2] == "s":
            return k
        if _TIME_NAMES.match(_base_name(name).lower()):
            return k
    if len(names) >= 2 and not any(_unit_of(n) for n in names[:1]):
        first = table[0][: min(table[0].shape[0], 10_001)]
        steps = np.diff(first)
        if steps.size and np.all(steps > 0) and not _is_counter(first):
            med = float(np.median(steps))
            # a steady time base: steps within a factor of 2 of their median
            if med > 0 and np.all((steps > 0.5 * med) & (steps < 2.0 * med)):
                return 0
    return None


def _increasing(values: np.ndarray, chunk: int = 1 << 16) -> bool:
    """Strictly increasing, checked in cache-sized chunks (no 2 MB temporaries)."""
    n = values.shape[0]
    for a in range(0, max(n - 1, 0), chunk):
        part = values[a : min(n, a + chunk + 1)]
        if not (part[1:] > part[:-1]).all():
            return False
    return True


def _is_counter(column: np.ndarray) -> bool:
    """A sample-number column (0, 1, 2, ... or 1, 2, 3, ...), not a measured channel."""
    head = column[: min(column.shape[0], 1001)]
    return bool(head.size > 2 and np.all(np.diff(head) == 1.0) and head[0] in (0.0, 1.0))


def _match_column(key: str | int, names: list[str], channels: dict | None = None) -> str:
    idx = _column_index(key, names, "capture")
    name = names[idx]
    if channels is not None and name not in channels:
        raise CaptureError(
            f"capture: column {name!r} was not loaded (channels loaded: {', '.join(channels)})"
        )
    return name


def _column_index(key: str | int, names: list[str], source: str) -> int:
    if isinstance(key, int) or (isinstance(key, str) and key.strip().isdigit()):
        number = int(key)
        if 1 <= number <= len(names):
            return number - 1
        raise CaptureError(
            f"{source}: there is no column {number} (columns found: {_listing(names)})"
        )
    wanted = key.strip().lower()
    for k, name in enumerate(names):
        if name.lower() == wanted:
            return k
    for k, name in enumerate(names):
        if _base_name(name).lower() == wanted:
            return k
    raise CaptureError(f"{source}: there is no column {key!r} (columns found: {_listing(names)})")


def _listing(names: list[str]) -> str:
    return ", ".join(f"{k + 1} {name!r}" for k, name in enumerate(names))


def _unique(names: list[str]) -> list[str]:
    seen: dict[str, int] = {}
    out = []
    for name in names:
        if name in seen:
            seen[name] += 1
            out.append(f"{name} ({seen[name]})")
        else:
            seen[name] = 1
            out.append(name)
    return out


def _interval_from_metadata(metadata: tuple[str, ...]) -> float | None:
    for line in metadata:
        parts = [p.strip().strip("\"'") for p in re.split(r"[,;\t:=]|\s{2,}", line) if p.strip()]
        if len(parts) < 2 or not _INTERVAL_KEY.search(parts[0]):
            continue
        value = parts[1].replace(",", ".") if parts[1].count(",") == 1 else parts[1]
        m = re.match(r"^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([a-zA-Zµμ]*)$", value)
        if not m:
            continue
        number = float(m.group(1))
        unit = (m.group(2) or (parts[2] if len(parts) > 2 else "s")).lower()
        scale = _UNITS.get(unit, (1.0, 0.0, "s") if unit in ("", "s") else None)
        if scale is None or scale[2] != "s":
            continue
        interval = number * scale[0]
        if interval > 0 and math.isfinite(interval):
            return interval
    return None

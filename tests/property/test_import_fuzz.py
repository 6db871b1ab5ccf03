"""Fuzzed CSV imports: a clean KitbinError or a complete import, never a crash, never a
partial write.

Files are built from a mix of good cells and bad ones -- unparsable and negative
numbers, wrong units, duplicate and malformed labels, unknown kinds, huge integers,
control characters, odd encodings and random bytes -- and imported into one
inventory that grows as the examples run (so later files also meet labels that
already exist). After each attempt the inventory either holds every row of the file
or is exactly as before. Examples are derandomised (a fixed sequence) unless
``KITBIN_HYPOTHESIS_RANDOM=1``.
"""

from __future__ import annotations

import csv
import io
import os
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from kitbin.errors import KitbinError
from kitbin.services import importexport, inventory
from kitbin.store import open_store, queries

DERANDOMIZE = os.environ.get("KITBIN_HYPOTHESIS_RANDOM") != "1"
FUZZ = settings(
    max_examples=150,
    deadline=None,
    derandomize=DERANDOMIZE,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture],
)
BINS = ("L-01", "L-02", "R-01", "C-01", "D-01")

_junk = st.text(
    st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=12
)  # includes NUL, tabs, quotes, CR/LF and non-Latin letters
_labels = st.one_of(
    st.sampled_from(["X-01", "X-02", "x-01", "X-03", "L-01", "A/1", "B+2#", "ok.3_4"]),
    st.sampled_from(["", " ", "bad label", "L" * 65, "é-1", "'; DROP TABLE bin; --"]),
    _junk,
)
_numbers = st.one_of(
    st.sampled_from(["10uH", "4k7", "100n", "0R1", "2.2 kΩ", "1e-05", "33", "20%", "4u7"]),
    st.sampled_from(["-1", "0", "-4.7uH", "10uF", "abc", "1e400", "nan", "inf", "-inf"]),
    st.sampled_from(["1,5", "1..2", "--1", "uH", "1 2", "0x10", "1e-400", "+5V"]),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    _junk,
)
_ints = st.one_of(
    st.integers(-5, 50).map(str),
    st.sampled_from(["", "x", "1.5", "-0", "99999999999999999999", "9" * 40, " 7 ", "1e3"]),
    _junk,
)
_kinds = st.one_of(
    st.sampled_from(["inductor", "resistor", "capacitor", "diode", "controller", "other"]),
    st.sampled_from(["Inductor", " resistor ", "coil", "", "cap"]),
    _junk,
)
_bin_rows = st.fixed_dictionaries(
    {
        "label": _labels,
        "kind": _kinds,
        "nominal": st.one_of(st.just(""), _numbers),
        "qty": _ints,
    },
    optional={
        "kit": st.one_of(st.sampled_from(["Kit A", "Kit B", ""]), _junk),
        "tolerance": st.one_of(st.sampled_from(["20%", "-20%/+80%", "5", "x", "-5%"]), _junk),
        "marking": st.one_of(st.sampled_from(["472", "brown black red gold", "4R7", "zz"]), _junk),
        "location": _junk,
        "notes": _junk,
        "prop:vrrm": st.one_of(st.sampled_from(["40V", "-1V", "1A"]), _numbers),
    },
)
_reading_rows = st.fixed_dictionaries(
    {
        "label": st.one_of(st.sampled_from([*BINS, "l-01", "NOPE"]), _labels),
        "quantity": st.one_of(
            st.sampled_from(["inductance", "dcr", "isat_20", "resistance", "esr", "rise"]),
            st.sampled_from(["", "Inductance", "weight", "isat_99"]),
            _junk,
        ),
        "value": st.one_of(_numbers, st.sampled_from([">=3A", ">= 2", ">=", "=1"])),
    },
    optional={
        "bound": st.sampled_from(["=", ">=", "<", "", "=="]),
        "specimen": _ints,
        "conditions": st.one_of(
            st.sampled_from(["freq=100kHz", '{"freq": 1e5}', '{"freq": "x"}', "{", "bias=2"]),
            st.sampled_from(['{"a": true}', "[1]", "temp=25degC;freq=1MHz", "freq"]),
            _junk,
        ),
        "taken_at": st.sampled_from(["2026-01-02T03:04:05", "2026-13-01", "yesterday", ""]),
        "method": _junk,
        "note": _junk,
    },
)
runner = CliRunner()
_encodings = st.sampled_from(["utf-8", "utf-8-sig", "latin-1", "utf-16", "cp1252"])


def _csv(rows: list[dict[str, str]]) -> str:
    columns: list[str] = []
    for row in rows:
        columns += [c for c in row if c not in columns]
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(columns or ["label", "kind"])
    for row in rows:
        writer.writerow([row.get(c, "") for c in columns])
    return buffer.getvalue()


@pytest.fixture(scope="module")
def fuzz_store():
    with tempfile.TemporaryDirectory() as tmp:
        store = open_store(str(Path(tmp) / "fuzz.sqlite"))
        for label in BINS:
            kind = {"L": "inductor", "R": "resistor", "C": "capacitor", "D": "diode"}[label[0]]
            inventory.add_bin(store, label, kind, qty=3)
        yield store, Path(tmp)
        store.close()


def _snapshot(store) -> tuple:
    with store.transaction() as session:
        counts = queries.counts(session)
        labels = tuple(sorted(queries.bin_ids_by_label(session)))
        kits = tuple(k.name for k in queries.kits(session))
    return tuple(sorted(counts.items())), labels, kits


def _attempt(store, folder: Path, content: bytes, what: str | None) -> None:
    path = folder / "fuzz.csv"
    path.write_bytes(content)
    before = _snapshot(store)
    try:
        summary = importexport.import_csv(store, str(path), what=what)
    except KitbinError as error:
        text = str(error)
        assert text and "\n" not in text.strip() and "Traceback" not in text
        assert _snapshot(store) == before, "a rejected import changed the inventory"
        return
    after = dict(_snapshot(store)[0])
    grown = after["bin"] - dict(before[0])["bin"]
    added = after["reading"] - dict(before[0])["reading"]
    assert (grown if summary["what"] == "bins" else added) == summary["rows"]
    assert (added if summary["what"] == "bins" else grown) == 0


@FUZZ
@given(rows=st.lists(_bin_rows, max_size=12), encoding=_encodings)
def test_bin_files(fuzz_store, rows, encoding) -> None:
    store, folder = fuzz_store
    try:
        content = _csv(rows).encode(encoding)
    except UnicodeEncodeError:
        content = _csv(rows).encode("utf-8", "surrogatepass")
    _attempt(store, folder, content, None)


@FUZZ
@given(rows=st.lists(_reading_rows, max_size=12), encoding=_encodings)
def test_reading_files(fuzz_store, rows, encoding) -> None:
    store, folder = fuzz_store
    try:
        content = _csv(rows).encode(encoding)
    except UnicodeEncodeError:
        content = _csv(rows).encode("utf-8", "surrogatepass")
    _attempt(store, folder, content, "readings")


@settings(FUZZ, max_examples=200)
@given(
    head=st.sampled_from([b"", b"label,kind\n", b"label,quantity,value\n", b"\xef\xbb\xbf"]),
    body=st.binary(max_size=300),
    what=st.sampled_from([None, "bins", "readings", "parts"]),
)
def test_random_bytes(fuzz_store, head, body, what) -> None:
    store, folder = fuzz_store
    _attempt(store, folder, head + body, what)


GOOD_BIN = {
    "kind": ["inductor", "resistor", "capacitor", "diode"],
    "nominal": ["10uH", "4k7", "100nF", "22uH", "1e-05"],
    "qty": ["0", "3", "12", "500"],
    "location": ["A1", "drawer 2", ""],
}
HOSTILE = [
    "-1", "99999999999999999999", "9" * 40, "1e400", "nan", "10uF", "x", "", "\x00", "=1+2",
    "é", "'", '"', ";", "\r", "1.5",
]  # fmt: skip


@FUZZ
@given(
    n=st.integers(1, 30),
    data=st.data(),
    spoil=st.one_of(st.none(), st.tuples(st.integers(0, 29), st.sampled_from(sorted(GOOD_BIN)))),
    hostile=st.sampled_from(HOSTILE),
)
def test_mostly_good_bin_files(fuzz_store, n, data, spoil, hostile) -> None:
    # Many good rows and at most one hostile cell: the import is all or nothing.
    store, folder = fuzz_store
    prefix = data.draw(st.integers(0, 10**9), label="prefix")
    rows = []
    for i in range(n):
        row = {"label": f"G{prefix}-{i}"}
        kind = data.draw(st.sampled_from(GOOD_BIN["kind"]), label="kind")
        row["kind"] = kind
        if kind != "diode":
            row["nominal"] = {"inductor": "10uH", "resistor": "4k7", "capacitor": "100nF"}[kind]
        row["qty"] = data.draw(st.sampled_from(GOOD_BIN["qty"]), label="qty")
        row["location"] = data.draw(st.sampled_from(GOOD_BIN["location"]), label="location")
        rows.append(row)
    if spoil is not None and spoil[0] < n:
        rows[spoil[0]][spoil[1]] = hostile
    _attempt(store, folder, _csv(rows).encode(), None)


@FUZZ
@given(
    n=st.integers(1, 30),
    spoil=st.one_of(
        st.none(), st.tuples(st.integers(0, 29), st.sampled_from(["value", "specimen"]))
    ),
    hostile=st.sampled_from(HOSTILE),
)
@example(n=3, spoil=(1, "specimen"), hostile="99999999999999999999")
def test_mostly_good_reading_files(fuzz_store, n, spoil, hostile) -> None:
    store, folder = fuzz_store
    rows = [
        {"label": BINS[i % 2], "quantity": "inductance", "value": f"{i + 1}uH", "specimen": "1"}
        for i in range(n)
    ]
    if spoil is not None and spoil[0] < n:
        rows[spoil[0]][spoil[1]] = hostile
    _attempt(store, folder, _csv(rows).encode(), "readings")


@pytest.mark.parametrize(
    ("header", "row"),
    [
        ("label,kind,qty", "H-1,inductor,99999999999999999999"),
        ("label,quantity,value,specimen", "L-01,inductance,1uH,99999999999999999999"),
    ],
)
def test_integers_beyond_64_bits_are_a_clean_error(fuzz_store, header, row) -> None:
    # Found by the fuzzing above: sqlite3 raised OverflowError, a traceback for the user.
    store, folder = fuzz_store
    before = _snapshot(store)
    path = folder / "huge.csv"
    path.write_text(f"{header}\n{row}\n")
    with pytest.raises(KitbinError, match="too large"):
        importexport.import_csv(store, str(path))
    assert _snapshot(store) == before
    for args in (
        ["stock", "L-01", "99999999999999999999", "--why", "x"],
        ["record", "L-01", "inductance=1uH", "--specimen", "99999999999999999999"],
    ):
        result = runner.invoke(app_for_tests(), ["--db", store.url, *args])
        assert result.exit_code == 6, result.stderr
        assert result.stderr.startswith("kitbin: error: a whole number is too large")
    assert _snapshot(store) == before


# -- the command line on the same kind of input ------------------------------------------


@settings(FUZZ, max_examples=40)
@given(rows=st.lists(_bin_rows, min_size=1, max_size=6))
def test_cli_import_prints_one_line(fuzz_store, rows) -> None:
    store, folder = fuzz_store
    path = folder / "cli.csv"
    path.write_text(_csv(rows), encoding="utf-8")
    db = store.url
    result = runner.invoke(app_for_tests(), ["--db", db, "import", str(path)])
    if result.exit_code == 0:
        assert result.stdout.startswith("imported ")
    else:
        lines = result.stderr.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("kitbin: error: "), lines
        assert isinstance(result.exception, SystemExit)


@settings(FUZZ, max_examples=60)
@given(marking=_junk, kind=st.sampled_from(["inductor", "resistor", "capacitor"]))
def test_cli_marking_decoder_prints_one_line(fuzz_store, marking, kind) -> None:
    # The decoders' own properties are in test_markings_props.py; this is the path from
    # the command line, where a bad marking must store nothing.
    store, _ = fuzz_store
    before = _snapshot(store)
    args = ["--db", store.url, "bin", "add", "M-FUZZ", "--kind", kind, "--marking", marking]
    result = runner.invoke(app_for_tests(), args)
    if result.exit_code == 0:
        inventory_rm(store, "M-FUZZ")
        return
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("kitbin: error: "), lines
    assert _snapshot(store) == before


def app_for_tests():
    from kitbin.cli.app import app

    return app


def inventory_rm(store, label: str) -> None:
    """Remove a bin a test added (the CLI has no delete; done through the session)."""
    with store.transaction() as session:
        session.delete(queries.bin_by_label(session, label))


_capture_cells = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(-(10**6), 10**6).map(str),
    st.sampled_from(["", "nan", "1,5", "-", "e", "time", "CH1", "1e-9", "0.1"]),
)


@settings(FUZZ, max_examples=40)
@given(
    content=st.one_of(
        st.binary(max_size=300),
        st.builds(
            lambda rows, sep: "\n".join(sep.join(r) for r in rows).encode(),
            st.lists(st.lists(_capture_cells, min_size=1, max_size=3), max_size=30),
            st.sampled_from([",", ";", "\t"]),
        ),
    )
)
def test_cli_capture_analysis_prints_one_line(fuzz_store, content) -> None:
    # The reader's own properties are in test_capture_reader_props.py; this is the
    # whole `kitbin ramp --save` path: one line for bad input, nothing stored.
    store, folder = fuzz_store
    path = folder / "capture.csv"
    path.write_bytes(content)
    before = _snapshot(store)
    args = ["--db", store.url, "ramp", str(path), "--bin", "L-01", "--sense", "0.1ohm",
            "--vl", "12V", "--save"]  # fmt: skip
    result = runner.invoke(app_for_tests(), args)
    if result.exit_code == 0:
        return
    lines = [ln for ln in result.stderr.strip().splitlines() if not ln.startswith("caution:")]
    assert len(lines) == 1 and lines[0].startswith("kitbin: error: "), lines
    assert isinstance(result.exception, SystemExit)
    assert _snapshot(store) == before

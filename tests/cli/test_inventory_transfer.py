"""CSV import and export: exact round trips; any bad row rejects the whole file."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from inventory_helpers import error_lines, kb, snapshot

from kitbin.errors import ExitCode


def _write(path: Path, text: str) -> Path:
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture
def db(tmp_path: Path) -> Path:
    path = tmp_path / "inv.sqlite"
    for args in (
        ("kit", "add", "Drum kit"),
        (
            "bin",
            "add",
            "L-07",
            "--kind",
            "inductor",
            "--kit",
            "Drum kit",
            "--marking",
            "4R7",
            "--tolerance",
            "20%",
            "--qty",
            "8",
            "--package",
            "6x8 drum",
            "--prop",
            "isat_20=1.5A",
        ),
        (
            "bin",
            "add",
            "D-01",
            "--kind",
            "diode",
            "--prop",
            "vrrm=40V",
            "--qty",
            "3",
            "--notes",
            "bag label, 40 V",
        ),
        (
            "record",
            "L-07",
            "inductance=4.52uH",
            "dcr=31mohm",
            "--specimen",
            "1",
            "--at",
            "freq=100kHz",
        ),
        ("record", "L-07", "isat_20>=3A", "--specimen", "2", "--method", "ramp"),
    ):
        assert kb(path, *args).exit_code == 0
    return path


def test_bins_and_readings_round_trip_exactly(db: Path, tmp_path: Path) -> None:
    bins_csv, readings_csv = tmp_path / "bins.csv", tmp_path / "readings.csv"
    assert kb(db, "export", str(bins_csv), "--what", "bins").exit_code == 0
    assert kb(db, "export", str(readings_csv), "--what", "readings").exit_code == 0
    header = bins_csv.read_text().splitlines()[0]
    assert header == (
        "label,kind,kit,nominal,tol_minus,tol_plus,marking,package,location,qty,notes,"
        "prop:isat_20,prop:vrrm"
    )
    other = tmp_path / "other.sqlite"
    r = kb(other, "import", str(bins_csv), "--json")
    assert r.exit_code == 0, r.output
    assert json.loads(r.stdout) == {
        "file": str(bins_csv),
        "what": "bins",
        "rows": 2,
        "kits_added": 1,
    }
    r = kb(other, "import", str(readings_csv))
    assert r.exit_code == 0, r.output
    assert "imported 3 readings" in r.stdout
    a = json.loads(kb(db, "bin", "show", "L-07", "--json").stdout)
    b = json.loads(kb(other, "bin", "show", "L-07", "--json").stdout)
    keep = ("nominal", "tol_minus", "tol_plus", "marking", "package", "qty", "kit", "kind")
    assert {k: a[k] for k in keep} == {k: b[k] for k in keep}
    strip = ("id",)
    assert [{k: v for k, v in x.items() if k not in strip} for x in a["readings"]] == [
        {k: v for k, v in x.items() if k not in strip} for x in b["readings"]
    ]
    assert a["evidence"] == b["evidence"]
    assert [p["value"] for p in a["properties"]] == [p["value"] for p in b["properties"]]


def test_export_to_stdout(db: Path) -> None:
    r = kb(db, "export", "-", "--what", "readings")
    assert r.exit_code == 0
    lines = r.stdout.splitlines()
    assert lines[0].startswith("label,quantity,value,bound,specimen,conditions")
    assert len(lines) == 4


def test_readings_with_units_bounds_and_conditions(db: Path, tmp_path: Path) -> None:
    csv = _write(
        tmp_path / "r.csv",
        "label,quantity,value,specimen,conditions,method,taken_at\n"
        "L-07,inductance,4.6uH,3,freq=100kHz;temp=25degC,lcr,2026-11-02T18:30:00\n"
        "L-07,isat,>=2.5A,3,,ramp,\n"
        "\n"
        'l-07,dcr,0R033,3,{"temp": 22.5},4wire,\n',
    )
    r = kb(db, "import", str(csv))
    assert r.exit_code == 0, r.output
    data = json.loads(kb(db, "bin", "show", "L-07", "--json").stdout)
    new = [x for x in data["readings"] if x["specimen"] == 3]
    assert [(x["quantity"], x["value"], x["bound"]) for x in new] == [
        ("inductance", pytest.approx(4.6e-6), "="),
        ("isat_20", 2.5, ">="),
        ("dcr", pytest.approx(0.033), "="),
    ]
    assert new[0]["conditions"] == {"freq": 100e3, "temp": 25.0}
    assert new[0]["taken_at"] == "2026-11-02T18:30:00+00:00"
    assert new[2]["conditions"] == {"temp": 22.5}


BAD_FILES = [
    (
        "bins",
        "label,kind,qty\nL-20,inductor,4\nL-21,inductor,5\nL-22,inductor,-3\n",
        4,
        "qty -3 is negative",
    ),
    (
        "bins",
        "label,kind,nominal\nL-20,inductor,10uH\nL-21,inductor,10uF\n",
        3,
        "expected an inductance",
    ),
    ("bins", "label,kind\nL-20,inductor\nL-20,resistor\n", 3, "appears again"),
    ("bins", "label,kind\nL-20,inductor\nL-07,inductor\n", 3, "already exists"),
    ("bins", "label,kind\nL-20,gadget\n", 2, "unknown kind"),
    ("bins", "label,kind,qty\nL-20,inductor,lots\n", 2, "not a whole number"),
    ("bins", "label,kind,prop:vrrm\nD-20,diode,40A\n", 2, "expected a voltage"),
    ("bins", "label,kind,colour\nL-20,inductor,red\n", 1, "unknown column 'colour'"),
    (
        "readings",
        "label,quantity,value\nL-07,dcr,30mohm\nL-07,inductance,4.7uF\n",
        3,
        "expected an inductance",
    ),
    (
        "readings",
        "label,quantity,value\nL-07,dcr,30mohm\nL-55,dcr,30mohm\n",
        3,
        "no bin labelled 'L-55'",
    ),
    ("readings", "label,quantity,value\nL-07,warp,3\n", 2, "unknown quantity"),
    ("readings", "label,quantity,value,bound\nL-07,dcr,3,<\n", 2, "bound"),
    ("readings", "label,quantity,value,specimen\nL-07,dcr,3,first\n", 2, "specimen"),
    ("readings", 'label,quantity,value,conditions\nL-07,dcr,3,{"freq": "x"}\n', 2, "conditions"),
    ("readings", "label,quantity,value,taken_at\nL-07,dcr,3,yesterday\n", 2, "taken_at"),
    ("readings", "label,quantity,value\nL-07,dcr,nan\n", 2, "value: "),
    ("readings", "label,quantity,value\nL-07,dcr,1e999\n", 2, "finite"),
    ("readings", "label,value\nL-07,3\n", 1, "cannot tell bins from readings"),
]


@pytest.mark.parametrize(
    ("what", "text", "line", "needle"), BAD_FILES, ids=[f"{b[0]}-{b[3]}" for b in BAD_FILES]
)
def test_a_bad_row_rejects_the_file(db: Path, tmp_path: Path, what, text, line, needle) -> None:
    csv = _write(tmp_path / "bad.csv", text)
    before = snapshot(db)
    r = kb(db, "import", str(csv))
    assert r.exit_code == int(ExitCode.INPUT), r.output
    (message,) = error_lines(r)
    assert f"line {line}" in message and needle in message, message
    assert snapshot(db) == before


def test_missing_and_empty_files(db: Path, tmp_path: Path) -> None:
    before = snapshot(db)
    r = kb(db, "import", str(tmp_path / "nope.csv"))
    assert r.exit_code == int(ExitCode.NOT_FOUND) and len(error_lines(r)) == 1
    r = kb(db, "import", str(_write(tmp_path / "empty.csv", "")))
    assert r.exit_code == int(ExitCode.INPUT) and "empty" in error_lines(r)[0]
    r = kb(db, "export", str(tmp_path / "x.csv"), "--what", "plans")
    assert r.exit_code != 0 and len(error_lines(r)) == 1
    assert snapshot(db) == before


def test_long_import_reports_progress(db: Path, tmp_path: Path) -> None:
    from kitbin.services import importexport
    from kitbin.store import open_store

    rows = ["label,quantity,value,specimen"] + [
        f"L-07,inductance,{4.5 + (i % 10) / 100:.2f}uH,{1 + i % 5}" for i in range(6000)
    ]
    csv = _write(tmp_path / "many.csv", "\n".join(rows) + "\n")
    seen: list[tuple[int, int]] = []
    with open_store(str(db)) as store:
        summary = importexport.import_csv(
            store, str(csv), progress=lambda d, t: seen.append((d, t))
        )
    assert summary["rows"] == 6000
    assert seen[-1] == (6000, 6000) and len(seen) > 2
    data = json.loads(kb(db, "bin", "show", "L-07", "--json").stdout)
    assert data["evidence"]["inductance"]["n"] == 6001
    assert data["evidence"]["inductance"]["low"] == pytest.approx(4.5e-6)


def test_formula_like_text_is_guarded_on_export_and_restored_on_import(tmp_path: Path) -> None:
    # A cell starting with = + - @ runs as a formula in common spreadsheet programs;
    # the export puts an apostrophe in front (OWASP "CSV Injection", common practice).
    db = tmp_path / "a.sqlite"
    kb(db, "bin", "add", "X-1", "--kind", "other", "--notes", "=1+2", "--location", "@top",
       "--qty", "2")  # fmt: skip
    kb(db, "record", "X-1", "rise=-3K", "--method", "-cool", "--note", "+fast")
    bins_csv, readings_csv = tmp_path / "b.csv", tmp_path / "r.csv"
    kb(db, "export", str(bins_csv), "--what", "bins")
    kb(db, "export", str(readings_csv), "--what", "readings")
    assert "'=1+2" in bins_csv.read_text() and "'@top" in bins_csv.read_text()
    text = readings_csv.read_text()
    assert "'-cool" in text and "'+fast" in text and ",-3.0," in text
    other = tmp_path / "b.sqlite"
    assert kb(other, "import", str(bins_csv)).exit_code == 0
    assert kb(other, "import", str(readings_csv)).exit_code == 0
    shown = json.loads(kb(other, "bin", "show", "X-1", "--json").stdout)
    assert (shown["notes"], shown["location"]) == ("=1+2", "@top")
    (reading,) = shown["readings"]
    assert (reading["method"], reading["note"], reading["value"]) == ("-cool", "+fast", -3.0)

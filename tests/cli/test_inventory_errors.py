"""Bad input: exit non-zero, exactly one ``kitbin: error:`` line, the database unchanged."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest
from inventory_helpers import error_lines, kb, snapshot

from kitbin.errors import ExitCode


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
            "--nominal",
            "10uH",
            "--qty",
            "8",
            "--kit",
            "Drum kit",
        ),
        ("record", "L-07", "inductance=9.8uH", "--specimen", "1"),
        ("bin", "add", "L-99", "--kind", "inductor", "--nominal", "22uH", "--qty", "3"),
    ):
        assert kb(path, *args).exit_code == 0
    return path


CASES = [
    (("record", "L-07", "inductance=abc"), ExitCode.INPUT, "inductance=abc"),
    (("record", "L-07", "inductance=10uF"), ExitCode.INPUT, "expected an inductance"),
    (("record", "L-07", "dcr=31mohm", "inductance=10uF"), ExitCode.INPUT, "10uF"),
    (("record", "L-07", "wobble=3"), ExitCode.INPUT, "unknown quantity 'wobble'"),
    (("record", "L-07", "inductance"), ExitCode.INPUT, "NAME=VALUE"),
    (("record", "L-07", "dcr=1ohm", "--at", "freq=3V"), ExitCode.INPUT, "freq=3V"),
    (("record", "L-07", "dcr=1ohm", "--at", "colour=blue"), ExitCode.INPUT, "condition"),
    (("record", "L-07", "dcr=1ohm", "--specimen", "0"), ExitCode.INPUT, "specimen"),
    (("record", "L-55", "dcr=1ohm"), ExitCode.NOT_FOUND, "no bin labelled 'L-55'"),
    (
        ("stock", "L-99", "-50", "--why", "too many"),
        ExitCode.STOCK,
        "L-99 has 3 on hand; cannot take 50",
    ),
    (("stock", "L-99", "0", "--why", "none"), ExitCode.STOCK, "0"),
    (("stock", "L-00", "-1", "--why", "x"), ExitCode.NOT_FOUND, "L-00"),
    (("bin", "add", "L-07", "--kind", "inductor"), ExitCode.FAILURE, "already exists"),
    (("bin", "add", "L-08", "--kind", "gizmo"), ExitCode.INPUT, "unknown kind"),
    (
        ("bin", "add", "L-08", "--kind", "inductor", "--nominal", "10uF"),
        ExitCode.INPUT,
        "expected an inductance",
    ),
    (
        ("bin", "add", "L-08", "--kind", "inductor", "--marking", "purple haze"),
        ExitCode.INPUT,
        "purple",
    ),
    (
        ("bin", "add", "L-08", "--kind", "inductor", "--tolerance", "lots"),
        ExitCode.INPUT,
        "tolerance",
    ),
    (
        ("bin", "add", "L-08", "--kind", "inductor", "--kit", "Nope"),
        ExitCode.NOT_FOUND,
        "no kit named 'Nope'",
    ),
    (("bin", "add", "L-08", "--kind", "inductor", "--qty", "-2"), ExitCode.INPUT, "negative"),
    (("bin", "add", "D 1", "--kind", "diode"), ExitCode.INPUT, "not a bin label"),
    (
        ("bin", "add", "D-1", "--kind", "diode", "--nominal", "1A"),
        ExitCode.INPUT,
        "no nominal value",
    ),
    (
        ("bin", "add", "D-1", "--kind", "diode", "--prop", "vrrm=40A"),
        ExitCode.INPUT,
        "expected a voltage",
    ),
    (("bin", "edit", "L-07", "--label", "L-99"), ExitCode.FAILURE, "already exists"),
    (("bin", "edit", "L-07", "--nominal", "1kohm"), ExitCode.INPUT, "inductance"),
    (("bin", "show", "X-1"), ExitCode.NOT_FOUND, "no bin labelled 'X-1'"),
    (("kit", "add", "Drum kit"), ExitCode.FAILURE, "already exists"),
    (("kit", "add", "K2", "--bought", "last week"), ExitCode.INPUT, "not a date"),
    (("bin", "list", "--kit", "Nope"), ExitCode.NOT_FOUND, "Nope"),
]


@pytest.mark.parametrize(("args", "code", "needle"), CASES, ids=[" ".join(c[0]) for c in CASES])
def test_bad_input_is_one_line_and_changes_nothing(db: Path, args, code, needle) -> None:
    before = snapshot(db)
    r = kb(db, *args)
    assert r.exit_code == int(code), r.output
    lines = error_lines(r)
    assert len(lines) == 1, r.stderr
    assert r.stderr.strip() == lines[0], "nothing but the error line on stderr"
    assert needle in lines[0]
    assert "Traceback" not in r.output
    assert snapshot(db) == before


def test_old_schema_is_refused_with_init_as_the_fix(tmp_path: Path) -> None:
    from alembic import command

    from kitbin.store import engine as store_engine

    path = tmp_path / "old.sqlite"
    store_engine._create_sqlite_file(path)
    eng = store_engine.make_engine("sqlite:///" + str(path), foreign_keys=False)
    with eng.begin() as conn:
        command.upgrade(store_engine._alembic_config(conn), "0001")
    eng.dispose()
    r = kb(path, "bin", "list")
    assert r.exit_code == int(ExitCode.STORE)
    (line,) = error_lines(r)
    assert "kitbin init" in line
    assert kb(path, "init").exit_code == 0
    assert kb(path, "bin", "list").exit_code == 0


def test_unreadable_database_is_one_line(tmp_path: Path) -> None:
    path = tmp_path / "junk.sqlite"
    path.write_bytes(b"this is not a database file, just text" * 50)
    r = kb(path, "bin", "list")
    assert r.exit_code == int(ExitCode.STORE)
    assert len(error_lines(r)) == 1 and "Traceback" not in r.output


def test_no_partial_batch_of_readings(db: Path) -> None:
    # The second item is bad: the first must not be stored either.
    kb(db, "record", "L-99", "dcr=40mohm", "isat_20=banana")
    con = sqlite3.connect(db)
    n = con.execute("SELECT count(*) FROM reading WHERE quantity = 'dcr'").fetchone()[0]
    con.close()
    assert n == 0

"""Security basics: CSV exports cannot run as spreadsheet formulas, inventory files are
private to their owner, and no SQL is ever assembled from user text.

Formula injection: a cell starting with ``=``, ``+``, ``-``, ``@``, a tab or a carriage
return is run by common spreadsheet programs; the usual defence is a leading
apostrophe (OWASP, "CSV Injection"; common practice). File modes: POSIX permission
bits, 0600 = read and write for the owner only.
"""

from __future__ import annotations

import ast
import csv
import io
import json
import os
import stat
from pathlib import Path

import pytest
from typer.testing import CliRunner

from kitbin.cli.app import app

runner = CliRunner()
SRC = Path(__file__).resolve().parents[2] / "src" / "kitbin"
DANGEROUS = ("=", "+", "-", "@", "\t", "\r")


def kb(db: Path | str, *args: str, code: int = 0):
    result = runner.invoke(app, ["--db", str(db), *args])
    assert result.exit_code == code, (args, result.stdout, result.stderr, result.exception)
    return result


# -- CSV exports ---------------------------------------------------------------------


def _is_number(cell: str) -> bool:
    try:
        float(cell)
    except ValueError:
        return False
    return True


def _formula_cells(text: str) -> list[str]:
    """Cells a spreadsheet would evaluate: text starting with a dangerous character."""
    rows = list(csv.reader(io.StringIO(text)))
    return [
        cell
        for row in rows[1:]
        for cell in row
        if cell and cell[0] in DANGEROUS and not _is_number(cell)
    ]


@pytest.fixture
def hostile_db(tmp_path: Path) -> Path:
    db = tmp_path / "inv.sqlite"
    payloads = ["=1+2", "+SUM(A1:A3)", "-2+3", "@CMD", "\tx", "\rx", '=HYPERLINK("x")']
    kb(db, "kit", "add", payloads[0] + " kit", "--notes", payloads[1])
    for i, text in enumerate(payloads):
        kb(db, "bin", "add", f"X-{i}", "--kind", "other", "--kit", payloads[0] + " kit",
           "--location", text, "--package", text, "--notes", text, "--qty", "1")  # fmt: skip
        kb(db, "record", f"X-{i}", "rise=12K", "--method", text, "--note", text)
    kb(db, "record", "X-0", "rise=-3K", "--method", "cool-down")  # a plain negative number
    return db


def test_hostile_cells_are_stored_as_typed(hostile_db: Path) -> None:
    shown = json.loads(kb(hostile_db, "bin", "show", "X-0", "--json").stdout)
    assert shown["notes"] == "=1+2" and shown["location"] == "=1+2"


@pytest.mark.parametrize("what", ["bins", "readings"])
def test_export_neutralises_spreadsheet_formulas(hostile_db: Path, what: str) -> None:
    out = kb(hostile_db, "export", "-", "--what", what).stdout
    assert "=1+2" in out  # the text is kept, behind its guard
    assert _formula_cells(out) == []


def test_export_to_file_neutralises_too(hostile_db: Path, tmp_path: Path) -> None:
    file = tmp_path / "bins.csv"
    kb(hostile_db, "export", str(file), "--what", "bins")
    assert _formula_cells(file.read_text()) == []


def test_guarded_cells_import_back_as_typed(hostile_db: Path, tmp_path: Path) -> None:
    file = tmp_path / "bins.csv"
    kb(hostile_db, "export", str(file), "--what", "bins")
    fresh = tmp_path / "fresh.sqlite"
    kb(fresh, "import", str(file))
    for label in ("X-0", "X-3", "X-6"):
        original = json.loads(kb(hostile_db, "bin", "show", label, "--json").stdout)
        copied = json.loads(kb(fresh, "bin", "show", label, "--json").stdout)
        for key in ("kit", "location", "package", "notes"):
            assert copied[key] == original[key], (label, key)


# -- file modes -----------------------------------------------------------------------


def test_inventory_files_are_owner_only(tmp_path: Path) -> None:
    old = os.umask(0o022)  # a usual, permissive umask: files would be world-readable
    try:
        db = tmp_path / "inv.sqlite"
        kb(db, "init")
        kb(db, "bin", "add", "L-01", "--kind", "inductor", "--nominal", "10uH", "--qty", "3")
        from kitbin.store import open_store

        store = open_store(str(db))
        with store.transaction() as session:  # keeps the -wal and -shm files in being
            from kitbin.store import queries

            assert queries.bin_by_label(session, "L-01") is not None
            siblings = [p for p in tmp_path.iterdir() if p.name.startswith("inv.sqlite")]
            assert {p.name for p in siblings} >= {"inv.sqlite", "inv.sqlite-wal"}
            for path in siblings:
                assert stat.S_IMODE(path.stat().st_mode) == 0o600, path.name
        store.close()
        backup = tmp_path / "copy.sqlite"
        kb(db, "backup", str(backup))
        assert stat.S_IMODE(backup.stat().st_mode) == 0o600
        dump = tmp_path / "copy.jsonl"
        kb(db, "backup", str(dump), "--format", "jsonl")
        assert stat.S_IMODE(dump.stat().st_mode) == 0o600
    finally:
        os.umask(old)


# -- SQL assembled from text ------------------------------------------------------------

#: Calls whose first argument is SQL text.
SQL_TEXT_CALLS = {"text", "exec_driver_sql", "executescript", "CheckConstraint", "literal_column"}
#: Calls that take SQL text or a SQLAlchemy statement.
SQL_CALLS = {"execute", "executemany"} | SQL_TEXT_CALLS
#: Audited cases: (file relative to src/kitbin, the argument's source text).
AUDITED = {
    # PRAGMA names come from the constant SQLITE_PRAGMAS; PRAGMA takes no parameters.
    ("store/engine.py", "f'PRAGMA {pragma}'"),
    # SQL compiled by SQLAlchemy from a statement, with its bound parameters.
    ("store/matchreads.py", "compiled.string"),
    # CHECK lists built from constant tuples in the models and the revisions.
    ("store/models.py", "_in_list('kind', PART_KINDS)"),
    ("store/models.py", "_in_list('bound', READING_BOUNDS)"),
    ("store/models.py", "_in_list('state', PICK_STATES)"),
    ("store/migrations/versions/0001_inventory.py", "f'kind IN ({_KINDS})'"),
}


def _assembled(node: ast.AST) -> bool:
    """True for an f-string, ``%``/``+`` on text, or ``.format()``/``.join()`` of text."""
    for n in ast.walk(node):
        if isinstance(n, ast.JoinedStr):
            return True
        if isinstance(n, ast.BinOp) and isinstance(n.op, ast.Mod | ast.Add):
            sides = (n.left, n.right)
            if any(isinstance(s, ast.JoinedStr) or _is_str(s) for s in sides):
                return True
        if (
            isinstance(n, ast.Call)
            and isinstance(n.func, ast.Attribute)
            and n.func.attr in ("format", "join")
            and _is_str(n.func.value)
        ):
            return True
    return False


def _is_str(node: ast.AST) -> bool:
    return isinstance(node, ast.Constant) and isinstance(node.value, str)


def sql_findings(source: str) -> list[tuple[int, str]]:
    """(line, source text) of SQL arguments that are assembled, or not a literal where
    SQL text is due."""
    found = []
    for node in ast.walk(ast.parse(source)):
        if not (isinstance(node, ast.Call) and node.args):
            continue
        func = node.func
        name = func.attr if isinstance(func, ast.Attribute) else getattr(func, "id", None)
        if name not in SQL_CALLS:
            continue
        arg = node.args[0]
        if _assembled(arg) or (name in SQL_TEXT_CALLS and not _is_str(arg)):
            found.append((node.lineno, ast.unparse(arg)))
    return found


def test_the_scanner_finds_assembled_sql() -> None:
    sample = (
        "conn.execute(text(f'SELECT * FROM bin WHERE label = {label}'))\n"
        "cur.execute('DELETE FROM bin WHERE id = %s' % bin_id)\n"
        "cur.execute('SELECT ' + column)\n"
        "session.execute(text('SELECT {}'.format(x)))\n"
        "conn.exec_driver_sql(query)\n"
        "conn.execute(text('SELECT 1 WHERE :a = 1'), {'a': a})\n"
        "session.execute(select(Bin).where(Bin.qty + n >= 0))\n"
    )
    assert {line for line, _ in sql_findings(sample)} == {1, 2, 3, 4, 5}


def test_no_sql_is_assembled_from_text_in_kitbin() -> None:
    found = []
    for path in sorted(SRC.rglob("*.py")):
        rel = path.relative_to(SRC).as_posix()
        for line, arg in sql_findings(path.read_text(encoding="utf-8")):
            if (rel, arg) not in AUDITED:
                found.append(f"{rel}:{line}: {arg}")
    assert found == [], "SQL assembled from text (bind parameters instead, or audit it here)"


QUOTES = [
    "O'Brien's \"best\" kit; DROP TABLE bin; --",
    "100% off_sale \\ back\\slash",
    "'); DELETE FROM reading; --",
    'x" OR "1"="1',
]


def test_quoting_characters_pass_through_the_cli_as_plain_text(tmp_path: Path) -> None:
    db = tmp_path / "inv.sqlite"
    for i, text in enumerate(QUOTES):
        kb(db, "kit", "add", text, "--source", text, "--notes", text)
        kb(db, "bin", "add", f"Q-{i}", "--kind", "other", "--kit", text, "--location", text,
           "--notes", text, "--qty", "2")  # fmt: skip
        kb(db, "record", f"Q-{i}", "rise=10K", "--method", text[:60], "--note", text)
        kb(db, "stock", f"Q-{i}", "-1", "--why", text)
    kits = json.loads(kb(db, "kit", "list", "--json").stdout)
    assert sorted(k["name"] for k in kits) == sorted(QUOTES)
    for i, text in enumerate(QUOTES):
        shown = json.loads(kb(db, "bin", "show", f"Q-{i}", "--json").stdout)
        assert (shown["kit"], shown["location"], shown["notes"], shown["qty"]) == (
            text, text, text, 1,
        )  # fmt: skip
        assert shown["readings"][0]["note"] == text

    # Searching for a quote, a percent sign or an underscore matches those characters
    # literally, never as SQL or as LIKE wildcards.
    def search(text: str) -> list[str]:
        return [b["label"] for b in json.loads(kb(db, "bin", "list", "--search", text,
                                                   "--json").stdout)]  # fmt: skip

    assert search("O'Brien") == ["Q-0"]
    assert search("100%") == ["Q-1"]
    assert search("%") == ["Q-1"]
    assert search("_") == ["Q-1"]
    assert search("\\") == ["Q-1"]
    assert search('"1"="1') == ["Q-3"]
    assert search("' OR '1'='1") == []
    # Labels are checked before any SQL is made: one clear line, nothing stored.
    bad = kb(db, "bin", "add", "Q-9'; DROP TABLE bin; --", "--kind", "other", code=3)
    assert bad.stderr.startswith("kitbin: error: ") and len(bad.stderr.splitlines()) == 1
    missing = kb(db, "bin", "show", "Q-0' OR '1'='1", code=4)
    assert "no bin labelled" in missing.stderr
    assert len(json.loads(kb(db, "bin", "list", "--json").stdout)) == len(QUOTES)

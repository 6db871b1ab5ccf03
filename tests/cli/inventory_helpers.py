"""Helpers for the inventory CLI tests: run a command, snapshot a database."""

from __future__ import annotations

import sqlite3
from pathlib import Path

from typer.testing import CliRunner

from kitbin.cli.app import app

TABLES = ("kit", "bin", "bin_property", "reading", "capture", "stock_move")


def kb(db: Path, *args: str):
    """Run ``kitbin --db DB ARGS...`` in-process; returns the click Result."""
    return CliRunner().invoke(app, ["--db", str(db), *args])


def snapshot(db: Path) -> dict[str, list[tuple]]:
    """Every row of every inventory table, for before/after comparisons."""
    if not db.exists():
        return {}
    con = sqlite3.connect(db)
    try:
        return {t: sorted(con.execute(f"SELECT * FROM {t}").fetchall(), key=repr) for t in TABLES}
    finally:
        con.close()


def error_lines(result) -> list[str]:
    """The ``kitbin: error:`` lines a command wrote to stderr."""
    return [line for line in result.stderr.splitlines() if line.startswith("kitbin: error:")]

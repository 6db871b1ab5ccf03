"""``kitbin backup`` and ``kitbin restore`` round-trip every row of every table.

The inventory is the invented demo workshop plus a plan, a pick list and its lines,
so that every table holds rows (captures carry binary content and JSON curves). It
is backed up in each format its backend allows, restored into a fresh database on
each backend, and compared table by table, row by row, column by column.
"""

from __future__ import annotations

import datetime as dt
import json
import os
import stat
from pathlib import Path

import pytest
from sqlalchemy import select
from typer.testing import CliRunner

from kitbin.cli.app import app
from kitbin.store import open_store
from kitbin.store.models import Base, Bin, PickLine, PickList, Plan

runner = CliRunner()


def kb(url: str, *args: str, code: int = 0):
    result = runner.invoke(app, ["--db", url, *args])
    assert result.exit_code == code, (args, result.stdout, result.stderr, result.exception)
    return result


def _fill(url: str) -> None:
    kb(url, "demo", "--db", url, "--force", "--json")
    with open_store(url) as store, store.transaction() as s:
        bins = s.scalars(select(Bin).order_by(Bin.id).limit(2)).all()
        plan = Plan(name="5 V buck (invented)", topology="buck", spec={"vin": [9.0, 14.0]})
        pick = PickList(plan=plan, boards=2, state="reserved", snapshot={"note": "µ Ω 'q'"})
        pick.lines = [
            PickLine(role="inductor", bin_id=bins[0].id, qty_per_board=1, qty_total=2),
            PickLine(role="output capacitor", bin_id=None, qty_per_board=2, qty_total=4),
        ]
        s.add(plan)


def _normal(value):
    if isinstance(value, dt.datetime):
        return value.astimezone(dt.UTC) if value.tzinfo else value.replace(tzinfo=dt.UTC)
    return value


def _dump(url: str) -> dict[str, list[tuple]]:
    """Every table's rows, by primary key, through the models' column types."""
    with open_store(url, create=False) as store, store.engine.connect() as conn:
        return {
            t.name: [
                tuple(_normal(v) for v in row)
                for row in conn.execute(select(t).order_by(*t.primary_key.columns))
            ]
            for t in Base.metadata.sorted_tables
        }


@pytest.fixture
def source(backend: str, databases) -> tuple[str, dict[str, list[tuple]]]:
    url = databases.new(backend)
    _fill(url)
    rows = _dump(url)
    assert all(rows[t] for t in rows), {t: len(r) for t, r in rows.items()}
    return url, rows


def _formats(url: str) -> list[str]:
    return ["sqlite", "jsonl"] if url.startswith("sqlite") else ["jsonl"]


def test_backup_restores_every_row_on_both_backends(source, databases, tmp_path: Path) -> None:
    url, rows = source
    targets = ["sqlite"] + (["postgresql"] if os.environ.get("KITBIN_TEST_PG") else [])
    for fmt in _formats(url):
        file = tmp_path / f"inventory.{fmt}"
        summary = json.loads(kb(url, "backup", str(file), "--format", fmt, "--json").stdout)
        assert summary["rows"] == {t: len(r) for t, r in rows.items()}
        assert stat.S_IMODE(file.stat().st_mode) == 0o600
        assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".kitbin")] == []
        for target_backend in targets:
            target = databases.new(target_backend)
            kb(target, "restore", str(file))
            restored = _dump(target)
            for table, want in rows.items():
                assert restored[table] == want, (fmt, target_backend, table)
            # The restored inventory is live: new rows get fresh ids, stock still moves.
            kb(target, "bin", "add", "NEW-1", "--kind", "resistor", "--nominal", "1k", "--qty", "3")
            label = rows["bin"][0][1]
            kb(target, "stock", label, "1", "--why", "after restore")
            if target_backend == "sqlite":
                path = Path(target.removeprefix("sqlite:///"))
                assert stat.S_IMODE(path.stat().st_mode) == 0o600


def test_restore_refuses_a_non_empty_database(source, tmp_path: Path) -> None:
    url, rows = source
    file = tmp_path / "b.jsonl"
    kb(url, "backup", str(file), "--format", "jsonl")
    refused = kb(url, "restore", str(file), code=6)
    assert "not empty" in refused.stderr and len(refused.stderr.strip().splitlines()) == 1
    assert _dump(url) == rows


def test_backup_never_overwrites_without_force(source, tmp_path: Path) -> None:
    url, _ = source
    file = tmp_path / "b.jsonl"
    file.write_text("precious")
    refused = kb(url, "backup", str(file), "--format", "jsonl", code=6)
    assert "exists" in refused.stderr
    assert file.read_text() == "precious"
    kb(url, "backup", str(file), "--format", "jsonl", "--force")
    assert file.read_text().startswith('{"format": "kitbin-backup"')


def test_a_damaged_dump_restores_nothing(source, databases, tmp_path: Path) -> None:
    url, _ = source
    file = tmp_path / "b.jsonl"
    kb(url, "backup", str(file), "--format", "jsonl")
    lines = file.read_text().splitlines(keepends=True)
    damaged = {
        "truncated": "".join(lines[: len(lines) // 2]),
        "no end line": "".join(lines[:-1]),
        "bad row": "".join(lines[:5]) + '[1, "too few"]\n' + "".join(lines[5:]),
        "not json": "".join(lines[:3]) + "{nope\n" + "".join(lines[3:]),
        "bad bytes": "".join(lines[:3]).encode() + b"\xff\xfe\n",
    }
    for name, content in damaged.items():
        bad = tmp_path / f"{name}.jsonl"
        if isinstance(content, bytes):
            bad.write_bytes(content)
        else:
            bad.write_text(content)
        for target_backend in {
            "sqlite",
            "postgresql" if url.startswith("postgresql") else "sqlite",
        }:
            target = databases.new(target_backend)
            result = kb(target, "restore", str(bad), code=6)
            lines_out = result.stderr.strip().splitlines()
            assert len(lines_out) == 1 and lines_out[0].startswith("kitbin: error:"), (
                name,
                lines_out,
            )
            if target_backend == "sqlite":
                assert not Path(target.removeprefix("sqlite:///")).exists(), name
            else:
                from sqlalchemy import create_engine, inspect

                engine = create_engine(target)
                try:
                    assert inspect(engine).get_table_names() == [], name
                finally:
                    engine.dispose()
    not_backup = tmp_path / "notes.txt"
    not_backup.write_text("label,kind\n")
    result = kb(databases.new("sqlite"), "restore", str(not_backup), code=6)
    assert "not a kitbin backup" in result.stderr


def test_an_older_backup_is_upgraded_on_restore(source, databases, tmp_path: Path) -> None:
    # A dump at revision 0001 has only the inventory tables; restoring it builds the
    # schema at 0001, loads the rows and upgrades to head in the same transaction.
    url, rows = source
    file = tmp_path / "b.jsonl"
    kb(url, "backup", str(file), "--format", "jsonl")
    at_0001 = {"kit", "bin", "bin_property", "capture", "reading", "stock_move"}
    out: list[dict | list] = []
    counts: dict[str, int] = {}
    table = ""
    for line in file.read_text().splitlines():
        item = json.loads(line)
        if isinstance(item, dict) and item.get("format"):
            out.append({**item, "revision": "0001"})
        elif isinstance(item, dict) and "table" in item:
            table = item["table"]
            if table in at_0001:
                counts[table] = 0
                out.append(item)
        elif isinstance(item, dict) and item.get("end"):
            out.append({"end": True, "rows": counts})
        elif table in at_0001:
            counts[table] += 1
            out.append(item)
    old = tmp_path / "old.jsonl"
    old.write_text("".join(json.dumps(item) + "\n" for item in out))
    target = databases.new("sqlite")
    kb(target, "restore", str(old))
    restored = _dump(target)
    for table in at_0001:
        assert restored[table] == rows[table], table
    assert restored["plan"] == [] and restored["pick_list"] == []


def _log_consistent(url: str) -> dict[str, int]:
    """Per bin: the move log adds up to the quantity and qty_after runs on; returns qty."""
    from kitbin.store.models import StockMove

    out = {}
    with open_store(url, create=False) as store, store.transaction() as s:
        for b in s.scalars(select(Bin).order_by(Bin.id)):
            moves = s.execute(
                select(StockMove.delta, StockMove.qty_after)
                .where(StockMove.bin_id == b.id)
                .order_by(StockMove.id)
            ).all()
            running = 0
            for delta, after in moves:
                running += delta
                assert after == running, b.label
            assert running == b.qty, b.label
            out[b.label] = b.qty
    return out


def test_a_backup_taken_while_stock_moves_is_a_consistent_snapshot(
    backend: str, databases, tmp_path: Path
) -> None:
    import random
    import threading

    from kitbin.errors import StockError
    from kitbin.services import backup as backup_service
    from kitbin.services import inventory

    url = databases.new(backend)
    store = open_store(url)
    for i in range(3):
        inventory.add_bin(store, f"L-{i}", "inductor", nominal="10uH", qty=200)
    stop = threading.Event()
    moves = [0]

    def churn() -> None:
        writer = open_store(url, create=False)
        rng = random.Random(5)
        try:
            while not stop.is_set():
                try:
                    inventory.adjust_stock(
                        writer, f"L-{rng.randrange(3)}", rng.choice((-2, 1)), "churn"
                    )
                    moves[0] += 1
                except StockError:
                    pass
        finally:
            writer.close()

    thread = threading.Thread(target=churn)
    thread.start()
    files = []
    try:
        for k, fmt in enumerate(_formats(url) * 2):
            file = tmp_path / f"during-{k}.{fmt}"
            backup_service.backup(store, str(file), fmt=fmt)
            files.append(file)
    finally:
        stop.set()
        thread.join()
        store.close()
    assert moves[0] > 0
    for file in files:
        target = databases.new("sqlite")
        kb(target, "restore", str(file))
        assert set(_log_consistent(target)) == {"L-0", "L-1", "L-2"}
    _log_consistent(url)

"""The demo workshop: invented and says so, deterministic, never the user's inventory."""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path

from inventory_helpers import error_lines, kb, snapshot
from typer.testing import CliRunner

from kitbin.cli.app import app
from kitbin.errors import ExitCode


def _json(r) -> dict:
    assert r.exit_code == 0, r.output
    return json.loads(r.stdout)


def test_demo_builds_the_workshop_and_says_it_is_invented(tmp_path: Path) -> None:
    path = tmp_path / "demo.sqlite"
    r = CliRunner().invoke(app, ["demo", "--db", str(path)])
    assert r.exit_code == 0, r.output
    assert "invented" in r.stdout.lower()
    assert "Harbour Lane Makerspace" in r.stdout
    kits = _json(kb(path, "kit", "list", "--json"))
    assert len(kits) >= 4
    bins = _json(kb(path, "bin", "list", "--json"))
    assert len(bins) >= 60
    by_kind: dict[str, list[dict]] = {}
    for b in bins:
        by_kind.setdefault(b["kind"], []).append(b)
    inductors = by_kind["inductor"]
    assert len({b["nominal"] for b in inductors}) >= 12
    assert len({b["package"] for b in inductors}) == 2
    resistors = sorted(b["nominal"] for b in by_kind["resistor"])
    # E12 from 10 ohm to 1 Mohm: 12 values per decade over 5 decades, plus 1 Mohm
    # (IEC 60063 E12 table, REFERENCES.md section 8.4).
    assert len(resistors) == 61 and resistors[0] == 10.0 and resistors[-1] == 1e6
    caps = by_kind["capacitor"]
    assert all(any(p["name"] == "rated_voltage" for p in c["properties"]) for c in caps)
    diodes = by_kind["diode"]
    assert all({"vrrm", "if_avg", "vf"} <= {p["name"] for p in d["properties"]} for d in diodes)
    controllers = by_kind["controller"]
    assert len(controllers) == 2
    for c in controllers:
        names = {p["name"] for p in c["properties"]}
        assert {"vref", "vref_tol", "fsw", "vin_min", "vin_max", "ton_min", "d_max"} <= names
        assert names & {"ilim", "ilim_gain"}
    measured = [b for b in bins if b["readings"]]
    assert len(measured) >= 30
    shown = _json(kb(path, "bin", "show", "L-05", "--json"))
    assert shown["evidence"]["inductance"]["specimens"] >= 3


def test_demo_is_deterministic(tmp_path: Path) -> None:
    a, b = tmp_path / "a.sqlite", tmp_path / "b.sqlite"
    for path in (a, b):
        assert CliRunner().invoke(app, ["demo", "--db", str(path)]).exit_code == 0

    def values(path: Path) -> list[tuple]:
        con = sqlite3.connect(path)
        try:
            return con.execute(
                "SELECT b.label, r.quantity, r.specimen, r.value, r.bound, r.conditions, "
                "CASE WHEN r.capture_id IS NULL THEN r.taken_at END "
                "FROM reading r JOIN bin b ON b.id = r.bin_id ORDER BY r.id"
            ).fetchall()
        finally:
            con.close()

    assert values(a) == values(b)
    assert len(values(a)) > 100


def test_demo_defaults_to_its_own_file_not_the_inventory(tmp_path: Path, monkeypatch) -> None:
    inventory = tmp_path / "mine.sqlite"
    assert kb(inventory, "kit", "add", "my own kit").exit_code == 0
    before = snapshot(inventory)
    monkeypatch.setenv("KITBIN_DB", str(inventory))
    r = CliRunner().invoke(app, ["demo", "--json"])
    data = _json(r)
    # The autouse fixture points the user data directory into tmp_path.
    assert data["url"].endswith("/kitbin/demo.sqlite")
    assert str(tmp_path) in data["url"]
    assert data["counts"]["bin"] >= 60
    assert snapshot(inventory) == before
    # Built again, fresh: same counts, no duplicates.
    assert _json(CliRunner().invoke(app, ["demo", "--json"]))["counts"] == data["counts"]


def test_demo_refuses_a_named_database_with_data_unless_forced(tmp_path: Path) -> None:
    inventory = tmp_path / "mine.sqlite"
    assert kb(inventory, "kit", "add", "my own kit").exit_code == 0
    before = snapshot(inventory)
    r = CliRunner().invoke(app, ["demo", "--db", str(inventory)])
    assert r.exit_code == int(ExitCode.STORE)
    (line,) = error_lines(r)
    assert "--force" in line
    assert snapshot(inventory) == before
    r = CliRunner().invoke(app, ["--db", str(inventory), "demo"])
    assert r.exit_code == int(ExitCode.STORE)
    r = CliRunner().invoke(app, ["demo", "--db", str(inventory), "--force"])
    assert r.exit_code == 0, r.output
    kits = _json(kb(inventory, "kit", "list", "--json"))
    assert "my own kit" not in {k["name"] for k in kits}

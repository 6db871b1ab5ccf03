"""``kitbin plan new|show|list|edit``: stored specs, TOML files, controller fill-in."""

from __future__ import annotations

import json
import math
import sqlite3
import tomllib
from pathlib import Path

import pytest
from typer.testing import CliRunner

from kitbin.cli.app import app

NEW = ["--topology", "buck", "--vin", "11..15V", "--vout", "5.1V", "--iout", "2.4A",
       "--fsw", "500kHz"]  # fmt: skip


def kb(db: Path, *args: str):
    return CliRunner().invoke(app, ["--db", str(db), *args])


def plans_table(db: Path) -> list[tuple]:
    con = sqlite3.connect(db)
    try:
        return con.execute("SELECT name, topology, spec, notes FROM plan ORDER BY name").fetchall()
    finally:
        con.close()


@pytest.fixture
def db(tmp_path: Path) -> Path:
    path = tmp_path / "inv.sqlite"
    r = kb(path, "bin", "add", "U-01", "--kind", "controller", "--prop", "vref=0.8V",
           "--prop", "vref_tol=1%", "--prop", "fsw=400kHz", "--prop", "ilim=3.5A",
           "--prop", "ton_min=100ns", "--prop", "rds_on=0.12ohm")  # fmt: skip
    assert r.exit_code == 0, r.output
    return path


def test_new_show_list_edit(db: Path) -> None:
    r = kb(db, "plan", "new", "bench", *NEW, "--vref", "0.8V", "--notes", "first board")
    assert r.exit_code == 0, r.output
    stored = json.loads(plans_table(db)[0][2])
    assert stored["vin_min"] == 11 and stored["vin_max"] == 15 and stored["vref"] == 0.8
    r = kb(db, "plan", "show", "bench", "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert data["name"] == "bench" and data["inductance_source"] == "l_min"
    assert [c["vin_V"] for c in data["corners"][:2]] == [11, 15]
    ratio = data["demands"]["feedback_divider"]["constraints"]
    assert math.isclose(ratio[0]["limit"], 5.1 / 0.8 * 0.97 - 1, rel_tol=1e-9)
    r = kb(db, "plan", "show", "bench")
    assert r.exit_code == 0 and "Demands" in r.stdout and "feedback_divider" in r.stdout
    r = kb(db, "plan", "edit", "bench", "--iout", "3A", "--ripple", "40%")
    assert r.exit_code == 0, r.output
    stored = json.loads(plans_table(db)[0][2])
    assert stored["iout_max"] == 3 and stored["ripple_ratio"] == 0.4 and stored["vout"] == 5.1
    r = kb(db, "plan", "list", "--json")
    assert [p["name"] for p in json.loads(r.stdout)] == ["bench"]
    assert "bench" in kb(db, "plan", "list").stdout


def test_controller_fills_the_spec_and_options_win(db: Path) -> None:
    r = kb(db, "plan", "new", "ctl", "--topology", "buck", "--vin", "11..15V", "--vout", "5.1V",
           "--iout", "2.4A", "--controller", "U-01", "--ilim", "4A", "--json")  # fmt: skip
    assert r.exit_code == 0, r.output
    spec = json.loads(r.stdout)["spec"]
    assert spec["fsw"] == 400e3 and spec["vref"] == 0.8 and spec["vref_tol"] == 0.01
    assert spec["ton_min"] == pytest.approx(100e-9) and spec["rsw"] == 0.12
    assert spec["ilim"] == 4.0 and spec["controller"] == "U-01"  # explicit option wins


def test_toml_round_trip(db: Path, tmp_path: Path) -> None:
    assert kb(db, "plan", "new", "a", *NEW, "--sync", "30mohm", "--vref", "0.6V").exit_code == 0
    r = kb(db, "plan", "show", "a", "--toml")
    assert r.exit_code == 0, r.output
    parsed = tomllib.loads(r.stdout)  # reference reader: the standard library's tomllib
    assert parsed["rectifier"] == "sync" and parsed["r_rect"] == 0.03
    path = tmp_path / "a.toml"
    path.write_text(r.stdout)
    assert kb(db, "plan", "new", "b", "--from", str(path)).exit_code == 0
    rows = {name: json.loads(spec) for name, _, spec, _ in plans_table(db)}
    assert rows["a"] == rows["b"]
    hand = tmp_path / "hand.toml"
    hand.write_text(
        'topology = "boost"\nvin = "4.5..5.5V"\nvout = "12V"\niout_max = "0.5A"\n'
        'fsw = "1MHz"\n[[extras]]\nname = "boot"\nquantity = "capacitance"\nop = ">="\n'
        'limit = "100nF"\n'
    )
    r = kb(db, "plan", "new", "c", "--from", str(hand), "--json")
    assert r.exit_code == 0, r.output
    spec = json.loads(r.stdout)["spec"]
    assert spec["vin_min"] == 4.5 and spec["extras"][0]["limit"] == pytest.approx(100e-9)
    ranged = tmp_path / "ranged.toml"
    ranged.write_text(
        hand.read_text().replace('vout = "12V"', 'vout = "12V"\nrbottom = "4k7..47k"')
    )
    r = kb(db, "plan", "new", "d", "--from", str(ranged), "--json")
    assert r.exit_code == 0, r.output
    spec = json.loads(r.stdout)["spec"]
    assert spec["rbottom_min"] == pytest.approx(4.7e3) and spec["rbottom_max"] == 47e3
    assert rows["a"]["rbottom_min"] == 1e3 and rows["a"]["rbottom_max"] == 100e3  # defaults


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (["plan", "new", "x", *NEW[:-1], "0Hz"], "switching frequency"),
        (["plan", "new", "x", "--topology", "boost", *NEW[2:]], "boost cannot make"),
        (["plan", "new", "x", *NEW, "--iout-min", "5A"], "above full load"),
        (["plan", "new", "x", *NEW, "--vref", "0.8uH"], "--vref"),
        (["plan", "new", "x", "--topology", "buck"], "missing"),
        (["plan", "new", "x", *NEW, "--controller", "U-99"], "not found"),
        (["plan", "new", "keep", *NEW], "already exists"),
        (["plan", "edit", "keep", "--vin", "15..11V"], "written backwards"),
        (["plan", "edit", "keep", "--vout", "20V"], "buck cannot make"),
        (["plan", "edit", "keep", "--rbottom", "47k..4k7"], "written backwards"),
        (["plan", "edit", "keep", "--rbottom", "0..4k7"], "bottom-resistor range"),
        (["plan", "show", "nothing"], "not found"),
        (["plan", "new", "x", "--from", "missing.toml"], "not found"),
    ],
)
def test_bad_input_writes_nothing(db: Path, args: list[str], words: str) -> None:
    assert kb(db, "plan", "new", "keep", *NEW).exit_code == 0
    before = plans_table(db)
    r = kb(db, *args)
    assert r.exit_code != 0
    lines = [ln for ln in r.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("kitbin: error:") and words in lines[0], lines
    assert plans_table(db) == before


def test_bad_toml_is_one_line(db: Path, tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text("topology = buck\n")
    r = kb(db, "plan", "new", "x", "--from", str(bad))
    assert r.exit_code != 0 and "not valid TOML" in r.stderr
    unknown = tmp_path / "unknown.toml"
    unknown.write_text('topology = "buck"\ncolour = 1\n')
    r = kb(db, "plan", "new", "x", "--from", str(unknown))
    assert r.exit_code != 0 and "unknown key" in r.stderr
    assert plans_table(db) == []

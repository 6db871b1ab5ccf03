"""Every inventory command end to end, through the real app, on a tmp_path database."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from inventory_helpers import kb, snapshot


@pytest.fixture
def db(tmp_path: Path) -> Path:
    return tmp_path / "inv.sqlite"


def test_issue_acceptance_marking_then_readings_then_show(db: Path) -> None:
    # IEC 60062 colour code read in µH on a banded inductor: brown-black-black-silver
    # = 10 µH ±10 % (REFERENCES.md section 8.1, "Colour-banded axial inductors").
    r = kb(
        db,
        "bin",
        "add",
        "L-99",
        "--kind",
        "inductor",
        "--marking",
        "brown black black silver",
        "--qty",
        "5",
    )
    assert r.exit_code == 0, r.output
    r = kb(
        db,
        "record",
        "L-99",
        "inductance=9.6uH",
        "dcr=31mohm",
        "--specimen",
        "1",
        "--at",
        "freq=100kHz",
    )
    assert r.exit_code == 0, r.output
    r = kb(db, "bin", "show", "L-99", "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert math.isclose(data["nominal"], 10e-6, rel_tol=1e-12)
    assert data["tol_minus"] == pytest.approx(0.1) and data["tol_plus"] == pytest.approx(0.1)
    assert data["qty"] == 5
    ev = data["evidence"]["inductance"]
    assert ev["grade"] == "measured" and ev["n"] == 1 and ev["specimens"] == 1
    assert ev["low"] == pytest.approx(9.6e-6) and ev["high"] == pytest.approx(9.6e-6)
    assert data["evidence"]["dcr"]["grade"] == "measured"
    assert data["evidence"]["dcr"]["conservative"] == pytest.approx(0.031)
    assert data["evidence"]["isat_20"]["grade"] == "unknown"
    (l_reading,) = [x for x in data["readings"] if x["quantity"] == "inductance"]
    assert l_reading["conditions"] == {"freq": 100e3} and l_reading["specimen"] == 1
    assert [m["delta"] for m in data["moves"]] == [5]


def test_marked_evidence_without_readings(db: Path) -> None:
    kb(db, "bin", "add", "L-10", "--kind", "inductor", "--nominal", "4.7uH", "--tolerance", "20%")
    data = json.loads(kb(db, "bin", "show", "L-10", "--json").stdout)
    ev = data["evidence"]["inductance"]
    assert ev["grade"] == "marked"
    assert ev["low"] == pytest.approx(3.76e-6) and ev["high"] == pytest.approx(5.64e-6)


def test_init_creates_and_reports_revision(db: Path) -> None:
    from kitbin.store import head_revision

    r = kb(db, "init")
    assert r.exit_code == 0 and f"revision {head_revision()}" in r.stdout
    assert db.exists()


def test_kits_add_and_list(db: Path) -> None:
    r = kb(db, "kit", "add", "Drum kit", "--source", "stall", "--bought", "2026-03-14")
    assert r.exit_code == 0, r.output
    kb(db, "bin", "add", "L-01", "--kind", "inductor", "--kit", "Drum kit", "--nominal", "10uH")
    kits = json.loads(kb(db, "kit", "list", "--json").stdout)
    assert kits == [
        {"name": "Drum kit", "source": "stall", "bought_on": "2026-03-14", "notes": None, "bins": 1}
    ]
    table = kb(db, "kit", "list")
    assert table.exit_code == 0 and "Drum kit" in table.stdout


def test_bin_add_with_properties_and_list_filters(db: Path) -> None:
    r = kb(
        db,
        "bin",
        "add",
        "D-01",
        "--kind",
        "diode",
        "--prop",
        "vrrm=40V",
        "--prop",
        "if_avg=1A",
        "--prop-source",
        "bag label",
        "--qty",
        "10",
        "--location",
        "C1",
    )
    assert r.exit_code == 0, r.output
    kb(db, "bin", "add", "R-4K7", "--kind", "resistor", "--nominal", "4k7", "--qty", "20")
    kb(
        db,
        "bin",
        "add",
        "U-01",
        "--kind",
        "controller",
        "--prop",
        "vref=0.8V",
        "--prop",
        "vref_tol=1.5%",
    )
    every = json.loads(kb(db, "bin", "list", "--json").stdout)
    assert [b["label"] for b in every] == ["D-01", "R-4K7", "U-01"]
    diodes = json.loads(kb(db, "bin", "list", "--kind", "diode", "--json").stdout)
    assert diodes[0]["properties"] == [
        {"name": "if_avg", "value": 1.0, "source": "bag label"},
        {"name": "vrrm", "value": 40.0, "source": "bag label"},
    ]
    found = json.loads(kb(db, "bin", "list", "--search", "4k", "--json").stdout)
    assert [b["label"] for b in found] == ["R-4K7"]
    assert found[0]["nominal"] == 4700.0
    shown = json.loads(kb(db, "bin", "show", "U-01", "--json").stdout)
    vref = shown["evidence"]["vref"]
    # vref_tol 1.5 % widens the stated vref into an interval.
    assert vref["grade"] == "marked"
    assert vref["low"] == pytest.approx(0.788) and vref["high"] == pytest.approx(0.812)
    table = kb(db, "bin", "list")
    assert table.exit_code == 0 and "R-4K7" in table.stdout


def test_bin_show_human_output(db: Path) -> None:
    kb(db, "bin", "add", "L-99", "--kind", "inductor", "--marking", "100", "--tolerance", "20%")
    kb(db, "record", "L-99", "isat_20>=3A", "--specimen", "2", "--method", "ramp")
    r = kb(db, "bin", "show", "L-99")
    assert r.exit_code == 0, r.output
    assert "10.0 µH ±20 %" in r.stdout
    assert "isat_20: measured ≥ 3.00 A" in r.stdout


def test_bin_edit(db: Path) -> None:
    kb(db, "kit", "add", "Drum kit")
    kb(
        db,
        "bin",
        "add",
        "L-01",
        "--kind",
        "inductor",
        "--nominal",
        "10uH",
        "--prop",
        "isat_20=2A",
        "--qty",
        "3",
    )
    r = kb(
        db,
        "bin",
        "edit",
        "L-01",
        "--label",
        "L-02",
        "--location",
        "drawer B2",
        "--kit",
        "Drum kit",
        "--tolerance",
        "-20%/+30%",
        "--drop-prop",
        "isat_20",
        "--prop",
        "dcr=40mohm",
        "--json",
    )
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert (data["label"], data["location"], data["kit"]) == ("L-02", "drawer B2", "Drum kit")
    assert (data["tol_minus"], data["tol_plus"]) == (pytest.approx(0.2), pytest.approx(0.3))
    assert [p["name"] for p in data["properties"]] == ["dcr"]
    assert data["qty"] == 3
    loose = json.loads(kb(db, "bin", "edit", "L-02", "--kit", "", "--json").stdout)
    assert loose["kit"] is None


def test_record_several_with_conditions_and_bounds(db: Path) -> None:
    kb(db, "bin", "add", "L-07", "--kind", "inductor", "--nominal", "22uH")
    r = kb(
        db,
        "record",
        "L-07",
        "L=21.5uH",
        "isat_20>=3A",
        "--specimen",
        "3",
        "--at",
        "freq=100kHz",
        "--at",
        "temp=25degC",
        "--at",
        "bias=0.5A",
        "--method",
        "lcr",
        "--instrument",
        "bench LCR",
        "--json",
    )
    assert r.exit_code == 0, r.output
    rows = json.loads(r.stdout)
    assert [(x["quantity"], x["bound"]) for x in rows] == [("inductance", "="), ("isat_20", ">=")]
    assert rows[0]["conditions"] == {"freq": 100e3, "temp": 25.0, "bias": 0.5}
    assert rows[0]["value"] == pytest.approx(21.5e-6)
    assert (rows[1]["method"], rows[1]["instrument"], rows[1]["specimen"]) == (
        "lcr",
        "bench LCR",
        3,
    )
    human = kb(db, "record", "L-07", "dcr=0R12")
    assert human.exit_code == 0 and "dcr 120 mΩ" in human.stdout


def test_stock_negative_delta_as_argument(db: Path) -> None:
    kb(db, "bin", "add", "L-07", "--kind", "inductor", "--nominal", "10uH", "--qty", "8")
    r = kb(db, "stock", "L-07", "-5", "--why", "used on board 1")
    assert r.exit_code == 0, r.output
    assert "L-07: -5, now 3 on hand" in r.stdout
    r = kb(db, "stock", "--why", "found a bag", "L-07", "12", "--json")
    assert r.exit_code == 0, r.output
    assert json.loads(r.stdout)["qty"] == 15
    moves = json.loads(kb(db, "bin", "show", "L-07", "--json").stdout)["moves"]
    assert [(m["delta"], m["qty_after"], m["reason"]) for m in moves] == [
        (8, 8, "starting count"),
        (-5, 3, "used on board 1"),
        (12, 15, "found a bag"),
    ]


def test_commands_without_db_use_kitbin_db(tmp_path: Path, monkeypatch) -> None:
    from typer.testing import CliRunner

    from kitbin.cli.app import app

    target = tmp_path / "from-env.sqlite"
    monkeypatch.setenv("KITBIN_DB", str(target))
    r = CliRunner().invoke(app, ["kit", "add", "k"])
    assert r.exit_code == 0, r.output
    assert snapshot(target)["kit"]

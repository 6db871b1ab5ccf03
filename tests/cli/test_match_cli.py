"""``kitbin match`` end to end on a small hand-made inventory (tests/cli/match_helpers.py).

Hand-worked numbers for the plan (buck 12 V -> 5 V, 1 A, 500 kHz, VD 0.4 V):
* smallest inductance for r = 0.3 (REFERENCES 2, rearranged with the diode drop,
  the power stage's l_min): D = (5 + 0.4)/(12 + 0.4) = 0.4355, dI = 0.3 A ->
  L >= (12 - 5) x 0.4355 / (500e3 x 0.3) = 20.3 uH. L-A (22 uH) passes, L-E (10 uH) fails.
* divider (REFERENCES 7): 0.800 V x (1 + 52.5 k / 10.0 k) = 5.000 V from the measured
  resistors; their evidence is a point, so the band is the reference's +-1 %:
  4.950 ... 5.050 V.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from inventory_helpers import snapshot
from match_helpers import kb


@pytest.fixture
def db(match_db: Path) -> Path:
    return match_db


def test_json_shape_and_order(db: Path) -> None:
    r = kb(db, "match", "bench-5v", "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert set(data) >= {"roles", "divider"}
    ind = data["roles"]["inductor"]
    # L-A verified; L-B only ">= 1.2 A" below its need -> unverified; L-E fails on L.
    assert [row["bin"] for row in ind] == ["L-A", "L-B", "L-E"]
    assert [row["verdict"] for row in ind] == ["verified", "unverified", "fails"]
    for row in ind:
        assert set(row) >= {"bin", "verdict", "score", "checks"}
        for c in row["checks"]:
            assert set(c) >= {"name", "required", "have", "grade", "status", "margin"}
    l_check = next(c for c in ind[0]["checks"] if c["name"] == "inductance")
    assert l_check["required"] == pytest.approx(7 * (5.4 / 12.4) / (500e3 * 0.3), rel=2e-3)
    assert l_check["status"] == "pass" and l_check["grade"] == "measured"
    lb = next(c for c in ind[1]["checks"] if c["name"] == "isat_20 vs own peak")
    assert lb["status"] == "unverified" and lb["have"] == pytest.approx(1.2)
    div = data["divider"]
    assert div["rtop"] == "R-TOP" and div["rbottom"] == "R-BOT"
    assert div["vout_V"] == pytest.approx(5.000, abs=1e-9)
    assert div["error_pct"] == pytest.approx(0.0, abs=1e-9)
    assert div["vout_band_V"] == [pytest.approx(4.95), pytest.approx(5.05)]


def test_one_role_and_top(db: Path) -> None:
    r = kb(db, "match", "bench-5v", "--role", "inductor", "--top", "1", "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert list(data["roles"]) == ["inductor"] and len(data["roles"]["inductor"]) == 1
    assert data["divider"] is None


def test_text_tables(db: Path) -> None:
    r = kb(db, "match", "bench-5v", "--top", "2")
    assert r.exit_code == 0, r.output
    assert "inductor" in r.stdout and "L-A" in r.stdout and "verified" in r.stdout
    assert "feedback divider" in r.stdout and "R-TOP" in r.stdout


def test_match_writes_nothing(db: Path) -> None:
    before = snapshot(db)
    assert kb(db, "match", "bench-5v").exit_code == 0
    assert snapshot(db) == before


@pytest.mark.parametrize(
    ("args", "code", "words"),
    [
        (["match", "no-such-plan"], 4, "no plan named 'no-such-plan'"),
        (["match", "bench-5v", "--role", "flux_capacitor"], 4, "has no role 'flux_capacitor'"),
    ],
)
def test_bad_input_is_one_line(db: Path, args: list[str], code: int, words: str) -> None:
    before = snapshot(db)
    r = kb(db, *args)
    assert r.exit_code == code
    assert r.stderr.startswith("kitbin: error: ") and words in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
    assert "Traceback" not in r.output
    assert snapshot(db) == before


def test_top_must_be_positive(db: Path) -> None:
    r = kb(db, "match", "bench-5v", "--top", "0")
    assert r.exit_code == 2


def test_shown_evidence_lines_say_what_bin_show_says(tmp_path: Path) -> None:
    # The matcher builds evidence for 100,000 bins as arrays and counts specimens
    # only for the rows it shows; each line it shows must still be the scalar
    # evidence of that bin (kitbin.match.evidence.build_evidence, via `bin show`),
    # "4 readings on 3 specimens" included.
    from typer.testing import CliRunner

    from kitbin.cli.app import app

    path = tmp_path / "demo.sqlite"
    assert CliRunner().invoke(app, ["demo", "--db", str(path)]).exit_code == 0
    r = kb(path, "match", "demo-5v", "--top", "3", "--json")
    assert r.exit_code == 0, r.output
    compared = with_specimens = 0
    for rows in json.loads(r.stdout)["roles"].values():
        for row in rows:
            shown = kb(path, "bin", "show", row["bin"], "--json")
            evidence = json.loads(shown.stdout)["evidence"]
            for c in row["checks"]:
                ev = evidence.get(c["quantity"])
                if c["grade"] != "measured" or not ev or not c["evidence"].startswith("measured"):
                    continue
                assert c["evidence"] == ev["text"].split(": ", 1)[1], (row["bin"], c["name"])
                compared += 1
                with_specimens += "specimen" in c["evidence"]
    assert compared >= 10 and with_specimens >= 5


def test_the_bottom_resistor_range_is_the_plans(db: Path) -> None:
    # Hand-worked (parallel resistors, 1/R = 1/R1 + 1/R2; divider as in the module
    # docstring): with the bottom leg kept in 1k..5k the only leg there is
    # R-BOT || R-BOT = 10.0k / 2 = 5.00k, and Rtop/Rbot = 5.25 asks for 26.25k, which
    # R-TOP || R-TOP = 52.5k / 2 gives exactly: Vout = 0.8 x 6.25 = 5.000 V.
    assert kb(db, "plan", "edit", "bench-5v", "--rbottom", "1k..5k").exit_code == 0
    r = kb(db, "match", "bench-5v", "--role", "feedback_divider", "--json")
    div = json.loads(r.stdout)["divider"]
    assert div["rbottom"] == "R-BOT ∥ R-BOT" and div["rtop"] == "R-TOP ∥ R-TOP"
    assert div["rbottom_ohm"] == pytest.approx(5.0e3) and div["rtop_ohm"] == pytest.approx(26.25e3)
    assert div["vout_V"] == pytest.approx(5.000, abs=1e-9)
    assert div["rbottom_range_ohm"] == [1e3, 5e3]
    # nothing stocked makes a bottom leg of 200k..300k (two 52.5k in series are 105k)
    assert kb(db, "plan", "edit", "bench-5v", "--rbottom", "200k..300k").exit_code == 0
    r = kb(db, "match", "bench-5v", "--role", "feedback_divider", "--json")
    div = json.loads(r.stdout)["divider"]
    assert div["verdict"] == "fails" and div["rbottom"] is None
    assert "200 kΩ … 300 kΩ" in div["note"]


def test_the_default_bottom_range_is_1k_to_100k(db: Path) -> None:
    r = kb(db, "match", "bench-5v", "--role", "feedback_divider", "--json")
    assert json.loads(r.stdout)["divider"]["rbottom_range_ohm"] == [1e3, 100e3]


@pytest.mark.parametrize("text", ["5k..1k", "1uF..5k", "0..5k", "lots"])
def test_a_bad_bottom_range_is_refused_and_changes_nothing(db: Path, text: str) -> None:
    before = snapshot(db)
    r = kb(db, "plan", "edit", "bench-5v", "--rbottom", text)
    assert r.exit_code == 3
    assert r.stderr.startswith("kitbin: error: ") and len(r.stderr.strip().splitlines()) == 1
    assert snapshot(db) == before

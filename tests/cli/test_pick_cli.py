"""``kitbin pick`` and ``kitbin picks list|done|cancel`` end to end.

Inventory and plan: tests/cli/match_helpers.py (10 parts in every bin). Hand-worked
bring-up values with the chosen L-A (22 uH measured, DCR 50 mohm), REFERENCES 1.2
(asynchronous buck with drops: D = (Vo + VD + Io*RL)/(Vin + VD)) and 1.1:
D = (5 + 0.4 + 0.05)/(12 + 0.4) = 0.4395 -> 44.0 %; dI = (12 - 0.05 - 5) x D /
(500e3 x 22e-6) = 0.2777 A -> 27.8 mV p-p across 0.1 ohm (Ohm's law). The output band
is the divider's (tests/cli/test_match_cli.py): 4.950 ... 5.050 V.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest
from inventory_helpers import snapshot
from match_helpers import kb, query, stock_of


@pytest.fixture
def db(match_db: Path) -> Path:
    return match_db


def test_text_pick_list_and_bring_up(db: Path) -> None:
    r = kb(db, "pick", "bench-5v", "--boards", "2")
    assert r.exit_code == 0, r.output
    out = r.stdout
    assert "Pick list: bench-5v × 2 boards" in out and "every role can be filled" in out
    # C-IN (10 uF, 50 V) tops both capacitor roles: both lines take it
    lines = {ln.split()[0]: ln.split()[1] for ln in out.splitlines()[6:13]}
    assert lines == {"inductor": "L-A", "output_capacitor": "C-IN", "input_capacitor": "C-IN",
                     "catch_diode": "D-1", "controller": "U-1", "divider_top": "R-TOP",
                     "divider_bottom": "R-BOT"}  # fmt: skip
    assert "duty cycle at Vin 12.0 V" in out and "44.0 %" in out
    assert "27.8 mV p-p across 100 mΩ" in out
    assert "5.000 V (worst case 4.950 V … 5.050 V)" in out
    assert "licensed practice" in out  # the safety cautions
    assert "marked 220" in out  # how to recognise L-A


def test_sense_resistor_scales_the_ripple(db: Path) -> None:
    # 0.2777 A p-p across 50 mohm = 13.9 mV p-p.
    r = kb(db, "pick", "bench-5v", "--sense", "50mohm")
    assert r.exit_code == 0, r.output
    assert "13.9 mV p-p across 50.0 mΩ" in r.stdout


@pytest.mark.parametrize("fmt", ["csv", "md", "html"])
def test_formats_to_file(db: Path, tmp_path: Path, fmt: str) -> None:
    out = tmp_path / f"pick.{fmt}"
    r = kb(db, "pick", "bench-5v", "--format", fmt, "--out", str(out))
    assert r.exit_code == 0, r.output
    text = out.read_text(encoding="utf-8")
    assert "L-A" in text
    if fmt == "csv":
        rows = list(csv.reader(io.StringIO(text)))
        assert rows[0][0] == "section" and any(row[0] == "bring-up" for row in rows)
        assert all(not c.startswith(("=", "+", "-", "@")) for row in rows for c in row)
    elif fmt == "md":
        assert text.startswith("# Pick list") and "## Bring-up sheet" in text
    else:
        assert text.startswith("<!DOCTYPE html>") and "<script" not in text


def test_use_overrides_a_role(db: Path) -> None:
    r = kb(db, "pick", "bench-5v", "--use", "inductor=L-B")
    assert r.exit_code == 0, r.output
    line = next(ln for ln in r.stdout.splitlines() if ln.startswith("inductor"))
    assert "L-B" in line and "unverified" in line
    assert "chosen by --use" in r.stdout


@pytest.mark.parametrize(
    ("args", "code", "words"),
    [
        (["--use", "inductor"], 1, "expected ROLE=LABEL"),
        (["--use", "inductor=R-X"], 4, "not a candidate for role 'inductor'"),
        (["--use", "flux=L-A"], 4, "has no role 'flux'"),
        (["--format", "pdf"], 1, "--format 'pdf'"),
        (["--sense", "10uF"], 3, "resistance"),
    ],
)
def test_bad_input(db: Path, args: list[str], code: int, words: str) -> None:
    before = snapshot(db)
    r = kb(db, "pick", "bench-5v", *args)
    assert r.exit_code == code, r.output
    assert r.stderr.startswith("kitbin: error: ") and words in r.stderr
    assert "Traceback" not in r.output
    assert snapshot(db) == before


def test_reserve_then_done(db: Path) -> None:
    r = kb(db, "pick", "bench-5v", "--boards", "3", "--reserve")
    assert r.exit_code == 0, r.output
    assert "Pick list #1" in r.stdout and "reserved" in r.stderr
    st = stock_of(db)
    for label in ("L-A", "D-1", "U-1", "R-TOP", "R-BOT"):
        assert st[label] == (10, 3)
    assert st["C-IN"] == (10, 6) and st["C-OUT"] == (10, 0)  # C-IN serves two roles
    assert query(db, "SELECT id, state, boards FROM pick_list") == [(1, "reserved", 3)]
    r = kb(db, "picks", "list", "--json")
    assert r.exit_code == 0 and '"state": "reserved"' in r.stdout
    moves_before = query(db, "SELECT count(*) FROM stock_move")[0][0]
    r = kb(db, "picks", "done", "1")
    assert r.exit_code == 0, r.output
    st = stock_of(db)
    for label in ("L-A", "D-1", "U-1", "R-TOP", "R-BOT"):
        assert st[label] == (7, 0)
    assert st["C-IN"] == (4, 0)
    moves = query(db, "SELECT delta, pick_list_id FROM stock_move WHERE pick_list_id = 1")
    assert len(moves) == 7 and all(d == -3 for d, _ in moves)
    assert query(db, "SELECT count(*) FROM stock_move")[0][0] == moves_before + 7
    assert query(db, "SELECT state FROM pick_list")[0][0] == "picked"
    # a second take is refused, one line, nothing changed
    before = snapshot(db)
    r = kb(db, "picks", "done", "1")
    assert r.exit_code == 5 and "is picked, not reserved" in r.stderr
    assert snapshot(db) == before


def test_reserve_then_cancel(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--reserve").exit_code == 0
    assert stock_of(db)["L-A"] == (10, 1)
    r = kb(db, "picks", "cancel", "1", "--json")
    assert r.exit_code == 0, r.output
    assert stock_of(db)["L-A"] == (10, 0)
    assert query(db, "SELECT state FROM pick_list")[0][0] == "cancelled"
    assert query(db, "SELECT count(*) FROM stock_move WHERE pick_list_id = 1")[0][0] == 0
    assert kb(db, "picks", "done", "1").exit_code == 5


def test_reserve_with_shortfall_writes_nothing(db: Path) -> None:
    # 11 boards need 11 of each part; every bin holds 10: the best bin for one board is
    # chosen, with its shortfall, and reserving is refused.
    before = snapshot(db)
    r = kb(db, "pick", "bench-5v", "--boards", "11", "--reserve")
    assert r.exit_code == 5, r.output
    assert "cannot reserve" in r.stderr and "short by 1" in r.stderr
    assert snapshot(db) == before
    assert query(db, "SELECT count(*) FROM pick_list")[0][0] == 0
    # without --reserve the list prints, with the shortfall shown
    r = kb(db, "pick", "bench-5v", "--boards", "11")
    assert r.exit_code == 0 and "SHORTFALL" in r.stdout


def test_unknown_pick_list(db: Path) -> None:
    r = kb(db, "picks", "done", "42")
    assert r.exit_code == 4 and "no pick list 42" in r.stderr


def test_demo_tour_step(tmp_path: Path) -> None:
    # The tour step on the invented demo workshop: it saves the demo plan when missing,
    # ranks the inductors with reasons, and prints a pick list with its bring-up sheet.
    from kitbin.services.demo import build_demo
    from kitbin.services.picking import DEMO_PLAN, tour_match_and_pick
    from kitbin.store import open_store

    url = str(tmp_path / "demo.sqlite")
    build_demo(url, force=True)
    with open_store(url) as store:
        section = tour_match_and_pick(store)
    text = "\n".join(section.lines)
    assert "invented" in section.title
    assert f"kitbin match {DEMO_PLAN} --role inductor" in text
    assert "1. L-" in text and "feedback divider" in text
    assert "bring-up sheet:" in text and "duty cycle at Vin" in text
    assert "licensed practice" in text
    assert query(tmp_path / "demo.sqlite", "SELECT name FROM plan") == [(DEMO_PLAN,)]


def test_unwritable_out_reserves_nothing(db: Path, tmp_path: Path) -> None:
    before = snapshot(db)
    out = tmp_path / "no-such-folder" / "pick.html"
    r = kb(db, "pick", "bench-5v", "--reserve", "--format", "html", "--out", str(out))
    assert r.exit_code == 1 and "cannot write" in r.stderr
    assert snapshot(db) == before

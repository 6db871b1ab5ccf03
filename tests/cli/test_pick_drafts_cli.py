"""``kitbin pick --save`` and ``kitbin picks reserve`` end to end: draft pick lists.

Inventory and plan: tests/cli/match_helpers.py (10 parts in every bin). With one
board the pick list takes L-A, D-1, U-1, R-TOP, R-BOT once each and C-IN twice (it
serves both capacitor roles), as in tests/cli/test_pick_cli.py.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from inventory_helpers import snapshot
from match_helpers import kb, query, stock_of

from kitbin.errors import ExitCode

ONCE = ("L-A", "D-1", "U-1", "R-TOP", "R-BOT")


@pytest.fixture
def db(match_db: Path) -> Path:
    return match_db


def _one_error(r, code: int) -> str:
    assert r.exit_code == code, r.output
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("kitbin: error: "), r.stderr
    assert "Traceback" not in r.output
    return lines[0]


def test_save_a_draft(db: Path) -> None:
    before = stock_of(db)
    r = kb(db, "pick", "bench-5v", "--boards", "2", "--save")
    assert r.exit_code == 0, r.output
    assert "Pick list #1" in r.stdout and "state draft" in r.stdout
    note = r.stderr.strip().splitlines()
    assert note == ["pick list 1 saved as a draft, no stock held; "
                    "reserve it with `kitbin picks reserve 1`"]  # fmt: skip
    assert stock_of(db) == before  # no stock held
    assert query(db, "SELECT id, state, boards FROM pick_list") == [(1, "draft", 2)]
    assert query(db, "SELECT count(*) FROM pick_line WHERE pick_list_id = 1")[0][0] == 7
    assert query(db, "SELECT count(*) FROM stock_move WHERE pick_list_id = 1")[0][0] == 0
    listed = json.loads(kb(db, "picks", "list", "--state", "draft", "--json").stdout)
    assert [(p["id"], p["state"]) for p in listed] == [(1, "draft")]


def test_save_json_keeps_the_documented_shape(db: Path) -> None:
    plain = json.loads(kb(db, "pick", "bench-5v", "--json").stdout)
    r = kb(db, "pick", "bench-5v", "--save", "--json")
    assert r.exit_code == 0, r.output
    saved = json.loads(r.stdout)
    assert set(saved) == set(plain)
    assert saved["state"] == "draft" and saved["pick_id"] == 1
    assert plain["state"] == "draft" and plain["pick_id"] is None
    assert saved["lines"] == plain["lines"]


def test_reserve_a_draft(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--boards", "3", "--save").exit_code == 0
    r = kb(db, "picks", "reserve", "1")
    assert r.exit_code == 0, r.output
    assert "L-A: reserved 3, 7 free (10 on hand, 3 reserved)" in r.stdout
    assert "C-IN: reserved 6, 4 free (10 on hand, 6 reserved)" in r.stdout
    assert r.stdout.strip().endswith("pick list 1 reserved")
    st = stock_of(db)
    for label in ONCE:
        assert st[label] == (10, 3)
    assert st["C-IN"] == (10, 6) and st["C-OUT"] == (10, 0)
    assert query(db, "SELECT state FROM pick_list WHERE id = 1") == [("reserved",)]
    assert query(db, "SELECT count(*) FROM stock_move WHERE pick_list_id = 1")[0][0] == 0
    # available = on hand - reserved, as kitbin pick shows it for the next list
    again = json.loads(kb(db, "pick", "bench-5v", "--json").stdout)
    assert {ln["bin"]: ln["available"] for ln in again["lines"]}["L-A"] == 10 - 3
    # then taken as any reserved list
    r = kb(db, "picks", "done", "1")
    assert r.exit_code == 0, r.output
    assert stock_of(db)["L-A"] == (7, 0) and stock_of(db)["C-IN"] == (4, 0)


def test_reserve_json(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--save").exit_code == 0
    r = kb(db, "picks", "reserve", "1", "--json")
    assert r.exit_code == 0, r.output
    out = json.loads(r.stdout)
    assert out["id"] == 1 and out["state"] == "reserved" and out["plan"] == "bench-5v"
    held = {h["bin"]: h for h in out["held"]}
    assert held["C-IN"] == {"bin": "C-IN", "reserved": 2, "on_hand": 10, "qty_reserved": 2,
                            "available": 8}  # fmt: skip
    assert set(held) == {*ONCE, "C-IN"}


def test_reserve_refused_when_the_bin_lost_its_freestock_of(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--boards", "3", "--save").exit_code == 0
    # meanwhile 8 parts of L-A go into another build: 2 left, the draft needs 3
    assert kb(db, "stock", "L-A", "-8", "--why", "another build").exit_code == 0
    before = snapshot(db)
    r = kb(db, "picks", "reserve", "1")
    line = _one_error(r, int(ExitCode.STOCK))
    assert "cannot reserve pick list 1: L-A has 2 free" in line and "stays a draft" in line
    assert snapshot(db) == before  # state still draft, nothing held, no move
    assert query(db, "SELECT state FROM pick_list WHERE id = 1") == [("draft",)]
    assert all(held == 0 for _qty, held in stock_of(db).values())


def test_reserving_twice_is_refused(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--save").exit_code == 0
    assert kb(db, "picks", "reserve", "1").exit_code == 0
    before = snapshot(db)
    line = _one_error(kb(db, "picks", "reserve", "1"), int(ExitCode.STOCK))
    assert "pick list 1 is reserved, not draft" in line
    assert snapshot(db) == before


def test_cancel_a_draft(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--save").exit_code == 0
    before = stock_of(db)
    moves = query(db, "SELECT count(*) FROM stock_move")
    r = kb(db, "picks", "cancel", "1")
    assert r.exit_code == 0, r.output
    assert r.stdout.strip() == "pick list 1 cancelled (a draft: no stock was held)"
    assert stock_of(db) == before
    assert query(db, "SELECT state FROM pick_list") == [("cancelled",)]
    assert query(db, "SELECT count(*) FROM stock_move") == moves  # no move
    # a cancelled draft cannot be reserved
    _one_error(kb(db, "picks", "reserve", "1"), int(ExitCode.STOCK))


def test_cancel_json_says_what_it_was(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--save").exit_code == 0
    out = json.loads(kb(db, "picks", "cancel", "1", "--json").stdout)
    assert out == {"id": 1, "state": "cancelled", "was": "draft", "released": []}


def test_done_on_a_draft_is_refused(db: Path) -> None:
    assert kb(db, "pick", "bench-5v", "--save").exit_code == 0
    before = snapshot(db)
    line = _one_error(kb(db, "picks", "done", "1"), int(ExitCode.STOCK))
    assert "pick list 1 is a draft" in line and "`kitbin picks reserve 1`" in line
    assert snapshot(db) == before


def test_draft_with_shortfall_is_saved_but_not_reserved(db: Path) -> None:
    r = kb(db, "pick", "bench-5v", "--boards", "11", "--save")
    assert r.exit_code == 0, r.output
    assert "SHORTFALL" in r.stdout and "state draft" in r.stdout
    before = snapshot(db)
    line = _one_error(kb(db, "picks", "reserve", "1"), int(ExitCode.STOCK))
    assert "cannot reserve pick list 1" in line and "cannot reserve 11" in line
    assert snapshot(db) == before


def test_save_and_reserve_together_is_a_usage_error(db: Path) -> None:
    before = snapshot(db)
    line = _one_error(kb(db, "pick", "bench-5v", "--save", "--reserve"), int(ExitCode.USAGE))
    assert "--save" in line and "--reserve" in line and "kitbin pick --help" in line
    assert snapshot(db) == before


@pytest.mark.parametrize(
    ("args", "code", "words"),
    [
        (["pick", "bench-5v", "--save", "--use", "flux=L-A"], 4, "has no role 'flux'"),
        (["pick", "no-plan", "--save"], 4, "no-plan"),
        (["picks", "reserve", "42"], 4, "no pick list 42"),
        (["picks", "reserve", "x"], 2, "Invalid value"),
    ],
)
def test_bad_input_writes_nothing(db: Path, args: list[str], code: int, words: str) -> None:
    before = snapshot(db)
    assert words in _one_error(kb(db, *args), code)
    assert snapshot(db) == before


def test_unwritable_out_saves_nothing(db: Path, tmp_path: Path) -> None:
    before = snapshot(db)
    out = tmp_path / "no-such-folder" / "pick.md"
    r = kb(db, "pick", "bench-5v", "--save", "--format", "md", "--out", str(out))
    assert "cannot write" in _one_error(r, 1)
    assert snapshot(db) == before


def test_use_label_in_any_case_is_stored_with_its_bin(db: Path) -> None:
    # --use finds a bin case-insensitively; the stored line must name that bin
    args = ["--use", "divider_top=r-top", "--use", "divider_bottom=r-bot", "--save"]
    assert kb(db, "pick", "bench-5v", *args).exit_code == 0
    rows = query(
        db,
        "SELECT l.role, b.label FROM pick_line l JOIN bin b ON b.id = l.bin_id "
        "WHERE l.role LIKE 'divider%' ORDER BY l.role",
    )
    assert rows == [("divider_bottom", "R-BOT"), ("divider_top", "R-TOP")]
    assert kb(db, "picks", "reserve", "1").exit_code == 0
    assert stock_of(db)["R-TOP"] == (10, 1)

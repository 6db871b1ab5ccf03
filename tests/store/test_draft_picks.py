"""Draft pick lists on each backend: saved without holding stock, reserved later in one
transaction, refused cleanly when the stock has moved, cancelled without moves, and
reserved exactly once when two benches try at the same moment.

The inventory and plan are those of ``test_picks_concurrency.py``: seven bins of 40
parts, every role with one verified bin; C-1 serves both capacitor roles (2 per list).
"""

from __future__ import annotations

import multiprocessing as mp
import traceback
from typing import Any

import pytest
from sqlalchemy import func, select
from test_picks_concurrency import START, _populate

from kitbin.errors import NotFoundError, StockError
from kitbin.services import picking
from kitbin.store import open_store
from kitbin.store.models import Bin, PickLine, PickList, StockMove
from kitbin.store.stock import move_stock

USAGE = {"L-1": 1, "C-1": 2, "D-1": 1, "U-1": 1, "R-T": 1, "R-B": 1}
RACE_DRAFTS = 8


def _bins(store) -> dict[str, tuple[int, int]]:
    with store.transaction() as s:
        return {b.label: (b.qty, b.qty_reserved) for b in s.scalars(select(Bin))}


def _state(store, pick_id: int) -> str:
    with store.transaction() as s:
        return s.scalar(select(PickList.state).where(PickList.id == pick_id))


def _moves(store) -> int:
    with store.transaction() as s:
        return s.scalar(select(func.count()).select_from(StockMove))


def _everything(store) -> tuple:
    """Stock, pick lists and moves, for before/after comparisons."""
    with store.transaction() as s:
        lists = sorted(s.execute(select(PickList.id, PickList.state)).all())
        lines = s.execute(
            select(
                PickLine.id, PickLine.pick_list_id, PickLine.bin_id, PickLine.qty_total
            ).order_by(PickLine.id)
        ).all()
    return _bins(store), lists, lines, _moves(store)


@pytest.fixture
def shop(store):
    _populate(store)
    return store


def test_save_draft_stores_lines_and_holds_nothing(shop) -> None:
    before = _bins(shop)
    sheet = picking.save_draft(shop, "race", boards=3)
    assert sheet.state == "draft" and sheet.pick_id == 1 and sheet.complete
    assert _bins(shop) == before  # nothing held, nothing moved
    assert _moves(shop) == 0
    with shop.transaction() as s:
        pl = s.get(PickList, sheet.pick_id)
        assert pl.state == "draft" and pl.boards == 3
        assert pl.snapshot["state"] == "draft" and pl.snapshot["pick_id"] == sheet.pick_id
        labels = {b.id: b.label for b in s.scalars(select(Bin))}
        stored = {(ln.role, labels[ln.bin_id], ln.qty_total) for ln in pl.lines}
    assert stored == {(ln.role, ln.label, ln.qty_total) for ln in sheet.lines}
    assert all(total == 3 for _role, _label, total in stored)
    rows = picking.list_picks(shop, "draft")
    assert [r["id"] for r in rows] == [sheet.pick_id]


def test_reserve_draft_holds_the_saved_quantities(shop) -> None:
    sheet = picking.save_draft(shop, "race", boards=2)
    result = picking.reserve_draft(shop, sheet.pick_id)
    assert result["state"] == "reserved" and result["id"] == sheet.pick_id
    held = {h["bin"]: h for h in result["held"]}
    assert {k: v["reserved"] for k, v in held.items()} == {k: 2 * n for k, n in USAGE.items()}
    # available = on hand - reserved
    assert all(h["available"] == h["on_hand"] - h["qty_reserved"] for h in held.values())
    assert _bins(shop) == {k: (START, 2 * n) for k, n in USAGE.items()} | {"L-1": (START, 2)}
    assert _state(shop, sheet.pick_id) == "reserved"
    assert _moves(shop) == 0  # reserving moves no stock
    # and it is then taken like any reserved list
    taken = picking.take(shop, sheet.pick_id)
    assert taken["state"] == "picked"
    assert _bins(shop) == {k: (START - 2 * n, 0) for k, n in USAGE.items()}


def test_reserving_twice_is_refused(shop) -> None:
    pick_id = picking.save_draft(shop, "race").pick_id
    picking.reserve_draft(shop, pick_id)
    before = _everything(shop)
    with pytest.raises(StockError, match="is reserved, not draft"):
        picking.reserve_draft(shop, pick_id)
    assert _everything(shop) == before


def test_reserve_refused_when_a_bin_lost_its_free_stock(shop) -> None:
    pick_id = picking.save_draft(shop, "race", boards=2).pick_id  # C-1 needs 4
    with shop.transaction() as s:
        c1 = s.scalar(select(Bin.id).where(Bin.label == "C-1"))
        move_stock(s, c1, -(START - 3), "used on another build")  # 3 left
    before = _everything(shop)
    with pytest.raises(StockError) as caught:
        picking.reserve_draft(shop, pick_id)
    text = str(caught.value)
    assert "cannot reserve pick list 1" in text and "C-1 has 3 free" in text
    assert "\n" not in text
    # L-1 (a lower bin id) was held first inside the transaction: rolled back too
    assert _everything(shop) == before
    assert _state(shop, pick_id) == "draft"
    assert all(r == 0 for _q, r in _bins(shop).values())


def test_draft_with_shortfall_is_saved_and_its_reservation_refused(shop) -> None:
    sheet = picking.save_draft(shop, "race", boards=START + 1)
    assert not sheet.complete and sheet.shortfalls
    assert _state(shop, sheet.pick_id) == "draft"
    before = _everything(shop)
    with pytest.raises(StockError, match="cannot reserve pick list"):
        picking.reserve_draft(shop, sheet.pick_id)
    assert _everything(shop) == before


def test_draft_with_a_role_without_a_bin(shop) -> None:
    with shop.transaction() as s:
        s.delete(s.scalars(select(Bin).where(Bin.label == "D-1")).one())
    sheet = picking.save_draft(shop, "race")
    line = next(ln for ln in sheet.lines if ln.role == "catch_diode")
    assert line.label is None
    with shop.transaction() as s:
        stored = {ln.role: ln.bin_id for ln in s.get(PickList, sheet.pick_id).lines}
    assert stored["catch_diode"] is None  # stored with no bin
    listed = picking.list_picks(shop, "draft")[0]["lines"]
    assert {"role": "catch_diode", "bin": None, "total": 1} in listed
    before = _everything(shop)
    with pytest.raises(StockError, match="nothing chosen for catch_diode"):
        picking.reserve_draft(shop, sheet.pick_id)
    assert _everything(shop) == before
    # such a draft can still be cancelled
    assert picking.cancel(shop, sheet.pick_id)["state"] == "cancelled"


def test_take_refuses_a_draft(shop) -> None:
    pick_id = picking.save_draft(shop, "race").pick_id
    before = _everything(shop)
    with pytest.raises(StockError) as caught:
        picking.take(shop, pick_id)
    assert "is a draft" in str(caught.value)
    assert f"kitbin picks reserve {pick_id}" in str(caught.value)
    assert _everything(shop) == before


def test_cancel_a_draft_moves_nothing(shop) -> None:
    pick_id = picking.save_draft(shop, "race").pick_id
    before_bins = _bins(shop)
    result = picking.cancel(shop, pick_id)
    assert result == {"id": pick_id, "state": "cancelled", "was": "draft", "released": []}
    assert _bins(shop) == before_bins and _moves(shop) == 0
    assert _state(shop, pick_id) == "cancelled"
    before = _everything(shop)
    for action in (picking.reserve_draft, picking.take, picking.cancel):
        with pytest.raises(StockError, match="is cancelled"):
            action(shop, pick_id)
    assert _everything(shop) == before


def test_cancel_a_reserved_list_still_releases(shop) -> None:
    pick_id = picking.save_draft(shop, "race").pick_id
    picking.reserve_draft(shop, pick_id)
    result = picking.cancel(shop, pick_id)
    assert result["was"] == "reserved"
    assert {r["bin"]: r["released"] for r in result["released"]}["C-1"] == 1  # one per line
    assert all(r == 0 for _q, r in _bins(shop).values())


def test_unknown_pick_list(shop) -> None:
    with pytest.raises(NotFoundError, match="no pick list 9"):
        picking.reserve_draft(shop, 9)


def test_bad_input_saves_nothing(shop) -> None:
    from kitbin.errors import KitbinError

    before = _everything(shop)
    for kwargs in ({"boards": 0}, {"use": {"flux": "L-1"}}, {"sense": -1.0}):
        with pytest.raises(KitbinError):
            picking.save_draft(shop, "race", **kwargs)
    with pytest.raises(NotFoundError):
        picking.save_draft(shop, "no-such-plan")
    assert _everything(shop) == before


# -- two benches reserving the same drafts at once ---------------------------------------


def _reserver(url: str, index: int, ids: list[int], barrier: Any, results: Any) -> None:
    out: dict[str, Any] = {"index": index, "won": [], "refused": [], "escaped": []}
    store = open_store(url, create=False)
    for pick_id in ids:
        barrier.wait()  # both start each draft together
        try:
            picking.reserve_draft(store, pick_id)
            out["won"].append(pick_id)
        except StockError as error:
            out["refused"].append((pick_id, str(error)))
        except Exception:
            out["escaped"].append(traceback.format_exc(limit=4))
    store.close()
    results.put(out)


@pytest.mark.slow
def test_two_benches_reserve_one_draft(db_url: str) -> None:
    store = open_store(db_url)
    _populate(store)
    ids = [picking.save_draft(store, "race").pick_id for _ in range(RACE_DRAFTS)]
    store.close()

    ctx = mp.get_context("spawn")
    barrier = ctx.Barrier(2)
    results = ctx.Queue()
    procs = [ctx.Process(target=_reserver, args=(db_url, i, ids, barrier, results)) for i in (0, 1)]
    for p in procs:
        p.start()
    outs = [results.get(timeout=180) for _ in procs]
    for p in procs:
        p.join(timeout=30)
        assert p.exitcode == 0
    assert [e for o in outs for e in o["escaped"]] == []
    won = sorted(i for o in outs for i in o["won"])
    refused = [(i, text) for o in outs for i, text in o["refused"]]
    # every draft was reserved exactly once; the other bench was refused with one line
    assert won == ids
    assert sorted(i for i, _ in refused) == ids
    assert all("not draft" in text or "changed by someone else" in text for _, text in refused)

    store = open_store(db_url, create=False)
    try:
        assert all(_state(store, i) == "reserved" for i in ids)
        # stock held once per draft, none taken
        assert _bins(store) == {k: (START, n * RACE_DRAFTS) for k, n in USAGE.items()}
        assert _moves(store) == 0
    finally:
        store.close()

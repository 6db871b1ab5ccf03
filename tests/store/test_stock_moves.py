"""Stock moves: one conditional UPDATE each; a refused move changes nothing."""

from __future__ import annotations

import threading
from pathlib import Path

import pytest

from kitbin.errors import NotFoundError, StockError
from kitbin.store import open_store, queries
from kitbin.store.models import Bin, StockMove
from kitbin.store.stock import consume_reserved, move_stock, release, reserve


def _bin(store, qty: int, reserved: int = 0, label: str = "L-07") -> int:
    with store.transaction() as s:
        b = Bin(label=label, kind="inductor", qty=qty, qty_reserved=reserved)
        s.add(b)
        s.flush()
        return b.id


def _state(store, bin_id: int) -> tuple[int, int, list[tuple[int, int]]]:
    with store.transaction() as s:
        b = s.get(Bin, bin_id)
        return b.qty, b.qty_reserved, [(m.delta, m.qty_after) for m in b.moves]


def test_move_changes_quantity_and_logs_it(store) -> None:
    bin_id = _bin(store, 3)
    with store.transaction() as s:
        result = move_stock(s, bin_id, 4, "found more")
    assert (result.qty, result.delta) == (7, 4)
    with store.transaction() as s:
        result = move_stock(s, bin_id, -7, "used")
    assert _state(store, bin_id) == (0, 0, [(4, 7), (-7, 0)])


def test_refused_move_names_the_bin_and_changes_nothing(store) -> None:
    bin_id = _bin(store, 3, reserved=1)
    with store.transaction() as s:
        s.add(StockMove(bin_id=bin_id, delta=3, reason="start", qty_after=3))
    before = _state(store, bin_id)
    with pytest.raises(StockError) as info, store.transaction() as s:
        move_stock(s, bin_id, -5, "too many")
    assert str(info.value) == "L-07 has 3 on hand (1 reserved); cannot take 5"
    # Taking 3 would leave 0 while 1 is reserved: refused too.
    with pytest.raises(StockError), store.transaction() as s:
        move_stock(s, bin_id, -3, "into the reservation")
    assert _state(store, bin_id) == before


def test_zero_and_reasonless_moves_are_refused(store) -> None:
    bin_id = _bin(store, 3)
    for delta, why in ((0, "nothing"), (-1, "  ")):
        with pytest.raises(StockError), store.transaction() as s:
            move_stock(s, bin_id, delta, why)
    assert _state(store, bin_id) == (3, 0, [])


def test_unknown_bin_is_not_found(store) -> None:
    with pytest.raises(NotFoundError), store.transaction() as s:
        move_stock(s, 999, -1, "x")


def test_reserve_release_and_consume(store) -> None:
    bin_id = _bin(store, 5)
    with store.transaction() as s:
        assert reserve(s, bin_id, 3).qty_reserved == 3
    with pytest.raises(StockError, match="2 free"), store.transaction() as s:
        reserve(s, bin_id, 3)
    with store.transaction() as s:
        assert release(s, bin_id, 1).qty_reserved == 2
    with pytest.raises(StockError), store.transaction() as s:
        release(s, bin_id, 3)
    with store.transaction() as s:
        result = consume_reserved(s, bin_id, 2, "picked for 2 boards")
    assert (result.qty, result.qty_reserved) == (3, 0)
    with pytest.raises(StockError), store.transaction() as s:
        consume_reserved(s, bin_id, 1, "nothing reserved")
    assert _state(store, bin_id) == (3, 0, [(-2, 3)])


def test_loaded_bin_sees_the_new_quantity(store) -> None:
    bin_id = _bin(store, 2)
    with store.transaction() as s:
        b = s.get(Bin, bin_id)
        move_stock(s, bin_id, 5, "restock")
        assert b.qty == 7


def test_concurrent_takes_never_oversell(tmp_path: Path) -> None:
    # 4 threads x 40 takes of 1 from a stock of 100, each with its own engine:
    # exactly 100 succeed, 60 are refused, nothing escapes, and the log adds up.
    url = str(tmp_path / "inv.sqlite")
    first = open_store(url)
    bin_id = _bin(first, 100)
    outcomes: list[str] = []
    lock = threading.Lock()

    def worker() -> None:
        store = open_store(url)
        try:
            for _ in range(40):
                try:
                    with store.transaction() as s:
                        move_stock(s, bin_id, -1, "take one")
                    outcome = "ok"
                except StockError:
                    outcome = "refused"
                with lock:
                    outcomes.append(outcome)
        finally:
            store.close()

    threads = [threading.Thread(target=worker) for _ in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert outcomes.count("ok") == 100 and outcomes.count("refused") == 60
    qty, _reserved, moves = _state(first, bin_id)
    assert qty == 0 and len(moves) == 100
    with first.transaction() as s:
        assert queries.counts(s)["stock_move"] == 100
    first.close()

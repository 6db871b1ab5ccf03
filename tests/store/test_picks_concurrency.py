"""Several benches finishing and cancelling the same pick lists at once, on each backend.

Twelve pick lists of one plan each reserve parts from the same seven bins. Four
workers (multiprocessing, spawn: each a fresh interpreter with its own engine) then
race through all twelve lists in different orders, each trying ``picks done`` on
some and ``picks cancel`` on others, as four benches would. Every list must end
exactly once, picked or cancelled; a late attempt is a clean ``StockError``. After
the race: every bin's quantity is its start minus what the picked lists took, no
part stays reserved, and the move log has exactly one move per line of each picked
list (carrying its id) and none for a cancelled one.
"""

from __future__ import annotations

import multiprocessing as mp
import random
import traceback
from typing import Any

import pytest
from sqlalchemy import select

from kitbin.stage.spec import Spec
from kitbin.store import open_store
from kitbin.store.models import Bin, BinProperty, PickList, Plan, Reading, StockMove

WORKERS = 4
LISTS = 12
START = 40
SEED = 424242


def _populate(store) -> None:
    """A tiny inventory where every role of the plan has one verified bin."""
    bins = {
        "L-1": ("inductor", 22e-6, 0.2, {"inductance": 22e-6, "dcr": 0.05, "isat_20": 2.4,
                                          "i_rise": 2.5}, {}),
        "C-1": ("capacitor", 22e-6, 0.2, {"capacitance": 18e-6, "esr": 0.005},
                {"rated_voltage": 50.0, "i_ripple": 2.0}),
        "D-1": ("diode", None, None, {}, {"vrrm": 40.0, "if_avg": 3.0, "if_peak": 10.0,
                                          "rated_power": 1.0}),
        "U-1": ("controller", None, None, {}, {"vref": 0.8, "fsw": 500e3, "ilim": 1.8,
                                               "vin_min": 4.5, "vin_max": 28.0,
                                               "d_max": 0.9, "ton_min": 100e-9}),
        "R-T": ("resistor", 52.3e3, 0.01, {"resistance": 52.5e3}, {}),
        "R-B": ("resistor", 10e3, 0.01, {"resistance": 10.0e3}, {}),
    }  # fmt: skip
    spec = Spec("buck", 12.0, 12.0, 5.0, 1.0, 500e3, vref=0.8, vref_tol=0.01, ilim=1.8,
                ton_min=100e-9, d_max=0.9)  # fmt: skip
    with store.transaction() as s:
        for label, (kind, nom, tol, reads, props) in bins.items():
            b = Bin(label=label, kind=kind, nominal=nom, tol_minus=tol, tol_plus=tol,
                    qty=START, qty_reserved=0, location="bench")  # fmt: skip
            s.add(b)
            s.flush()
            for q, v in reads.items():
                s.add(Reading(bin_id=b.id, quantity=q, value=v, bound="=", conditions={}))
            for q, v in props.items():
                s.add(BinProperty(bin_id=b.id, name=q, value=v, source="datasheet"))
        s.add(Plan(name="race", topology="buck", spec=spec.to_dict()))


def _worker(url: str, index: int, ids: list[int], barrier: Any, results: Any) -> None:
    from kitbin.errors import StockError
    from kitbin.services import picking

    out: dict[str, Any] = {"index": index, "picked": [], "cancelled": [], "refused": 0,
                           "escaped": []}  # fmt: skip
    store = open_store(url, create=False)
    order = list(ids)
    random.Random(SEED + index).shuffle(order)
    barrier.wait()
    for pick_id in order:
        try:
            if (pick_id + index) % 3 == 0:
                picking.cancel(store, pick_id)
                out["cancelled"].append(pick_id)
            else:
                picking.take(store, pick_id)
                out["picked"].append(pick_id)
        except StockError:
            out["refused"] += 1
        except Exception:
            out["escaped"].append(traceback.format_exc(limit=4))
    store.close()
    results.put(out)


@pytest.mark.slow
def test_picks_done_and_cancel_race(db_url: str) -> None:
    from kitbin.services import picking

    store = open_store(db_url)
    _populate(store)
    ids = []
    usage: dict[str, int] = {}
    for _ in range(LISTS):
        sheet, chosen, m = picking.build_sheet(store, "race", boards=1)
        assert sheet.complete, [ln.note for ln in sheet.lines if not ln.label]
        ids.append(picking.reserve_sheet(store, sheet, chosen, m.plan_id))
    for ln in sheet.lines:
        usage[ln.label] = usage.get(ln.label, 0) + ln.qty_total
    # C-1 serves both capacitor roles: 2 per list; every other bin 1
    assert usage == {"L-1": 1, "C-1": 2, "D-1": 1, "U-1": 1, "R-T": 1, "R-B": 1}
    store.close()

    ctx = mp.get_context("spawn")
    barrier = ctx.Barrier(WORKERS)
    results = ctx.Queue()
    procs = [
        ctx.Process(target=_worker, args=(db_url, i, ids, barrier, results)) for i in range(WORKERS)
    ]
    for p in procs:
        p.start()
    outs = [results.get(timeout=180) for _ in range(WORKERS)]
    for p in procs:
        p.join(timeout=30)
        assert p.exitcode == 0
    assert [e for o in outs for e in o["escaped"]] == []
    picked = sorted(i for o in outs for i in o["picked"])
    cancelled = sorted(i for o in outs for i in o["cancelled"])
    # each list ended exactly once, and everyone else was refused cleanly
    assert sorted(picked + cancelled) == ids
    assert sum(o["refused"] for o in outs) == WORKERS * LISTS - LISTS

    store = open_store(db_url, create=False)
    try:
        with store.transaction() as s:
            states = dict(s.execute(select(PickList.id, PickList.state)).all())
            assert {i for i, st in states.items() if st == "picked"} == set(picked)
            assert {i for i, st in states.items() if st == "cancelled"} == set(cancelled)
            for b in s.scalars(select(Bin)):
                assert b.qty == START - usage[b.label] * len(picked), b.label
                assert b.qty_reserved == 0, b.label
                moves = s.execute(
                    select(StockMove.delta, StockMove.pick_list_id, StockMove.qty_after)
                    .where(StockMove.bin_id == b.id)
                    .order_by(StockMove.id)
                ).all()
                # one move per line of each picked list, none for a cancelled one
                per_list: dict[int, int] = {}
                for delta, pl_id, _after in moves:
                    assert pl_id in set(picked)
                    per_list[pl_id] = per_list.get(pl_id, 0) + delta
                assert per_list == {i: -usage[b.label] for i in picked}
                # qty_after runs down consistently in log order
                running = START
                for delta, _pl, after in moves:
                    running += delta
                    assert after == running
    finally:
        store.close()

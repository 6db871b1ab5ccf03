"""The plan view saves a pick list as a draft (S, no stock held), and tab 5 reserves the
highlighted draft (R), as ``kitbin pick --save`` and ``kitbin picks reserve`` do."""

from __future__ import annotations

import asyncio

from pilot_steps import until as _until

from kitbin.services import picking
from kitbin.services.picking import DEMO_PLAN
from kitbin.store import open_store
from kitbin.tui.app import make_app


def _state(db: str, pick_id: int) -> str | None:
    with open_store(db) as store:
        rows = picking.list_picks(store)
    return next((r["state"] for r in rows if r["id"] == pick_id), None)


def _held(db: str) -> int:
    from sqlalchemy import func, select

    from kitbin.store.models import Bin

    with open_store(db) as store, store.transaction() as s:
        return int(s.scalar(select(func.sum(Bin.qty_reserved))) or 0)


def test_save_a_draft_then_reserve_it_on_the_stored_tab(demo_db: str) -> None:
    held_before = _held(demo_db)

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(120, 40)) as pilot:
            await _until(pilot, lambda: bool(app.shelf.rows))
            await pilot.press("p")
            await _until(pilot, lambda: type(app.screen).__name__ == "PlanScreen")
            plans = app.screen
            table = plans.query_one("#plan-list")
            await _until(pilot, lambda: table.row_count > 0)
            while table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value != DEMO_PLAN:
                await pilot.press("down")
            await pilot.press("enter")
            await _until(pilot, lambda: plans.page is not None)
            await pilot.press("S")
            await _until(pilot, lambda: plans.page["sheet"].state == "draft")
            pick_id = plans.page["sheet"].pick_id
            assert pick_id is not None
            assert "state draft" in str(plans.query_one("#plan-sheet").content)
            assert _state(demo_db, pick_id) == "draft"
            assert _held(demo_db) == held_before  # a draft holds nothing
            # tab 5: the draft is listed; R reserves the highlighted one
            await pilot.press("5")
            picks = plans.query_one("#plan-picks")
            await _until(pilot, lambda: picks.row_count > 0)
            key = picks.coordinate_to_cell_key(picks.cursor_coordinate).row_key.value
            assert key == str(pick_id)  # newest first
            await pilot.press("R")
            await _until(pilot, lambda: _state(demo_db, pick_id) == "reserved")
            assert _held(demo_db) > held_before
            # R again: refused with one line, nothing changed
            held = _held(demo_db)
            await pilot.press("R")
            await _until(pilot, lambda: any(n.severity == "error" for n in app._notifications))
            errors = [n.message for n in app._notifications if n.severity == "error"]
            assert len(errors) == 1 and "not draft" in errors[0] and "\n" not in errors[0]
            assert _held(demo_db) == held

    asyncio.run(scenario())

"""The app driven with Textual's Pilot: each flow once, at 80×24 and larger.

Database work runs in thread workers, so each step waits for its result to land.
"""

from __future__ import annotations

import asyncio
from pathlib import Path

from pilot_steps import on_screen as _screen
from pilot_steps import shelf_ready as _shelf_ready
from pilot_steps import until as _until

from kitbin.services import inventory
from kitbin.store import open_store, queries
from kitbin.tui.app import make_app
from kitbin.tui.widgets.shelf.grid import ShelfGrid


def _demo_capture(name: str) -> str:
    from importlib import resources

    return str(resources.files("kitbin.demo.captures").joinpath(name))


def test_filter_the_shelf_and_open_a_bin(demo_db: str) -> None:
    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            grid = await _shelf_ready(app, pilot)
            total = len(grid.shown)
            await pilot.press("slash", *"ind >=2A")
            await pilot.pause()
            shown = [grid.rows[i] for i in grid.shown]
            assert 0 < len(shown) < total
            assert all(r.kind == "inductor" and r.slots[2].number >= 2.0 for r in shown)
            await pilot.press("escape", "s", "s", "s", "s", "s", "S")  # sort by Isat, high first
            await pilot.pause()
            numbers = [grid.rows[i].slots[2].number for i in grid.shown]
            assert numbers == sorted(numbers, reverse=True)
            first = grid.current.label
            await pilot.press("enter")
            await _until(pilot, lambda: _screen(app, "BinScreen") and app.screen.page is not None)
            assert app.screen.label == first
            head = str(app.screen.query_one("#bin-head").content)
            assert first in head and "on hand" in head
            await pilot.press("question_mark")
            await _until(pilot, lambda: _screen(app, "HelpScreen"))
            await pilot.press("escape", "escape")
            await _until(pilot, lambda: _screen(app, "ShelfScreen"))

    asyncio.run(scenario())


def _reading_count(db: str, label: str) -> int:
    with open_store(db) as store:
        return len(inventory.show_bin(store, label)["readings"])


def test_record_a_reading_and_refuse_a_wrong_unit(demo_db: str) -> None:
    before = _reading_count(demo_db, "L-05")

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            await _shelf_ready(app, pilot)
            await pilot.press("slash", *"L-05", "enter", "r")
            await _until(pilot, lambda: _screen(app, "RecordScreen"))
            # a capacitance typed for the inductance: shown red, nothing written
            await pilot.press(*"10uF")
            await pilot.pause()
            check = str(app.screen.query_one("#record-check-1").content)
            assert "capacitance" in check
            await pilot.press("ctrl+s")
            await pilot.pause()
            assert _screen(app, "RecordScreen")
            assert "nothing written" in str(app.screen.query_one("#record-problems").content)
            assert _reading_count(demo_db, "L-05") == before
            # corrected: 9.7 µH on specimen 4 at 100 kHz with an LCR meter (set, not
            # typed: the keystroke checks were exercised above)
            fields = {"value-1": "9.7uH", "specimen": "4", "conditions": "freq=100kHz"}
            for field, text in fields.items():
                app.screen.query_one(f"#record-{field}").value = text
            await pilot.pause()
            assert "9.70 µH" in str(app.screen.query_one("#record-check-1").content)
            app.screen.query_one("#record-method").value = "LCR meter"
            await pilot.press("ctrl+s")
            await _until(pilot, lambda: _screen(app, "ShelfScreen"))

    asyncio.run(scenario())
    with open_store(demo_db) as store:
        readings = inventory.show_bin(store, "L-05")["readings"]
    assert len(readings) == before + 1
    new = readings[-1]
    assert new["quantity"] == "inductance" and abs(new["value"] - 9.7e-6) < 1e-12
    assert new["specimen"] == 4 and new["method"] == "LCR meter"
    assert new["conditions"] == {"freq": 100000.0}


def test_analyse_a_demo_capture_and_save_it(demo_db: str) -> None:
    with open_store(demo_db) as store, store.transaction() as session:
        captures_before = queries.counts(session)["capture"]

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(100, 40)) as pilot:
            await _shelf_ready(app, pilot)
            await pilot.press("slash", *"L-04", "enter", "c")
            await _until(pilot, lambda: _screen(app, "CaptureScreen"))
            fields = {
                "file": _demo_capture("L-05_switching_ramps.csv"),
                "sense": "0.1ohm",
                "vl": "9V",
                "r_loop": "0.25ohm",
            }
            for field, text in fields.items():
                app.screen.query_one(f"#capture-{field}").value = text
            await pilot.press("ctrl+a")
            await _until(pilot, lambda: app.screen.analysed is not None)
            results = str(app.screen.query_one("#capture-results").content)
            assert (
                "not saved yet" in results and "Isat20%" in results and "L0 (low bias)" in results
            )
            with open_store(demo_db) as store, store.transaction() as session:
                assert queries.counts(session)["capture"] == captures_before
            await pilot.press("ctrl+s")
            await _until(pilot, lambda: _screen(app, "ShelfScreen"))

    asyncio.run(scenario())
    with open_store(demo_db) as store:
        page = inventory.show_bin(store, "L-04")
    assert [c["file_name"] for c in page["captures"]][-1] == "L-05_switching_ramps.csv"
    assert any(r["method"] == "ramp" for r in page["readings"])


def test_plan_ranked_export_and_reserve(demo_db: str, tmp_path: Path) -> None:
    out = tmp_path / "t5v-pick.md"

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(120, 40)) as pilot:
            await _shelf_ready(app, pilot)
            await pilot.press("p")
            await _until(pilot, lambda: _screen(app, "PlanScreen"))
            await pilot.press("n")
            await _until(pilot, lambda: _screen(app, "NewPlanScreen"))
            await pilot.press(*"t5v", "enter", *"buck", "enter")  # typed, enter moves on
            fields = {"vin": "11..15V", "vout": "5V", "iout": "1A", "fsw": "500kHz", "vref": "0.8V"}
            for field, text in fields.items():
                app.screen.query_one(f"#plan-field-{field}").value = text
            await pilot.press("ctrl+s")
            await _until(pilot, lambda: _screen(app, "PlanScreen") and app.screen.page is not None)
            plans = app.screen
            ranked = plans.query_one("#plan-ranked")
            assert ranked.row_count > 0
            reasons = str(plans.query_one("#plan-reasons").content)
            assert "needs" in reasons  # every check says what was needed and what the bin has
            # the input capacitor has a shortfall: step to it and use its best bin anyway
            roles = plans._roles()
            steps = roles.index("input_capacitor") - plans.role_index
            await pilot.press(*["right_square_bracket"] * steps)
            await pilot.pause()
            assert "input_capacitor" in str(plans.query_one("#plan-role").content)
            await pilot.press("u")
            await _until(pilot, lambda: "input_capacitor" in plans.page["use"])
            assert not plans.page["sheet"].shortfalls
            await pilot.press("e")
            await _until(pilot, lambda: _screen(app, "ExportScreen"))
            await pilot.click("#export-path")
            path_box = app.screen.query_one("#export-path")
            path_box.value = str(out)
            await pilot.press("ctrl+s")
            await _until(pilot, lambda: out.exists())
            await pilot.press("R")
            await _until(pilot, lambda: plans.page["sheet"].state == "reserved")
            pick_id = plans.page["sheet"].pick_id
            free_before = _stock(demo_db, "C-226")[0]
            # take the parts: tab 5 lists the stored pick lists, T takes the highlighted one
            await pilot.press("5")
            picks = plans.query_one("#plan-picks")
            await _until(pilot, lambda: picks.row_count > 0)
            while picks.coordinate_to_cell_key(picks.cursor_coordinate).row_key.value != str(
                pick_id
            ):
                await pilot.press("down")
            await pilot.press("T")
            await _until(pilot, lambda: _stock(demo_db, "C-226")[0] == free_before - 1)

    asyncio.run(scenario())
    text = out.read_text(encoding="utf-8")
    assert "t5v" in text and "input_capacitor" in text
    with open_store(demo_db) as store:
        from kitbin.services import picking

        picks = picking.list_picks(store, "picked")
    assert len([p for p in picks if p["plan"] == "t5v"]) == 1


def _stock(db: str, label: str) -> tuple[int, int]:
    with open_store(db) as store:
        page = inventory.show_bin(store, label)
    return page["qty"], len(page["moves"])


def test_stock_change_and_a_refused_take(demo_db: str) -> None:
    qty, moves = _stock(demo_db, "L-05")

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            await _shelf_ready(app, pilot)
            await pilot.press("slash", *"L-05", "enter", "a")
            await _until(pilot, lambda: _screen(app, "StockScreen"))
            await pilot.press(*f"-{qty + 100}", "enter", *"counted", "enter")
            await _until(pilot, lambda: any(n.severity == "error" for n in app._notifications))
            errors = [n.message for n in app._notifications if n.severity == "error"]
            assert len(errors) == 1 and "\n" not in errors[0] and "Traceback" not in errors[0]
            assert _screen(app, "StockScreen") and _stock(demo_db, "L-05") == (qty, moves)
            app.screen.query_one("#stock-delta").value = "+5"
            await pilot.press("ctrl+s")
            await _until(pilot, lambda: _screen(app, "ShelfScreen"))
            await _until(pilot, lambda: app.shelf.query_one(ShelfGrid).current.qty == qty + 5)

    asyncio.run(scenario())
    assert _stock(demo_db, "L-05") == (qty + 5, moves + 1)


def test_a_new_user_adds_a_bin_to_an_empty_database(tmp_path: Path) -> None:
    db = str(tmp_path / "new.sqlite")

    async def scenario() -> None:
        app = make_app(db)
        async with app.run_test(size=(80, 24)) as pilot:
            await _until(pilot, lambda: app.store is not None)
            await _until(
                pilot, lambda: "no bins yet" in str(app.shelf.query_one("#shelf-status").content)
            )
            await pilot.press("n")
            await _until(pilot, lambda: _screen(app, "NewBinScreen"))
            for text in ("L-21", "inductor", "100"):  # typed; enter moves to the next field
                await pilot.press(*text, "enter")
            app.screen.query_one("#newbin-qty").value = "12"
            await pilot.press("ctrl+s")
            await _until(pilot, lambda: _screen(app, "ShelfScreen"))
            await _until(pilot, lambda: len(app.shelf.rows) == 1)
            assert app.shelf.rows[0].nominal.text == "10.0µH"  # from the numeric code 100

    asyncio.run(scenario())
    with open_store(db) as store:
        page = inventory.show_bin(store, "L-21")
    assert page["qty"] == 12 and page["marking"] == "100" and len(page["moves"]) == 1

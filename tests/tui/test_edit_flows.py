"""Adding a kit from the kits dialog and editing a bin from the bin view, with Pilot at 80×24.

Each flow is checked against the database through the inventory service (what
``kitbin kit list`` and ``kitbin bin show`` print), and each refused input is checked
to leave the database as it was.
"""

from __future__ import annotations

import asyncio

from pilot_steps import on_screen, shelf_ready, until

from kitbin.services import inventory
from kitbin.store import open_store
from kitbin.tui.app import make_app


def _kits(db: str) -> dict[str, dict]:
    with open_store(db) as store:
        return {k["name"]: k for k in inventory.list_kits(store)}


def _bin(db: str, label: str) -> dict:
    with open_store(db) as store:
        data = inventory.show_bin(store, label)
    data.pop("updated_at", None)
    return data


def _problems(app, prefix: str) -> str:
    return _shown(app.screen.query_one(f"#{prefix}-problems"))


def _cursor_key(table) -> str:
    return table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value


def _shown(widget) -> str:
    """A Static's text as drawn (markup read, escapes gone)."""
    return widget.render().plain


def _errors(app) -> list[str]:
    return [n.message for n in app._notifications if n.severity == "error"]


def test_add_a_kit_then_a_bin_in_it(demo_db: str) -> None:
    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            await shelf_ready(app, pilot)
            await pilot.press("k")
            await until(pilot, lambda: on_screen(app, "KitsScreen"))
            kits = app.screen
            rows_before = kits.query_one("#kits-table").row_count
            await pilot.press("n")
            await until(pilot, lambda: on_screen(app, "NewKitScreen"))
            await pilot.press(*"bag [B]", "enter", *"bench fair", "enter")  # typed, enter moves on
            app.screen.query_one("#newkit-bought_on").value = "2026-03-14"
            app.screen.query_one("#newkit-notes").value = "mixed chokes, invented"
            await pilot.press("ctrl+s")
            await until(pilot, lambda: on_screen(app, "KitsScreen"))
            table = kits.query_one("#kits-table")
            await until(pilot, lambda: table.row_count == rows_before + 1)
            # the cursor lands on the new kit, and enter narrows the shelf to it
            await until(pilot, lambda: _cursor_key(table) == "bag [B]")
            await pilot.press("enter")
            await until(pilot, lambda: on_screen(app, "ShelfScreen"))
            assert app.shelf.query_one("#shelf-filter").value == "kit:bag_[b]"
            # the new-bin form takes the new kit
            await until(pilot, lambda: "bag [B]" in [k["name"] for k in app.shelf.kits])
            await pilot.press("n")
            await until(pilot, lambda: on_screen(app, "NewBinScreen"))
            fields = {"label": "L-90", "kind": "inductor", "nominal": "22uH", "kit": "bag [B]"}
            for field, text in fields.items():
                app.screen.query_one(f"#newbin-{field}").value = text
            await pilot.press("ctrl+s")
            await until(pilot, lambda: on_screen(app, "ShelfScreen"))
            await until(pilot, lambda: any(r.label == "L-90" for r in app.shelf.rows))

    asyncio.run(scenario())
    kit = _kits(demo_db)["bag [B]"]
    assert kit["source"] == "bench fair" and kit["bought_on"] == "2026-03-14"
    assert kit["notes"] == "mixed chokes, invented" and kit["bins"] == 1
    assert _bin(demo_db, "L-90")["kit"] == "bag [B]"


def test_a_taken_name_a_bad_date_or_no_name_writes_no_kit(demo_db: str) -> None:
    before = _kits(demo_db)
    taken = next(iter(before))

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            await shelf_ready(app, pilot)
            await pilot.press("k")
            await until(pilot, lambda: on_screen(app, "KitsScreen"))
            await pilot.press("n")
            await until(pilot, lambda: on_screen(app, "NewKitScreen"))
            form = app.screen
            name = form.query_one("#newkit-name")
            name.value = taken
            await pilot.press("ctrl+s")
            await until(pilot, lambda: "already exists" in _problems(app, "newkit"))
            assert _problems(app, "newkit").startswith("nothing written")
            errors = _errors(app)
            assert len(errors) == 1 and "\n" not in errors[0] and "Traceback" not in errors[0]
            name.value = "another bag"
            form.query_one("#newkit-bought_on").value = "2026-13-40"
            await pilot.pause()
            await pilot.press("ctrl+s")
            await until(pilot, lambda: "not a date" in _problems(app, "newkit"))
            name.value = "  "
            form.query_one("#newkit-bought_on").value = ""
            await pilot.pause()  # the edits clear the last problem line first
            await pilot.press("ctrl+s")
            await pilot.pause()
            assert "give the kit a name" in _problems(app, "newkit")
            assert on_screen(app, "NewKitScreen")
            await pilot.press("escape")
            await until(pilot, lambda: on_screen(app, "KitsScreen"))

    asyncio.run(scenario())
    assert _kits(demo_db) == before


def test_edit_a_bins_location_and_nominal(demo_db: str) -> None:
    before = _bin(demo_db, "L-05")
    assert before["nominal"] != 22e-6

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            await shelf_ready(app, pilot)
            await pilot.press("slash", *"L-05", "enter", "enter")
            await until(pilot, lambda: on_screen(app, "BinScreen") and app.screen.page is not None)
            view = app.screen
            await pilot.press("e")
            await until(pilot, lambda: on_screen(app, "EditBinScreen"))
            form = app.screen
            # filled from the bin: what edit_bin would keep
            assert form.query_one("#editbin-location").value == before["location"]
            assert form.query_one("#editbin-kit").value == before["kit"]
            form.query_one("#editbin-location").value = "drawer 9 [front]"
            nominal = form.query_one("#editbin-nominal")
            nominal.value = ""
            nominal.focus()
            await pilot.press(*"22uH")
            await pilot.pause()
            assert "22.0 µH" in _shown(form.query_one("#editbin-nominal-check"))
            await pilot.press("ctrl+s")
            await until(pilot, lambda: on_screen(app, "BinScreen"))
            await until(pilot, lambda: view.page is not None and view.page["nominal"] == 22e-6)
            head = _shown(view.query_one("#bin-head"))
            assert "drawer 9 [front]" in head and "22.0 µH" in head  # brackets shown as typed
            await pilot.press("escape")
            await until(pilot, lambda: on_screen(app, "ShelfScreen"))
            grid = app.shelf.query_one("ShelfGrid")
            await until(pilot, lambda: grid.current.location == "drawer 9 [front]")
            assert grid.current.label == "L-05" and grid.current.nominal.text.startswith("22.0µH")

    asyncio.run(scenario())
    after = _bin(demo_db, "L-05")
    assert after["location"] == "drawer 9 [front]" and abs(after["nominal"] - 22e-6) < 1e-15
    # only the two changed fields were written
    for key in ("location", "nominal"):
        before.pop(key), after.pop(key)
    assert after == before


def test_a_wrong_unit_or_an_unknown_kit_edits_nothing(demo_db: str) -> None:
    before = _bin(demo_db, "L-05")

    async def scenario() -> None:
        app = make_app(demo_db)
        async with app.run_test(size=(80, 24)) as pilot:
            await shelf_ready(app, pilot)
            await pilot.press("slash", *"L-05", "enter", "enter")
            await until(pilot, lambda: on_screen(app, "BinScreen") and app.screen.page is not None)
            await pilot.press("e")
            await until(pilot, lambda: on_screen(app, "EditBinScreen"))
            form = app.screen
            form.query_one("#editbin-location").value = "drawer 2"
            nominal = form.query_one("#editbin-nominal")
            nominal.value = ""
            nominal.focus()
            await pilot.press(*"10uF")  # a capacitance on an inductor
            await pilot.pause()
            check = _shown(form.query_one("#editbin-nominal-check"))
            assert "✗" in check and "capacitance" in check
            await pilot.press("ctrl+s")
            await pilot.pause()
            assert on_screen(app, "EditBinScreen")
            problems = _problems(app, "editbin")
            assert problems.startswith("nothing written") and "capacitance" in problems
            assert _bin(demo_db, "L-05") == before
            # a kit that does not exist: refused by the service, one line, nothing written
            nominal.value = "22uH"
            form.query_one("#editbin-kit").value = "no such kit"
            await pilot.pause()
            await pilot.press("ctrl+s")
            await until(pilot, lambda: "no kit named" in _problems(app, "editbin"))
            errors = _errors(app)
            assert len(errors) == 2 and all("\n" not in e for e in errors)
            await pilot.press("escape")
            await until(pilot, lambda: on_screen(app, "BinScreen"))

    asyncio.run(scenario())
    assert _bin(demo_db, "L-05") == before

"""Steps shared by the Pilot tests: wait for a worker's result to land, name the screen."""

from __future__ import annotations

from collections.abc import Callable

from kitbin.tui.widgets.shelf.grid import ShelfGrid


async def until(pilot, condition: Callable[[], bool], timeout: float = 10.0) -> None:
    """Let the app run until ``condition()`` holds (fail after ``timeout`` seconds)."""
    waited = 0.0
    while not condition():
        await pilot.pause(0.02)
        waited += 0.02
        assert waited < timeout, "the app did not get there in time"


def on_screen(app, name: str) -> bool:
    """True when the screen on top is of the class named ``name``."""
    return type(app.screen).__name__ == name


async def shelf_ready(app, pilot) -> ShelfGrid:
    """The shelf's grid once every bin was read."""
    await until(pilot, lambda: bool(app.shelf.rows))
    return app.shelf.query_one(ShelfGrid)

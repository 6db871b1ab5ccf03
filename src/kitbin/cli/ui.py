"""``kitbin ui``: the terminal UI over the same database as every other command."""

import typer

from kitbin.cli.common import state


def register(app: typer.Typer) -> None:
    """Add the ``ui`` command to the root app."""

    @app.command("ui")
    def ui(ctx: typer.Context) -> None:
        """Open the terminal UI: shelf, bins, readings, captures and plans.

        Keys are listed with ? in every screen; q on the shelf quits.

        Example: kitbin --db shop.sqlite ui
        """
        from kitbin.tui.app import make_app  # Textual costs ~160 ms: only when asked for

        make_app(state(ctx).db).run()

"""``kitbin kit add|list``: the assortments parts came in."""

import typer

from kitbin.cli.common import console, print_json, state


def _add_row(table, *cells: str) -> None:
    """Add a table row; cells are shown as typed (no rich markup in user text)."""
    from rich.markup import escape

    table.add_row(*(escape(c) for c in cells))


def register(app: typer.Typer) -> None:
    """Add the ``kit`` group to the root app."""
    kit_app = typer.Typer(help="Kits: assortments as bought.", no_args_is_help=True)

    @kit_app.command("add")
    def add(
        ctx: typer.Context,
        name: str = typer.Argument(..., help="Name of the kit."),
        source: str | None = typer.Option(None, "--source", help="Where it came from."),
        bought: str | None = typer.Option(None, "--bought", help="Date bought, YYYY-MM-DD."),
        notes: str | None = typer.Option(None, "--notes", help="Free text."),
        as_json: bool = typer.Option(False, "--json", help="Print the kit as JSON."),
    ) -> None:
        """Add a kit (an assortment as bought).

        Example: kitbin kit add "Drum inductors" --source "market stall" --bought 2026-03-01
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            kit = inventory.add_kit(store, name, source=source, bought_on=bought, notes=notes)
        if as_json:
            print_json(kit)
        else:
            typer.echo(f"added kit {kit['name']}")

    @kit_app.command("list")
    def list_(
        ctx: typer.Context,
        as_json: bool = typer.Option(False, "--json", help="Print the kits as JSON."),
    ) -> None:
        """List kits with their number of bins.

        Example: kitbin kit list --json
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            kits = inventory.list_kits(store)
        if as_json:
            print_json(kits)
            return
        from rich.table import Table

        table = Table(title="Kits", title_justify="left")
        for column in ("kit", "source", "bought", "bins", "notes"):
            table.add_column(column, justify="right" if column == "bins" else "left")
        for kit in kits:
            _add_row(
                table,
                kit["name"],
                kit["source"] or "",
                kit["bought_on"] or "",
                str(kit["bins"]),
                kit["notes"] or "",
            )
        console().print(table)

    app.add_typer(kit_app, name="kit")

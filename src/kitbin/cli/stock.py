"""``kitbin stock LABEL DELTA --why TEXT``: add or take parts, with the reason logged."""

import typer

from kitbin.cli.common import print_json, state


def register(app: typer.Typer) -> None:
    """Add the ``stock`` command to the root app."""

    # ignore_unknown_options lets "-5" through as the DELTA argument instead of being
    # taken for an option; allow_interspersed_args keeps --why usable after it.
    @app.command(
        "stock",
        context_settings={"ignore_unknown_options": True, "allow_interspersed_args": True},
    )
    def stock(
        ctx: typer.Context,
        label: str = typer.Argument(..., help="Bin label, e.g. L-07."),
        delta: int = typer.Argument(..., help="Parts added (e.g. 10) or taken (e.g. -5)."),
        why: str = typer.Option(..., "--why", help="Reason for the change (logged)."),
        as_json: bool = typer.Option(False, "--json", help="Print the result as JSON."),
    ) -> None:
        """Add parts to a bin (positive DELTA) or take them out (negative DELTA).

        The quantity can go neither below zero nor below what pick lists reserve;
        a refused move changes nothing.

        Example: kitbin stock L-07 -5 --why "used on the 5 V board"
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            result = inventory.adjust_stock(store, label, delta, why)
        if as_json:
            print_json(result)
            return
        held = f" ({result['qty_reserved']} reserved)" if result["qty_reserved"] else ""
        typer.echo(f"{result['label']}: {result['delta']:+d}, now {result['qty']} on hand{held}")

"""``kitbin record LABEL QUANTITY=VALUE ...``: readings taken on a bin's parts."""

from typing import Annotated

import typer

from kitbin.cli.common import print_json, state


def register(app: typer.Typer) -> None:
    """Add the ``record`` command to the root app."""

    @app.command("record")
    def record(
        ctx: typer.Context,
        label: Annotated[str, typer.Argument(help="Bin label, e.g. L-07.")],
        items: Annotated[
            list[str],
            typer.Argument(help="QUANTITY=VALUE, or QUANTITY>=VALUE for 'not reached up to'."),
        ],
        specimen: int | None = typer.Option(
            None, "--specimen", help="Number of the specimen measured (1, 2, ...)."
        ),
        at: Annotated[
            list[str] | None,
            typer.Option("--at", help="Test condition COND=VALUE, e.g. freq=100kHz (repeatable)."),
        ] = None,
        method: str | None = typer.Option(
            None, "--method", help="How it was measured, e.g. lcr, ramp, 4wire."
        ),
        instrument: str | None = typer.Option(None, "--instrument", help="What measured it."),
        note: str | None = typer.Option(None, "--note", help="Free text."),
        as_json: bool = typer.Option(False, "--json", help="Print the readings as JSON."),
    ) -> None:
        """Record one or more readings on a bin, all at once (all or none are stored).

        Quantities: inductance, dcr, isat_10/20/30, resistance, capacitance, esr, vf, ...
        (see docs/inventory.md). Conditions: freq, temp, bias, vbias, level.

        Example: kitbin record L-99 inductance=9.6uH dcr=31mohm --specimen 1 --at freq=100kHz
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            rows = inventory.record_readings(
                store,
                label,
                items,
                specimen=specimen,
                at=at or [],
                method=method,
                instrument=instrument,
                note=note,
            )
        if as_json:
            print_json(rows)
            return
        from kitbin.quantities import QUANTITIES
        from kitbin.units import format_quantity

        for r in rows:
            bound = "≥ " if r["bound"] == ">=" else ""
            value = format_quantity(r["value"], QUANTITIES[r["quantity"]].dimension)
            on = f" (specimen {r['specimen']})" if r["specimen"] is not None else ""
            typer.echo(f"{r['label']}: {r['quantity']} {bound}{value}{on}")

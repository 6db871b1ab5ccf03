"""``kitbin plan new|show|list|edit``: saved converter designs."""

import typer

from kitbin.cli.common import print_json, state
from kitbin.cli.specopts import spec_options


def register(app: typer.Typer) -> None:
    """Add the ``plan`` group to the root app."""
    plan_app = typer.Typer(help="Plans: saved converter designs.", no_args_is_help=True)

    @plan_app.command("new")
    @spec_options()
    def new(
        ctx: typer.Context,
        name: str = typer.Argument(..., help="Name of the plan."),
        from_file: str | None = typer.Option(None, "--from", help="Read the spec from TOML."),
        controller: str | None = typer.Option(
            None, "--controller", help="Controller bin whose properties fill the spec."
        ),
        notes: str | None = typer.Option(None, "--notes", help="Free text."),
        as_json: bool = typer.Option(False, "--json", help="Print the stored plan as JSON."),
        spec: dict[str, str | None] | None = None,
    ) -> None:
        """Save a plan: a TOML file (--from), then a controller's properties, then options.

        Example: kitbin plan new bench-5v --topology buck --vin 11..15V --vout 5.1V --iout 2.4A
        --fsw 500kHz --vref 0.8V
        """
        from kitbin.services import plans
        from kitbin.store import open_store

        updates = plans.parse_spec_texts(spec or {})
        with open_store(state(ctx).db) as store:
            plan = plans.new_plan(
                store, name, updates, from_file=from_file, controller=controller, notes=notes
            )
        if as_json:
            print_json(plan)
        else:
            typer.echo(f"saved plan {plan['name']} ({plan['topology']})")

    @plan_app.command("edit")
    @spec_options()
    def edit(
        ctx: typer.Context,
        name: str = typer.Argument(..., help="Name of the plan."),
        controller: str | None = typer.Option(
            None, "--controller", help="Controller bin whose properties fill the spec."
        ),
        notes: str | None = typer.Option(None, "--notes", help="Free text."),
        as_json: bool = typer.Option(False, "--json", help="Print the stored plan as JSON."),
        spec: dict[str, str | None] | None = None,
    ) -> None:
        """Change a saved plan; options given win, a new --controller fills the rest.

        Example: kitbin plan edit bench-5v --iout 3A --ripple 0.4
        """
        from kitbin.services import plans
        from kitbin.store import open_store

        updates = plans.parse_spec_texts(spec or {})
        with open_store(state(ctx).db) as store:
            plan = plans.edit_plan(store, name, updates, controller=controller, notes=notes)
        if as_json:
            print_json(plan)
        else:
            typer.echo(f"updated plan {plan['name']}")

    @plan_app.command("show")
    def show(
        ctx: typer.Context,
        name: str = typer.Argument(..., help="Name of the plan."),
        as_toml: bool = typer.Option(False, "--toml", help="Print the plan as TOML."),
        as_json: bool = typer.Option(False, "--json", help="Print corners and demands as JSON."),
    ) -> None:
        """Show a plan's corners (at the smallest allowed L) and its demands with reasons.

        Example: kitbin plan show bench-5v --json
        """
        from kitbin.services import plans
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            if as_toml:
                typer.echo(plans.plan_toml(store, name), nl=False)
                return
            report = plans.show_plan(store, name)
        if as_json:
            print_json(report)
            return
        from kitbin.cli.stage import CAUTION, print_report
        from kitbin.units import format_quantity

        title = (
            f"plan {report['name']}: {report['topology']}, corners at L_min = "
            f"{format_quantity(report['l_min_H'], 'H')}"
        )
        print_report(report, title)
        typer.echo(CAUTION, err=True)

    @plan_app.command("list")
    def list_(
        ctx: typer.Context,
        as_json: bool = typer.Option(False, "--json", help="Print the plans as JSON."),
    ) -> None:
        """List saved plans.

        Example: kitbin plan list
        """
        from kitbin.services import plans
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            rows = plans.list_plans(store)
        if as_json:
            print_json(rows)
            return
        from rich.table import Table

        from kitbin.cli.common import console

        table = Table(title="Plans", title_justify="left")
        for column in ("plan", "spec", "controller", "notes"):
            table.add_column(column)
        for row in rows:
            table.add_row(
                row["name"], row["summary"], row["spec"].get("controller") or "", row["notes"] or ""
            )
        console().print(table)

    app.add_typer(plan_app, name="plan")

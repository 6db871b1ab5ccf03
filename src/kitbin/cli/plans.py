"""``kitbin plan new|show|list|edit``: saved converter designs."""

from typing import Any

import typer

from kitbin.cli.common import print_json, state

_SPEC_HELP = {
    "--topology": "buck, boost or invert.",
    "--vin": "Input range, e.g. 11..15V.",
    "--vout": "Output voltage (magnitude for invert).",
    "--iout": "Full load.",
    "--iout-min": "Light load (default 10 % of --iout).",
    "--fsw": "Switching frequency.",
    "--vf": "Diode forward drop (default 0.4V).",
    "--rsw": "Switch on-resistance.",
    "--sync": "Synchronous rectifier with this low-side resistance.",
    "--rectifier": "diode or sync.",
    "--ripple": "Target r = ΔI/IL (default 0.3).",
    "--vout-ripple": "Allowed output ripple p-p.",
    "--vin-ripple": "Allowed input ripple p-p.",
    "--ambient": "Ambient temperature.",
    "--rise-max": "Allowed inductor rise.",
    "--isat-drop": "Isat criterion, 10/20/30 %.",
    "--isat-margin": "Isat as a multiple of the peak.",
    "--vout-tol": "Allowed output error.",
    "--ilim": "Controller current limit.",
    "--ton-min": "Controller minimum on-time.",
    "--d-max": "Controller maximum duty.",
    "--vref": "Controller reference voltage.",
    "--vref-tol": "Reference tolerance.",
    "--ifb": "Feedback-pin current.",
    "--ilim-gain": "Current-limit set gain (V): Ilim = gain / Rset.",
    "--ilim-target": "Current limit wanted from the set resistor.",
}


def _opt(name: str) -> Any:
    return typer.Option(None, name, help=_SPEC_HELP[name])


def _texts(values: dict[str, Any]) -> dict[str, str | None]:
    """Option name -> text, from a command's locals (parameter names as in _SPEC_HELP)."""
    out: dict[str, str | None] = {}
    for option in _SPEC_HELP:
        out[option] = values.get(option[2:].replace("-", "_"))
    return out


def register(app: typer.Typer) -> None:
    """Add the ``plan`` group to the root app."""
    plan_app = typer.Typer(help="Plans: saved converter designs.", no_args_is_help=True)

    @plan_app.command("new")
    def new(
        ctx: typer.Context,
        name: str = typer.Argument(..., help="Name of the plan."),
        from_file: str | None = typer.Option(None, "--from", help="Read the spec from TOML."),
        controller: str | None = typer.Option(
            None, "--controller", help="Controller bin whose properties fill the spec."
        ),
        notes: str | None = typer.Option(None, "--notes", help="Free text."),
        topology: str | None = _opt("--topology"),
        vin: str | None = _opt("--vin"),
        vout: str | None = _opt("--vout"),
        iout: str | None = _opt("--iout"),
        iout_min: str | None = _opt("--iout-min"),
        fsw: str | None = _opt("--fsw"),
        vf: str | None = _opt("--vf"),
        rsw: str | None = _opt("--rsw"),
        sync: str | None = _opt("--sync"),
        rectifier: str | None = _opt("--rectifier"),
        ripple: str | None = _opt("--ripple"),
        vout_ripple: str | None = _opt("--vout-ripple"),
        vin_ripple: str | None = _opt("--vin-ripple"),
        ambient: str | None = _opt("--ambient"),
        rise_max: str | None = _opt("--rise-max"),
        isat_drop: str | None = _opt("--isat-drop"),
        isat_margin: str | None = _opt("--isat-margin"),
        vout_tol: str | None = _opt("--vout-tol"),
        ilim: str | None = _opt("--ilim"),
        ton_min: str | None = _opt("--ton-min"),
        d_max: str | None = _opt("--d-max"),
        vref: str | None = _opt("--vref"),
        vref_tol: str | None = _opt("--vref-tol"),
        ifb: str | None = _opt("--ifb"),
        ilim_gain: str | None = _opt("--ilim-gain"),
        ilim_target: str | None = _opt("--ilim-target"),
        as_json: bool = typer.Option(False, "--json", help="Print the stored plan as JSON."),
    ) -> None:
        """Save a plan: a TOML file (--from), then a controller's properties, then options.

        Example: kitbin plan new bench-5v --topology buck --vin 11..15V --vout 5.1V --iout 2.4A
        --fsw 500kHz --vref 0.8V
        """
        from kitbin.services import plans
        from kitbin.store import open_store

        updates = plans.parse_spec_texts(_texts(locals()))
        with open_store(state(ctx).db) as store:
            plan = plans.new_plan(
                store, name, updates, from_file=from_file, controller=controller, notes=notes
            )
        if as_json:
            print_json(plan)
        else:
            typer.echo(f"saved plan {plan['name']} ({plan['topology']})")

    @plan_app.command("edit")
    def edit(
        ctx: typer.Context,
        name: str = typer.Argument(..., help="Name of the plan."),
        controller: str | None = typer.Option(
            None, "--controller", help="Controller bin whose properties fill the spec."
        ),
        notes: str | None = typer.Option(None, "--notes", help="Free text."),
        topology: str | None = _opt("--topology"),
        vin: str | None = _opt("--vin"),
        vout: str | None = _opt("--vout"),
        iout: str | None = _opt("--iout"),
        iout_min: str | None = _opt("--iout-min"),
        fsw: str | None = _opt("--fsw"),
        vf: str | None = _opt("--vf"),
        rsw: str | None = _opt("--rsw"),
        sync: str | None = _opt("--sync"),
        rectifier: str | None = _opt("--rectifier"),
        ripple: str | None = _opt("--ripple"),
        vout_ripple: str | None = _opt("--vout-ripple"),
        vin_ripple: str | None = _opt("--vin-ripple"),
        ambient: str | None = _opt("--ambient"),
        rise_max: str | None = _opt("--rise-max"),
        isat_drop: str | None = _opt("--isat-drop"),
        isat_margin: str | None = _opt("--isat-margin"),
        vout_tol: str | None = _opt("--vout-tol"),
        ilim: str | None = _opt("--ilim"),
        ton_min: str | None = _opt("--ton-min"),
        d_max: str | None = _opt("--d-max"),
        vref: str | None = _opt("--vref"),
        vref_tol: str | None = _opt("--vref-tol"),
        ifb: str | None = _opt("--ifb"),
        ilim_gain: str | None = _opt("--ilim-gain"),
        ilim_target: str | None = _opt("--ilim-target"),
        as_json: bool = typer.Option(False, "--json", help="Print the stored plan as JSON."),
    ) -> None:
        """Change a saved plan; options given win, a new --controller fills the rest.

        Example: kitbin plan edit bench-5v --iout 3A --ripple 0.4
        """
        from kitbin.services import plans
        from kitbin.store import open_store

        updates = plans.parse_spec_texts(_texts(locals()))
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

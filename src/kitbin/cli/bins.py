"""``kitbin bin add|list|show|edit``: compartments of parts and what is known about them."""

import functools
from typing import Annotated, Any

import typer

from kitbin.cli.common import console, print_json, state


def _fmt(value: float | None, quantity: str | None) -> str:
    """A value of a named quantity in engineering notation, or "" when absent."""
    if value is None or quantity is None:
        return ""
    from kitbin.quantities import QUANTITIES
    from kitbin.units import format_quantity

    kind = QUANTITIES.get(quantity)
    return format_quantity(value, kind.dimension if kind else quantity)


def _condition(name: str, value: float) -> str:
    """``freq=100 kHz``: a test condition with its unit when the name is known."""
    from kitbin.quantities import CONDITIONS
    from kitbin.units import format_quantity

    dimension = CONDITIONS.get(name)
    if dimension is None or not isinstance(value, (int, float)):
        return f"{name}={value}"
    return f"{name}={format_quantity(float(value), dimension)}"


def _tol(data: dict[str, Any]) -> str:
    lo, hi = data.get("tol_minus"), data.get("tol_plus")
    if lo is None or hi is None:
        return ""
    if abs(lo - hi) < 1e-12:
        return f"±{100 * lo:g} %"
    return f"−{100 * lo:g}/+{100 * hi:g} %"


def _nominal(data: dict[str, Any]) -> str:
    text = _fmt(data["nominal"], data.get("nominal_quantity"))
    tol = _tol(data)
    return f"{text} {tol}".strip()


def _print_bin_line(data: dict[str, Any], verb: str) -> None:
    nominal = _nominal(data)
    what = f" {nominal}" if nominal else ""
    typer.echo(f"{verb} {data['kind']} bin {data['label']}{what}, {data['qty']} on hand")


def _bin_options() -> dict[str, Any]:
    """Options shared by ``bin add`` and ``bin edit`` (one definition each)."""
    return {
        "kit": typer.Option(None, "--kit", help="Kit name (must exist; see `kitbin kit add`)."),
        "nominal": typer.Option(None, "--nominal", help="Nominal value, e.g. 4.7uH, 4k7, 100nF."),
        "tolerance": typer.Option(None, "--tolerance", help="Tolerance, e.g. 20% or -20%/+80%."),
        "marking": typer.Option(
            None, "--marking", help='Marking as printed, e.g. "brown black black silver" or 104.'
        ),
        "package": typer.Option(None, "--package", help="Body size or package, e.g. 6x6 drum."),
        "location": typer.Option(None, "--location", help="Where the bin is, e.g. drawer A3."),
        "prop": typer.Option(
            None, "--prop", help="Extra quantity NAME=VALUE, e.g. vrrm=40V (repeatable)."
        ),
        "prop_source": typer.Option(
            "user", "--prop-source", help="Where --prop values come from (e.g. listing)."
        ),
        "notes": typer.Option(None, "--notes", help="Free text."),
    }


def _add_row(table, *cells: str) -> None:
    """Add a table row; cells are shown as typed (no rich markup in user text)."""
    from rich.markup import escape

    table.add_row(*(escape(c) for c in cells))


def register(app: typer.Typer) -> None:
    """Add the ``bin`` group to the root app."""
    bin_app = typer.Typer(help="Bins: one kind of part of one value each.", no_args_is_help=True)
    opt = _bin_options()

    @bin_app.command("add")
    def add(
        ctx: typer.Context,
        label: str = typer.Argument(..., help="Bin label, e.g. L-07."),
        kind: str = typer.Option(
            ..., "--kind", help="inductor, resistor, capacitor, diode, controller or other."
        ),
        kit: str | None = opt["kit"],
        nominal: str | None = opt["nominal"],
        tolerance: str | None = opt["tolerance"],
        marking: str | None = opt["marking"],
        package: str | None = opt["package"],
        location: str | None = opt["location"],
        qty: int = typer.Option(0, "--qty", help="Parts on hand now (logged as a stock move)."),
        prop: list[str] | None = opt["prop"],
        prop_source: str = opt["prop_source"],
        notes: str | None = opt["notes"],
        as_json: bool = typer.Option(False, "--json", help="Print the new bin as JSON."),
    ) -> None:
        """Add a bin. Nominal and tolerance come from --marking when not given.

        Example: kitbin bin add L-99 --kind inductor --marking "brown black black silver" --qty 5
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            data = inventory.add_bin(
                store,
                label,
                kind,
                kit=kit,
                nominal=nominal,
                tolerance=tolerance,
                marking=marking,
                package=package,
                location=location,
                qty=qty,
                props=prop or [],
                prop_source=prop_source,
                notes=notes,
            )
        if as_json:
            print_json(data)
        else:
            _print_bin_line(data, "added")

    @bin_app.command("edit")
    def edit(
        ctx: typer.Context,
        label: str = typer.Argument(..., help="Bin label, e.g. L-07."),
        new_label: str | None = typer.Option(None, "--label", help="A new label."),
        kind: str | None = typer.Option(None, "--kind", help="A new kind."),
        kit: str | None = typer.Option(
            None, "--kit", help='Kit name; "" makes the bin loose (no kit).'
        ),
        nominal: str | None = opt["nominal"],
        tolerance: str | None = opt["tolerance"],
        marking: str | None = opt["marking"],
        package: str | None = opt["package"],
        location: str | None = opt["location"],
        prop: list[str] | None = opt["prop"],
        prop_source: str = opt["prop_source"],
        drop_prop: Annotated[
            list[str] | None,
            typer.Option("--drop-prop", help="Remove a property by name (repeatable)."),
        ] = None,
        notes: str | None = opt["notes"],
        as_json: bool = typer.Option(False, "--json", help="Print the bin as JSON."),
    ) -> None:
        """Change a bin's description. Quantities change only with `kitbin stock`.

        Example: kitbin bin edit L-07 --location "drawer B2" --prop isat_20=2.1A
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            data = inventory.edit_bin(
                store,
                label,
                new_label=new_label,
                kind=kind,
                kit=kit,
                nominal=nominal,
                tolerance=tolerance,
                marking=marking,
                package=package,
                location=location,
                props=prop or [],
                prop_source=prop_source,
                drop_props=drop_prop or [],
                notes=notes,
            )
        if as_json:
            print_json(data)
        else:
            _print_bin_line(data, "changed")

    @bin_app.command("list")
    def list_(
        ctx: typer.Context,
        kind: str | None = typer.Option(None, "--kind", help="Only bins of this kind."),
        kit: str | None = typer.Option(None, "--kit", help="Only bins of this kit."),
        search: str | None = typer.Option(
            None, "--search", help="Text in label, marking, package, location or notes."
        ),
        as_json: bool = typer.Option(False, "--json", help="Print the bins as JSON."),
    ) -> None:
        """List bins with their nominal value, stock and number of readings.

        Example: kitbin bin list --kind inductor --json
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            bins = inventory.list_bins(store, kind=kind, kit=kit, search=search)
        if as_json:
            print_json(bins)
            return
        from rich.table import Table

        table = Table(title=f"Bins ({len(bins)})", title_justify="left")
        for column in ("label", "kind", "nominal", "package", "kit", "location"):
            table.add_column(column, no_wrap=column in ("label", "kind", "nominal"))
        for column in ("qty", "reserved", "readings"):
            table.add_column(column, justify="right")
        for b in bins:
            _add_row(
                table,
                b["label"],
                b["kind"],
                _nominal(b),
                b["package"] or "",
                b["kit"] or "",
                b["location"] or "",
                str(b["qty"]),
                str(b["qty_reserved"] or ""),
                str(b["readings"]),
            )
        console().print(table)

    @bin_app.command("show")
    def show(
        ctx: typer.Context,
        label: str = typer.Argument(..., help="Bin label, e.g. L-07."),
        as_json: bool = typer.Option(False, "--json", help="Print everything as JSON."),
    ) -> None:
        """Show a bin: kit, properties, evidence per parameter, readings, captures, moves.

        Example: kitbin bin show L-99 --json
        """
        from kitbin.services import inventory
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            data = inventory.show_bin(store, label)
        if as_json:
            print_json(data)
        else:
            _print_show(data)

    app.add_typer(bin_app, name="bin")


def _print_show(data: dict[str, Any]) -> None:
    from rich.markup import escape
    from rich.table import Table

    out = console()
    say = functools.partial(out.print, markup=False, soft_wrap=True)
    out.print(f"[bold]{escape(data['label'])}[/bold]  {data['kind']}  {_nominal(data)}".rstrip())
    facts = [
        ("kit", data["kit"]),
        ("marking", data["marking"]),
        ("package", data["package"]),
        ("location", data["location"]),
        ("on hand", f"{data['qty']} ({data['qty_reserved']} reserved)"),
        ("notes", data["notes"]),
    ]
    for name, value in facts:
        if value:
            say(f"  {name:<9} {value}")
    if data["properties"]:
        say("properties")
        for p in data["properties"]:
            say(f"  {p['name']:<13} {_fmt(p['value'], p['name']):<12} ({p['source']})")
    say("evidence")
    for ev in data["evidence"].values():
        say(f"  {ev['text']}")
    if data["readings"]:
        table = Table(title="readings", title_justify="left")
        for column in ("quantity", "value", "specimen", "conditions", "method", "taken"):
            table.add_column(column)
        for r in data["readings"]:
            bound = "≥ " if r["bound"] == ">=" else ""
            conditions = ", ".join(_condition(k, v) for k, v in r["conditions"].items())
            _add_row(
                table,
                r["quantity"],
                bound + _fmt(r["value"], r["quantity"]),
                "" if r["specimen"] is None else str(r["specimen"]),
                conditions,
                r["method"] or "",
                (r["taken_at"] or "")[:16].replace("T", " "),
            )
        out.print(table)
    if data["captures"]:
        say("captures")
        for c in data["captures"]:
            say(f"  #{c['id']} {c['kind']} {c['file_name'] or ''} sha256 {c['sha256'][:12]}")
    if data["moves"]:
        say("stock moves")
        for m in data["moves"][-10:]:
            say(
                f"  {(m['at'] or '')[:16].replace('T', ' ')}  {m['delta']:+d} -> {m['qty_after']}"
                f"  {m['reason']}"
            )

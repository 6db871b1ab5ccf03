"""``kitbin pick PLAN`` and ``kitbin picks list|reserve|done|cancel``: pick lists and their
stock."""

from pathlib import Path
from typing import Annotated

import typer

from kitbin.cli.common import console, err_console, print_json, state
from kitbin.errors import KitbinError


def register(app: typer.Typer) -> None:
    """Add ``kitbin pick`` and the ``kitbin picks`` group to the root app."""

    @app.command("pick")
    def pick(
        ctx: typer.Context,
        plan: str = typer.Argument(..., help="Name of a saved plan."),
        boards: int = typer.Option(1, "--boards", help="Number of boards.", min=1),
        use: Annotated[
            list[str] | None,
            typer.Option("--use", help="Override a role's bin: ROLE=LABEL (repeatable)."),
        ] = None,
        fmt: str = typer.Option("text", "--format", help="text, csv, md, html or json."),
        out: Annotated[Path | None, typer.Option("--out", help="Write to this file.")] = None,
        sense: str = typer.Option(
            "0.1ohm", "--sense", help="Sense resistor the ripple is shown across."
        ),
        do_reserve: bool = typer.Option(
            False, "--reserve", help="Store the pick list and hold its stock."
        ),
        do_save: bool = typer.Option(
            False,
            "--save",
            help="Store the pick list as a draft, holding no stock (reserve it later).",
        ),
        as_json: bool = typer.Option(False, "--json", help="Same as --format json."),
    ) -> None:
        """Print a pick list with its bring-up sheet; optionally save it as a draft or
        reserve the parts.

        Example: kitbin pick bench-5v --boards 3 --format html --out pick.html --reserve
        """
        from kitbin.picking import RENDERERS, render
        from kitbin.services import picking
        from kitbin.store import open_store
        from kitbin.units import parse_quantity

        if do_save and do_reserve:
            raise typer.BadParameter(
                "use --save (store a draft) or --reserve (hold the stock now), not both",
                ctx=ctx,
                param_hint="'--save'",
            )
        if as_json:
            fmt = "json"
        if fmt not in RENDERERS:
            raise KitbinError(f"--format {fmt!r}: expected one of {', '.join(RENDERERS)}")
        r_sense = parse_quantity(sense, "resistance")
        choices = picking.parse_use(use or [])
        if out is not None:
            picking.check_writable(out)  # before anything is reserved
        with open_store(state(ctx).db) as store:
            if do_reserve:
                sheet = picking.reserve(store, plan, boards=boards, use=choices, sense=r_sense)
            elif do_save:
                sheet = picking.save_draft(store, plan, boards=boards, use=choices, sense=r_sense)
            else:
                sheet, _, _ = picking.build_sheet(
                    store, plan, boards=boards, use=choices, sense=r_sense
                )
        if out is None:
            typer.echo(render(sheet, fmt), nl=False)
        else:
            err_console().print(f"wrote {picking.write_sheet(sheet, fmt, out)}")
        # one plain line on stderr each (not wrapped to a terminal's width)
        if do_reserve:
            typer.echo(
                f"pick list {sheet.pick_id} reserved; take the parts with "
                f"`kitbin picks done {sheet.pick_id}` or release them with "
                f"`kitbin picks cancel {sheet.pick_id}`",
                err=True,
            )
        elif do_save:
            typer.echo(
                f"pick list {sheet.pick_id} saved as a draft, no stock held; "
                f"reserve it with `kitbin picks reserve {sheet.pick_id}`",
                err=True,
            )

    picks_app = typer.Typer(
        help="Stored pick lists: list, reserve a draft, take, release.", no_args_is_help=True
    )

    @picks_app.command("list")
    def picks_list(
        ctx: typer.Context,
        only: str | None = typer.Option(
            None, "--state", help="draft, reserved, picked or cancelled."
        ),
        as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    ) -> None:
        """List stored pick lists, newest first.

        Example: kitbin picks list --state reserved
        """
        from kitbin.services import picking
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            rows = picking.list_picks(store, only)
        if as_json:
            print_json(rows)
            return
        from rich.markup import escape
        from rich.table import Table

        table = Table(title="pick lists", title_justify="left")
        for col in ("id", "plan", "boards", "state", "created", "lines"):
            table.add_column(col)
        for r in rows:
            lines = ", ".join(f"{ln['role']} {ln['bin'] or '—'}×{ln['total']}" for ln in r["lines"])
            table.add_row(
                str(r["id"]),
                escape(r["plan"]),
                str(r["boards"]),
                r["state"],
                (r["created_at"] or "")[:16],
                escape(lines),
            )
        console().print(table)

    @picks_app.command("reserve")
    def picks_reserve(
        ctx: typer.Context,
        pick_id: int = typer.Argument(..., help="Draft pick list id (see `kitbin picks list`)."),
        as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    ) -> None:
        """Hold a draft pick list's stock (state becomes reserved); the quantities saved
        with the draft are reserved, and refused unless every bin has them free.

        Example: kitbin picks reserve 3
        """
        from kitbin.services import picking
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            result = picking.reserve_draft(store, pick_id)
        if as_json:
            print_json(result)
            return
        for h in result["held"]:
            typer.echo(
                f"{h['bin']}: reserved {h['reserved']}, {h['available']} free "
                f"({h['on_hand']} on hand, {h['qty_reserved']} reserved)"
            )
        typer.echo(f"pick list {pick_id} reserved")

    @picks_app.command("done")
    def picks_done(
        ctx: typer.Context,
        pick_id: int = typer.Argument(..., help="Pick list id (see `kitbin picks list`)."),
        as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    ) -> None:
        """Take a reserved pick list's parts out of stock (state becomes picked).

        Example: kitbin picks done 3
        """
        from kitbin.services import picking
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            result = picking.take(store, pick_id)
        if as_json:
            print_json(result)
            return
        for mv in result["moves"]:
            typer.echo(f"{mv['bin']}: {mv['delta']:+d}, {mv['qty_after']} left")
        typer.echo(f"pick list {pick_id} picked")

    @picks_app.command("cancel")
    def picks_cancel(
        ctx: typer.Context,
        pick_id: int = typer.Argument(..., help="Pick list id (see `kitbin picks list`)."),
        as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    ) -> None:
        """Cancel a draft pick list, or release a reserved one's parts (state becomes
        cancelled).

        Example: kitbin picks cancel 3
        """
        from kitbin.services import picking
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            result = picking.cancel(store, pick_id)
        if as_json:
            print_json(result)
            return
        for r in result["released"]:
            typer.echo(f"{r['bin']}: released {r['released']}")
        was = " (a draft: no stock was held)" if result["was"] == "draft" else ""
        typer.echo(f"pick list {pick_id} cancelled{was}")

    app.add_typer(picks_app, name="picks")

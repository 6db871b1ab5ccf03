"""``kitbin init`` and ``kitbin demo``: create the inventory, or an invented one to explore."""

import typer

from kitbin.cli.common import err_console, print_json, state


def register(app: typer.Typer) -> None:
    """Add ``init`` and ``demo`` to the root app."""

    @app.command("init")
    def init(ctx: typer.Context) -> None:
        """Create the inventory database, or upgrade it to this kitbin's schema.

        The database is --db, else $KITBIN_DB, else kitbin.sqlite in your user data
        directory. A new SQLite file is readable by you only.

        Example: kitbin --db ~/bench/inventory.sqlite init
        """
        from kitbin.store import init_database, mask_url, resolve_url

        url = resolve_url(state(ctx).db)
        revision = init_database(url)
        typer.echo(f"database ready at schema revision {revision}: {mask_url(url)}")

    @app.command("demo")
    def demo(
        ctx: typer.Context,
        db: str | None = typer.Option(
            None, "--db", help="Build it here instead of the demo's own file."
        ),
        force: bool = typer.Option(False, "--force", help="Wipe the database named by --db first."),
        as_json: bool = typer.Option(False, "--json", help="Print counts and tour as JSON."),
        ui: bool = typer.Option(False, "--ui", help="Then open the terminal UI on it."),
    ) -> None:
        """Build the invented demo workshop in its own database and show a short tour.

        Without --db the demo goes to demo.sqlite in your user data directory (rebuilt
        each time), never to your inventory. The data is invented.

        Example: kitbin demo
        """
        from kitbin.services import demo as demo_service

        target = db or _explicit_root_db(ctx)
        err_console().print("building the invented demo workshop ...")
        result = demo_service.build_demo(target, force=force)
        if as_json:
            print_json(
                {
                    "url": result.url,
                    "counts": result.counts,
                    "tour": [{"title": s.title, "lines": s.lines} for s in result.sections],
                }
            )
            return
        from kitbin.cli.common import console

        out = console()
        for section in result.sections:
            out.print(f"[bold]{section.title}[/bold]", soft_wrap=True)
            for line in section.lines:
                out.print(f"  {line}", soft_wrap=True, markup=False)
            out.print()
        if ui:
            from kitbin.tui.app import make_app  # only when asked for (Textual ~160 ms)

            make_app(result.url).run()


def _explicit_root_db(ctx: typer.Context) -> str | None:
    """The root ``--db`` only when typed on the command line, never from $KITBIN_DB."""
    root = ctx.find_root()
    source = root.get_parameter_source("db")
    if source is not None and source.name == "COMMANDLINE":
        return state(ctx).db
    return None

"""``kitbin import FILE`` and ``kitbin export FILE``: bins and readings as CSV."""

import typer

from kitbin.cli.common import err_console, print_json, state


def register(app: typer.Typer) -> None:
    """Add the ``import`` and ``export`` commands to the root app."""

    @app.command("import")
    def import_(
        ctx: typer.Context,
        file: str = typer.Argument(..., help="CSV file of bins or of readings."),
        what: str | None = typer.Option(
            None, "--what", help="bins or readings (default: told from the header)."
        ),
        as_json: bool = typer.Option(False, "--json", help="Print what was imported as JSON."),
    ) -> None:
        """Import bins or readings from CSV. Any bad row rejects the whole file.

        Example: kitbin import readings.csv
        """
        from kitbin.services import importexport
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store, _progress() as progress:
            summary = importexport.import_csv(store, file, what=what, progress=progress)
        if as_json:
            print_json(summary)
        else:
            typer.echo(
                f"imported {summary['rows']} {summary['what']} from {summary['file']}"
                + (f" ({summary['kits_added']} new kits)" if summary.get("kits_added") else "")
            )

    @app.command("export")
    def export(
        ctx: typer.Context,
        file: str = typer.Argument(..., help="CSV file to write, or - for stdout."),
        what: str = typer.Option("bins", "--what", help="bins or readings."),
    ) -> None:
        """Export bins or readings as CSV (SI numbers), ready for `kitbin import`.

        Example: kitbin export bins.csv --what bins
        """
        from kitbin.services import importexport
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            n = importexport.export_csv(store, file, what=what)
        if file != "-":
            err_console().print(f"wrote {n} {what} to {file}")


class _progress:
    """A rich progress bar on stderr, shown only for long imports."""

    def __init__(self) -> None:
        self._bar = None
        self._task = None

    def __enter__(self) -> "_progress":
        return self

    def __call__(self, done: int, total: int) -> None:
        if self._bar is None:
            if total < 5000:
                return
            from rich.progress import Progress

            self._bar = Progress(console=err_console(), transient=True)
            self._bar.start()
            self._task = self._bar.add_task("importing", total=total)
        self._bar.update(self._task, completed=done)

    def __exit__(self, *exc: object) -> None:
        if self._bar is not None:
            self._bar.stop()

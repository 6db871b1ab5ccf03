"""``kitbin backup FILE`` and ``kitbin restore FILE``: whole-inventory copies."""

import typer

from kitbin.cli.common import err_console, print_json, state


def register(app: typer.Typer) -> None:
    """Add the ``backup`` and ``restore`` commands to the root app."""

    @app.command("backup")
    def backup(
        ctx: typer.Context,
        file: str = typer.Argument(..., help="Backup file to write."),
        fmt: str | None = typer.Option(
            None,
            "--format",
            help="sqlite (a database file; default for SQLite) or jsonl (portable text; "
            "default for PostgreSQL).",
        ),
        force: bool = typer.Option(False, "--force", help="Replace FILE if it exists."),
        as_json: bool = typer.Option(False, "--json", help="Print what was written as JSON."),
    ) -> None:
        """Copy the whole inventory to FILE: a consistent snapshot, even while others work.

        The file is readable by you only. Put it back with `kitbin restore`.

        Example: kitbin backup inventory-2026-12-01.sqlite
        """
        from kitbin.services import backup as service
        from kitbin.store import open_store

        with open_store(state(ctx).db, create=False) as store:
            summary = service.backup(store, file, fmt=fmt, force=force)
        if as_json:
            print_json(summary)
            return
        total = sum(summary["rows"].values())
        typer.echo(
            f"backed up {total} rows in {len(summary['rows'])} tables to {summary['file']} "
            f"({summary['format']}, schema {summary['revision']}, {summary['bytes']} bytes)"
        )

    @app.command("restore")
    def restore(
        ctx: typer.Context,
        file: str = typer.Argument(..., help="A file written by `kitbin backup`."),
        as_json: bool = typer.Option(False, "--json", help="Print what was restored as JSON."),
    ) -> None:
        """Restore a backup into the empty database named by --db (all of it, or nothing).

        Either format restores into SQLite or PostgreSQL, so this also moves an
        inventory between the two. An older backup is upgraded to this kitbin's schema.

        Example: kitbin --db postgresql://kitbin@server/shop restore inventory.jsonl
        """
        from kitbin.services import backup as service

        summary = service.restore(file, state(ctx).db)
        if as_json:
            print_json(summary)
            return
        total = sum(summary["rows"].values())
        err_console().print(f"restored {total} rows in {len(summary['rows'])} tables")
        typer.echo(f"restored {file} ({summary['format']}, schema {summary['revision']})")

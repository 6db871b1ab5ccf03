"""The root ``kitbin`` command and its error handling."""

from __future__ import annotations

import sys
from typing import Any

import typer
from typer.core import TyperGroup

from kitbin import __version__
from kitbin.cli.common import CliState
from kitbin.errors import KitbinError


class KitbinGroup(TyperGroup):
    """The root group: turns every :class:`KitbinError` into one line and an exit code.

    Sub-groups run inside this ``invoke``, so one place covers every command.
    """

    def invoke(self, ctx: Any) -> Any:
        try:
            return super().invoke(ctx)
        except KitbinError as error:
            typer.echo(f"kitbin: error: {error}", err=True)
            ctx.exit(int(error.exit_code))


app = typer.Typer(
    cls=KitbinGroup,
    name="kitbin",
    help="Characterise, stock and pick unlabelled kit parts for small DC-DC converters.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    context_settings={"help_option_names": ["-h", "--help"]},
)


def _version(value: bool) -> None:
    if value:
        typer.echo(f"kitbin {__version__}")
        raise typer.Exit()


@app.callback()
def root(
    ctx: typer.Context,
    db: str | None = typer.Option(
        None,
        "--db",
        envvar="KITBIN_DB",
        help="Database URL or SQLite file (default: a file in your user data directory).",
    ),
    version: bool = typer.Option(
        False, "--version", callback=_version, is_eager=True, help="Show the version."
    ),
) -> None:
    """Keep a drawer of kit parts, their bench readings and the converters built from them."""
    ctx.obj = CliState(db=db)


# Command modules register themselves here. Each imports only typer at module level.
# -- registered command modules (keep one line each) --
__import__("kitbin.cli.kits", fromlist=["register"]).register(app)
__import__("kitbin.cli.bins", fromlist=["register"]).register(app)
__import__("kitbin.cli.stock", fromlist=["register"]).register(app)
__import__("kitbin.cli.record", fromlist=["register"]).register(app)
__import__("kitbin.cli.transfer", fromlist=["register"]).register(app)
__import__("kitbin.cli.bench", fromlist=["register"]).register(app)
__import__("kitbin.cli.setup", fromlist=["register"]).register(app)
__import__("kitbin.cli.stage", fromlist=["register"]).register(app)
__import__("kitbin.cli.plans", fromlist=["register"]).register(app)
__import__("kitbin.cli.match", fromlist=["register"]).register(app)
__import__("kitbin.cli.pick", fromlist=["register"]).register(app)
__import__("kitbin.cli.ui", fromlist=["register"]).register(app)
__import__("kitbin.cli.backup", fromlist=["register"]).register(app)
# -- end of registered command modules --


def main() -> None:
    """Console-script entry point."""
    try:
        app()
    except KitbinError as error:  # raised outside a command (e.g. in a callback)
        print(f"kitbin: error: {error}", file=sys.stderr)
        sys.exit(int(error.exit_code))

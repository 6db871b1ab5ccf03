"""The root ``kitbin`` command and its error handling."""

import importlib
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


#: Command modules, in the order ``kitbin --help`` lists them. Each imports only typer
#: (and kitbin.cli.common / kitbin.errors) at module level and defines ``register(app)``.
# -- registered command modules (keep one name each) --
COMMAND_MODULES = (
    "setup",
    "kits",
    "bins",
    "stock",
    "record",
    "bench",
    "stage",
    "plans",
    "match",
    "pick",
    "transfer",
    "backup",
    "ui",
)
# -- end of registered command modules --
for _module in COMMAND_MODULES:
    importlib.import_module(f"kitbin.cli.{_module}").register(app)


def main() -> None:
    """Console-script entry point."""
    try:
        app()
    except KitbinError as error:  # raised outside a command (e.g. in a callback)
        print(f"kitbin: error: {error}", file=sys.stderr)
        sys.exit(int(error.exit_code))

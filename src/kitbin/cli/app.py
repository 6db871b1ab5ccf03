"""The root ``kitbin`` command and its error handling."""

import importlib
import sys
from typing import Any

import typer
from typer.core import TyperGroup

from kitbin import __version__
from kitbin.cli.common import CliState
from kitbin.errors import KitbinError, one_line


class KitbinGroup(TyperGroup):
    """The root group: every error the user causes becomes one line and an exit code.

    A :class:`KitbinError` from a command keeps its own exit code; a usage error
    (an unknown option, a value of the wrong type) exits 2. Sub-groups run inside
    this group, so one place covers every command.
    """

    def invoke(self, ctx: Any) -> Any:
        try:
            return super().invoke(ctx)
        except KitbinError as error:
            typer.echo(f"kitbin: error: {error}", err=True)
            ctx.exit(int(error.exit_code))

    def main(self, *args: Any, standalone_mode: bool = True, **kwargs: Any) -> Any:
        # Typer draws usage errors as a multi-line box; a bench script wants one line.
        # typer vendors click: its exception classes live in typer._click.
        from typer._click.exceptions import ClickException, NoArgsIsHelpError, UsageError

        try:
            result = super().main(*args, standalone_mode=False, **kwargs)
        except NoArgsIsHelpError as error:  # a bare group: its help, as click prints it
            if not standalone_mode:
                raise
            error.show()
            sys.exit(error.exit_code)
        except ClickException as error:
            if not standalone_mode:
                raise
            message = f"kitbin: error: {one_line(error.format_message())}"
            if isinstance(error, UsageError) and error.ctx is not None:
                message += f" (see `{error.ctx.command_path} --help`)"
            typer.echo(message, err=True)
            sys.exit(error.exit_code)
        except typer.Abort:
            if not standalone_mode:
                raise
            typer.echo("kitbin: aborted", err=True)
            sys.exit(1)
        if not standalone_mode:
            return result
        sys.exit(result if isinstance(result, int) else 0)


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
    "marking",
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
    """Console-script entry point: run one command, then leave without tearing down.

    Tearing the interpreter down after a store command takes about 0.1 s (measured:
    0.11 s after ``kitbin match``, 0.05 s of it for SQLAlchemy's ORM alone) and does
    nothing kitbin needs: every file and database connection is closed by the
    command's own ``with`` blocks. So, once the command has returned, the exit
    handlers run and the output is flushed as on a normal exit, and the process
    ends with :func:`os._exit`, keeping the exit code. ``KITBIN_FULL_EXIT=1``
    exits the normal way (for a profiler or a coverage tool, which write their
    results at interpreter shutdown).
    """
    try:
        app()
        code: object = 0
    except KitbinError as error:  # raised outside a command (e.g. in a callback)
        print(f"kitbin: error: {error}", file=sys.stderr)
        code = int(error.exit_code)
    except SystemExit as done:
        code = done.code
    _leave(code)


def _leave(code: object) -> None:
    """Exit with ``code`` (an int, None for 0, or a message for 1) as ``sys.exit`` would."""
    import os

    if code is None:
        code = 0
    elif not isinstance(code, int):
        print(code, file=sys.stderr)
        code = 1
    if os.environ.get("KITBIN_FULL_EXIT"):
        sys.exit(code)
    import atexit
    import contextlib

    atexit._run_exitfuncs()  # what a normal exit runs first: logging, temporary files
    for stream in (sys.stdout, sys.stderr):
        # a closed pipe (``| head``) or a closed stream: nothing more can be shown
        with contextlib.suppress(OSError, ValueError):
            stream.flush()
    os._exit(code)

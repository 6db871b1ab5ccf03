"""Helpers shared by every command: the global state, JSON and table output."""

import json
import sys
from dataclasses import dataclass
from typing import Any

import typer


@dataclass
class CliState:
    """What the root callback collected: the database URL given with ``--db``."""

    db: str | None = None


def state(ctx: typer.Context) -> CliState:
    """The :class:`CliState` of the running command (root callback's object)."""
    root = ctx.find_root()
    if not isinstance(root.obj, CliState):
        root.obj = CliState()
    return root.obj


def print_json(data: Any) -> None:
    """Write ``data`` to stdout as indented JSON (stdout carries data only)."""
    sys.stdout.write(json.dumps(data, indent=2, ensure_ascii=False, default=_json_default))
    sys.stdout.write("\n")


def _json_default(value: Any) -> Any:
    if hasattr(value, "isoformat"):
        return value.isoformat()
    if hasattr(value, "tolist"):
        return value.tolist()
    raise TypeError(f"not JSON serialisable: {type(value).__name__}")


def console():  # -> rich.console.Console
    """A rich console on stdout (imported on first use)."""
    from rich.console import Console

    return Console(highlight=False, soft_wrap=False)


def err_console():  # -> rich.console.Console
    """A rich console on stderr, for notes and progress that must not pollute stdout."""
    from rich.console import Console

    return Console(stderr=True, highlight=False)

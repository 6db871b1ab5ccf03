"""``kitbin match PLAN``: rank the stock against what a plan demands of each role."""

import math
from typing import Any

import typer

from kitbin.cli.common import console, print_json, state

_STATUS_STYLE = {"pass": "green", "fail": "red", "unverified": "yellow"}
_VERDICT_STYLE = {"verified": "bold green", "unverified": "yellow", "fails": "red"}


def _fmt(value: float | None, quantity: str) -> str:
    from kitbin.quantities import QUANTITIES
    from kitbin.units import format_quantity

    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "?"
    if math.isinf(value):
        return "∞"
    kind = QUANTITIES.get(quantity)
    if kind is None:
        return f"{int(value)}" if quantity == "stock" else f"{value:.4g}"
    if kind.dimension == "ratio" and abs(value) > 1.5:
        return f"{value:.4g}"
    return format_quantity(value, kind.dimension)


def _check_cell(c: Any) -> str:
    from rich.markup import escape

    style = _STATUS_STYLE[c.status]
    # an infinite "have" is a limit the part lets you set (a resistor-set ilim)
    have = "settable" if c.have is not None and math.isinf(c.have) else _fmt(c.have, c.quantity)
    if getattr(c, "lower_bound", False):
        have = f"≥ {have}"  # "not reached up to": only a lower bound is known
    need = _fmt(c.required, c.quantity)
    op = "≥" if c.op == ">=" else "≤"
    grade = "" if c.grade in ("counted",) else f" {c.grade}"
    return f"[{style}]{escape(c.name)}[/] {have}{grade} {op} {need}"


def _print_role(con: Any, rm: Any) -> None:
    from rich.markup import escape
    from rich.table import Table

    counts = ", ".join(f"{v} {k}" for k, v in rm.counts.items())
    table = Table(
        title=f"{rm.role} — {counts}",
        title_justify="left",
        show_lines=True,
        expand=False,
    )
    table.add_column("#", justify="right")
    table.add_column("bin")
    table.add_column("verdict")
    table.add_column("score", justify="right")
    table.add_column("checks")
    table.add_column("why")
    for r in rm.rows:
        checks = "\n".join(_check_cell(c) for c in r.checks)
        why = escape(r.summary + ("".join(f"\n· {n}" for n in r.notes)))
        table.add_row(
            str(r.rank),
            escape(r.label),
            f"[{_VERDICT_STYLE[r.verdict]}]{r.verdict}[/]",
            f"{r.score:.1f}",
            checks,
            why,
        )
    if not rm.rows:
        table.add_row("", "—", "[red]none[/]", "", "no stocked bin of this kind", "")
    con.print(table)
    for note in rm.notes:
        con.print(f"  note: {escape(note)}")


def _print_divider(con: Any, d: Any) -> None:
    from rich.markup import escape

    style = _VERDICT_STYLE.get(d.verdict, "")
    con.print(f"[bold]feedback divider[/] — [{style}]{d.verdict}[/]")
    con.print(f"  {escape(d.note)}")
    for c in d.checks:
        con.print(f"  {_check_cell(c)}")


def _print_network(con: Any, n: Any) -> None:
    from rich.markup import escape

    style = _VERDICT_STYLE.get(n.verdict, "")
    con.print(f"[bold]set resistor from two parts[/] — [{style}]{n.verdict}[/]")
    con.print(f"  {escape(n.note)}")
    for c in n.checks:
        con.print(f"  {_check_cell(c)}")


def register(app: typer.Typer) -> None:
    """Add ``kitbin match`` to the root app."""

    @app.command("match")
    def match(
        ctx: typer.Context,
        plan: str = typer.Argument(..., help="Name of a saved plan."),
        role: str | None = typer.Option(
            None, "--role", help="Only this role, e.g. inductor or feedback_divider."
        ),
        top: int = typer.Option(5, "--top", help="Rows shown per role.", min=1),
        boards: int = typer.Option(1, "--boards", help="Boards to be built.", min=1),
        as_json: bool = typer.Option(False, "--json", help="Print JSON instead of tables."),
    ) -> None:
        """Rank stocked bins for every role of a plan, with reasons.

        Verified bins come first (every check passes on the worst case of its
        evidence), then bins with unverified checks, then failures.

        Example: kitbin match bench-5v --role inductor --top 3
        """
        from kitbin.services.matching import match_dict, match_plan
        from kitbin.stage.spec import spec_summary
        from kitbin.store import open_store

        with open_store(state(ctx).db) as store:
            result = match_plan(store, plan, role=role, top=top, boards=boards)
        if as_json:
            print_json(match_dict(result))
            return
        con = console()
        con.print(f"[bold]{result.plan}[/]: {spec_summary(result.spec)}")
        for rm in result.roles.values():
            _print_role(con, rm)
        if result.set_network is not None:
            _print_network(con, result.set_network)
        if result.divider is not None:
            _print_divider(con, result.divider)

"""``kitbin stage buck|boost|invert``: the power-stage calculator (no database)."""

from typing import Any

import typer

from kitbin.cli.common import print_json
from kitbin.cli.specopts import spec_options

CAUTION = (
    "caution: inductors and diodes run hot, capacitors store energy; the arithmetic leaves "
    "out core, AC copper and switching losses and loop stability. Follow local codes and "
    "licensed practice."
)

#: Rows of the corner table: (label, record key, dimension or "" for a plain number).
ROWS: tuple[tuple[str, str, str], ...] = (
    ("input", "vin_V", "voltage"),
    ("load", "iout_A", "current"),
    ("mode", "mode", ""),
    ("duty D", "duty", "fraction"),
    ("D2 (off, rectifier)", "d2", "fraction"),
    ("on-time", "on_time_s", "time"),
    ("IL average", "il_avg_A", "current"),
    ("ΔI p-p", "ripple_App", "current"),
    ("r = ΔI/IL", "ripple_ratio", "fraction"),
    ("I peak", "i_peak_A", "current"),
    ("I valley", "i_valley_A", "current"),
    ("IL rms", "i_rms_A", "current"),
    ("switch rms", "isw_rms_A", "current"),
    ("switch off-state V", "v_switch_V", "voltage"),
    ("rectifier avg", "diode_iavg_A", "current"),
    ("rectifier rms", "diode_irms_A", "current"),
    ("rectifier reverse V", "diode_vr_V", "voltage"),
    ("Cin rms", "i_cin_rms_A", "current"),
    ("Cout rms", "i_cout_rms_A", "current"),
    ("CCM down to", "ccm_min_load_A", "current"),
    ("ΔVout p-p (exact)", "vout_ripple_Vpp", "voltage"),
    ("ΔVout C + ESR (bound)", "vout_ripple_bound_Vpp", "voltage"),
    ("ΔVin p-p (exact)", "vin_ripple_Vpp", "voltage"),
    ("P switch", "p_switch_W", "power"),
    ("P rectifier", "p_rect_W", "power"),
    ("P inductor (DCR)", "p_inductor_W", "power"),
)


def _cell(value: Any, dim: str) -> str:
    from kitbin.units import format_quantity

    if value is None:
        return "—"
    if dim == "":
        return str(value)
    if dim == "fraction":
        return f"{value:.4f}"
    return format_quantity(value, dim)


def print_report(report: dict[str, Any], title: str) -> None:
    """Print the corners and demands of a stage report as rich tables on stdout."""
    from rich.table import Table

    from kitbin.cli.common import console

    out = console()
    corners = report["corners"]
    table = Table(title=title, title_justify="left")
    table.add_column("")
    for c in corners:
        table.add_column(c["name"], justify="right")
    for label, key, dim in ROWS:
        table.add_row(label, *(_cell(c.get(key), dim) for c in corners))
    out.print(table)
    for c in corners:
        for flag in c["flags"]:
            out.print(f"[bold]flag[/bold] ({c['name']}): {flag}")
    print_demands(report["demands"])


def print_demands(demands: dict[str, Any]) -> None:
    """Print demands by role, each constraint with its reason; sources numbered below."""
    from rich.markup import escape

    from kitbin.cli.common import console
    from kitbin.quantities import QUANTITIES
    from kitbin.units import format_quantity

    out = console()
    sources: list[str] = []
    out.print("[bold]Demands[/bold]")
    for role, d in demands.items():
        out.print(f"[bold]{role}[/bold]")
        for k in d["constraints"]:
            kind = QUANTITIES.get(k["quantity"])
            dim = kind.dimension if kind else ""
            limit = k["limit"]
            if limit is None:
                shown = "∞"
            elif dim in ("", "ratio"):
                shown = f"{limit:.4g}"
            else:
                shown = format_quantity(limit, dim)
            if k["source"] not in sources:
                sources.append(k["source"])
            ref = sources.index(k["source"]) + 1
            op = "≥" if k["op"] == ">=" else "≤"
            out.print(f"  {k['quantity']} {op} {shown}: {escape(k['reason'])} [{ref}]")
        for note in d["notes"]:
            out.print(f"  note: {escape(note)}")
    out.print("[bold]Sources[/bold]")
    for n, src in enumerate(sources, 1):
        out.print(f"  [{n}] {escape(src)}")


def register(app: typer.Typer) -> None:
    """Add ``kitbin stage`` to the root app."""

    @app.command("stage")
    @spec_options(exclude=("--topology",), required=("--vin", "--vout", "--iout", "--fsw"))
    def stage(
        topology: str = typer.Argument(..., help="buck, boost or invert (inverting buck-boost)."),
        l_text: str | None = typer.Option(
            None, "--l", help="Inductance; omitted: the smallest L for the ripple target."
        ),
        dcr: str | None = typer.Option(None, "--dcr", help="Inductor DCR, e.g. 30mohm."),
        cout: str | None = typer.Option(None, "--cout", help="Output capacitance (effective)."),
        esr: str | None = typer.Option(None, "--esr", help="Output capacitor ESR."),
        cin: str | None = typer.Option(None, "--cin", help="Input capacitance (effective)."),
        esr_in: str | None = typer.Option(None, "--esr-in", help="Input capacitor ESR."),
        as_json: bool = typer.Option(False, "--json", help="Print corners and demands as JSON."),
        spec: dict[str, str | None] | None = None,
    ) -> None:
        """Operating corners and part demands of a power stage (a calculator; no database).

        Ripple is peak-to-peak and r = ΔI/IL. The output ripple is the exact
        waveform value; "C + ESR" is the upper bound app notes quote.

        Example: kitbin stage buck --vin 11..15V --vout 5.1V --iout 2.4A --fsw 500kHz --l 10uH
        """
        from kitbin.services.plans import build_spec, parse_spec_texts
        from kitbin.stage.report import stage_report

        fields = parse_spec_texts({"--topology": topology, **(spec or {})})
        stage_spec = build_spec({}, fields)
        parts = _parts(l_text, dcr, cout, esr, cin, esr_in)
        report = stage_report(stage_spec, **parts)
        if report["inductance_source"] == "l_min":
            from kitbin.units import format_quantity

            typer.echo(
                f"note: no --l given: using L_min = {format_quantity(report['l_min_H'], 'H')} "
                f"from the ripple target r = {stage_spec.ripple_ratio:g} "
                f"(worst at {format_quantity(report['l_min_vin_V'], 'V')} input)",
                err=True,
            )
        if as_json:
            print_json(report)
        else:
            print_report(report, f"{stage_spec.topology} stage")
        typer.echo(CAUTION, err=True)


def _parts(
    l_text: str | None,
    dcr: str | None,
    cout: str | None,
    esr: str | None,
    cin: str | None,
    esr_in: str | None,
) -> dict[str, Any]:
    """Parse the part options into keyword arguments of ``stage_report``."""
    from kitbin.errors import QuantityError
    from kitbin.units import parse_quantity

    def q(text: str | None, dim: str, option: str) -> float | None:
        if text is None:
            return None
        try:
            return parse_quantity(text, dim)
        except QuantityError as e:
            raise QuantityError(f"{option}: {e.msg}", e.hint) from None

    out: dict[str, Any] = {
        "l_henry": q(l_text, "inductance", "--l"),
        "dcr": q(dcr, "resistance", "--dcr") or 0.0,
        "cout": q(cout, "capacitance", "--cout"),
        "esr": q(esr, "resistance", "--esr") or 0.0,
        "cin": q(cin, "capacitance", "--cin"),
        "esr_in": q(esr_in, "resistance", "--esr-in") or 0.0,
    }
    return out

"""``kitbin ramp``, ``kitbin heat``, ``kitbin ring``: bench captures analysed and saved on bins."""

from pathlib import Path
from typing import Annotated

import typer

from kitbin.cli.common import print_json, state
from kitbin.errors import KitbinError

_CAUTION = (
    "caution: stored energy ½·L·I², hot parts and scope earth clips can hurt; "
    "see docs/measuring.md and follow local codes and licensed practice"
)


def _q(text: str | None, expect: str, option: str) -> float | None:
    """Parse an option's quantity, naming the option in the error."""
    if text is None:
        return None
    from kitbin.errors import QuantityError
    from kitbin.units import parse_quantity

    try:
        return parse_quantity(text, expect)
    except QuantityError as e:
        raise QuantityError(f"{option}: {e.msg}", e.hint) from None


def _show(value: float | None, dim: str) -> str:
    from kitbin.units import format_quantity

    return format_quantity(value, dim)


def register(app: typer.Typer) -> None:
    """Add the bench commands to the root app."""

    @app.command("ramp")
    def ramp(
        ctx: typer.Context,
        file: str = typer.Argument(..., help="Capture file (delimited text: CSV, TSV, ...)."),
        bin_label: str = typer.Option(..., "--bin", help="Bin label the part came from."),
        sense: str = typer.Option(..., "--sense", help="Sense resistance, e.g. 0.1ohm or 0R1."),
        vl: str | None = typer.Option(
            None, "--vl", help="Voltage across the inductor (supply), e.g. 12V."
        ),
        r_loop: str | None = typer.Option(
            None,
            "--r-loop",
            help="Loop resistance subtracted as i·R from --vl (sense + switch + wiring + DCR).",
        ),
        vl_col: str | None = typer.Option(
            None, "--vl-col", help="Channel measuring the inductor voltage (name or number)."
        ),
        col: str | None = typer.Option(
            None, "--col", help="Sense-voltage channel (name or 1-based number)."
        ),
        time_col: str | None = typer.Option(None, "--time-col", help="Time column."),
        dt: str | None = typer.Option(
            None, "--dt", help="Sample interval when the file has no time column, e.g. 1ns."
        ),
        save: bool = typer.Option(False, "--save", help="Store capture and readings on the bin."),
        as_json: bool = typer.Option(False, "--json", help="Print the results as JSON."),
        plot: str | None = typer.Option(None, "--plot", help="Draw L(i) and current to a PNG."),
    ) -> None:
        """Incremental inductance L(i), L0 and Isat at 10/20/30 % from a current-ramp capture.

        Isat that is not reached is reported as "not reached up to i_max" (stored
        as a lower bound), never extrapolated.

        Example: kitbin ramp pulse.csv --bin L-03 --sense 0.1ohm --vl 12V --r-loop 0.15ohm --save
        """
        from kitbin.services import bench

        params = bench.RampParams(
            sense_ohm=_q(sense, "resistance", "--sense"),  # type: ignore[arg-type]
            vl=_q(vl, "voltage", "--vl"),
            r_loop_ohm=_q(r_loop, "resistance", "--r-loop") or 0.0,
            col=col,
            vl_col=vl_col,
            time_col=time_col,
            dt_s=_q(dt, "time", "--dt"),
        )
        if params.sense_ohm <= 0:
            raise KitbinError("--sense: the sense resistance must be positive")
        path = Path(file)
        # a path lets pandas parse a large capture on several threads; saving needs the bytes
        content = bench.read_file(path) if save else path
        if save:
            from kitbin.store import open_store

            # analyse first: a bad capture must not even create the database file
            run = bench.analyse_ramp_bytes(content, params, source=path.name)
            with open_store(state(ctx).db) as store:
                data = bench.ramp(
                    content,
                    params,
                    label=bin_label,
                    file_name=path.name,
                    store=store,
                    plot=plot,
                    run=run,
                )
        else:
            data = bench.ramp(content, params, label=bin_label, file_name=path.name, plot=plot)
        typer.echo(_CAUTION, err=True)
        if as_json:
            print_json(data)
            return
        _print_ramp(data)

    @app.command("heat")
    def heat(
        ctx: typer.Context,
        file: str = typer.Argument(..., help="Temperature log (time and temperature columns)."),
        bin_label: str = typer.Option(..., "--bin", help="Bin label the part came from."),
        current: str = typer.Option(..., "--current", help="DC test current, e.g. 2A."),
        rise: str = typer.Option(
            "40K", "--rise", help="Allowed rise for the rating (40 K: common practice)."
        ),
        dcr: str | None = typer.Option(
            None, "--dcr", help="Winding DCR (else the bin's dcr readings), e.g. 50mohm."
        ),
        dcr_temp: str = typer.Option("20degC", "--dcr-temp", help="Temperature of the DCR."),
        t0: str | None = typer.Option(
            None, "--t0", help="When the current was switched on (default: first sample)."
        ),
        col: str | None = typer.Option(None, "--col", help="Temperature column."),
        time_col: str | None = typer.Option(None, "--time-col", help="Time column."),
        dt: str | None = typer.Option(None, "--dt", help="Sample interval without a time column."),
        save: bool = typer.Option(False, "--save", help="Store the log and readings on the bin."),
        as_json: bool = typer.Option(False, "--json", help="Print the results as JSON."),
    ) -> None:
        """Fit a heating log: ambient, steady rise, time constant; R_th and the current rating.

        The rating is the DC current giving the allowed rise, solved with the copper
        tempco (IEC 60028) when the DCR is known.

        Example: kitbin heat warm.csv --bin L-03 --current 2A --rise 40K --save
        """
        from kitbin.services import bench

        params = bench.HeatParams(
            current_A=_q(current, "current", "--current"),  # type: ignore[arg-type]
            rise_K=_q(rise, "temperature_rise", "--rise"),  # type: ignore[arg-type]
            dcr_ohm=_q(dcr, "resistance", "--dcr"),
            dcr_temp_C=_q(dcr_temp, "temperature", "--dcr-temp"),  # type: ignore[arg-type]
            t0_s=_q(t0, "time", "--t0"),
            col=col,
            time_col=time_col,
            dt_s=_q(dt, "time", "--dt"),
        )
        path = Path(file)
        content = bench.read_file(path)
        # analyse first: a bad log must not even create the database file
        bench.analyse_heat_bytes(content, params, source=path.name)
        store_ctx = _maybe_store(state(ctx).db, must=save)
        if store_ctx is None:
            data = bench.heat(content, params, label=bin_label, file_name=path.name)
        else:
            with store_ctx as store:
                data = bench.heat(
                    content, params, label=bin_label, file_name=path.name, store=store, save=save
                )
        for note in data.get("notes", []):
            typer.echo(f"note: {note}", err=True)
        typer.echo(_CAUTION, err=True)
        if as_json:
            print_json(data)
            return
        _print_heat(data)

    @app.command("ring")
    def ring(
        ctx: typer.Context,
        cap: Annotated[
            list[str],
            typer.Option("--cap", help="Test capacitor, e.g. 100nF (repeat with --freq)."),
        ],
        freq: Annotated[
            list[str],
            typer.Option("--freq", help="Resonance frequency with that capacitor, e.g. 159kHz."),
        ],
        bin_label: str = typer.Option(..., "--bin", help="Bin label the part came from."),
        fixture_cap: str | None = typer.Option(
            None, "--fixture-cap", help="Fixture/stray capacitance added to --cap, e.g. 20pF."
        ),
        ind: str | None = typer.Option(
            None, "--ind", help="Known inductance: measure the bin's capacitor instead."
        ),
        save: bool = typer.Option(False, "--save", help="Store the reading on the bin."),
        as_json: bool = typer.Option(False, "--json", help="Print the results as JSON."),
    ) -> None:
        """Inductance by LC resonance: L = 1/((2πf)²·C); two or more capacitors also give Cp.

        Example: kitbin ring --bin L-05 --cap 1nF --freq 157.6kHz --cap 10nF --freq 50.28kHz
        """
        from kitbin.services import bench

        caps = [_q(c, "capacitance", "--cap") for c in cap]
        freqs = [_q(f, "frequency", "--freq") for f in freq]
        fixture = _q(fixture_cap, "capacitance", "--fixture-cap") or 0.0
        inductance = _q(ind, "inductance", "--ind")
        args = {"label": bin_label, "fixture_F": fixture, "inductance_H": inductance}
        if save:
            bench.ring(caps, freqs, **args)  # type: ignore[arg-type]
            from kitbin.store import open_store

            with open_store(state(ctx).db) as store:
                data = bench.ring(caps, freqs, store=store, **args)  # type: ignore[arg-type]
        else:
            data = bench.ring(caps, freqs, **args)  # type: ignore[arg-type]
        if as_json:
            print_json(data)
            return
        if data["l_H"] is not None:
            line = f"{data['bin']}: L = {_show(data['l_H'], 'inductance')}"
            if data["cp_F"] is not None:
                line += f", Cp = {_show(data['cp_F'], 'capacitance')} (self + fixture)"
        else:
            line = f"{data['bin']}: C = {_show(data['c_F'], 'capacitance')}"
        typer.echo(line + (" (saved)" if data["readings"] else ""))


def _maybe_store(db: str | None, *, must: bool):  # -> contextmanager | None
    """The store for reading a bin's DCR (when a database exists) or for saving."""
    from kitbin.errors import StoreError
    from kitbin.store import open_store

    if must:
        return open_store(db)
    try:
        return open_store(db, create=False)
    except StoreError:
        return None


def _print_ramp(data: dict) -> None:
    out = typer.echo
    out(
        f"{data['bin']}: {data['file']}  "
        f"({data['ramps']} rising segment(s), {data['samples']} samples)"
    )
    out(
        f"  L0        {_show(data['l0_H'], 'inductance')}  "
        f"(median over {_show(data['l0_window_A'][0], 'current')}.."
        f"{_show(data['l0_window_A'][1], 'current')})"
    )
    for percent, value in data["isat_A"].items():
        shown = (
            _show(value, "current")
            if value is not None
            else f"not reached up to {_show(data['i_max_A'], 'current')}"
        )
        out(f"  Isat {percent:>2} %  {shown}")
    out(
        f"  covered   {_show(data['i_min_A'], 'current')}..{_show(data['i_max_A'], 'current')}; "
        f"noise {_show(data['noise_A'], 'current')} rms"
    )
    if data["capture_id"] is not None:
        out(f"  saved as capture {data['capture_id']} with {len(data['readings'])} readings")
    if data.get("plot"):
        out(f"  plot: {data['plot']}")
    for w in data["warnings"]:
        typer.echo(f"note: {w}", err=True)


def _print_heat(data: dict) -> None:
    out = typer.echo
    out(f"{data['bin']}: {data['file']} at {_show(data['current_A'], 'current')}")
    u = data["uncertainty"]
    out(f"  ambient      {data['t_amb_C']:.2f} °C ± {u['t_amb_C']:.2g}")
    out(
        f"  steady rise  {data['rise_ss_K']:.2f} K ± {u['rise_ss_K']:.2g}  "
        f"(log reached {100 * data['reached_fraction']:.0f} %, {data['length_tau']:.2g} τ long)"
    )
    out(f"  time const.  {data['tau_s']:.4g} s ± {u['tau_s']:.2g}")
    if data["r_th_K_per_W"] is not None:
        out(f"  R_th         {data['r_th_K_per_W']:.4g} K/W at {data['power_W']:.3g} W")
    else:
        out("  R_th         unknown (no DCR: give --dcr or record one on the bin)")
    out(f"  I for {data['allowed_rise_K']:.0f} K  {_show(data['i_for_rise_A'], 'current')}")
    if data["seconds_to_limit"] is not None:
        out(
            f"  at the test current the rise reaches {data['allowed_rise_K']:.0f} K after "
            f"{data['seconds_to_limit']:.4g} s"
        )
    if data["flags"]:
        out(f"  flags        {', '.join(data['flags'])}")
    if data["capture_id"] is not None:
        out(f"  saved as capture {data['capture_id']} with {len(data['readings'])} readings")

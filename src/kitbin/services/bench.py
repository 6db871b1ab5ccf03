"""Bench analysis put together: read a capture, analyse it, show it, save it on a bin.

The command line (``kitbin ramp``, ``kitbin heat``, ``kitbin ring``), the terminal
UI and the demo builder call these. Every analysis runs before the database is
touched; saving is one unit of work (capture row plus its readings), so a bad
capture, an unknown bin or a duplicate writes nothing.

Returned dicts are ready for ``--json``: SI floats, ``None`` for "not known" or
"not reached"; the keys are documented in ``docs/measuring.md``.
"""

from __future__ import annotations

import hashlib
import json
import math
import zlib
from collections.abc import Sequence
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING, Any

from kitbin.errors import CaptureError, KitbinError, StoreError

if TYPE_CHECKING:
    from kitbin.measure.ramp import RampResult
    from kitbin.measure.reader import Capture as CaptureData
    from kitbin.measure.thermal import HeatFit, ThermalRating
    from kitbin.store import Store

#: Where the demo workshop's captures and their manifest live (package data).
DEMO_CAPTURES = "kitbin.demo.captures"
MANIFEST = "manifest.json"

CAUTION = (
    "caution: pulse tests store ½·L·I² in the inductor — give it a freewheel path; "
    "parts get hot; see docs/measuring.md"
)


# -- parameters ---------------------------------------------------------------------


@dataclass(frozen=True)
class RampParams:
    """What ``kitbin ramp`` needs besides the file (SI units).

    ``vl`` is a constant inductor/supply voltage (V), or None when ``vl_col``
    names a measured channel. ``col``, ``vl_col`` and ``time_col`` are column
    names or 1-based numbers as text.
    """

    sense_ohm: float
    vl: float | None = None
    r_loop_ohm: float = 0.0
    col: str | None = None
    vl_col: str | None = None
    time_col: str | None = None
    dt_s: float | None = None

    def as_json(self) -> dict[str, Any]:
        return {
            "sense_ohm": self.sense_ohm,
            "vl_V": self.vl,
            "r_loop_ohm": self.r_loop_ohm,
            "col": self.col,
            "vl_col": self.vl_col,
            "time_col": self.time_col,
            "dt_s": self.dt_s,
        }


@dataclass(frozen=True)
class HeatParams:
    """What ``kitbin heat`` needs besides the file (SI units; temperatures °C)."""

    current_A: float
    rise_K: float = 40.0
    dcr_ohm: float | None = None
    dcr_temp_C: float = 20.0
    t0_s: float | None = None
    col: str | None = None
    time_col: str | None = None
    dt_s: float | None = None

    def as_json(self) -> dict[str, Any]:
        return {
            "current_A": self.current_A,
            "rise_K": self.rise_K,
            "dcr_ohm": self.dcr_ohm,
            "dcr_temp_C": self.dcr_temp_C,
            "t0_s": self.t0_s,
            "col": self.col,
            "time_col": self.time_col,
            "dt_s": self.dt_s,
        }


@dataclass(frozen=True)
class RampRun:
    """A ramp analysis with the data it came from."""

    capture: CaptureData
    current: Any  # numpy array (A)
    result: RampResult
    sense_column: str
    vl_column: str | None
    summary: dict[str, Any] = field(default_factory=dict)


# -- reading files --------------------------------------------------------------------


def _sha256(content: bytes | Path) -> str:
    if isinstance(content, Path):
        try:
            with content.open("rb") as handle:
                return hashlib.file_digest(handle, "sha256").hexdigest()
        except OSError as e:
            raise CaptureError(f"{content}: cannot read ({e.strerror})") from None
    return hashlib.sha256(content).hexdigest()


def read_file(path: str | Path) -> bytes:
    """The bytes of a capture file, or a :class:`CaptureError` naming it."""
    p = Path(path)
    try:
        return p.read_bytes()
    except FileNotFoundError:
        raise CaptureError(f"{p}: no such file") from None
    except IsADirectoryError:
        raise CaptureError(f"{p}: is a directory, expected a capture file") from None
    except OSError as e:
        raise CaptureError(f"{p}: cannot read ({e.strerror})") from None


def _key(text: str | None) -> str | int | None:
    if text is None:
        return None
    stripped = text.strip()
    return int(stripped) if stripped.isdigit() else stripped


# -- ramp -------------------------------------------------------------------------------


def analyse_ramp_bytes(
    content: bytes | Path, params: RampParams, *, source: str = "capture"
) -> RampRun:
    """Read and analyse a current-ramp capture (no database).

    ``content`` is the file's bytes, or its path: a path lets pandas parse a
    large file on several threads (see :func:`kitbin.measure.reader.read_capture`).

    Raises
    ------
    CaptureError
        For an unreadable capture or one with no rising current segment.
    """
    from kitbin.measure.ramp import analyse_ramp
    from kitbin.measure.reader import read_capture

    if params.vl is None and params.vl_col is None:
        raise CaptureError(
            f"{source}: the inductor voltage is not given",
            "give --vl 12V (supply) or --vl-col NAME (a measured channel)",
        )
    # with --col, load only the named channels (a broken unused column does not matter)
    columns: list[str | int] | None = None
    if params.col is not None:
        columns = [k for k in (_key(params.col), _key(params.vl_col)) if k is not None]
    cap = read_capture(
        content, columns=columns, time_col=_key(params.time_col), dt=params.dt_s, source=source
    )
    names = list(cap.channels)
    if params.col is not None:
        sense_name, sense = cap.channel(_key(params.col))
    else:
        free = [n for n in names if params.vl_col is None or n != _vl_name(cap, params)]
        if not free:
            raise CaptureError(
                f"{source}: no sense-voltage channel besides the inductor-voltage channel",
                "give --col",
            )
        sense_name, sense = free[0], cap.channels[free[0]]
    vl_name = None
    if params.vl_col is not None:
        vl_name, vl = cap.channel(_key(params.vl_col))
        if vl_name == sense_name:
            raise CaptureError(f"{source}: --col and --vl-col name the same column {vl_name!r}")
        v_l: Any = vl
    else:
        v_l = params.vl
    result = analyse_ramp(
        cap.time,
        sense,
        r_sense=params.sense_ohm,
        v_l=v_l,
        r_loop=params.r_loop_ohm,
        source=source,
    )
    run = RampRun(
        capture=cap,
        current=sense / params.sense_ohm,
        result=result,
        sense_column=sense_name,
        vl_column=vl_name,
    )
    return run


def _vl_name(cap: CaptureData, params: RampParams) -> str | None:
    if params.vl_col is None:
        return None
    return cap.channel(_key(params.vl_col))[0]


def ramp_summary(run: RampRun) -> dict[str, Any]:
    """The ``kitbin ramp --json`` keys (see docs/measuring.md)."""
    r = run.result
    q = r.quality
    return {
        "l0_H": _num(r.l0_H),
        "isat_A": {str(k): _num(v) for k, v in r.isat_A.items()},
        "i_max_A": _num(r.i_max_A),
        "saturated": bool(r.saturated),
        "ramps": q.ramps,
        "points": q.points,
        "i_min_A": _num(q.i_min_A),
        "l0_window_A": [_num(r.l0_window_A[0]), _num(r.l0_window_A[1])],
        "l0_spread": _num(q.l0_spread),
        "noise_A": _num(q.noise_A),
        "lsb_A": _num(q.lsb_A),
        "window_s": _num(q.window_s),
        "samples": run.capture.n,
        "dt_s": _num(run.capture.dt),
        "time_source": run.capture.time_source,
        "sense_column": run.sense_column,
        "vl_column": run.vl_column,
        "warnings": [*run.capture.notes, *q.warnings],
        "curve": {
            "i_A": [float(v) for v in r.curve_i_A],
            "L_H": [float(v) for v in r.curve_L_H],
            "n": [int(v) for v in r.curve_n],
        },
    }


def ramp(
    content: bytes | Path,
    params: RampParams,
    *,
    label: str,
    file_name: str,
    store: Store | None = None,
    plot: str | Path | None = None,
    run: RampRun | None = None,
) -> dict[str, Any]:
    """Analyse a ramp capture; draw it; save it on bin ``label`` when ``store`` is given.

    ``run`` is an analysis of the same content already made (it is not repeated).
    Returns the :func:`ramp_summary` keys plus ``bin``, ``file``, ``sha256``,
    ``capture_id`` and ``readings`` (ids; empty when not saved) and ``plot``.
    """
    if run is None:
        run = analyse_ramp_bytes(content, params, source=file_name)
    data = ramp_summary(run)
    digest = _sha256(content)
    data.update({"bin": label, "file": file_name, "sha256": digest})
    data["capture_id"], data["readings"] = None, []
    if plot is not None:
        data["plot"] = str(plot_ramp(run, plot, title=f"{label}: {file_name}"))
    if store is not None:
        raw = read_file(content) if isinstance(content, Path) else content
        cap_id, reading_ids = save_ramp(store, label, file_name, raw, params, run, data)
        data["capture_id"], data["readings"] = cap_id, reading_ids
    return data


def save_ramp(
    store: Store,
    label: str,
    file_name: str,
    content: bytes,
    params: RampParams,
    run: RampRun,
    summary: dict[str, Any],
) -> tuple[int, list[int]]:
    """Store the capture, its low-bias inductance, Isat readings and L(i) curve (one unit of work).

    Isat not reached is stored as ``>= i_max`` (a lower bound).
    """
    from kitbin.store.models import Capture, Reading

    r = run.result
    results = {k: v for k, v in summary.items() if k not in ("curve", "readings", "capture_id")}
    with store.transaction() as session:
        b = _bin(session, label)
        _refuse_duplicate(session, b, summary["sha256"], label)
        cap = Capture(
            bin_id=b.id,
            kind="ramp",
            file_name=file_name,
            sha256=summary["sha256"],
            content=zlib.compress(content, 6),
            params=params.as_json(),
            results=results,
            curve=summary["curve"],
        )
        session.add(cap)
        session.flush()
        conditions: dict[str, Any] = {}
        if params.vl is not None:
            conditions["vdc"] = params.vl
        readings = [
            Reading(
                bin_id=b.id,
                quantity="inductance",
                value=r.l0_H,
                bound="=",
                conditions={**conditions, "bias": 0.5 * (r.l0_window_A[0] + r.l0_window_A[1])},
                method="ramp",
                capture_id=cap.id,
                note=f"median L over {r.l0_window_A[0]:.3g}..{r.l0_window_A[1]:.3g} A",
            )
        ]
        for percent in sorted(r.isat_A):
            bound, value = r.isat_bound(percent)
            readings.append(
                Reading(
                    bin_id=b.id,
                    quantity=f"isat_{percent}",
                    value=value,
                    bound=bound,
                    conditions={**conditions, "drop": percent / 100.0},
                    method="ramp",
                    capture_id=cap.id,
                    note=None if bound == "=" else f"L fell less than {percent} % up to i_max",
                )
            )
        session.add_all(readings)
        session.flush()
        return cap.id, [rd.id for rd in readings]


def plot_ramp(run: RampRun, path: str | Path, *, title: str = "") -> Path:
    """Draw the current trace (rising segments marked) and L(i) to a PNG (matplotlib, Agg)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt  # ~400 ms, only when a plot is asked for
    import numpy as np

    out = Path(path)
    r = run.result
    t = run.capture.time
    step = max(1, t.shape[0] // 20_000)
    fig, (ax_i, ax_l) = plt.subplots(2, 1, figsize=(8, 7), constrained_layout=True)
    ax_i.plot(t[::step] * 1e6, run.current[::step], lw=0.7, color="0.4", label="current")
    for k, (a, b) in enumerate(r.segments):
        ax_i.plot(
            t[a : b + 1] * 1e6,
            run.current[a : b + 1],
            lw=1.0,
            color="tab:blue",
            label="rising segments used" if k == 0 else None,
        )
    ax_i.set_xlabel("time (µs)")
    ax_i.set_ylabel("current (A)")
    ax_i.legend(loc="upper right")
    ax_i.set_title(title)
    ax_l.plot(r.curve_i_A, r.curve_L_H * 1e6, marker=".", color="tab:blue", label="L(i), median")
    ax_l.axhline(r.l0_H * 1e6, color="0.5", ls=":", label=f"L0 = {r.l0_H * 1e6:.3g} µH")
    for percent, value in r.isat_A.items():
        if value is not None:
            ax_l.axvline(value, ls="--", lw=0.8, color="tab:red")
            ax_l.annotate(
                f"{percent} %",
                (value, r.l0_H * 1e6 * (1 - percent / 100)),
                textcoords="offset points",
                xytext=(3, 3),
                fontsize=8,
            )
    ax_l.set_xlabel("current (A)")
    ax_l.set_ylabel("incremental inductance (µH)")
    ax_l.set_ylim(0, float(np.nanmax(r.curve_L_H)) * 1e6 * 1.15)
    ax_l.legend(loc="lower left")
    try:
        fig.savefig(out, dpi=110)
    except OSError as e:
        raise KitbinError(f"{out}: cannot write the plot ({e.strerror})") from None
    finally:
        plt.close(fig)
    return out


# -- heat ------------------------------------------------------------------------------


def analyse_heat_bytes(
    content: bytes, params: HeatParams, *, source: str = "temperature log"
) -> tuple[CaptureData, str, HeatFit]:
    """Read a temperature log and fit the heating curve (no database)."""
    from kitbin.measure.reader import read_capture
    from kitbin.measure.thermal import fit_heating

    cap = read_capture(
        content,
        columns=[_key(params.col)] if params.col is not None else None,
        time_col=_key(params.time_col),
        dt=params.dt_s,
        source=source,
        min_samples=8,
    )
    name, temps = cap.channel(_key(params.col) if params.col is not None else None)
    return cap, name, fit_heating(cap.time, temps, t0=params.t0_s, source=source)


def heat_summary(
    rating: ThermalRating, cap: CaptureData, column: str, dcr_source: str | None
) -> dict[str, Any]:
    """The ``kitbin heat --json`` keys (see docs/measuring.md)."""
    f = rating.fit
    return {
        "t_amb_C": _num(f.t_amb_C),
        "rise_ss_K": _num(f.rise_ss_K),
        "tau_s": _num(f.tau_s),
        "uncertainty": {
            "t_amb_C": _num(f.sigma_t_amb_C),
            "rise_ss_K": _num(f.sigma_rise_K),
            "tau_s": _num(f.sigma_tau_s),
        },
        "t_hot_C": _num(rating.t_hot_C),
        "current_A": _num(rating.current_A),
        "allowed_rise_K": _num(rating.allowed_rise_K),
        "r20_ohm": _num(rating.r20_ohm),
        "dcr_source": dcr_source,
        "power_W": _num(rating.power_W),
        "r_th_K_per_W": _num(rating.r_th_K_per_W),
        "i_for_rise_A": _num(rating.i_for_rise_A),
        "seconds_to_limit": _num(rating.seconds_to_limit),
        "runaway_current_A": _num(rating.runaway_current_A),
        "reached_fraction": _num(f.reached),
        "length_tau": _num(f.length_tau),
        "rms_K": _num(f.rms_K),
        "samples": cap.n,
        "temperature_column": column,
        "flags": list(rating.flags),
    }


def heat(
    content: bytes,
    params: HeatParams,
    *,
    label: str,
    file_name: str,
    store: Store | None = None,
    save: bool = False,
) -> dict[str, Any]:
    """Fit a heating log; rate the part; save it on bin ``label`` when ``save``.

    With ``store`` given, a DCR not passed in ``params`` is taken from the bin's
    ``dcr`` readings, and the bin's earlier heating captures join this one in a
    ``ΔT = a·I² + b`` fit when they were taken at other currents.
    """
    from kitbin.measure.thermal import rate_heating

    cap, column, fit = analyse_heat_bytes(content, params, source=file_name)
    dcr, dcr_temp, dcr_source = params.dcr_ohm, params.dcr_temp_C, None
    previous: list[tuple[float, float]] = []
    if dcr is not None:
        dcr_source = "given"
    notes: list[str] = []
    if store is not None:
        with store.transaction() as session:
            b = _lookup_bin(session, label, must=save)
            if b is None:
                notes.append(f"no bin labelled '{label}' in the inventory: no DCR, no earlier logs")
            else:
                if dcr is None:
                    found = _bin_dcr(b)
                    if found is not None:
                        dcr, dcr_temp, dcr_source = found
                previous = [
                    (float(c.results["current_A"]), float(c.results["rise_ss_K"]))
                    for c in b.captures
                    if c.kind == "heat"
                    and c.results.get("rise_ss_K") is not None
                    and "poorly constrained" not in c.results.get("flags", [])
                ]
    rating = rate_heating(
        fit, params.current_A, r_dcr=dcr, t_dcr=dcr_temp, allowed_rise=params.rise_K
    )
    data = heat_summary(rating, cap, column, dcr_source)
    digest = hashlib.sha256(content).hexdigest()
    data.update({"bin": label, "file": file_name, "sha256": digest})
    data["loss_split"] = _loss_split([*previous, (params.current_A, fit.rise_ss_K)])
    data["notes"] = [*cap.notes, *notes]
    data["capture_id"], data["readings"] = None, []
    if save:
        if store is None:
            raise StoreError("saving a heating log needs a database")
        cap_id, ids = save_heat(store, label, file_name, content, params, rating, data)
        data["capture_id"], data["readings"] = cap_id, ids
    return data


def save_heat(
    store: Store,
    label: str,
    file_name: str,
    content: bytes,
    params: HeatParams,
    rating: ThermalRating,
    summary: dict[str, Any],
) -> tuple[int, list[int]]:
    """Store a heating log with its readings (one unit of work).

    A poorly constrained fit stores only the rise actually seen, as a lower
    bound (``rise >=``); R_th and the current rating are not stored from it.
    """
    from kitbin.store.models import Capture, Reading

    f = rating.fit
    results = {k: v for k, v in summary.items() if k not in ("readings", "capture_id")}
    poor = "poorly constrained" in rating.flags
    note = ("flags: " + ", ".join(rating.flags)) if rating.flags else None
    conditions = {"idc": rating.current_A, "ambient": f.t_amb_C}
    with store.transaction() as session:
        b = _bin(session, label)
        _refuse_duplicate(session, b, summary["sha256"], label)
        cap = Capture(
            bin_id=b.id,
            kind="heat",
            file_name=file_name,
            sha256=summary["sha256"],
            content=zlib.compress(content, 6),
            params=params.as_json(),
            results=results,
            curve=None,
        )
        session.add(cap)
        session.flush()

        def reading(quantity: str, value: float, bound: str = "=", **extra: Any) -> Reading:
            return Reading(
                bin_id=b.id,
                quantity=quantity,
                value=float(value),
                bound=bound,
                conditions={**conditions, **extra},
                method="heat",
                capture_id=cap.id,
                note=note,
            )

        rows: list[Reading] = []
        if poor:
            seen = f.reached * f.rise_ss_K
            rows.append(reading("rise", max(seen, 0.0), ">="))
        else:
            rows.append(reading("rise", f.rise_ss_K))
            rows.append(reading("tau_th", f.tau_s))
            if rating.r_th_K_per_W is not None:
                rows.append(reading("r_th", rating.r_th_K_per_W))
            rows.append(reading("i_rise", rating.i_for_rise_A, rise_limit=rating.allowed_rise_K))
        session.add_all(rows)
        session.flush()
        return cap.id, [r.id for r in rows]


def _bin_dcr(b: Any) -> tuple[float, float, str] | None:
    """Median of a bin's measured DCR readings and the temperature they were taken at."""
    values = [r for r in b.readings if r.quantity == "dcr" and r.bound == "="]
    if not values:
        return None
    values.sort(key=lambda r: r.value)
    mid = values[len(values) // 2]
    temp = (mid.conditions or {}).get("temp", (mid.conditions or {}).get("ambient"))
    t = float(temp) if temp is not None else 20.0
    return (
        float(mid.value),
        t,
        f"bin reading #{mid.id}" + ("" if temp is not None else " (20 °C assumed)"),
    )


def _loss_split(points: Sequence[tuple[float, float]]) -> dict[str, Any] | None:
    from kitbin.measure.thermal import split_losses

    currents = sorted({round(i, 9) for i, _ in points})
    if len(currents) < 2:
        return None
    split = split_losses([i for i, _ in points], [r for _, r in points])
    return {
        "a_K_per_A2": _num(split.a_K_per_A2),
        "b_K": _num(split.b_K),
        "sigma_a": _num(split.sigma_a),
        "sigma_b": _num(split.sigma_b),
        "logs": split.points,
    }


# -- ring ------------------------------------------------------------------------------


def ring(
    caps_F: Sequence[float],
    freqs_Hz: Sequence[float],
    *,
    label: str,
    fixture_F: float = 0.0,
    inductance_H: float | None = None,
    store: Store | None = None,
) -> dict[str, Any]:
    """Inductance (or, with ``inductance_H``, capacitance) from LC resonance.

    One capacitor: ``L = 1/((2πf)²(C + C_fixture))``. Two or more: the line of
    1/f² against C gives L and the parallel capacitance Cp (self plus fixture).
    Saves an ``inductance`` (or ``capacitance``) reading when ``store`` is given.
    """
    from kitbin.measure import resonance as rs

    if len(caps_F) != len(freqs_Hz) or not caps_F:
        raise CaptureError("give one --freq for each --cap")
    data: dict[str, Any] = {"bin": label, "fixture_cap_F": fixture_F}
    if inductance_H is not None:
        if len(caps_F) != 1:
            raise CaptureError("with --ind, give one --freq (the capacitor under test)")
        c = rs.capacitance_from_resonance(freqs_Hz[0], inductance_H, fixture_F)
        if not c > 0:
            raise CaptureError(
                "the fixture capacitance is larger than the total: check --fixture-cap and --freq"
            )
        data.update({"method": "resonance", "c_F": c, "l_H": None, "cp_F": None, "points": 1})
        quantity, value, freq = "capacitance", c, freqs_Hz[0]
    elif len(caps_F) == 1:
        value = rs.inductance_from_resonance(freqs_Hz[0], caps_F[0], fixture_F)
        data.update({"method": "resonance", "l_H": value, "c_F": None, "cp_F": None, "points": 1})
        quantity, freq = "inductance", freqs_Hz[0]
    else:
        fit = rs.fit_stray(caps_F, freqs_Hz)
        data.update(
            {
                "method": "resonance line",
                "l_H": fit.l_H,
                "c_F": None,
                "cp_F": fit.cp_F,
                "points": fit.points,
                "max_residual": fit.max_residual,
            }
        )
        quantity, value, freq = "inductance", fit.l_H, max(freqs_Hz)
    data["readings"] = []
    if store is not None:
        from kitbin.store.models import Reading

        with store.transaction() as session:
            b = _bin(session, label)
            rd = Reading(
                bin_id=b.id,
                quantity=quantity,
                value=float(value),
                bound="=",
                conditions={"freq": float(freq)},
                method="resonance",
                note=(
                    f"C = {', '.join(f'{c:.4g}' for c in caps_F)} F; "
                    f"f = {', '.join(f'{f:.6g}' for f in freqs_Hz)} Hz"
                ),
            )
            session.add(rd)
            session.flush()
            data["readings"] = [rd.id]
    return data


# -- demo -------------------------------------------------------------------------------


def demo_manifest() -> dict[str, Any]:
    """The demo captures' manifest: file, bin label, kind and analysis parameters."""
    text = resources.files(DEMO_CAPTURES).joinpath(MANIFEST).read_text(encoding="utf-8")
    return json.loads(text)


def load_demo_captures(
    store: Store, *, labels: Sequence[str] | None = None
) -> list[dict[str, Any]]:
    """Analyse the demo workshop's captures and save them on their bins.

    Parameters
    ----------
    store
        An open store whose demo bins (see the manifest) already exist.
    labels
        Only captures for these bins; all when None.

    Returns
    -------
    list of dict
        One summary per capture (the ``ramp`` or ``heat`` keys).
    """
    manifest = demo_manifest()
    out: list[dict[str, Any]] = []
    folder = resources.files(DEMO_CAPTURES)
    for entry in manifest["captures"]:
        if labels is not None and entry["bin"] not in labels:
            continue
        content = folder.joinpath(entry["file"]).read_bytes()
        p = entry["params"]
        if entry["kind"] == "ramp":
            params = RampParams(
                sense_ohm=p["sense_ohm"],
                vl=p.get("vl_V"),
                r_loop_ohm=p.get("r_loop_ohm", 0.0),
                col=p.get("col"),
                vl_col=p.get("vl_col"),
                time_col=p.get("time_col"),
                dt_s=p.get("dt_s"),
            )
            out.append(
                ramp(content, params, label=entry["bin"], file_name=entry["file"], store=store)
            )
        elif entry["kind"] == "heat":
            params_h = HeatParams(
                current_A=p["current_A"],
                rise_K=p.get("rise_K", 40.0),
                dcr_ohm=p.get("dcr_ohm"),
                dcr_temp_C=p.get("dcr_temp_C", 20.0),
                t0_s=p.get("t0_s"),
                col=p.get("col"),
                time_col=p.get("time_col"),
                dt_s=p.get("dt_s"),
            )
            out.append(
                heat(
                    content,
                    params_h,
                    label=entry["bin"],
                    file_name=entry["file"],
                    store=store,
                    save=True,
                )
            )
    return out


# -- helpers ----------------------------------------------------------------------------


def _num(value: float | None) -> float | None:
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _bin(session: Any, label: str) -> Any:
    from kitbin.services.inventory import get_bin

    return get_bin(session, label)


def _lookup_bin(session: Any, label: str, *, must: bool) -> Any:
    """The bin, or None when it does not exist and ``must`` is False."""
    from kitbin.errors import NotFoundError

    try:
        return _bin(session, label)
    except NotFoundError:
        if must:
            raise
        return None


def _refuse_duplicate(session: Any, b: Any, digest: str, label: str) -> None:
    for c in b.captures:
        if c.sha256 == digest:
            raise KitbinError(
                f"this capture is already stored on {label} (capture {c.id}); nothing was written"
            )

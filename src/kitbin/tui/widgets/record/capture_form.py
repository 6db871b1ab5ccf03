"""The capture form's fields and how they are read into bench parameters (pure)."""

from __future__ import annotations

from dataclasses import dataclass

from kitbin.errors import QuantityError
from kitbin.services.bench import HeatParams, RampParams
from kitbin.units import parse_quantity

#: (key, label, hint, kinds the field belongs to)
FIELDS: tuple[tuple[str, str, str, tuple[str, ...]], ...] = (
    ("file", "file", "path of the capture file (CSV, TSV, text)", ("ramp", "heat")),
    ("sense", "sense R", "sense resistor, e.g. 0.1ohm", ("ramp",)),
    ("vl", "inductor V", "voltage across the inductor, e.g. 9V", ("ramp",)),
    ("vl_col", "or V column", "column measuring that voltage, e.g. CH2", ("ramp",)),
    ("r_loop", "loop R", "loop resistance, e.g. 0.25ohm (optional)", ("ramp",)),
    ("current", "test current", "DC current of the run, e.g. 1.5A", ("heat",)),
    ("rise", "allowed rise", "temperature rise allowed, default 40K", ("heat",)),
    ("dcr", "DCR", "DC resistance at 20 °C (optional; else the bin's readings)", ("heat",)),
    ("col", "column", "channel to use (optional; default the first)", ("ramp", "heat")),
    ("dt", "sample step", "only when the file has no time column, e.g. 2ns", ("ramp", "heat")),
)


@dataclass(frozen=True)
class CaptureForm:
    """What the form says: the kind, the file and the analysis parameters."""

    kind: str
    path: str
    ramp: RampParams | None = None
    heat: HeatParams | None = None


def _value(values: dict[str, str], key: str, dimension: str, problems: list[str]) -> float | None:
    text = (values.get(key) or "").strip()
    if not text:
        return None
    try:
        return parse_quantity(text, dimension)
    except QuantityError as error:
        problems.append(f"{key}: {error.msg}")
        return None


def read_form(kind: str, values: dict[str, str]) -> tuple[CaptureForm | None, list[str]]:
    """(form, problems) from the field texts of a ``ramp`` or ``heat`` capture."""
    problems: list[str] = []
    path = (values.get("file") or "").strip()
    if not path:
        problems.append("file: give the path of the capture file")
    col = (values.get("col") or "").strip() or None
    dt = _value(values, "dt", "time", problems)
    if kind == "ramp":
        sense = _value(values, "sense", "resistance", problems)
        vl = _value(values, "vl", "voltage", problems)
        r_loop = _value(values, "r_loop", "resistance", problems)
        vl_col = (values.get("vl_col") or "").strip() or None
        if sense is None and not any(p.startswith("sense") for p in problems):
            problems.append("sense R: give the sense resistor, e.g. 0.1ohm")
        elif sense is not None and sense <= 0:
            problems.append("sense R: must be above zero")
        if vl is None and vl_col is None and not any(p.startswith("vl") for p in problems):
            problems.append("inductor V: give a voltage (9V) or the column measuring it")
        if problems:
            return None, problems
        params = RampParams(
            sense_ohm=float(sense),  # type: ignore[arg-type]
            vl=vl,
            r_loop_ohm=r_loop or 0.0,
            col=col,
            vl_col=vl_col,
            dt_s=dt,
        )
        return CaptureForm("ramp", path, ramp=params), []
    current = _value(values, "current", "current", problems)
    rise = _value(values, "rise", "temperature_rise", problems)
    dcr = _value(values, "dcr", "resistance", problems)
    if current is None and not any(p.startswith("current") for p in problems):
        problems.append("test current: give the DC current of the run, e.g. 1.5A")
    if problems:
        return None, problems
    heat = HeatParams(
        current_A=float(current),  # type: ignore[arg-type]
        rise_K=rise if rise is not None else 40.0,
        dcr_ohm=dcr,
        col=col,
        dt_s=dt,
    )
    return CaptureForm("heat", path, heat=heat), []

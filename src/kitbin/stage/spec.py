"""The converter specification: what a plan asks of a power stage.

A :class:`Spec` is a frozen dataclass of SI floats. Every field has a documented
default and the place the default comes from; :data:`DEFAULT_SOURCES` holds the
same text for the command line and the docs (``docs/power-stage.md``). Building a
``Spec`` validates it and raises :class:`kitbin.errors.SpecError` with one line
naming the field and what was expected.

Conventions (REFERENCES section 0): ripple currents and voltages are
peak-to-peak; the ripple ratio is r = ΔI / IL (against the average inductor
current, as in Maniktala, *Switching Power Supplies A to Z*, 2nd ed., ch. 2); for
the inverting buck-boost ``vout`` is the magnitude of the negative output.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field, fields
from typing import Any

from kitbin.errors import SpecError
from kitbin.units import format_quantity

TOPOLOGIES = ("buck", "boost", "invert")
RECTIFIERS = ("diode", "sync")
ISAT_DROPS = (10, 20, 30)

COMMON = "common practice, no source"

#: Where each default comes from, by field name (shown by ``--help`` and the docs).
DEFAULT_SOURCES: dict[str, str] = {
    "iout_min": "10 % of iout_max when not given (" + COMMON + ")",
    "rectifier": "diode (asynchronous stage), the usual kit build (" + COMMON + ")",
    "vf": "0.4 V, a small Schottky diode near its rated current (" + COMMON + ")",
    "r_rect": "0 Ω: the low-side switch is ideal unless given",
    "rsw": "0 Ω: the switch is ideal unless given (a controller's rds_on fills it)",
    "ripple_ratio": "0.3 (r = ΔI/IL), inside the usual 0.2–0.4 (" + COMMON + ")",
    "vout_ripple_max": "1 % of vout when not given (" + COMMON + ")",
    "vin_ripple_max": "2 % of vin_min when not given (" + COMMON + ")",
    "t_ambient": "25 °C, a bench (" + COMMON + ")",
    "rise_max": "40 K, the rise most Irms ratings are quoted at (" + COMMON + ")",
    "isat_drop": "20 % inductance drop defines Isat (" + COMMON + ")",
    "isat_margin": (
        "1.25 × Ipk: the middle of the usual 1.2–1.3 rule ("
        + COMMON
        + "), because a kit part's Isat comes from one or two specimens at room temperature "
        "and ferrite saturates earlier when hot"
    ),
    "cap_voltage_margin": "1.5 × working voltage for class 2 ceramics (" + COMMON + ")",
    "vrrm_margin": "1.25 × the reverse voltage for a Schottky (" + COMMON + ")",
    "diode_current_margin": (
        "1.5 × the average current: a kit diode's rating is quoted at a case temperature "
        "a breadboard does not hold (" + COMMON + ")"
    ),
    "vout_tol": "3 % allowed output error (" + COMMON + ")",
    "survive_short": (
        "True: the inductor must not saturate below the current limit when the output is "
        "overloaded or shorted (" + COMMON + ")"
    ),
    "ilim_headroom": (
        "1.25 × Ipk for a current limit set by a resistor, so full load never trips it "
        "(" + COMMON + ")"
    ),
    "fsw_tol": "±10 % between the plan's and a controller's switching frequency (" + COMMON + ")",
    "rbottom_min": (
        "1 kΩ lower end of the feedback divider's bottom resistor: below it the divider "
        "wastes power and loads the output (" + COMMON + ")"
    ),
    "rbottom_max": (
        "100 kΩ upper end of the feedback divider's bottom resistor: above it the "
        "feedback-pin current, leakage and noise pickup shift the output (" + COMMON + ")"
    ),
}


@dataclass(frozen=True)
class ExtraPart:
    """A fixed part the user adds to a plan (e.g. a bootstrap capacitor).

    Parameters
    ----------
    name
        Short name, becomes the role ``extra:<name>``.
    quantity
        A quantity name from :mod:`kitbin.quantities`.
    op
        ``">="`` or ``"<="``.
    limit
        The limit in SI units.
    reason
        Why the user wants it (free text).
    """

    name: str
    quantity: str
    op: str
    limit: float
    reason: str = ""


@dataclass(frozen=True)
class Spec:
    """A DC-DC power-stage specification (SI units; °C for temperatures, K for rises).

    Parameters
    ----------
    topology
        ``"buck"``, ``"boost"`` or ``"invert"`` (inverting buck-boost).
    vin_min, vin_max
        Input voltage range (V), lowest first.
    vout
        Output voltage (V); for ``invert`` the magnitude of the negative output.
    iout_max
        Full load (A).
    fsw
        Switching frequency (Hz).
    iout_min
        Light load (A); None means 10 % of ``iout_max``.
    rectifier
        ``"diode"`` (asynchronous, forward drop ``vf``) or ``"sync"`` (low-side switch
        of resistance ``r_rect``; runs in forced CCM).
    vf
        Diode forward drop (V).
    r_rect
        Synchronous rectifier on-resistance (Ω).
    rsw
        Main switch on-resistance (Ω).
    ripple_ratio
        Target r = ΔI/IL at full load, sets the smallest inductance.
    vout_ripple_max
        Allowed peak-to-peak output ripple (V); None means 1 % of ``vout``.
    vin_ripple_max
        Allowed peak-to-peak input ripple (V); None means 2 % of ``vin_min``.
    t_ambient
        Ambient temperature (°C).
    rise_max
        Allowed temperature rise of the inductor (K).
    isat_drop
        Which Isat is compared: the current at a 10, 20 or 30 % inductance drop.
    isat_margin
        Required Isat as a multiple of the worst full-load peak current.
    cap_voltage_margin
        Required capacitor rated voltage as a multiple of the working voltage.
    vrrm_margin
        Required diode V_RRM as a multiple of its reverse voltage.
    diode_current_margin
        Required diode average-current rating as a multiple of its average current.
    vout_tol
        Allowed output-voltage error (fraction) the feedback divider must meet.
    survive_short
        Require Isat at or above the controller's current limit (overload, short).
    ilim, ton_min, d_max, vref, vref_tol, ifb, ilim_gain, ctrl_vin_min, ctrl_vin_max
        Controller properties where known (A, s, fraction, V, fraction, A, V, V, V):
        current limit, minimum on-time, maximum duty, feedback reference and its
        tolerance, feedback-pin current, current-limit set gain (Ilim = ilim_gain /
        Rset), controller input range. None when unknown.
    ilim_target
        Current limit wanted from a set resistor (A); None means ``ilim_headroom`` × Ipk.
    ilim_headroom
        Multiple of the worst peak current used when ``ilim_target`` is None.
    fsw_tol
        Allowed relative difference between ``fsw`` and a controller's frequency.
    rbottom_min, rbottom_max
        Range the feedback divider's bottom resistor (or leg) is searched in, Ω.
    extras
        Fixed parts added by the user.
    controller
        Label of the controller bin the plan uses (its properties filled the
        controller fields), or None.
    """

    topology: str
    vin_min: float
    vin_max: float
    vout: float
    iout_max: float
    fsw: float
    iout_min: float | None = None
    rectifier: str = "diode"
    vf: float = 0.4
    r_rect: float = 0.0
    rsw: float = 0.0
    ripple_ratio: float = 0.3
    vout_ripple_max: float | None = None
    vin_ripple_max: float | None = None
    t_ambient: float = 25.0
    rise_max: float = 40.0
    isat_drop: int = 20
    isat_margin: float = 1.25
    cap_voltage_margin: float = 1.5
    vrrm_margin: float = 1.25
    diode_current_margin: float = 1.5
    vout_tol: float = 0.03
    survive_short: bool = True
    ilim: float | None = None
    ton_min: float | None = None
    d_max: float | None = None
    vref: float | None = None
    vref_tol: float | None = None
    ifb: float | None = None
    ilim_gain: float | None = None
    ctrl_vin_min: float | None = None
    ctrl_vin_max: float | None = None
    ilim_target: float | None = None
    ilim_headroom: float = 1.25
    fsw_tol: float = 0.1
    rbottom_min: float = 1e3
    rbottom_max: float = 100e3
    extras: tuple[ExtraPart, ...] = field(default=())
    controller: str | None = None

    def __post_init__(self) -> None:
        validate(self)

    # -- effective values of fields whose default depends on others ---------------
    @property
    def load_min(self) -> float:
        """Light load (A): ``iout_min`` or 10 % of ``iout_max``."""
        return 0.1 * self.iout_max if self.iout_min is None else self.iout_min

    @property
    def vout_ripple_limit(self) -> float:
        """Allowed output ripple (V p-p): ``vout_ripple_max`` or 1 % of ``vout``."""
        return 0.01 * self.vout if self.vout_ripple_max is None else self.vout_ripple_max

    @property
    def vin_ripple_limit(self) -> float:
        """Allowed input ripple (V p-p): ``vin_ripple_max`` or 2 % of ``vin_min``."""
        return 0.02 * self.vin_min if self.vin_ripple_max is None else self.vin_ripple_max

    @property
    def synchronous(self) -> bool:
        """True for a synchronous rectifier (no catch diode)."""
        return self.rectifier == "sync"

    @property
    def isat_quantity(self) -> str:
        """The quantity name of the Isat compared (``isat_20`` by default)."""
        return f"isat_{self.isat_drop}"

    @property
    def v_rect(self) -> float:
        """Constant forward drop of the rectifier (V): ``vf`` for a diode, 0 for sync."""
        return 0.0 if self.synchronous else self.vf

    @property
    def r_rect_eff(self) -> float:
        """Resistance of the rectifier path (Ω): ``r_rect`` for sync, 0 for a diode."""
        return self.r_rect if self.synchronous else 0.0

    def to_dict(self) -> dict[str, Any]:
        """Plain JSON-able dict (extras as dicts); inverse of :func:`spec_from_dict`."""
        data = asdict(self)
        data["extras"] = [asdict(x) for x in self.extras]
        return data


SPEC_FIELDS: tuple[str, ...] = tuple(f.name for f in fields(Spec))

#: Dimension (for :func:`kitbin.units.parse_quantity`) of each numeric spec field.
FIELD_DIMENSIONS: dict[str, str] = {
    "vin_min": "voltage",
    "vin_max": "voltage",
    "vout": "voltage",
    "iout_max": "current",
    "fsw": "frequency",
    "iout_min": "current",
    "vf": "voltage",
    "r_rect": "resistance",
    "rsw": "resistance",
    "ripple_ratio": "ratio",
    "vout_ripple_max": "voltage",
    "vin_ripple_max": "voltage",
    "t_ambient": "temperature",
    "rise_max": "temperature_rise",
    "isat_drop": "ratio",
    "isat_margin": "ratio",
    "cap_voltage_margin": "ratio",
    "vrrm_margin": "ratio",
    "diode_current_margin": "ratio",
    "vout_tol": "ratio",
    "ilim": "current",
    "ton_min": "time",
    "d_max": "ratio",
    "vref": "voltage",
    "vref_tol": "ratio",
    "ifb": "current",
    "ilim_gain": "voltage",
    "ctrl_vin_min": "voltage",
    "ctrl_vin_max": "voltage",
    "ilim_target": "current",
    "ilim_headroom": "ratio",
    "fsw_tol": "ratio",
    "rbottom_min": "resistance",
    "rbottom_max": "resistance",
}

#: Controller bin properties (names in :mod:`kitbin.quantities`) and the spec field each fills.
CONTROLLER_FIELDS: dict[str, str] = {
    "vref": "vref",
    "vref_tol": "vref_tol",
    "ifb": "ifb",
    "fsw": "fsw",
    "ilim": "ilim",
    "ilim_gain": "ilim_gain",
    "ton_min": "ton_min",
    "d_max": "d_max",
    "vin_min": "ctrl_vin_min",
    "vin_max": "ctrl_vin_max",
    "rds_on": "rsw",
}


def spec_summary(spec: Spec) -> str:
    """One line: ``buck: 9.00 V … 13.2 V → 5.00 V at 1.00 A, 1.20 MHz``."""
    vin = format_quantity(spec.vin_min, "voltage")
    if spec.vin_max != spec.vin_min:
        vin = f"{vin} … {format_quantity(spec.vin_max, 'voltage')}"
    sign = "−" if spec.topology == "invert" else ""
    return (
        f"{spec.topology}: {vin} → {sign}{format_quantity(spec.vout, 'voltage')} at "
        f"{format_quantity(spec.iout_max, 'current')}, {format_quantity(spec.fsw, 'frequency')}"
    )


def spec_from_dict(data: dict[str, Any]) -> Spec:
    """Build a :class:`Spec` from a dict such as :meth:`Spec.to_dict` gives.

    Raises
    ------
    SpecError
        On an unknown key, a missing required key, or an invalid value.
    """
    unknown = sorted(set(data) - set(SPEC_FIELDS))
    if unknown:
        raise SpecError(
            f"unknown spec field {unknown[0]!r}: expected one of {', '.join(SPEC_FIELDS)}"
        )
    required = ("topology", "vin_min", "vin_max", "vout", "iout_max", "fsw")
    missing = [k for k in required if data.get(k) is None]
    if missing:
        raise SpecError(f"spec is missing {missing[0]!r} (required: {', '.join(required)})")
    values = dict(data)
    extras = values.get("extras") or ()
    try:
        values["extras"] = tuple(x if isinstance(x, ExtraPart) else ExtraPart(**x) for x in extras)
    except TypeError as error:
        raise SpecError(f"extra part is malformed: {error}") from None
    for key, value in values.items():
        if key in {"topology", "rectifier", "extras", "survive_short", "controller"}:
            continue
        if value is None:
            continue
        if key == "isat_drop":
            if isinstance(value, bool) or not isinstance(value, int | float):
                raise SpecError(f"isat_drop {value!r}: expected 10, 20 or 30")
            values[key] = int(value)
            continue
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise SpecError(f"spec field {key!r} is {value!r}: expected a number")
        values[key] = float(value)
    if "survive_short" in values and not isinstance(values["survive_short"], bool):
        raise SpecError(f"survive_short {values['survive_short']!r}: expected true or false")
    return Spec(**values)


def _v(value: float) -> str:
    return format_quantity(value, "voltage")


def validate(spec: Spec) -> None:
    """Check a spec; raise :class:`SpecError` with one line on the first problem found."""
    import math

    if spec.topology not in TOPOLOGIES:
        raise SpecError(f"topology {spec.topology!r}: expected one of buck, boost, invert")
    if spec.controller is not None and not isinstance(spec.controller, str):
        raise SpecError(f"controller {spec.controller!r}: expected a bin label")
    if spec.rectifier not in RECTIFIERS:
        raise SpecError(f"rectifier {spec.rectifier!r}: expected diode or sync")
    for name in SPEC_FIELDS:
        value = getattr(spec, name)
        if isinstance(value, float) and not math.isfinite(value):
            raise SpecError(f"{name} is {value}: expected a finite number")
    if spec.vin_min <= 0:
        raise SpecError(f"input voltage {_v(spec.vin_min)}: expected a positive voltage")
    if spec.vin_min > spec.vin_max:
        raise SpecError(
            f"input range {spec.vin_min:g}..{spec.vin_max:g} V is written backwards: "
            f"write it low..high ({spec.vin_max:g}..{spec.vin_min:g}V)"
        )
    if spec.vout <= 0:
        raise SpecError(
            f"output voltage {_v(spec.vout)}: expected a positive voltage "
            "(for invert give the magnitude of the negative output)"
        )
    if spec.topology == "buck" and spec.vout >= spec.vin_min:
        raise SpecError(
            f"a buck cannot make {_v(spec.vout)} from {_v(spec.vin_min)}: "
            "the output must be below the lowest input (use boost or invert)"
        )
    if spec.topology == "boost" and spec.vout <= spec.vin_max:
        raise SpecError(
            f"a boost cannot make {_v(spec.vout)} from {_v(spec.vin_max)}: "
            "the output must be above the highest input (use buck or invert)"
        )
    if spec.fsw <= 0:
        raise SpecError(f"switching frequency {spec.fsw:g} Hz: expected a positive frequency")
    if spec.iout_max <= 0:
        raise SpecError(f"full load {spec.iout_max:g} A: expected a positive current")
    if spec.iout_min is not None:
        if spec.iout_min < 0:
            raise SpecError(f"light load {spec.iout_min:g} A: expected zero or more")
        if spec.iout_min > spec.iout_max:
            raise SpecError(
                f"light load {spec.iout_min:g} A is above full load {spec.iout_max:g} A: "
                "expected iout_min <= iout_max"
            )
    for name in ("vf", "r_rect", "rsw"):
        if getattr(spec, name) < 0:
            raise SpecError(f"{name} is {getattr(spec, name):g}: expected zero or more")
    if not 0 < spec.ripple_ratio < 2:
        raise SpecError(
            f"ripple ratio {spec.ripple_ratio:g}: expected 0 < r < 2 (r = ΔI/IL; CCM needs r < 2)"
        )
    for name in ("vout_ripple_max", "vin_ripple_max"):
        value = getattr(spec, name)
        if value is not None and value <= 0:
            raise SpecError(f"{name} is {value:g} V: expected a positive voltage")
    if spec.rise_max <= 0:
        raise SpecError(f"allowed temperature rise {spec.rise_max:g} K: expected a positive rise")
    if spec.isat_drop not in ISAT_DROPS:
        raise SpecError(f"Isat criterion {spec.isat_drop!r} %: expected 10, 20 or 30")
    for name in (
        "isat_margin",
        "cap_voltage_margin",
        "vrrm_margin",
        "diode_current_margin",
        "ilim_headroom",
    ):
        if getattr(spec, name) < 1:
            raise SpecError(f"{name} is {getattr(spec, name):g}: expected a factor of 1 or more")
    if not 0 < spec.vout_tol < 1:
        raise SpecError(f"output tolerance {spec.vout_tol:g}: expected a fraction between 0 and 1")
    if not 0 < spec.fsw_tol < 1:
        raise SpecError(f"fsw_tol {spec.fsw_tol:g}: expected a fraction between 0 and 1")
    if not 0 < spec.rbottom_min <= spec.rbottom_max:
        raise SpecError(
            f"bottom-resistor range {spec.rbottom_min:g}..{spec.rbottom_max:g} Ω: expected "
            "positive values, low..high"
        )
    for name in ("ilim", "ifb", "ilim_gain", "ilim_target", "ctrl_vin_min", "ctrl_vin_max"):
        value = getattr(spec, name)
        if value is not None and value < 0:
            raise SpecError(f"controller {name} is {value:g}: expected zero or more")
    if spec.ilim is not None and spec.ilim == 0:
        raise SpecError("controller current limit is 0 A: expected a positive current")
    if spec.ton_min is not None and spec.ton_min < 0:
        raise SpecError(f"minimum on-time {spec.ton_min:g} s: expected zero or more")
    if spec.d_max is not None and not 0 < spec.d_max <= 1:
        raise SpecError(f"maximum duty {spec.d_max:g}: expected a fraction in (0, 1]")
    if spec.vref is not None:
        if spec.vref <= 0:
            raise SpecError(f"reference voltage {_v(spec.vref)}: expected a positive voltage")
        if spec.vref >= spec.vout:
            raise SpecError(
                f"reference {_v(spec.vref)} is not below the output {_v(spec.vout)}: "
                "a feedback divider can only divide down"
            )
    if spec.vref_tol is not None:
        if not 0 <= spec.vref_tol < 1:
            raise SpecError(f"reference tolerance {spec.vref_tol:g}: expected a fraction")
        if spec.vref_tol >= spec.vout_tol:
            raise SpecError(
                f"reference tolerance {spec.vref_tol:.3g} leaves nothing of the output "
                f"tolerance {spec.vout_tol:.3g} for the divider: allow more output error"
            )
    if (
        spec.ctrl_vin_min is not None
        and spec.ctrl_vin_max is not None
        and spec.ctrl_vin_min > spec.ctrl_vin_max
    ):
        raise SpecError(
            f"controller input range {spec.ctrl_vin_min:g}..{spec.ctrl_vin_max:g} V is "
            "written backwards: expected low..high"
        )
    from kitbin.quantities import QUANTITIES

    for extra in spec.extras:
        if extra.quantity not in QUANTITIES:
            raise SpecError(
                f"extra part {extra.name!r}: unknown quantity {extra.quantity!r} "
                "(see kitbin.quantities)"
            )
        if extra.op not in (">=", "<="):
            raise SpecError(f"extra part {extra.name!r}: operator {extra.op!r}, expected >= or <=")
        if not extra.name:
            raise SpecError("extra part has no name")

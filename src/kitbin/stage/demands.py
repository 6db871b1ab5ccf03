"""What a plan demands of each role, as constraints with their reasons and sources.

A :class:`Demand` is a role (inductor, output capacitor, ...) and a tuple of
:class:`Constraint` — one quantity (a name from :mod:`kitbin.quantities`), ``>=``
or ``<=``, a limit in SI units, a reason in words with the numbers, and a source.

Two quantities are derived for a candidate rather than recorded:

* ``rise_load`` — the inductor's predicted steady rise at the plan's RMS current,
  from its DCR and R_th with :func:`kitbin.stage.thermal.predicted_rise`.
* ``divider_ratio`` / ``divider_sum`` — Rtop/Rbot (at its worst-case tolerance
  ends) and Rtop + Rbot of a feedback divider.

Because a candidate inductor's own L sets its ripple and peak, the matcher calls
:func:`inductor_duty` per candidate rather than using the plan-wide Isat limit
(which is computed at the smallest allowed inductance, so it is the largest).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

from kitbin.stage.operating import (
    Corner,
    Parts,
    corner_points,
    full_load_inputs,
    l_min,
    operate,
    solve,
)
from kitbin.stage.spec import COMMON, Spec
from kitbin.stage.thermal import predicted_rise
from kitbin.units import format_quantity as q

ROLES = (
    "inductor",
    "output_capacitor",
    "input_capacitor",
    "catch_diode",
    "feedback_divider",
    "set_resistor",
    "controller",
)

#: Relative window of the current limit a set resistor may give above its target.
SET_WINDOW = 0.1

# Sources shown beside each constraint. The books are cited by chapter; where the
# chapter was recalled rather than checked it says "from memory".
EM = "Erickson & Maksimović, Fundamentals of Power Electronics, 3rd ed."
MUR = "Mohan, Undeland & Robbins, Power Electronics, 3rd ed., ch. 7 (from memory)"
SRC_RIPPLE = (
    f"{EM}, ch. 2 (from memory for the chapter); Maniktala, Switching Power Supplies A to Z, "
    "2nd ed., ch. 2 (r = ΔI/IL)"
)
SRC_ISAT = "saturation margin (" + COMMON + ")"
SRC_IRMS = "Irms (thermal) check (" + COMMON + ")"
SRC_RISE = (
    "first-order thermal model (Incropera et al., Fundamentals of Heat and Mass Transfer, "
    "7th ed., ch. 5) with copper α20 = 0.00393 /K (IEC 60028)"
)
SRC_CAP_V = "class 2 ceramic rated ≥ 1.5–2 × working (" + COMMON + ")"
SRC_DIODE_V = "Schottky V_RRM ≥ 1.25–1.5 × reverse voltage (" + COMMON + ")"
SRC_CAP_RIPPLE = (
    f"charge balance ({EM}, ch. 2, from memory); half the ripple budget to each of the "
    "capacitive and ESR terms, whose sum bounds the ripple"
)
SRC_CAP_RMS = f"capacitor RMS currents of the piecewise-linear waveforms ({MUR})"
SRC_DIODE_I = f"diode currents ({MUR}); margin " + COMMON
SRC_LOSS = f"P_D = VD·ID,avg, first-order conduction loss ({EM}, ch. 3, from memory)"
SRC_DIVIDER = (
    "Vout = Vref(1 + Rtop/Rbot) + I_FB·Rtop (the form of regulator data sheets); "
    "linear worst-case budget (" + COMMON + ")"
)
SRC_IFB = "R1 + R2 ≤ Vout/(100·I_FB) (a regulator data sheet's sizing rule; " + COMMON + ")"
SRC_SET = "controller current-limit set relation Ilim = ilim_gain / Rset; headroom " + COMMON
SRC_CTRL = "the plan's own limits; frequency window " + COMMON
SRC_USER = "the user's plan"


@dataclass(frozen=True)
class Constraint:
    """One requirement on one quantity of the part filling a role.

    Parameters
    ----------
    role
        The role (see :data:`ROLES`, or ``extra:<name>``).
    quantity
        A quantity name from :mod:`kitbin.quantities`.
    op
        ``">="`` (the part's value must be at least ``limit``) or ``"<="``.
    limit
        The limit in SI units of the quantity's dimension.
    reason
        Why, in words with the numbers.
    source
        A citation, or "common practice, no source".
    """

    role: str
    quantity: str
    op: str
    limit: float
    reason: str
    source: str

    def holds(self, value: float) -> bool:
        """True when ``value`` (SI) meets the constraint."""
        return value >= self.limit if self.op == ">=" else value <= self.limit

    def margin(self, value: float) -> float:
        """Relative margin of ``value`` over the limit (positive passes)."""
        if self.limit == 0:
            return math.inf if self.holds(value) else -math.inf
        rel = value / self.limit - 1
        return rel if self.op == ">=" else -rel


@dataclass(frozen=True)
class Demand:
    """What a plan requires of one role: constraints plus notes (cautions, assumptions)."""

    role: str
    constraints: tuple[Constraint, ...]
    notes: tuple[str, ...] = field(default=())


@dataclass(frozen=True)
class InductorOperating:
    """A candidate inductor in the plan: worst full-load currents over the input range.

    Currents in A, inductance in H, voltages in V.

    Attributes
    ----------
    ripple_pp, ripple_ratio, vin_ripple
        Largest peak-to-peak ripple, its ratio r = ΔI/IL, and the input giving it.
    i_peak, vin_peak, mode
        Largest peak current, the input giving it, and the mode there.
    i_avg, i_rms
        Largest average and RMS inductor current.
    isat_required, isat_quantity
        Isat the candidate needs (margin × peak, and ≥ the current limit when the
        spec asks to survive a short) and which Isat (``isat_20`` ...).
    current_limit
        The current limit used for that, or None.
    stepped, runaway
        True when a measured L(i) curve was stepped; True when its current ran away.
    """

    inductance: float
    dcr: float
    ripple_pp: float
    ripple_ratio: float
    vin_ripple: float
    i_peak: float
    vin_peak: float
    mode: str
    i_avg: float
    i_rms: float
    isat_required: float
    isat_quantity: str
    current_limit: float | None
    stepped: bool = False
    runaway: bool = False
    notes: tuple[str, ...] = field(default=())


def _worst_full_load(spec: Spec, l_henry: float, dcr: float) -> dict[str, tuple[float, float]]:
    """Largest ripple, peak, rms and average current over the full-load input scan."""
    worst: dict[str, tuple[float, float]] = {}
    for vin in full_load_inputs(spec):
        s = solve(spec, vin, spec.iout_max, l_henry, dcr)
        if s.mode == "CCM":
            rms = math.sqrt(s.il_avg**2 + s.ripple_pp**2 / 12)
        else:
            rms = s.i_peak * math.sqrt((s.duty + s.d2) / 3)
        for key, value in (
            ("ripple", s.ripple_pp),
            ("ratio", s.ripple_pp / s.il_avg),
            ("peak", s.i_peak),
            ("rms", rms),
            ("avg", s.il_avg),
        ):
            if key not in worst or value > worst[key][0]:
                worst[key] = (value, vin)
    return worst


def plan_current_limit(spec: Spec) -> float | None:
    """The highest switch current limit the stage may run into (A), or None if unknown.

    The controller's fixed ``ilim`` when known; otherwise, with a set resistor
    (``ilim_gain``), the top of its window: (1 + SET_WINDOW) × the target, where the
    target is ``ilim_target`` or ``ilim_headroom`` × the peak at the smallest L.
    """
    if spec.ilim is not None:
        return spec.ilim
    if spec.ilim_gain is not None:
        return (1 + SET_WINDOW) * set_target(spec)
    return None


def set_target(spec: Spec) -> float:
    """Current limit wanted from a set resistor (A)."""
    if spec.ilim_target is not None:
        return spec.ilim_target
    lm, _ = l_min(spec)
    return spec.ilim_headroom * _worst_full_load(spec, lm, 0.0)["peak"][0]


def inductor_duty(
    spec: Spec,
    l_henry: float,
    dcr_ohm: float = 0.0,
    l_of_i: object | None = None,
) -> InductorOperating:
    """Worst full-load currents and the Isat a candidate inductor of ``l_henry`` needs.

    Parameters
    ----------
    spec
        The plan's specification.
    l_henry
        The candidate's inductance (H), e.g. the low end of its evidence interval.
    dcr_ohm
        Its DC resistance (Ω), e.g. the high end.
    l_of_i
        Optional measured curve: an :class:`kitbin.stage.stepping.LCurve` or a pair
        ``(currents_A, inductances_H)`` of incremental inductance. The worst corners
        are then stepped through the curve (saturation-aware peak and ripple).

    Returns
    -------
    InductorOperating
    """
    worst = _worst_full_load(spec, l_henry, dcr_ohm)
    ripple, vin_r = worst["ripple"]
    ratio = worst["ratio"][0]
    peak, vin_pk = worst["peak"]
    rms = worst["rms"][0]
    avg = worst["avg"][0]
    mode = solve(spec, vin_pk, spec.iout_max, l_henry, dcr_ohm).mode
    stepped = runaway = False
    notes: list[str] = []
    if l_of_i is not None:
        from kitbin.stage.stepping import as_curve, step_corner

        curve = as_curve(l_of_i)
        for vin in sorted({vin_r, vin_pk, spec.vin_min, spec.vin_max}):
            res = step_corner(spec, vin, spec.iout_max, curve, dcr_ohm)
            stepped = True
            runaway = runaway or res.runaway
            if res.i_peak > peak:
                peak, vin_pk = res.i_peak, vin
            if res.ripple_pp > ripple:
                ripple, vin_r = res.ripple_pp, vin
                ratio = max(ratio, res.ripple_pp / res.i_avg if res.i_avg > 0 else math.inf)
            rms = max(rms, res.i_rms)
            if res.runaway:
                notes.append(f"at {q(vin, 'voltage')} input: {res.note}")
    required = spec.isat_margin * peak
    limit = plan_current_limit(spec)
    if spec.survive_short and limit is not None:
        required = max(required, limit)
    return InductorOperating(
        inductance=l_henry,
        dcr=dcr_ohm,
        ripple_pp=ripple,
        ripple_ratio=ratio,
        vin_ripple=vin_r,
        i_peak=peak,
        vin_peak=vin_pk,
        mode=mode,
        i_avg=avg,
        i_rms=rms,
        isat_required=required,
        isat_quantity=spec.isat_quantity,
        current_limit=limit,
        stepped=stepped,
        runaway=runaway,
        notes=tuple(notes),
    )


def candidate_rise(spec: Spec, duty: InductorOperating, dcr_20C: float, r_th: float) -> float:
    """Predicted steady rise (K) of a candidate at its worst RMS current (quantity rise_load)."""
    return predicted_rise(duty.i_rms, dcr_20C, r_th, spec.t_ambient)


def output_ripple(spec: Spec, l_henry: float, c: float, esr: float, dcr: float = 0.0) -> float:
    """Largest exact output ripple (V p-p) over every corner for a candidate capacitor."""
    parts = Parts(inductance=l_henry, dcr=dcr, cout=c, esr=esr)
    return max(operate(spec, parts, vin, io).vout_ripple or 0.0 for vin, io in _all_points(spec))


def _all_points(spec: Spec) -> list[tuple[float, float]]:
    pts = [(v, spec.iout_max) for v in full_load_inputs(spec)]
    pts += [(vin, io) for _, vin, io in corner_points(spec) if io != spec.iout_max]
    return pts


def demands(spec: Spec, l_henry: float | None = None, dcr: float = 0.0) -> tuple[Demand, ...]:
    """Every role's demand for a spec.

    Parameters
    ----------
    spec
        The specification.
    l_henry
        Inductance to compute currents with (H); None uses the smallest inductance
        allowed by the ripple target, which gives the largest currents (worst case).
    dcr
        Inductor DCR for the currents (Ω); 0 is the worst case for ripple.

    Returns
    -------
    tuple[Demand, ...]
        In the order of :data:`ROLES` (catch diode absent for a synchronous stage,
        set resistor only with ``ilim_gain``), then the extras.
    """
    lm, vin_lm = l_min(spec)
    l_use = lm if l_henry is None else l_henry
    ops: list[Corner] = []
    c_unit = Parts(inductance=l_use, dcr=dcr, cout=1.0, esr=0.0, cin=1.0, esr_in=0.0)
    for vin, io in _all_points(spec):
        ops.append(operate(spec, c_unit, vin, io))
    full = [c for c in ops if c.iout == spec.iout_max]
    duty = inductor_duty(spec, l_use, dcr)
    out: list[Demand] = [
        _inductor(spec, lm, vin_lm, l_use, duty),
        _output_cap(spec, ops, full),
        _input_cap(spec, ops, full),
    ]
    if not spec.synchronous:
        out.append(_diode(spec, full, duty))
    out.append(_divider(spec))
    if spec.ilim_gain is not None:
        out.append(_set_resistor(spec))
    out.append(_controller(spec, full, duty))
    for extra in spec.extras:
        role = f"extra:{extra.name}"
        out.append(
            Demand(
                role,
                (
                    Constraint(
                        role,
                        extra.quantity,
                        extra.op,
                        extra.limit,
                        extra.reason or "fixed part given by the user",
                        SRC_USER,
                    ),
                ),
            )
        )
    return tuple(out)


def _inductor(
    spec: Spec, lm: float, vin_lm: float, l_use: float, duty: InductorOperating
) -> Demand:
    role = "inductor"
    cs = [
        Constraint(
            role,
            "inductance",
            ">=",
            lm,
            f"ripple ratio r = ΔI/IL ≤ {spec.ripple_ratio:g} at full load "
            f"{q(spec.iout_max, 'current')}; the worst input is {q(vin_lm, 'voltage')}",
            SRC_RIPPLE,
        ),
        Constraint(
            role,
            spec.isat_quantity,
            ">=",
            spec.isat_margin * duty.i_peak,
            f"{spec.isat_margin:g} × the full-load peak {q(duty.i_peak, 'current')} "
            f"(at {q(duty.vin_peak, 'voltage')} input with {q(l_use, 'inductance')}; "
            f"Isat at a {spec.isat_drop} % drop)",
            SRC_ISAT,
        ),
    ]
    notes = [
        "a candidate's own L sets its ripple and peak: judge Isat with inductor_duty()",
        "core loss and AC copper loss are not included; the DC rise test does not cover them",
        "inductors run hot: allow for the rise before touching",
    ]
    if spec.survive_short and duty.current_limit is not None:
        cs.append(
            Constraint(
                role,
                spec.isat_quantity,
                ">=",
                duty.current_limit,
                f"an overload or short drives the current to the limit "
                f"{q(duty.current_limit, 'current')}",
                SRC_ISAT,
            )
        )
    elif spec.survive_short:
        notes.append("controller current limit unknown: Isat is not checked against a short")
    cs.append(
        Constraint(
            role,
            "i_rise",
            ">=",
            duty.i_rms,
            f"RMS current {q(duty.i_rms, 'current')} at full load must not exceed the current "
            f"giving the allowed rise {spec.rise_max:g} K",
            SRC_IRMS,
        )
    )
    cs.append(
        Constraint(
            role,
            "rise_load",
            "<=",
            spec.rise_max,
            f"predicted steady rise at {q(duty.i_rms, 'current')} RMS, ambient "
            f"{spec.t_ambient:g} °C, from DCR and R_th with the copper tempco",
            SRC_RISE,
        )
    )
    return Demand(role, tuple(cs), tuple(notes))


def _cap_pp_current(c: Corner, spec: Spec, output: bool) -> float:
    """Peak-to-peak current of a capacitor at a corner (A)."""
    span = c.i_peak - min(0.0, c.i_valley)
    if output:
        if spec.topology == "buck":
            return c.ripple_pp if c.mode == "CCM" else c.i_peak
        return span
    if spec.topology == "boost":
        return c.ripple_pp if c.mode == "CCM" else c.i_peak
    return span


def _esr_limit(role: str, budget: float, ipp: float) -> Constraint:
    """ESR so that the step it makes with ``ipp`` (A p-p) uses half the ripple
    ``budget`` (V p-p); the other half is the capacitive ripple."""
    return Constraint(
        role,
        "esr",
        "<=",
        budget / 2 / ipp if ipp > 0 else math.inf,
        f"ESR step ≤ half of {q(budget, 'voltage')} p-p with {q(ipp, 'current')} p-p "
        "capacitor current",
        SRC_CAP_RIPPLE,
    )


def _output_cap(spec: Spec, ops: Sequence[Corner], full: Sequence[Corner]) -> Demand:
    role = "output_capacitor"
    budget = spec.vout_ripple_limit
    # with cout = 1 F and no ESR the exact ripple is the capacitive term for 1 F
    c_need = max((c.vout_ripple or 0.0) for c in ops) / (budget / 2)
    c_at = max(ops, key=lambda c: c.vout_ripple or 0.0)
    ipp = max(_cap_pp_current(c, spec, True) for c in ops)
    rms = max(c.icout_rms for c in ops)
    v_work = spec.vout * (1 + spec.vout_tol)
    cs = (
        Constraint(
            role,
            "capacitance",
            ">=",
            c_need,
            f"capacitive ripple ≤ half of {q(budget, 'voltage')} p-p at "
            f"{q(c_at.vin, 'voltage')} in, {q(c_at.iout, 'current')}; effective C at "
            "the working bias",
            SRC_CAP_RIPPLE,
        ),
        _esr_limit(role, budget, ipp),
        Constraint(
            role,
            "i_ripple",
            ">=",
            rms,
            f"RMS ripple current {q(rms, 'current')}",
            SRC_CAP_RMS,
        ),
        Constraint(
            role,
            "rated_voltage",
            ">=",
            spec.cap_voltage_margin * v_work,
            f"{spec.cap_voltage_margin:g} × the working voltage {q(v_work, 'voltage')} "
            f"(output {q(spec.vout, 'voltage')} + {spec.vout_tol * 100:g} %)",
            SRC_CAP_V,
        ),
    )
    notes = (
        "class 2 ceramics lose capacitance with DC bias: use C measured at the working voltage",
        "the exact ripple of a candidate (C, ESR) is output_ripple(); the limits here are a "
        "sufficient split",
        "capacitors store energy: discharge before handling",
    )
    return Demand(role, cs, notes)


def _input_cap(spec: Spec, ops: Sequence[Corner], full: Sequence[Corner]) -> Demand:
    role = "input_capacitor"
    budget = spec.vin_ripple_limit
    c_need = max((c.vin_ripple or 0.0) for c in ops) / (budget / 2)
    c_at = max(ops, key=lambda c: c.vin_ripple or 0.0)
    ipp = max(_cap_pp_current(c, spec, False) for c in ops)
    rms = max(c.icin_rms for c in ops)
    rms_at = max(ops, key=lambda c: c.icin_rms)
    cs = (
        Constraint(
            role,
            "capacitance",
            ">=",
            c_need,
            f"capacitive input ripple ≤ half of {q(budget, 'voltage')} p-p at "
            f"{q(c_at.vin, 'voltage')} in, {q(c_at.iout, 'current')}",
            SRC_CAP_RIPPLE,
        ),
        _esr_limit(role, budget, ipp),
        Constraint(
            role,
            "i_ripple",
            ">=",
            rms,
            f"RMS ripple current {q(rms, 'current')} (largest at {q(rms_at.vin, 'voltage')} in)",
            SRC_CAP_RMS,
        ),
        Constraint(
            role,
            "rated_voltage",
            ">=",
            spec.cap_voltage_margin * spec.vin_max,
            f"{spec.cap_voltage_margin:g} × the highest input {q(spec.vin_max, 'voltage')}",
            SRC_CAP_V,
        ),
    )
    notes = (
        "place it next to the switch and rectifier; the input supply's own ripple is not included",
        "capacitors store energy: discharge before handling",
    )
    return Demand(role, cs, notes)


def _diode(spec: Spec, full: Sequence[Corner], duty: InductorOperating) -> Demand:
    role = "catch_diode"
    vr = max(c.v_reverse for c in full)
    iavg = max(c.id_avg for c in full)
    ipk = max(c.id_peak for c in full)
    p = max(c.p_rect for c in full)
    cs = [
        Constraint(
            role,
            "vrrm",
            ">=",
            spec.vrrm_margin * vr,
            f"{spec.vrrm_margin:g} × the reverse voltage {q(vr, 'voltage')} "
            "(ringing at the switching node needs the margin)",
            SRC_DIODE_V,
        ),
        Constraint(
            role,
            "if_avg",
            ">=",
            spec.diode_current_margin * iavg,
            f"{spec.diode_current_margin:g} × the average current {q(iavg, 'current')}",
            SRC_DIODE_I,
        ),
        Constraint(
            role,
            "if_peak",
            ">=",
            ipk,
            f"peak current {q(ipk, 'current')} at full load",
            SRC_DIODE_I,
        ),
        Constraint(
            role,
            "rated_power",
            ">=",
            p,
            f"dissipation {q(p, 'power')} = {q(spec.vf, 'voltage')} × {q(iavg, 'current')}",
            SRC_LOSS,
        ),
    ]
    notes = [
        "a Schottky's leakage rises steeply when hot; at high reverse voltage it can run away",
        "the diode runs hot: allow for it before touching",
    ]
    if spec.survive_short and duty.current_limit is not None:
        notes.append(
            f"in a short the diode carries about the current limit "
            f"{q(duty.current_limit, 'current')} almost all the time"
        )
    return Demand(role, tuple(cs), tuple(notes))


def divider_window(spec: Spec) -> tuple[float, float, float]:
    """Allowed Rtop/Rbot range and the I_FB error share for the feedback divider.

    Returns ``(ratio_low, ratio_high, ifb_share)``: the ratio must stay within the
    output tolerance less the reference tolerance and, when I_FB is known, a share
    of min(1 %, a quarter of what is left) for I_FB·Rtop.
    """
    if spec.vref is None:
        raise ValueError("vref unknown")
    left = spec.vout_tol - (spec.vref_tol or 0.0)
    share = min(0.01, left / 4) if spec.ifb else 0.0
    b = left - share
    m = spec.vout / spec.vref
    return m * (1 - b) - 1, m * (1 + b) - 1, share


def _divider(spec: Spec) -> Demand:
    role = "feedback_divider"
    if spec.vref is None:
        return Demand(
            role,
            (),
            ("controller reference voltage unknown: give --vref or a controller",),
        )
    lo, hi, share = divider_window(spec)
    nominal = spec.vout / spec.vref - 1
    why = (
        f"Vout = Vref(1 + Rtop/Rbot): {q(spec.vout, 'voltage')} from {q(spec.vref, 'voltage')} "
        f"needs Rtop/Rbot = {nominal:.4g}; output within ±{spec.vout_tol * 100:g} %"
    )
    if spec.vref_tol:
        why += f" less the reference's ±{spec.vref_tol * 100:g} %"
    cs = [
        Constraint(role, "divider_ratio", ">=", lo, why + " (low end)", SRC_DIVIDER),
        Constraint(role, "divider_ratio", "<=", hi, why + " (high end)", SRC_DIVIDER),
    ]
    if spec.ifb:
        cs.append(
            Constraint(
                role,
                "divider_sum",
                "<=",
                share * spec.vout / spec.ifb,
                f"I_FB {q(spec.ifb, 'current')} through Rtop may shift the output by at most "
                f"{share * 100:.3g} %",
                SRC_IFB,
            )
        )
    notes = (
        "judge the ratio at the resistors' worst-case tolerance ends (or their measured values)",
        f"the bottom resistor (or leg) is chosen in {q(spec.rbottom_min, 'resistance')} … "
        f"{q(spec.rbottom_max, 'resistance')}",
    )
    return Demand(role, tuple(cs), notes)


def _set_resistor(spec: Spec) -> Demand:
    role = "set_resistor"
    gain = spec.ilim_gain or 0.0
    target = set_target(spec)
    i_hi = (1 + SET_WINDOW) * target
    why = (
        f"Rset = ilim_gain / Ilim = {q(gain, 'voltage')} / Ilim, Ilim between "
        f"{q(target, 'current')} and {q(i_hi, 'current')}"
    )
    if spec.ilim_target is None:
        why += f" ({spec.ilim_headroom:g} × the worst full-load peak)"
    cs = (
        Constraint(role, "resistance", ">=", gain / i_hi, why + " (low end)", SRC_SET),
        Constraint(role, "resistance", "<=", gain / target, why + " (high end)", SRC_SET),
    )
    return Demand(role, cs)


def _controller(spec: Spec, full: Sequence[Corner], duty: InductorOperating) -> Demand:
    role = "controller"
    d_max = max(c.duty for c in full)
    ton = min(c.on_time for c in full)
    ipk = duty.i_peak
    cs = (
        Constraint(
            role,
            "vin_min",
            "<=",
            spec.vin_min,
            f"must run from the lowest input {q(spec.vin_min, 'voltage')}",
            SRC_CTRL,
        ),
        Constraint(
            role,
            "vin_max",
            ">=",
            spec.vin_max,
            f"must withstand the highest input {q(spec.vin_max, 'voltage')}",
            SRC_CTRL,
        ),
        Constraint(
            role,
            "ilim",
            ">=",
            spec.ilim_headroom * ipk,
            f"{spec.ilim_headroom:g} × the full-load peak {q(ipk, 'current')} so full load "
            "never trips the limit",
            "headroom " + COMMON,
        ),
        Constraint(
            role,
            "fsw",
            ">=",
            spec.fsw * (1 - spec.fsw_tol),
            f"switching frequency {q(spec.fsw, 'frequency')} −{spec.fsw_tol * 100:g} %",
            SRC_CTRL,
        ),
        Constraint(
            role,
            "fsw",
            "<=",
            spec.fsw * (1 + spec.fsw_tol),
            f"switching frequency {q(spec.fsw, 'frequency')} +{spec.fsw_tol * 100:g} %",
            SRC_CTRL,
        ),
        Constraint(
            role,
            "d_max",
            ">=",
            d_max,
            f"largest full-load duty {d_max:.4f}",
            SRC_RIPPLE,
        ),
        Constraint(
            role,
            "ton_min",
            "<=",
            ton,
            f"shortest full-load on-time {q(ton, 'time')}",
            SRC_RIPPLE,
        ),
    )
    return Demand(role, cs)


def demand_for(all_demands: Sequence[Demand], role: str) -> Demand:
    """The demand of one role from :func:`demands`' result.

    Raises
    ------
    KeyError
        When the role is not among them.
    """
    for d in all_demands:
        if d.role == role:
            return d
    raise KeyError(role)


__all__ = [
    "ROLES",
    "Constraint",
    "Demand",
    "InductorOperating",
    "candidate_rise",
    "demand_for",
    "demands",
    "divider_window",
    "inductor_duty",
    "output_ripple",
    "plan_current_limit",
]

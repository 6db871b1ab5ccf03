"""Operating points of a power stage at its corners.

Sources (REFERENCES sections 1.1–1.4): volt-second balance on L and charge balance
on C with the small-ripple approximation — Erickson & Maksimović, *Fundamentals of
Power Electronics*, 3rd ed., ch. 2, 3 (losses) and 5 (DCM) (chapter numbers from
memory); Mohan, Undeland, Robbins, *Power Electronics*, 3rd ed., ch. 7 (from memory);
Maniktala, *Switching Power Supplies A to Z*, 2nd ed., ch. 2. The duty cycle with
drops (REFERENCES 1.2) is volt-second balance with the switch resistance ``rsw``,
the inductor DCR, the diode drop ``vf`` or the synchronous rectifier resistance
``r_rect``, each resistive drop taken at the average inductor current; for the
boost and the inverting stage that gives an exact quadratic in 1 − D.

In DCM (diode rectified, load below the boundary Io,B) the resistive drops are
taken at Ipk/2, the mean current of each interval, so CCM and DCM agree at the
boundary. A synchronous stage never enters DCM: it runs in forced CCM and its
valley current goes negative below Io,B.

All ripple values are peak-to-peak; r = ΔI / IL.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from kitbin.errors import SpecError
from kitbin.stage.ripple import ripple_pp
from kitbin.stage.spec import Spec
from kitbin.units import format_quantity


@dataclass(frozen=True)
class Parts:
    """The power-stage parts a corner is computed with (SI units).

    Parameters
    ----------
    inductance
        Inductance (H).
    dcr
        Inductor DC resistance at its working temperature (Ω).
    cout, esr
        Output capacitance (F) and its ESR (Ω); None skips the output ripple.
    cin, esr_in
        Input capacitance (F) and its ESR (Ω); None skips the input ripple.
    """

    inductance: float
    dcr: float = 0.0
    cout: float | None = None
    esr: float = 0.0
    cin: float | None = None
    esr_in: float = 0.0

    def __post_init__(self) -> None:
        if not (self.inductance > 0 and math.isfinite(self.inductance)):
            raise SpecError(f"inductance {self.inductance!r} H: expected a positive inductance")
        for name in ("dcr", "esr", "esr_in"):
            if getattr(self, name) < 0:
                raise SpecError(f"{name} is {getattr(self, name):g} Ω: expected zero or more")
        for name in ("cout", "cin"):
            value = getattr(self, name)
            if value is not None and value <= 0:
                raise SpecError(f"{name} is {value:g} F: expected a positive capacitance")


@dataclass(frozen=True)
class Corner:
    """One operating point. Currents in A, voltages in V, times in s, powers in W.

    ``None`` marks a value that needs a part not given (capacitor ripple).
    For a synchronous stage the ``id_*`` currents are those of the low-side switch.
    """

    name: str
    vin: float
    iout: float
    mode: str
    duty: float
    d2: float
    on_time: float
    il_avg: float
    ripple_pp: float
    ripple_ratio: float
    i_peak: float
    i_valley: float
    il_rms: float
    isw_rms: float
    isw_avg: float
    v_switch: float
    id_avg: float
    id_rms: float
    id_peak: float
    v_reverse: float
    icin_rms: float
    icout_rms: float
    ccm_min_load: float
    vout_ripple: float | None
    vout_ripple_c: float | None
    vout_ripple_esr: float | None
    vout_ripple_sum: float | None
    vin_ripple: float | None
    vin_ripple_c: float | None
    p_switch: float
    p_rect: float
    p_inductor: float
    p_cout: float
    p_cin: float
    flags: tuple[str, ...] = field(default=())


@dataclass(frozen=True)
class Solution:
    """Inductor waveform of one operating point (before the derived currents).

    ``v_on`` and ``v_off`` are the magnitudes of the inductor voltage while the
    switch is on and while the rectifier conducts (V).
    """

    mode: str
    duty: float
    d2: float
    il_avg: float
    ripple_pp: float
    i_peak: float
    i_valley: float
    v_on: float
    v_off: float


def _ccm_duty(spec: Spec, vin: float, io: float, dcr: float) -> tuple[float, float]:
    """CCM duty and average inductor current with drops (REFERENCES 1.2)."""
    vo, vd, rsw, rr = spec.vout, spec.v_rect, spec.rsw, spec.r_rect_eff
    if spec.topology == "buck":
        den = vin + vd - io * (rsw - rr)
        d = (vo + vd + io * (dcr + rr)) / den if den > 0 else math.inf
        il = io
    else:
        a = vo + vd + (vin if spec.topology == "invert" else 0.0)
        b = vin + io * (rsw - rr)
        c = io * (dcr + rsw)
        disc = b * b - 4 * a * c
        if disc < 0 or b <= 0:
            d = math.inf
            il = math.inf
        else:
            x = (b + math.sqrt(disc)) / (2 * a)
            d = 1.0 - x
            il = io / x
    if not 0 <= d < 1:
        raise SpecError(
            f"{spec.topology} cannot reach {format_quantity(vo, 'voltage')} from "
            f"{format_quantity(vin, 'voltage')} at {format_quantity(io, 'current')} with these "
            "drops: lower the resistances or the load"
        )
    return d, il


def _on_off(spec: Spec, vin: float, i_on: float, i_off: float, dcr: float) -> tuple[float, float]:
    """Magnitudes of the inductor voltage on and off, resistive drops at the given currents."""
    vo, vd = spec.vout, spec.v_rect
    v_on = vin - i_on * (spec.rsw + dcr)
    v_off = vo + vd + i_off * (dcr + spec.r_rect_eff)
    if spec.topology == "buck":
        v_on -= vo
    elif spec.topology == "boost":
        v_off -= vin
    return v_on, v_off


def solve(spec: Spec, vin: float, io: float, l_henry: float, dcr: float = 0.0) -> Solution:
    """Duty, mode and inductor current of one operating point.

    Parameters
    ----------
    spec
        The specification (drops, topology, frequency).
    vin
        Input voltage (V).
    io
        Load current (A).
    l_henry
        Inductance (H).
    dcr
        Inductor DC resistance (Ω).

    Raises
    ------
    SpecError
        When the output cannot be reached with these drops.
    """
    ts = 1.0 / spec.fsw
    d, il = _ccm_duty(spec, vin, io, dcr)
    v_on, v_off = _on_off(spec, vin, il, il, dcr)
    ripple = v_on * d * ts / l_henry
    if spec.synchronous or il >= ripple / 2:
        return Solution(
            "CCM", d, 1.0 - d, il, ripple, il + ripple / 2, il - ripple / 2, v_on, v_off
        )
    return _dcm(spec, vin, io, l_henry, dcr)


def _dcm(spec: Spec, vin: float, io: float, l_henry: float, dcr: float) -> Solution:
    """DCM solution (REFERENCES 1.3), drops at Ipk/2, by fixed-point iteration."""
    ts = 1.0 / spec.fsw
    if io <= 0:
        v_on, v_off = _on_off(spec, vin, 0.0, 0.0, dcr)
        return Solution("DCM", 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, v_on, v_off)
    ipk = 0.0
    d = d2 = 0.0
    v_on = v_off = 0.0
    for _ in range(100):
        v_on, v_off = _on_off(spec, vin, ipk / 2, ipk / 2, dcr)
        if v_on <= 0 or v_off <= 0:
            raise SpecError(
                f"{spec.topology} cannot reach {format_quantity(spec.vout, 'voltage')} from "
                f"{format_quantity(vin, 'voltage')} with these drops"
            )
        if spec.topology == "buck":
            d = math.sqrt(2 * l_henry * io * spec.fsw / (v_on * (1 + v_on / v_off)))
        else:
            d = math.sqrt(2 * l_henry * spec.fsw * io * v_off) / v_on
        new = v_on * d * ts / l_henry
        d2 = d * v_on / v_off
        if abs(new - ipk) <= 1e-14 * max(new, 1e-30):
            ipk = new
            break
        ipk = new
    il = ipk * (d + d2) / 2
    return Solution("DCM", d, d2, il, ipk, ipk, 0.0, v_on, v_off)


def ccm_min_load(spec: Spec, vin: float, l_henry: float, dcr: float = 0.0) -> float:
    """Boundary load Io,B (A): below it a diode stage runs in DCM (REFERENCES 1.1).

    Buck Io,B = ΔI/2; boost and inverting Io,B = (1 − D)·ΔI/2, with the CCM duty and
    ripple evaluated at the boundary load itself (fixed-point; exact in one step
    without resistive drops).
    """
    ts = 1.0 / spec.fsw
    io = 0.0
    for _ in range(100):
        d, il = _ccm_duty(spec, vin, io, dcr)
        v_on, _ = _on_off(spec, vin, il, il, dcr)
        ripple = v_on * d * ts / l_henry
        new = ripple / 2 if spec.topology == "buck" else (1 - d) * ripple / 2
        if abs(new - io) <= 1e-14 * max(new, 1e-30):
            return new
        io = new
    return io


def duty_with_efficiency(topology: str, vin: float, vout: float, eta: float) -> float:
    """CCM duty from an estimated efficiency η (REFERENCES 1.2).

    Buck D = Vo/(η·Vin) [TI-BUCK, from memory]; boost D = 1 − η·Vin/Vo [TI-BOOST,
    from memory]; inverting D = Vo/(η·Vin + Vo) (derived in REFERENCES).
    """
    if topology == "buck":
        return vout / (eta * vin)
    if topology == "boost":
        return 1 - eta * vin / vout
    if topology == "invert":
        return vout / (eta * vin + vout)
    raise SpecError(f"topology {topology!r}: expected one of buck, boost, invert")


def conduction_losses(
    isw_rms: float,
    rsw: float,
    id_avg: float,
    id_rms: float,
    vf: float,
    r_diode: float,
    il_rms: float,
    dcr: float,
    icout_rms: float = 0.0,
    esr: float = 0.0,
    icin_rms: float = 0.0,
    esr_in: float = 0.0,
) -> tuple[float, float, float, float, float]:
    """First-order conduction losses (W): switch, rectifier, inductor copper, Cout, Cin.

    P_sw = Isw,rms²·Rsw; P_D = VD·ID,avg + rD·ID,rms²; P_L = IL,rms²·DCR;
    P_C = IC,rms²·ESR (REFERENCES 1.4; Erickson & Maksimović ch. 3, from memory).
    """
    return (
        isw_rms**2 * rsw,
        vf * id_avg + r_diode * id_rms**2,
        il_rms**2 * dcr,
        icout_rms**2 * esr,
        icin_rms**2 * esr_in,
    )


def _output_waveform(spec: Spec, s: Solution, io: float) -> tuple[list[float], list[float]]:
    """Output-capacitor current over one period: breakpoints (s) and currents (A)."""
    ts = 1.0 / spec.fsw
    t_on, t_end = s.duty * ts, (s.duty + s.d2) * ts
    if spec.topology == "buck":
        if s.mode == "CCM":
            return [0.0, t_on, ts], [s.i_valley - io, s.i_peak - io, s.i_valley - io]
        return [0.0, t_on, t_end, ts], [-io, s.i_peak - io, -io, -io]
    if s.mode == "CCM":
        return [0.0, t_on, t_on, ts, ts], [-io, -io, s.i_peak - io, s.i_valley - io, -io]
    return [0.0, t_on, t_on, t_end, ts], [-io, -io, s.i_peak - io, -io, -io]


def _input_waveform(spec: Spec, s: Solution) -> tuple[list[float], list[float]]:
    """Input-capacitor current (minus its mean) over one period: switch or inductor current."""
    ts = 1.0 / spec.fsw
    t_on, t_end = s.duty * ts, (s.duty + s.d2) * ts
    if spec.topology == "boost":  # the input carries the inductor current
        if s.mode == "CCM":
            return [0.0, t_on, ts], [s.i_valley, s.i_peak, s.i_valley]
        return [0.0, t_on, t_end, ts], [0.0, s.i_peak, 0.0, 0.0]
    # buck and invert: the input carries the switch current
    return [0.0, 0.0, t_on, t_on, ts], [0.0, s.i_valley, s.i_peak, 0.0, 0.0]


def operate(spec: Spec, parts: Parts, vin: float, iout: float, name: str = "") -> Corner:
    """Everything about one operating point (REFERENCES 1.1–1.4).

    Parameters
    ----------
    spec
        The specification.
    parts
        Inductance, DCR and (optionally) the capacitors.
    vin
        Input voltage (V).
    iout
        Load current (A).
    name
        A label for the corner.

    Returns
    -------
    Corner
        Duty, mode, currents, ripples, losses and flags.
    """
    ts = 1.0 / spec.fsw
    s = solve(spec, vin, iout, parts.inductance, parts.dcr)
    if s.mode == "CCM":
        il_rms = math.sqrt(s.il_avg**2 + s.ripple_pp**2 / 12)
        isw_rms = math.sqrt(s.duty) * il_rms
        isw_avg = s.duty * s.il_avg
        id_rms = math.sqrt(1 - s.duty) * il_rms
        id_avg = (1 - s.duty) * s.il_avg
    else:
        il_rms = s.i_peak * math.sqrt((s.duty + s.d2) / 3)
        isw_rms = s.i_peak * math.sqrt(s.duty / 3)
        isw_avg = s.i_peak * s.duty / 2
        id_rms = s.i_peak * math.sqrt(s.d2 / 3)
        id_avg = s.i_peak * s.d2 / 2
    if spec.topology == "boost":
        icin = math.sqrt(max(il_rms**2 - s.il_avg**2, 0.0))
    else:
        icin = math.sqrt(max(isw_rms**2 - isw_avg**2, 0.0))
    i_to_out_rms = il_rms if spec.topology == "buck" else id_rms
    icout = math.sqrt(max(i_to_out_rms**2 - iout**2, 0.0))
    vo, vd = spec.vout, spec.v_rect
    if spec.topology == "buck":
        v_rev, v_sw = vin, vin + vd
    elif spec.topology == "boost":
        v_rev, v_sw = vo, vo + vd
    else:
        v_rev, v_sw = vin + vo, vin + vo + vd

    vr = vr_c = vr_esr = vr_sum = None
    if parts.cout is not None:
        c, esr = parts.cout, parts.esr
        vr = ripple_pp(*_output_waveform(spec, s, iout), c, esr)
        buckish = spec.topology == "buck"
        if s.mode == "CCM" and buckish:
            vr_c = s.ripple_pp / (8 * spec.fsw * c)
            vr_esr = esr * s.ripple_pp
        elif s.mode == "CCM":
            if s.i_valley >= iout or s.ripple_pp == 0:
                vr_c = iout * s.duty / (spec.fsw * c)
            else:  # valley below the load: only part of the off-time charges C
                vr_c = (s.i_peak - iout) ** 2 * (1 - s.duty) * ts / (2 * s.ripple_pp * c)
            # the capacitor current spans -Io .. Ipk - Io (and below, if the valley is negative)
            vr_esr = esr * (s.i_peak - min(0.0, s.i_valley))
        else:
            span = (s.duty + s.d2) if buckish else s.d2
            vr_c = (s.i_peak - iout) ** 2 * span * ts / (2 * s.i_peak * c) if s.i_peak > 0 else 0.0
            vr_esr = esr * s.i_peak
        vr_sum = vr_c + vr_esr
    vin_r = vin_r_c = None
    if parts.cin is not None:
        vin_r = ripple_pp(*_input_waveform(spec, s), parts.cin, parts.esr_in)
        if s.mode == "CCM":
            if spec.topology == "boost":
                vin_r_c = s.ripple_pp / (8 * spec.fsw * parts.cin)
            else:
                vin_r_c = s.il_avg * s.duty * (1 - s.duty) / (spec.fsw * parts.cin)

    p_sw, p_rect, p_l, p_co, p_ci = conduction_losses(
        isw_rms,
        spec.rsw,
        id_avg,
        id_rms,
        spec.v_rect,
        spec.r_rect_eff,
        il_rms,
        parts.dcr,
        icout,
        parts.esr if parts.cout is not None else 0.0,
        icin,
        parts.esr_in if parts.cin is not None else 0.0,
    )
    corner = Corner(
        name=name or f"{vin:g} V, {iout:g} A",
        vin=vin,
        iout=iout,
        mode=s.mode,
        duty=s.duty,
        d2=s.d2,
        on_time=s.duty * ts,
        il_avg=s.il_avg,
        ripple_pp=s.ripple_pp,
        ripple_ratio=s.ripple_pp / s.il_avg if s.il_avg > 0 else math.inf,
        i_peak=s.i_peak,
        i_valley=s.i_valley,
        il_rms=il_rms,
        isw_rms=isw_rms,
        isw_avg=isw_avg,
        v_switch=v_sw,
        id_avg=id_avg,
        id_rms=id_rms,
        id_peak=s.i_peak,
        v_reverse=v_rev,
        icin_rms=icin,
        icout_rms=icout,
        ccm_min_load=ccm_min_load(spec, vin, parts.inductance, parts.dcr),
        vout_ripple=vr,
        vout_ripple_c=vr_c,
        vout_ripple_esr=vr_esr,
        vout_ripple_sum=vr_sum,
        vin_ripple=vin_r,
        vin_ripple_c=vin_r_c,
        p_switch=p_sw,
        p_rect=p_rect,
        p_inductor=p_l,
        p_cout=p_co,
        p_cin=p_ci,
    )
    return _with_flags(spec, corner)


def _with_flags(spec: Spec, c: Corner) -> Corner:
    """Add the controller-limit flags that apply to a corner."""
    from dataclasses import replace

    flags: list[str] = []
    q = format_quantity
    if spec.ton_min is not None and 0 < c.on_time < spec.ton_min:
        flags.append(
            f"on-time {q(c.on_time, 'time')} is below the controller minimum "
            f"{q(spec.ton_min, 'time')}: expect pulse skipping or a higher output"
        )
    if spec.ton_min is not None and c.on_time == 0 and c.iout == 0:
        flags.append("no load: the controller will skip pulses")
    if spec.d_max is not None and c.duty > spec.d_max:
        flags.append(
            f"duty {c.duty:.3f} is above the controller maximum {spec.d_max:.3f}: "
            "the output will drop out"
        )
    if spec.ilim is not None and c.i_peak > spec.ilim:
        flags.append(
            f"peak current {q(c.i_peak, 'current')} is above the controller current limit "
            f"{q(spec.ilim, 'current')}: the limit will trip at this load"
        )
    if spec.ctrl_vin_min is not None and c.vin < spec.ctrl_vin_min:
        flags.append(
            f"input {q(c.vin, 'voltage')} is below the controller minimum "
            f"{q(spec.ctrl_vin_min, 'voltage')}"
        )
    if spec.ctrl_vin_max is not None and c.vin > spec.ctrl_vin_max:
        flags.append(
            f"input {q(c.vin, 'voltage')} is above the controller maximum "
            f"{q(spec.ctrl_vin_max, 'voltage')}"
        )
    if c.i_valley < 0:
        flags.append(
            f"valley current {q(c.i_valley, 'current')} is negative (forced CCM below "
            f"{q(c.ccm_min_load, 'current')})"
        )
    return replace(c, flags=tuple(flags))


def corner_points(spec: Spec) -> list[tuple[str, float, float]]:
    """The named corners of a spec: (name, Vin, Iout).

    Lowest and highest input at full load; for a boost whose input range contains
    Vo/2 (D = 0.5, largest ripple, REFERENCES 1.1 notes) that input at full load too;
    then the light load at the highest and the lowest input.
    """
    points = [("low line, full load", spec.vin_min, spec.iout_max)]
    if spec.vin_max > spec.vin_min:
        points.append(("high line, full load", spec.vin_max, spec.iout_max))
    if spec.topology == "boost":
        mid = spec.vout / 2
        if spec.vin_min < mid < spec.vin_max:
            points.append(("largest ripple (D = 0.5), full load", mid, spec.iout_max))
    points.append(("high line, light load", spec.vin_max, spec.load_min))
    if spec.vin_max > spec.vin_min:
        points.append(("low line, light load", spec.vin_min, spec.load_min))
    return points


def corners(spec: Spec, parts: Parts) -> list[Corner]:
    """Operating points at every named corner of :func:`corner_points`."""
    return [operate(spec, parts, vin, io, name) for name, vin, io in corner_points(spec)]


def full_load_inputs(spec: Spec, n: int = 65) -> list[float]:
    """Input voltages scanned for the worst full-load case (V).

    An even grid over the range plus, for a boost, Vo/2 (largest ΔI) and 2·Vo/3
    (largest r = ΔI/IL) when inside the range.
    """
    lo, hi = spec.vin_min, spec.vin_max
    if hi == lo:
        return [lo]
    grid = [lo + (hi - lo) * k / (n - 1) for k in range(n)]
    grid[-1] = hi
    if spec.topology == "boost":
        grid += [v for v in (spec.vout / 2, 2 * spec.vout / 3) if lo < v < hi]
    return sorted(set(grid))


def l_min(spec: Spec, dcr: float = 0.0) -> tuple[float, float]:
    """Smallest inductance keeping r = ΔI/IL ≤ ``spec.ripple_ratio`` at full load.

    Rearranged from REFERENCES 1.1 (section 2): buck L = Vo(Vin,max − Vo)/(Vin,max·fs·ΔI),
    boost L = Vin(Vo − Vin)/(Vo·fs·ΔI), inverting L = Vin·Vo/((Vin + Vo)·fs·ΔI), with
    ΔI = r·IL, maximised over the input range (with drops, the scan of
    :func:`full_load_inputs`).

    Returns
    -------
    (l, vin)
        The inductance (H) and the input voltage (V) that sets it.
    """
    ts = 1.0 / spec.fsw
    best, at = 0.0, spec.vin_max
    for vin in full_load_inputs(spec):
        d, il = _ccm_duty(spec, vin, spec.iout_max, dcr)
        v_on, _ = _on_off(spec, vin, il, il, dcr)
        need = v_on * d * ts / (spec.ripple_ratio * il)
        if need > best:
            best, at = need, vin
    return best, at

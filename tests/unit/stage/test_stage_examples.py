"""Operating points against the worked examples B1–B6, B1d, B2d of REFERENCES 1.5.

Closed forms are recomputed here from the published formulas and matched to 1e-9
relative; the 4-significant-figure values printed in REFERENCES are matched to
5e-4. Sources: Erickson & Maksimović, Fundamentals of Power Electronics, 3rd ed.,
ch. 2 (CCM) and ch. 5 (DCM) (from memory for the chapters); Mohan, Undeland,
Robbins, Power Electronics, 3rd ed., ch. 7 (from memory); Maniktala, Switching
Power Supplies A to Z, 2nd ed., ch. 2 (r = ΔI/IL); REFERENCES 1.1–1.5.
"""

import math

import pytest

from kitbin.stage import Parts, Spec, operate
from kitbin.stage.operating import conduction_losses, duty_with_efficiency

EXACT = 1e-9
PRINTED = 5e-4


def close(a: float, b: float, rel: float = EXACT) -> bool:
    return math.isclose(a, b, rel_tol=rel, abs_tol=1e-15)


def ideal(topology: str, vin: float, vo: float, io: float, fs: float, **kw) -> Spec:
    return Spec(topology, vin, vin, vo, io, fs, vf=0.0, **kw)


# -- B1: buck CCM, 12 V -> 5 V, 2 A, 500 kHz, 10 uH, 22 uF ------------------------------


def b1(esr: float = 0.01, **kw):
    spec = ideal("buck", 12, 5, 2, 500e3, **kw)
    return operate(spec, Parts(inductance=10e-6, cout=22e-6, esr=esr, cin=10e-6), 12, 2)


def test_b1_buck_ccm_closed_forms() -> None:
    # REFERENCES B1; Erickson & Maksimović ch. 2 (volt-second balance), peak-to-peak ripple
    c = b1()
    d = 5 / 12
    di = (12 - 5) * d / (500e3 * 10e-6)
    il_rms = math.sqrt(2**2 + di**2 / 12)
    assert c.mode == "CCM"
    assert close(c.duty, d)
    assert close(c.ripple_pp, di)
    assert close(c.ripple_ratio, di / 2)
    assert close(c.i_peak, 2 + di / 2) and close(c.i_valley, 2 - di / 2)
    assert close(c.il_rms, il_rms)
    assert close(c.isw_rms, math.sqrt(d) * il_rms) and close(c.isw_avg, d * 2)
    assert close(c.id_avg, (1 - d) * 2) and close(c.id_rms, math.sqrt(1 - d) * il_rms)
    assert close(c.id_peak, 2 + di / 2) and c.v_reverse == 12
    assert close(c.icin_rms, math.sqrt((math.sqrt(d) * il_rms) ** 2 - (d * 2) ** 2))
    assert close(c.icout_rms, di / math.sqrt(12))
    assert close(c.ccm_min_load, di / 2)
    assert close(c.vout_ripple_c, di / (8 * 500e3 * 22e-6))
    assert close(c.vout_ripple_esr, di * 0.01)
    assert close(c.vout_ripple_sum, di / (8 * 500e3 * 22e-6) + di * 0.01)
    assert close(c.vin_ripple_c, 2 * d * (1 - d) / (500e3 * 10e-6))
    assert close(c.on_time, d / 500e3)


def test_b1_printed_values() -> None:
    # REFERENCES B1 table (4 s.f.), incl. the exact waveform ripple 7.949 mV (sim-verified)
    c = b1()
    for got, want in [
        (c.duty, 0.4167),
        (c.ripple_pp, 0.5833),
        (c.i_peak, 2.292),
        (c.i_valley, 1.708),
        (c.il_rms, 2.007),
        (c.isw_rms, 1.296),
        (c.id_rms, 1.533),
        (c.icin_rms, 0.9920),
        (c.icout_rms, 0.1684),
        (c.ccm_min_load, 0.2917),
        (c.vout_ripple_c, 6.629e-3),
        (c.vout_ripple_esr, 5.833e-3),
        (c.vout_ripple_sum, 12.46e-3),
        (c.vout_ripple, 7.949e-3),
        (c.vin_ripple_c, 97.22e-3),
    ]:
        assert close(got, want, PRINTED), (got, want)


def test_b1_exact_ripple_without_esr_is_the_capacitive_term() -> None:
    # REFERENCES 1.1: with ESR = 0 the triangle-current ripple is exactly ΔI/(8 fs C)
    c = b1(esr=0.0)
    assert close(c.vout_ripple, c.ripple_pp / (8 * 500e3 * 22e-6))


def test_b1_losses() -> None:
    # REFERENCES 1.4 and B1: Rsw 0.1 ohm, VD 0.4 V, DCR 50 mohm, ESR 10 mohm, ideal-duty currents
    c = b1()
    p_sw, p_d, p_l, p_co, _ = conduction_losses(
        c.isw_rms, 0.1, c.id_avg, c.id_rms, 0.4, 0.0, c.il_rms, 0.05, c.icout_rms, 0.01
    )
    assert close(p_sw, c.isw_rms**2 * 0.1)
    for got, want in [(p_sw, 0.1678), (p_d, 0.4667), (p_l, 0.2014), (p_co, 0.2836e-3)]:
        assert close(got, want, PRINTED), (got, want)


def test_b1_over_input_range() -> None:
    # REFERENCES B1 "over Vin = 9/12/15 V"
    spec = Spec("buck", 9, 15, 5, 2, 500e3, vf=0.0)
    for vin, di, ipk in [(9, 0.4444, 2.222), (12, 0.5833, 2.292), (15, 0.6667, 2.333)]:
        c = operate(spec, Parts(inductance=10e-6), vin, 2)
        assert close(c.ripple_pp, (vin - 5) * (5 / vin) / (500e3 * 10e-6))
        assert close(c.ripple_pp, di, PRINTED) and close(c.i_peak, ipk, PRINTED)


def test_b1d_buck_with_drops() -> None:
    # REFERENCES B1d (sim-verified): D = (Vo + VD + Io·RL)/(Vin − Io·Rsw + VD)
    spec = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.4, rsw=0.1)
    c = operate(spec, Parts(inductance=10e-6, dcr=0.05), 12, 2)
    d = (5 + 0.4 + 2 * 0.05) / (12 - 2 * 0.1 + 0.4)
    assert close(c.duty, d) and close(c.duty, 0.4508, PRINTED)
    assert close(c.ripple_pp, (12 - 2 * 0.1 - 2 * 0.05 - 5) * d / (500e3 * 10e-6))
    assert close(c.ripple_pp, 0.6041, PRINTED)


def test_b1_synchronous_duty() -> None:
    # REFERENCES 1.2 (derived there): D = (Vo + Io(RL + Rls))/(Vin − Io(Rhs − Rls))
    spec = Spec("buck", 12, 12, 5, 2, 500e3, rectifier="sync", rsw=0.05, r_rect=0.03)
    c = operate(spec, Parts(inductance=10e-6, dcr=0.05), 12, 2)
    assert close(c.duty, (5 + 2 * 0.08) / (12 - 2 * 0.02))
    assert close(c.duty, 0.4314, PRINTED)


def test_duty_with_efficiency() -> None:
    # REFERENCES 1.2: TI-BUCK / TI-BOOST forms (from memory), inverting derived there
    assert close(duty_with_efficiency("buck", 12, 5, 0.9), 5 / (0.9 * 12))
    assert close(duty_with_efficiency("buck", 12, 5, 0.9), 0.4630, PRINTED)
    assert close(duty_with_efficiency("boost", 5, 12, 0.85), 0.6458, PRINTED)
    assert close(duty_with_efficiency("invert", 12, 5, 0.85), 0.3289, PRINTED)


# -- B2: boost CCM, 5 V -> 12 V, 0.5 A, 1 MHz, 4.7 uH, 10 uF ------------------------------


def test_b2_boost_ccm() -> None:
    # REFERENCES B2; Erickson & Maksimović ch. 2
    spec = ideal("boost", 5, 12, 0.5, 1e6)
    c = operate(spec, Parts(inductance=4.7e-6, cout=10e-6, esr=0.01), 5, 0.5)
    d = 1 - 5 / 12
    il = 0.5 / (1 - d)
    di = 5 * d / (1e6 * 4.7e-6)
    il_rms = math.sqrt(il**2 + di**2 / 12)
    assert close(c.duty, d) and close(c.il_avg, il) and close(c.ripple_pp, di)
    assert close(c.id_avg, 0.5) and close(c.id_rms, math.sqrt(1 - d) * il_rms)
    assert close(c.icin_rms, di / math.sqrt(12))
    assert close(c.icout_rms, math.sqrt((1 - d) * il_rms**2 - 0.25))
    assert close(c.ccm_min_load, (1 - d) * di / 2)
    assert close(c.vout_ripple_c, 0.5 * d / (1e6 * 10e-6))
    assert close(c.vout_ripple_esr, (il + di / 2) * 0.01)
    for got, want in [
        (c.ripple_ratio, 0.5171),
        (c.i_peak, 1.510),
        (c.i_valley, 0.8897),
        (c.il_rms, 1.213),
        (c.isw_rms, 0.9267),
        (c.isw_avg, 0.7000),
        (c.id_rms, 0.7832),
        (c.icin_rms, 0.1791),
        (c.icout_rms, 0.6028),
        (c.ccm_min_load, 0.1293),
        (c.vout_ripple_c, 29.17e-3),
        (c.vout_ripple_esr, 15.10e-3),
        (c.vout_ripple_sum, 44.27e-3),
        (c.vout_ripple, 38.06e-3),
    ]:
        assert close(got, want, PRINTED), (got, want)
    assert c.v_reverse == 12


def test_b2d_boost_exact_quadratic() -> None:
    # REFERENCES B2d (sim-verified): (Vo+VD)x² − (Vin + Io·Rsw)x + Io(RL + Rsw) = 0, x = 1 − D
    spec = Spec("boost", 5, 5, 12, 0.5, 1e6, vf=0.4, rsw=0.1)
    c = operate(spec, Parts(inductance=4.7e-6, dcr=0.05), 5, 0.5)
    a, b, cc = 12.4, 5 + 0.5 * 0.1, 0.5 * 0.15
    x = (b + math.sqrt(b * b - 4 * a * cc)) / (2 * a)
    assert close(c.duty, 1 - x) and close(c.il_avg, 0.5 / x)
    assert close(c.ripple_pp, (5 - 0.5 / x * 0.15) * (1 - x) / (1e6 * 4.7e-6))
    assert close(c.duty, 0.6082, PRINTED)
    assert close(c.il_avg, 1.276, PRINTED)
    assert close(c.ripple_pp, 0.6222, PRINTED)


# -- B3: inverting CCM, 12 V -> -5 V, 1 A, 500 kHz, 22 uH, 22 uF --------------------------


def test_b3_inverting_ccm() -> None:
    # REFERENCES B3; Erickson & Maksimović ch. 2
    spec = ideal("invert", 12, 5, 1, 500e3)
    c = operate(spec, Parts(inductance=22e-6, cout=22e-6, esr=0.01), 12, 1)
    d = 5 / 17
    assert close(c.duty, d) and close(c.il_avg, 1 / (1 - d))
    assert close(c.ripple_pp, 12 * d / (500e3 * 22e-6))
    assert close(c.ccm_min_load, (1 - d) * 12 * d / (500e3 * 22e-6) / 2)
    for got, want in [
        (c.il_avg, 1.417),
        (c.ripple_ratio, 0.2265),
        (c.i_peak, 1.577),
        (c.i_valley, 1.256),
        (c.il_rms, 1.420),
        (c.isw_rms, 0.7699),
        (c.id_avg, 1.000),
        (c.id_rms, 1.193),
        (c.icin_rms, 0.6474),
        (c.icout_rms, 0.6502),
        (c.ccm_min_load, 0.1132),
        (c.vout_ripple_c, 26.74e-3),
        (c.vout_ripple_esr, 15.77e-3),
        (c.vout_ripple_sum, 42.51e-3),
        (c.vout_ripple, 39.30e-3),
    ]:
        assert close(got, want, PRINTED), (got, want)
    assert c.v_reverse == 17


def test_b3_inverting_with_drops() -> None:
    # REFERENCES B3 "D with VD 0.4 V, Rsw 0.1 ohm, DCR 50 mohm (numeric)": 0.3172, IL = 1.465 A
    spec = Spec("invert", 12, 12, 5, 1, 500e3, vf=0.4, rsw=0.1)
    c = operate(spec, Parts(inductance=22e-6, dcr=0.05), 12, 1)
    # the defining balance D(Vin − IL(Rsw+RL)) = (1−D)(Vo + VD + IL·RL), IL = Io/(1−D)
    lhs = c.duty * (12 - c.il_avg * 0.15)
    rhs = (1 - c.duty) * (5.4 + c.il_avg * 0.05)
    assert close(lhs, rhs)
    assert close(c.duty, 0.3172, PRINTED) and close(c.il_avg, 1.465, PRINTED)


# -- B4–B6: DCM -----------------------------------------------------------------------------


def test_b4_buck_dcm() -> None:
    # REFERENCES B4 (Erickson & Maksimović ch. 5, from memory; sim-verified)
    spec = ideal("buck", 12, 5, 2, 500e3, iout_min=0.2)
    c = operate(spec, Parts(inductance=10e-6, cout=22e-6), 12, 0.2)
    d = math.sqrt(2 * 10e-6 * 500e3 * 0.2 * 5 / (12 * 7))
    ipk = 7 * d / (500e3 * 10e-6)
    d2 = d * 7 / 5
    assert c.mode == "DCM"
    assert close(c.duty, d) and close(c.i_peak, ipk) and close(c.d2, d2)
    assert close(c.il_avg, 0.2)
    assert close(c.vout_ripple_c, (ipk - 0.2) ** 2 * (d + d2) * 2e-6 / (2 * ipk * 22e-6))
    assert close(c.vout_ripple, c.vout_ripple_c)  # no ESR: the exact waveform equals the form
    for got, want in [
        (c.duty, 0.3450),
        (c.i_peak, 0.4830),
        (c.d2, 0.4830),
        (c.il_rms, 0.2538),
        (c.isw_rms, 0.1638),
        (c.id_rms, 0.1938),
        (c.id_avg, 0.1167),
        (c.vout_ripple, 6.243e-3),
    ]:
        assert close(got, want, PRINTED), (got, want)
    # Erickson's K = 2L·fs/R < Kcrit = 1 − D
    k = 2 * 10e-6 * 500e3 / (5 / 0.2)
    assert close(k, 0.4) and k < 1 - c.duty


def test_b5_boost_dcm() -> None:
    # REFERENCES B5
    spec = ideal("boost", 5, 12, 0.5, 1e6, iout_min=0.05)
    c = operate(spec, Parts(inductance=4.7e-6, cout=10e-6), 5, 0.05)
    d = math.sqrt(2 * 4.7e-6 * 1e6 * 0.05 * 7) / 5
    assert c.mode == "DCM" and close(c.duty, d)
    assert close(c.i_peak, 5 * d / (1e6 * 4.7e-6)) and close(c.d2, d * 5 / 7)
    assert close(c.id_avg, 0.05)
    for got, want in [
        (c.duty, 0.3628),
        (c.i_peak, 0.3859),
        (c.d2, 0.2591),
        (c.il_avg, 0.1200),
        (c.il_rms, 0.1757),
        (c.isw_rms, 0.1342),
        (c.id_rms, 0.1134),
        (c.vout_ripple, 3.788e-3),
        (c.vout_ripple_c, 3.788e-3),
    ]:
        assert close(got, want, PRINTED), (got, want)


def test_b6_inverting_dcm() -> None:
    # REFERENCES B6
    spec = ideal("invert", 12, 5, 1, 500e3, iout_min=0.1)
    c = operate(spec, Parts(inductance=22e-6, cout=22e-6), 12, 0.1)
    d = math.sqrt(2 * 22e-6 * 500e3 * 0.1 * 5) / 12
    assert c.mode == "DCM" and close(c.duty, d) and close(c.d2, d * 12 / 5)
    for got, want in [
        (c.duty, 0.2764),
        (c.i_peak, 0.3015),
        (c.d2, 0.6633),
        (c.il_avg, 0.1417),
        (c.id_avg, 0.1000),
        (c.il_rms, 0.1687),
        (c.isw_rms, 0.09152),
        (c.id_rms, 0.1418),
        (c.vout_ripple, 4.061e-3),
    ]:
        assert close(got, want, PRINTED), (got, want)


@pytest.mark.parametrize(
    ("topology", "vin", "vo", "lh"), [("buck", 12, 5, 10e-6), ("boost", 5, 12, 4.7e-6)]
)
def test_ccm_and_dcm_meet_at_the_boundary(topology: str, vin: float, vo: float, lh: float) -> None:
    # REFERENCES 1.1/1.3: at Io = Io,B the DCM duty equals the CCM duty (D + D2 = 1)
    spec = Spec(topology, vin, vin, vo, 1.0, 500e3, vf=0.3, rsw=0.05)
    boundary = operate(spec, Parts(inductance=lh, dcr=0.04), vin, 0.5).ccm_min_load
    above = operate(spec, Parts(inductance=lh, dcr=0.04), vin, boundary * (1 + 1e-9))
    below = operate(spec, Parts(inductance=lh, dcr=0.04), vin, boundary * (1 - 1e-9))
    assert above.mode == "CCM" and below.mode == "DCM"
    assert math.isclose(above.duty, below.duty, rel_tol=1e-6)
    assert math.isclose(below.duty + below.d2, 1.0, rel_tol=1e-6)

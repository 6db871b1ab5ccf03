"""Demands, inductor selection (REFERENCES 2), thermal (REFERENCES 5), divider (REFERENCES 7),
derating (REFERENCES 6) and spec validation."""

import math

import pytest

from kitbin.errors import SpecError
from kitbin.stage import (
    Parts,
    Spec,
    demand_for,
    demands,
    inductor_duty,
    l_min,
    operate,
    output_ripple,
    predicted_rise,
    r_at,
    runaway_current,
    spec_from_dict,
)
from kitbin.stage.divider import divider_output
from kitbin.stage.spec import ExtraPart
from kitbin.stage.thermal import r_th_from_rise, tau_effective, time_to_limit, winding_temperature

EXACT = 1e-9
PRINTED = 5e-4


def close(a: float, b: float, rel: float = EXACT) -> bool:
    return math.isclose(a, b, rel_tol=rel)


# -- REFERENCES 2: inductance from a ripple target, saturation margin -----------------------


def test_l_min_b1_and_isat_margin() -> None:
    # REFERENCES 2 worked numbers: B1 with r = 0.3 needs 5·7/(12·500e3·0.6) = 9.722 uH;
    # 10 uH gives r = 0.2917; Isat ≥ 1.2 × 2.292 A = 2.750 A (margin common practice, no source)
    spec = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.0, ripple_ratio=0.3, isat_margin=1.2)
    lm, at = l_min(spec)
    assert close(lm, 5 * 7 / (12 * 500e3 * 0.6)) and close(lm, 9.722e-6, PRINTED) and at == 12
    duty = inductor_duty(spec, 10e-6)
    assert close(duty.ripple_ratio, 0.2917, PRINTED)
    assert close(duty.isat_required, 1.2 * (2 + 7 * 5 / 12 / 5 / 2))
    assert close(duty.isat_required, 2.750, PRINTED)
    assert duty.isat_quantity == "isat_20"


def test_l_min_b2_and_b3() -> None:
    # REFERENCES 2: B2 with r = 0.4 needs 6.076 uH (4.7 uH gives r = 0.5171, Isat ≥ 1.812 A);
    # B3 with r = 0.3 needs 16.61 uH (22 uH gives r = 0.2265)
    b2 = Spec("boost", 5, 5, 12, 0.5, 1e6, vf=0.0, ripple_ratio=0.4, isat_margin=1.2)
    lm, _ = l_min(b2)
    assert close(lm, 5 * 7 / (12 * 1e6 * 0.4 * 1.2)) and close(lm, 6.076e-6, PRINTED)
    d2 = inductor_duty(b2, 4.7e-6)
    assert close(d2.ripple_ratio, 0.5171, PRINTED) and close(d2.isat_required, 1.812, PRINTED)
    b3 = Spec("invert", 12, 12, 5, 1, 500e3, vf=0.0, ripple_ratio=0.3)
    lm3, _ = l_min(b3)
    il = 1 / (1 - 5 / 17)
    assert close(lm3, 12 * 5 / (17 * 500e3 * 0.3 * il)) and close(lm3, 16.61e-6, PRINTED)
    assert close(inductor_duty(b3, 22e-6).ripple_ratio, 0.2265, PRINTED)


def test_boost_worst_ripple_ratio_is_inside_the_range() -> None:
    # REFERENCES 1.1 notes: a boost's r = Vin²(Vo − Vin)/(Vo²·fs·L·Io) peaks at Vin = 2Vo/3
    spec = Spec("boost", 5, 11, 12, 0.5, 1e6, vf=0.0)
    lm, at = l_min(spec)
    assert close(at, 8.0)
    assert close(lm, 8 * 4 / (12 * 1e6 * 0.3 * 0.5 * 12 / 8))


def test_survive_short_raises_isat_to_the_current_limit() -> None:
    # REFERENCES 2: Isat ≥ the controller's switch current limit if the output can be shorted
    spec = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.0, ilim=4.0)
    assert inductor_duty(spec, 10e-6).isat_required == 4.0
    relaxed = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.0, ilim=4.0, survive_short=False)
    assert close(inductor_duty(relaxed, 10e-6).isat_required, 1.25 * 2.2916666666666665)


def test_candidate_l_sets_its_own_peak() -> None:
    spec = Spec("buck", 11, 15, 5.1, 2.4, 500e3)
    small, large = inductor_duty(spec, 6.8e-6), inductor_duty(spec, 22e-6)
    assert small.i_peak > large.i_peak and small.isat_required > large.isat_required
    assert small.vin_peak == 15


# -- REFERENCES 5: thermal -------------------------------------------------------------------


def test_copper_tempco_t0() -> None:
    # REFERENCES T0a/T0b; IEC 60028:1925 α20 = 0.00393 /K (values seen in secondary sources)
    assert close(r_at(0.050, 25, 100), 0.050 * (1 + 0.00393 * 80) / (1 + 0.00393 * 5))
    assert close(r_at(0.050, 25, 100), 64.45e-3, PRINTED)
    assert close(winding_temperature(0.050, 25, 0.063), 92.47, PRINTED)


def test_self_consistent_rise_t2() -> None:
    # REFERENCES T2 (derived there, ODE-checked): R20 = 50 mohm, R_th fitted to 40 K at 3 A,
    # 25 °C ambient; 5 A gives 153.1 K, τ_eff = 286.2 s from τ = 180 s; runaway at 8.208 A
    r_th = r_th_from_rise(40.0, 3.0, 0.050, 25.0)
    assert close(r_th, 75.53, PRINTED)
    assert close(predicted_rise(3.0, 0.050, r_th, 25.0), 40.0)
    k = 25 * 0.050 * r_th
    rise5 = predicted_rise(5.0, 0.050, r_th, 25.0)
    assert close(rise5, k * (1 + 0.00393 * 5) / (1 - 0.00393 * k))
    assert close(rise5, 153.1, PRINTED)
    tau = tau_effective(180.0, 5.0, 0.050, r_th)
    assert close(tau, 286.2, PRINTED)
    assert close(time_to_limit(tau, 25.0, 25.0 + rise5, 125.0), 303.2, PRINTED)
    i_run = runaway_current(0.050, r_th)
    assert close(i_run, 8.208, PRINTED)
    assert predicted_rise(i_run * 1.001, 0.050, r_th, 25.0) == math.inf


def test_time_to_limit_t1() -> None:
    # REFERENCES T1/T1' (R constant): ΔT' = 40·(5/3)² = 111.1 K; from cold 414.5 s; warm 334.1 s
    rise = 40 * (5 / 3) ** 2
    assert close(time_to_limit(180, 25, 25 + rise, 125), 180 * math.log(rise / (rise - 100)))
    assert close(time_to_limit(180, 25, 25 + rise, 125), 414.5, PRINTED)
    assert close(time_to_limit(180, 65, 25 + rise, 125), 334.1, PRINTED)
    assert time_to_limit(180, 25, 100, 125) == math.inf


# -- REFERENCES 7: divider ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("vref", "e", "rtop", "rbot", "t", "ifb", "nom", "vmax", "vmin", "plus", "minus", "lin", "rss"),
    [
        (0.8, 0.01, 52.3e3, 10e3, 0.01, 0, 4.984, 5.119, 4.852, 2.713, -2.646, 2.679, 1.552),
        (1.25, 0.02, 16e3, 10e3, 0.05, 100e-9, 3.252, 3.531, 3.000, 8.606, -7.742, 8.154, 4.789),
        (0.6, 0.015, 100e3, 22.1e3, 0.001, 0, 3.315, 3.370, 3.260, 1.666, -1.661, 1.664, 1.504),
    ],
    ids=["F1", "F2", "F3"],
)
def test_divider_f1_f3(vref, e, rtop, rbot, t, ifb, nom, vmax, vmin, plus, minus, lin, rss):
    # REFERENCES F1–F3: Vout = Vref(1 + Rtop/Rbot) + I_FB·Rtop (regulator data sheets, seen);
    # worst-case corners and linear/RSS estimates (common practice, no source)
    out = divider_output(vref, rtop, rbot, t, e, ifb)
    assert close(out.nominal, vref * (1 + rtop / rbot) + ifb * rtop)
    assert close(
        out.v_max, vref * (1 + e) * (1 + rtop * (1 + t) / (rbot * (1 - t))) + ifb * rtop * (1 + t)
    )
    for got, want in [(out.nominal, nom), (out.v_max, vmax), (out.v_min, vmin)]:
        assert close(got, want, PRINTED)
    for got, want in [
        (out.err_plus, plus),
        (out.err_minus, minus),
        (out.linear, lin),
        (out.rss, rss),
    ]:
        assert close(got * 100, want, 2e-3), (got, want)


def test_divider_demand_window() -> None:
    # ratio window from Vref and the allowed output error less the reference tolerance
    spec = Spec("buck", 11, 15, 5.1, 2.4, 500e3, vref=0.8, vref_tol=0.01, vout_tol=0.03)
    d = demand_for(demands(spec), "feedback_divider")
    lo, hi = (c.limit for c in d.constraints if c.quantity == "divider_ratio")
    assert close(lo, 5.1 / 0.8 * 0.98 - 1) and close(hi, 5.1 / 0.8 * 1.02 - 1)
    with_ifb = Spec(
        "buck", 11, 15, 5.1, 2.4, 500e3, vref=0.8, vref_tol=0.01, vout_tol=0.05, ifb=100e-9
    )
    total = [c for c in demand_for(demands(with_ifb), "feedback_divider").constraints]
    assert close(total[-1].limit, 5.1 / (100 * 100e-9))  # REFERENCES 7: R1+R2 ≤ Vout/(100·I_FB)


# -- REFERENCES 6: derating --------------------------------------------------------------------


def test_diode_vrrm_b3_at_high_line() -> None:
    # REFERENCES 6 example: B3 at Vin,max = 13.2 V: V_R = 18.2 V → V_RRM ≥ 1.25·18.2 = 22.75 V
    spec = Spec("invert", 10.8, 13.2, 5, 1, 500e3)
    d = demand_for(demands(spec), "catch_diode")
    vrrm = next(c for c in d.constraints if c.quantity == "vrrm")
    assert close(vrrm.limit, 22.75) and vrrm.op == ">="
    assert "18.2 V" in vrrm.reason and "common practice" in vrrm.source


def test_capacitor_demands_bound_the_exact_ripple() -> None:
    # a capacitor just meeting both halves of the budget keeps the exact ripple within it
    spec = Spec("buck", 11, 15, 5.1, 2.4, 500e3)
    d = demand_for(demands(spec), "output_capacitor")
    c_min = next(c.limit for c in d.constraints if c.quantity == "capacitance")
    esr_max = next(c.limit for c in d.constraints if c.quantity == "esr")
    lm, _ = l_min(spec)
    assert output_ripple(spec, lm, c_min, esr_max) <= spec.vout_ripple_limit * (1 + 1e-9)
    v = next(c for c in d.constraints if c.quantity == "rated_voltage")
    assert close(v.limit, 1.5 * 5.1 * 1.03)


def test_roles_and_sync_has_no_diode() -> None:
    spec = Spec(
        "buck",
        11,
        15,
        5.1,
        2.4,
        500e3,
        ilim_gain=12e3 * 1.0,
        extras=(ExtraPart("boot", "capacitance", ">=", 100e-9, "bootstrap"),),
    )
    roles = [d.role for d in demands(spec)]
    assert roles == [
        "inductor",
        "output_capacitor",
        "input_capacitor",
        "catch_diode",
        "feedback_divider",
        "set_resistor",
        "controller",
        "extra:boot",
    ]
    sync = Spec("buck", 11, 15, 5.1, 2.4, 500e3, rectifier="sync")
    assert "catch_diode" not in [d.role for d in demands(sync)]
    rset = demand_for(demands(spec), "set_resistor").constraints
    lo, hi = rset[0].limit, rset[1].limit
    assert lo < hi and close(hi / lo, 1.1)
    for d in demands(spec):
        for c in d.constraints:
            assert c.op in (">=", "<=") and c.reason and c.source


def test_light_load_corner_reports_dcm() -> None:
    # REFERENCES 1.1: a diode buck below Io,B = ΔI/2 runs in DCM; ideal CCM duty is Vo/Vin
    spec = Spec("buck", 11, 15, 5.1, 2.4, 500e3, vf=0.0, iout_min=0.1)
    full = operate(spec, Parts(inductance=10e-6), 15, 2.4)
    light = operate(spec, Parts(inductance=10e-6), 15, 0.1)
    assert full.mode == "CCM" and close(full.duty, 5.1 / 15)
    assert light.ccm_min_load > 0.1 and light.mode == "DCM"


# -- spec validation ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("kwargs", "words"),
    [
        (dict(topology="buck", vin_min=4, vin_max=6, vout=5.1), "buck cannot make"),
        (dict(topology="boost", vin_min=4, vin_max=6, vout=5.1), "boost cannot make"),
        (dict(fsw=0.0), "switching frequency"),
        (dict(fsw=-1.0), "switching frequency"),
        (dict(vin_min=15, vin_max=11), "written backwards"),
        (dict(iout_min=3.0), "above full load"),
        (dict(topology="flyback"), "expected one of"),
        (dict(isat_drop=25), "Isat criterion"),
        (dict(ripple_ratio=2.5), "ripple ratio"),
        (dict(vref=6.0), "not below the output"),
        (dict(vref=0.8, vref_tol=0.05), "leaves nothing"),
        (dict(isat_margin=0.9), "factor of 1 or more"),
    ],
)
def test_bad_specs_raise_one_line(kwargs: dict, words: str) -> None:
    base = dict(topology="buck", vin_min=11, vin_max=15, vout=5.1, iout_max=2.4, fsw=500e3)
    base.update(kwargs)
    with pytest.raises(SpecError) as err:
        Spec(**base)
    assert words in str(err.value) and "\n" not in str(err.value)


def test_spec_round_trips_through_a_dict() -> None:
    spec = Spec("invert", 10, 14, 5, 1, 400e3, vref=0.8, extras=(ExtraPart("x", "vrrm", ">=", 30),))
    assert spec_from_dict(spec.to_dict()) == spec
    with pytest.raises(SpecError, match="unknown spec field"):
        spec_from_dict({**spec.to_dict(), "colour": 1})
    with pytest.raises(SpecError, match="missing"):
        spec_from_dict({"topology": "buck"})


def test_unreachable_output_with_drops_is_a_spec_error() -> None:
    spec = Spec("boost", 5, 5, 12, 5.0, 1e6, rsw=0.5)
    with pytest.raises(SpecError, match="cannot reach"):
        operate(spec, Parts(inductance=4.7e-6, dcr=0.5), 5, 5.0)

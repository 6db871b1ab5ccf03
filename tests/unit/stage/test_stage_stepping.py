"""Saturation-aware stepping: constant L must reproduce the closed form (REFERENCES 1.1)
to 0.1 %; a saturating curve raises the peak; runaway is flagged."""

import math

import numpy as np
import pytest

from kitbin.errors import SpecError
from kitbin.stage import Parts, Spec, inductor_duty, operate
from kitbin.stage.stepping import LCurve, step_corner, step_periods

CUR = np.linspace(0.0, 8.0, 41)


def flat(l_h: float) -> LCurve:
    return LCurve(CUR, np.full(CUR.size, l_h))


@pytest.mark.parametrize(
    ("topology", "vin", "vo", "io", "fs", "l_h", "vf", "rsw", "dcr"),
    [
        ("buck", 12, 5, 2, 500e3, 10e-6, 0.0, 0.0, 0.0),  # REFERENCES B1
        ("buck", 12, 5, 2, 500e3, 10e-6, 0.4, 0.1, 0.05),  # REFERENCES B1d
        ("buck", 12, 5, 0.2, 500e3, 10e-6, 0.0, 0.0, 0.0),  # REFERENCES B4 (DCM)
        ("boost", 5, 12, 0.5, 1e6, 4.7e-6, 0.0, 0.0, 0.0),  # REFERENCES B2
        ("boost", 5, 12, 0.05, 1e6, 4.7e-6, 0.0, 0.0, 0.0),  # REFERENCES B5 (DCM)
        ("invert", 12, 5, 1, 500e3, 22e-6, 0.0, 0.0, 0.0),  # REFERENCES B3
        ("invert", 12, 5, 0.1, 500e3, 22e-6, 0.0, 0.0, 0.0),  # REFERENCES B6 (DCM)
    ],
)
def test_constant_l_matches_closed_form(topology, vin, vo, io, fs, l_h, vf, rsw, dcr) -> None:
    # closed forms of REFERENCES 1.1/1.3 (Erickson & Maksimović ch. 2 and 5, from memory)
    spec = Spec(topology, vin, vin, vo, 2.0, fs, vf=vf, rsw=rsw, iout_min=min(io, 2.0))
    c = operate(spec, Parts(inductance=l_h, dcr=dcr), vin, io)
    r = step_corner(spec, vin, io, flat(l_h), dcr)
    assert r.converged and not r.runaway and r.mode == c.mode
    assert math.isclose(r.i_peak, c.i_peak, rel_tol=1e-3)
    assert math.isclose(r.ripple_pp, c.ripple_pp, rel_tol=1e-3)
    assert math.isclose(r.i_avg, c.il_avg, rel_tol=1e-3)
    assert math.isclose(r.i_rms, c.il_rms, rel_tol=1e-3)
    assert math.isclose(r.on_time * fs, c.duty, rel_tol=1e-3)


def test_flux_linkage_is_exact_and_invertible() -> None:
    # λ(i) = ∫ L di for L linear between points (exact quadratic per segment)
    lv = 10e-6 / (1 + (CUR / 3) ** 4)
    curve = LCurve(CUR, lv)
    i = np.array([-2.5, 0.0, 0.7, 3.3, 7.9])
    from scipy.integrate import quad  # reference library: scipy

    for x, lam in zip(i, curve.flux(i), strict=True):
        ref = quad(
            lambda u: np.interp(abs(u), CUR, lv),
            0,
            x,
            points=[float(np.sign(x) * p) for p in CUR[1:] if p < abs(x)],
            limit=200,
        )
        assert math.isclose(lam, ref[0], rel_tol=1e-9, abs_tol=1e-18)
    assert np.allclose(curve.current_at(curve.flux(i)), i, rtol=1e-12, atol=1e-12)


def test_saturation_raises_peak_and_ripple() -> None:
    spec = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.0)
    soft = LCurve(CUR, 10e-6 / (1 + (CUR / 2.6) ** 6))
    r = step_corner(spec, 12, 2, soft)
    c = operate(spec, Parts(inductance=10e-6), 12, 2)
    assert r.converged and r.i_peak > c.i_peak * 1.01 and r.ripple_pp > c.ripple_pp * 1.05
    assert math.isclose(r.i_avg, 2.0, rel_tol=1e-6)  # the load still sets the average
    duty = inductor_duty(spec, 10e-6, 0.0, (CUR, 10e-6 / (1 + (CUR / 2.6) ** 6)))
    assert duty.stepped and math.isclose(duty.i_peak, r.i_peak, rel_tol=1e-9)


def test_runaway_when_the_peak_leaves_the_curve() -> None:
    spec = Spec("buck", 12, 12, 5, 2, 500e3, vf=0.0)
    hard = LCurve(np.array([0.0, 1.0, 1.5, 2.0]), np.array([10e-6, 9e-6, 2e-6, 0.5e-6]))
    r = step_corner(spec, 12, 2, hard)
    assert r.runaway and "leaves the measured curve" in r.note
    duty = inductor_duty(spec, 10e-6, 0.0, hard)
    assert duty.runaway and duty.notes


def test_volt_second_imbalance_grows_period_after_period() -> None:
    # 7 V·(1 µs) on against 5 V·(1 µs) off: +2 µV·s each period until the curve ends
    r = step_periods(flat(10e-6), 7.0, 5.0, 1e-6, 2e-6, 0.0, diode=True, max_periods=5000)
    assert r.runaway and np.all(np.diff(r.peaks[:-1]) > 0)


def test_bad_curves_are_spec_errors() -> None:
    with pytest.raises(SpecError, match="increase"):
        LCurve(np.array([0.0, 2.0, 1.0]), np.array([1e-6, 1e-6, 1e-6]))
    with pytest.raises(SpecError, match="positive"):
        LCurve(np.array([0.0, 1.0]), np.array([1e-6, 0.0]))

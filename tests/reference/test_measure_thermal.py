"""Thermal analysis against worked examples and reference libraries.

Sources: REFERENCES.md §5 worked examples T0a–T2 (computed there with the
lumped-capacitance model of Incropera, DeWitt, Bergman, Lavine, *Fundamentals of
Heat and Mass Transfer*, 7th ed., Wiley 2011, §5.1–5.3 — section numbers from
memory); copper tempco α20 = 0.00393 /K from IEC 60028:1925 "International
standard of resistance for copper"; the fit is compared with
scipy.optimize.curve_fit on the same data and the tempco model with
scipy.integrate.solve_ivp.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from kitbin.errors import CaptureError
from kitbin.measure import thermal as th
from kitbin.measure.synthetic import heating_curve


def test_t0a_copper_resistance_at_100c() -> None:
    # REFERENCES §5 T0a: 50.0 mΩ at 25 °C -> ×1.289 -> 64.45 mΩ at 100 °C (IEC 60028)
    assert th.copper_resistance(0.050, 25.0, 100.0) == pytest.approx(0.06445, abs=5e-6)


def test_t0b_winding_temperature_by_resistance() -> None:
    # REFERENCES §5 T0b: 50.0 mΩ cold at 25 °C, 63.0 mΩ hot -> 92.47 °C (234.5 form);
    # the α20 form differs from it by 0.05 K (1/α20 − 20 = 234.45)
    assert th.winding_temperature(0.050, 25.0, 0.063) == pytest.approx(92.47, abs=0.05)


def test_t1_overload_time_from_cold_and_warm() -> None:
    # REFERENCES §5 T1: ΔT_ss = 40 K at 3 A, τ = 180 s, R constant; 5 A, limit 125 °C
    # from 25 °C: ΔT_ss' = 111.1 K, t_lim = 414.5 s; T1': from 65 °C, 334.1 s
    rise_5a = 40.0 * (5.0 / 3.0) ** 2
    assert rise_5a == pytest.approx(111.1, abs=0.05)
    assert th.time_to_limit(rise_5a, 180.0, 100.0) == pytest.approx(414.5, abs=0.1)
    assert th.time_to_limit(rise_5a, 180.0, 100.0, rise_start=40.0) == pytest.approx(334.1, abs=0.3)
    assert th.time_to_limit(30.0, 180.0, 100.0) is None
    # T1'': 60 s into the 5 A overload from cold -> 56.50 °C
    fit = th.HeatFit(25.0, rise_5a, 180.0, 0, 0, 0, 0.0, 0, 1, 10, ())
    assert float(fit.temperature(60.0)) == pytest.approx(56.50, abs=0.01)


def test_t2_self_consistent_copper_tempco() -> None:
    # REFERENCES §5 T2: R20 = 50 mΩ, ΔT(3 A) = 40 K at T_amb 25 °C -> R_th = 75.53 K/W,
    # ΔT_ss'(5 A) = 153.1 K, τ_eff = 286.2 s (τ0 = 180 s), t_lim = 303.2 s, runaway 8.208 A
    r20 = 0.050
    r_th = 40.0 / (3.0**2 * th.copper_resistance(r20, 20.0, 65.0))
    assert r_th == pytest.approx(75.53, abs=0.01)
    rise_5a = th.steady_rise(5.0, r20, r_th, 25.0)
    assert rise_5a == pytest.approx(153.1, abs=0.05)
    k = 25.0 * r20 * r_th
    tau_eff = 180.0 / (1.0 - th.ALPHA20_CU * k)
    assert tau_eff == pytest.approx(286.2, abs=0.05)
    assert th.time_to_limit(rise_5a, tau_eff, 100.0) == pytest.approx(303.2, abs=0.1)
    assert math.sqrt(1 / (th.ALPHA20_CU * r20 * r_th)) == pytest.approx(8.208, abs=0.001)
    assert th.current_for_rise(40.0, r20, r_th, 25.0) == pytest.approx(3.0, rel=1e-12)
    assert th.steady_rise(8.3, r20, r_th, 25.0) is None  # past runaway


def test_t2_rating_from_a_fitted_log_matches_the_worked_example() -> None:
    # A 3 A log of the T2 part: ΔT = 40 K, measured τ = τ_eff(3 A); DCR 50 mΩ at 20 °C.
    tau3 = 180.0 / (1.0 - th.ALPHA20_CU * 9.0 * 0.050 * 75.53)
    t = np.arange(0.0, 3000.0, 5.0)
    y = heating_curve(t, t_amb=25.0, rise_ss=40.0, tau=tau3)
    fit = th.fit_heating(t, y)
    rating = th.rate_heating(fit, 3.0, r_dcr=0.050, t_dcr=20.0, allowed_rise=40.0)
    assert rating.r_th_K_per_W == pytest.approx(75.53, abs=0.01)
    assert rating.i_for_rise_A == pytest.approx(3.0, rel=1e-6)
    assert rating.runaway_current_A == pytest.approx(8.208, abs=0.001)
    assert rating.seconds_to_limit is None
    assert th.FLAG_COPPER_UP in rating.flags  # R(65 °C)/R(25 °C) = 1.154


def test_tempco_model_against_an_ode_solver() -> None:
    # REFERENCES §5 "derived here, ODE-checked": C dT/dt = I²R20(1+α(T−20)) − (T−Ta)/R_th
    from scipy.integrate import solve_ivp

    r20, r_th, c_th, t_amb, current = 0.050, 75.53, 180.0 / 75.53, 25.0, 5.0

    def rhs(_t, y):
        p = current**2 * r20 * (1 + th.ALPHA20_CU * (y[0] - 20.0))
        return [(p - (y[0] - t_amb) / r_th) / c_th]

    sol = solve_ivp(rhs, (0, 303.2), [t_amb], rtol=1e-10, atol=1e-10)
    assert sol.y[0][-1] - t_amb == pytest.approx(100.0, abs=0.05)


def test_fit_matches_scipy_curve_fit_on_the_same_noisy_data() -> None:
    # reference library: scipy.optimize.curve_fit, same model, same data
    from scipy.optimize import curve_fit

    rng = np.random.default_rng(5)
    t = np.arange(0.0, 1500.0, 3.0)
    t0 = 45.0
    y = heating_curve(t, t_amb=21.3, rise_ss=36.0, tau=260.0, t0=t0) + rng.normal(0, 0.15, t.size)
    fit = th.fit_heating(t, y, t0=t0)

    def model(tt, a, b, c):
        return a + b * (1 - np.exp(-np.clip(tt - t0, 0, None) / c))

    p, cov = curve_fit(model, t, y, p0=[20.0, 30.0, 200.0])
    sig = np.sqrt(np.diag(cov))
    assert [fit.t_amb_C, fit.rise_ss_K, fit.tau_s] == pytest.approx(list(p), rel=1e-6)
    assert [fit.sigma_t_amb_C, fit.sigma_rise_K, fit.sigma_tau_s] == pytest.approx(
        list(sig), rel=1e-3
    )
    assert fit.flags == ()
    assert fit.length_tau == pytest.approx((t[-1] - t0) / fit.tau_s)


def test_short_log_is_flagged_extrapolated_and_poorly_constrained() -> None:
    rng = np.random.default_rng(9)
    t = np.arange(0.0, 400.0, 4.0)
    y = heating_curve(t, t_amb=22.0, rise_ss=40.0, tau=300.0) + rng.normal(0, 0.05, t.size)
    fit = th.fit_heating(t, y)
    assert th.FLAG_EXTRAPOLATED in fit.flags
    assert th.FLAG_POORLY_CONSTRAINED not in fit.flags
    assert fit.rise_ss_K == pytest.approx(40.0, rel=0.05)
    y2 = heating_curve(t[:30], t_amb=22.0, rise_ss=40.0, tau=900.0) + rng.normal(0, 0.05, 30)
    fit2 = th.fit_heating(t[:30], y2)
    assert {th.FLAG_EXTRAPOLATED, th.FLAG_POORLY_CONSTRAINED} <= set(fit2.flags)


def test_accelerating_rise_is_flagged() -> None:
    t = np.arange(0.0, 900.0, 5.0)
    y = 22.0 + 4e-5 * t**2
    assert th.FLAG_ACCELERATING in th.fit_heating(t, y).flags


def test_overshooting_test_current_gives_seconds_to_limit() -> None:
    t = np.arange(0.0, 2400.0, 5.0)
    fit = th.fit_heating(t, heating_curve(t, t_amb=22.0, rise_ss=55.0, tau=240.0))
    rating = th.rate_heating(fit, 2.0, allowed_rise=40.0)
    assert rating.seconds_to_limit == pytest.approx(240.0 * math.log(55.0 / 15.0), rel=1e-6)
    assert rating.r_th_K_per_W is None
    # without DCR the current for the allowed rise follows the I² rule (common practice)
    assert rating.i_for_rise_A == pytest.approx(2.0 * math.sqrt(40.0 / 55.0), rel=1e-6)


def test_loss_split_from_logs_at_several_currents() -> None:
    # ΔT = a·I² + b: exact for two points, least squares with errors for more
    split = th.split_losses([1.0, 2.0], [7.0, 22.0])
    assert (split.a_K_per_A2, split.b_K) == pytest.approx((5.0, 2.0))
    assert split.sigma_a is None
    split3 = th.split_losses([1.0, 2.0, 3.0], [7.1, 21.9, 47.0])
    ref = np.polyfit([1.0, 4.0, 9.0], [7.1, 21.9, 47.0], 1)  # reference: numpy.polyfit
    assert (split3.a_K_per_A2, split3.b_K) == pytest.approx(tuple(ref))
    with pytest.raises(CaptureError):
        th.split_losses([2.0, 2.0], [10.0, 11.0])


def test_flat_log_is_refused() -> None:
    t = np.arange(0.0, 100.0, 1.0)
    with pytest.raises(CaptureError, match="no temperature rise"):
        th.fit_heating(t, np.full(t.size, 22.0))

"""Current-ramp analysis recovers L0 and Isat of known L(i) models.

The captures are synthesised from closed-form L(i) curves (a smooth knee and a
hard knee) by exact integration of dt = L(i)/(V − i·R)·di, then passed through
white noise and an 8-bit quantiser, written in several file layouts and read
back. The expected Isat values are the models' closed-form inverses; the
tolerances (L0 ±3 %, Isat ±5 %) are the project's targets (common practice, no
source). The slope estimator is checked against ``numpy.gradient``.
"""

from __future__ import annotations

import numpy as np
import pytest

from kitbin.errors import CaptureError
from kitbin.measure.ramp import analyse_ramp, local_slope
from kitbin.measure.reader import read_capture
from kitbin.measure.synthetic import (
    InductorModel,
    on_time_for,
    pulse_current,
    scope,
    switching_current,
)

R_SENSE, V_SUPPLY, R_LOOP = 0.1, 12.0, 0.15
MODELS = {
    "smooth": InductorModel(l0_H=10e-6, knee_A=3.0, shape="smooth", p=4.0),
    "hard": InductorModel(l0_H=22e-6, knee_A=1.6, shape="hard", l_sat_frac=0.15, width_frac=0.04),
}


def _trace(model: InductorModel, kind: str, i_peak: float):
    t_on = on_time_for(model, V_SUPPLY, R_LOOP, i_peak)
    if kind == "switching":
        dt = t_on / 400
        return switching_current(
            model,
            v=V_SUPPLY,
            r_loop=R_LOOP,
            t_on=t_on,
            period=5 * t_on,
            periods=16,
            dt=dt,
            v_off=V_SUPPLY,
            t_lead=0.3 * t_on,
        )
    dt = t_on / 6000
    return pulse_current(
        model,
        v=V_SUPPLY,
        r_loop=R_LOOP,
        t_on=t_on,
        dt=dt,
        t_lead=0.2 * t_on,
        t_tail=0.6 * t_on,
        v_off=V_SUPPLY,
    )


def _write(t: np.ndarray, v: np.ndarray, layout: str) -> bytes:
    """The same samples in one of several bench-export layouts."""
    if layout == "csv_header":
        lines = ["Time (s),CH1 (V)", *(f"{a:.9g},{b:.6g}" for a, b in zip(t, v, strict=True))]
    elif layout == "semicolon_decimal_comma_mV":
        lines = [
            "Export of an invented scope",
            f"Points;{t.size}",
            "",
            "Time [us];CH1 [mV]",
            *(f"{a * 1e6:.9g};{b * 1e3:.6g}".replace(".", ",") for a, b in zip(t, v, strict=True)),
        ]
    elif layout == "whitespace_no_header":
        lines = [f"{a:.9e}   {b:.6e}" for a, b in zip(t, v, strict=True)]
    else:  # "tab_values_only": the time base comes from dt
        lines = ["CH1", *(f"{b:.6g}" for b in v)]
    return ("\n".join(lines) + "\n").encode()


CASES = [
    ("smooth", "switching", "clean", "csv_header"),
    ("smooth", "switching", "noisy8", "semicolon_decimal_comma_mV"),
    ("smooth", "pulse", "clean", "whitespace_no_header"),
    ("smooth", "pulse", "noisy8", "csv_header"),
    ("hard", "switching", "clean", "tab_values_only"),
    ("hard", "switching", "noisy8", "whitespace_no_header"),
    ("hard", "pulse", "clean", "semicolon_decimal_comma_mV"),
    ("hard", "pulse", "noisy8", "tab_values_only"),
]


@pytest.mark.parametrize(("shape", "kind", "quality", "layout"), CASES)
def test_recovers_l0_and_isat(shape: str, kind: str, quality: str, layout: str) -> None:
    model = MODELS[shape]
    i_peak = 1.5 * model.isat(0.30)
    t, i = _trace(model, kind, i_peak)
    v = i * R_SENSE
    if quality == "noisy8":
        rng = np.random.default_rng(7)
        # about one LSB of noise on an 8-bit range 10 % above the peak
        full = (-0.02 * v.max(), 1.1 * v.max())
        v = scope(v, rng, noise=(full[1] - full[0]) / 255, bits=8, full_scale=full)
    dt = float(t[1] - t[0])
    cap = read_capture(_write(t, v, layout), dt=dt if layout == "tab_values_only" else None)
    _, sense = cap.channel()
    result = analyse_ramp(cap.time, sense, r_sense=R_SENSE, v_l=V_SUPPLY, r_loop=R_LOOP)

    l0_true = float(model.inductance(0.0))
    assert result.l0_H == pytest.approx(l0_true, rel=0.03)
    for percent in (10, 20, 30):
        assert result.isat_A[percent] == pytest.approx(model.isat(percent / 100), rel=0.05)
    assert result.saturated
    assert result.quality.ramps == (16 if kind == "switching" else 1)
    assert result.curve_i_A.shape == result.curve_L_H.shape == result.curve_n.shape


@pytest.mark.parametrize("kind", ["switching", "pulse"])
def test_not_reached_is_a_lower_bound_never_extrapolated(kind: str) -> None:
    model = MODELS["smooth"]
    # ramp only to where L has fallen ~5 %: no 10/20/30 % drop inside the capture
    i_peak = 0.95 * model.isat(0.10)
    t, i = _trace(model, kind, i_peak)
    rng = np.random.default_rng(11)
    v = scope(i * R_SENSE, rng, noise=0.0008, bits=8, full_scale=(-0.01, 0.3))
    result = analyse_ramp(t, v, r_sense=R_SENSE, v_l=V_SUPPLY, r_loop=R_LOOP)
    assert result.isat_A == {10: None, 20: None, 30: None}
    assert not result.saturated
    assert result.i_max_A <= i_peak
    assert result.isat_bound(20) == (">=", result.i_max_A)
    assert result.l0_H == pytest.approx(10e-6, rel=0.03)


def test_measured_inductor_voltage_channel() -> None:
    # A supply that droops during the pulse, integrated with scipy's solve_ivp
    # (reference integrator); the analysis is given the measured V_L channel.
    from scipy.integrate import solve_ivp

    model = MODELS["hard"]
    t_on = on_time_for(model, V_SUPPLY, R_LOOP, 1.5 * model.isat(0.3)) * 1.2
    dt = t_on / 6000
    t = np.arange(int(1.3 * t_on / dt)) * dt
    t_start = 0.1 * t_on

    def supply(tt):
        return V_SUPPLY - 2.0 * np.clip((tt - t_start) / t_on, 0.0, 1.0)

    def rhs(tt, y):
        return [(supply(tt) - y[0] * R_LOOP) / float(model.inductance(y[0]))]

    on = (t >= t_start) & (t <= t_start + t_on)
    sol = solve_ivp(rhs, (t_start, t[on][-1]), [0.0], t_eval=t[on], rtol=1e-10, atol=1e-12)
    i = np.zeros_like(t)
    i[on] = sol.y[0]
    peak = i.max()
    i[t > t_start + t_on] = np.maximum(peak - (t[t > t_start + t_on] - t_start - t_on) * 1e6, 0)
    # the channel across the inductor includes its own DCR drop (0.05 ohm here)
    v_l = np.where(on, supply(t) - i * (R_LOOP - 0.05), 0.0)
    measured = analyse_ramp(t, i * R_SENSE, r_sense=R_SENSE, v_l=v_l, r_loop=0.05)
    assumed = analyse_ramp(t, i * R_SENSE, r_sense=R_SENSE, v_l=V_SUPPLY, r_loop=R_LOOP)
    assert measured.l0_H == pytest.approx(float(model.inductance(0.0)), rel=0.01)
    for percent in (10, 20, 30):
        assert measured.isat_A[percent] == pytest.approx(model.isat(percent / 100), rel=0.02)
    # a constant supply assumed while it droops overstates L and Isat (REFERENCES §3)
    assert assumed.curve_L_H[-1] > measured.curve_L_H[-1]
    assert assumed.isat_A[20] > measured.isat_A[20]


def test_local_slope_matches_numpy_gradient_on_clean_data() -> None:
    # reference: numpy.gradient (second-order central differences) on a smooth signal
    t = np.linspace(0.0, 1e-5, 5001)
    y = 3.0 * np.sin(2e5 * t) + 1e5 * t
    slope, centre = local_slope(t, y, 4)
    ref = np.gradient(y, t)
    inner = slice(10, -10)
    np.testing.assert_allclose(slope[inner], ref[inner], rtol=2e-4, atol=1e-4 * np.abs(ref).max())
    np.testing.assert_allclose(centre[inner], y[inner], rtol=1e-4, atol=1e-6)
    assert np.isnan(slope[:4]).all() and np.isnan(slope[-4:]).all()


def test_local_slope_is_exact_for_a_parabola_on_uneven_sampling() -> None:
    rng = np.random.default_rng(3)
    t = np.sort(rng.uniform(0, 1, 400))
    y = 2.0 + 5.0 * t + 0.0 * t**2
    slope, _ = local_slope(t, y, 6)
    np.testing.assert_allclose(slope[6:-6], 5.0, rtol=1e-9)
    t = np.linspace(0, 1, 401)
    y = 2.0 + 5.0 * t + 7.0 * t**2
    slope, _ = local_slope(t, y, 6)
    np.testing.assert_allclose(slope[6:-6], np.gradient(y, t)[6:-6], rtol=1e-9)


@pytest.mark.parametrize(
    ("name", "current", "message"),
    [
        ("flat", lambda t: np.full(t.size, 0.3), "no rising current segment"),
        ("zero", lambda t: np.zeros(t.size), "no rising current segment"),
        ("falling only", lambda t: 3.0 - 2.9 * t / t[-1], "no rising current segment"),
    ],
)
def test_captures_without_a_rising_segment(name: str, current, message: str) -> None:
    t = np.arange(5000) * 1e-9
    rng = np.random.default_rng(0)
    v = scope(current(t) * R_SENSE, rng, noise=0.001, bits=8, full_scale=(-0.05, 0.35))
    with pytest.raises(CaptureError, match=message):
        analyse_ramp(t, v, r_sense=R_SENSE, v_l=V_SUPPLY)


def test_inductor_voltage_must_stay_positive() -> None:
    t, i = _trace(MODELS["hard"], "pulse", 2.0)
    with pytest.raises(CaptureError, match="not positive"):
        analyse_ramp(t, i * R_SENSE, r_sense=R_SENSE, v_l=1.0, r_loop=1.0)


def test_measured_channel_equal_to_the_constant_gives_the_same_answer() -> None:
    # a low-duty switching capture (analysed on windows around the pulses): a V_L
    # channel that reads the constant supply must give exactly the constant's result
    model = MODELS["hard"]
    t, i = _trace(model, "switching", 1.5 * model.isat(0.3))
    rng = np.random.default_rng(2)
    v = scope(i * R_SENSE, rng, noise=0.002, bits=8, full_scale=(-0.02, 0.4))
    const = analyse_ramp(t, v, r_sense=R_SENSE, v_l=V_SUPPLY, r_loop=R_LOOP)
    chan = analyse_ramp(t, v, r_sense=R_SENSE, v_l=np.full(t.size, V_SUPPLY), r_loop=R_LOOP)
    assert chan.l0_H == pytest.approx(const.l0_H, rel=1e-9)
    assert chan.isat_A == pytest.approx(const.isat_A, rel=1e-9)
    assert chan.segments == const.segments
    # segments are sample indices of the capture, on rising current
    assert len(const.segments) == 16
    for a, b in const.segments:
        assert 0 <= a < b < t.size and i[b] > i[a]

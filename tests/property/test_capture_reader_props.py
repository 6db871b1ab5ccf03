"""The capture reader never raises anything but CaptureError, whatever it is given."""

from __future__ import annotations

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from kitbin.errors import CaptureError
from kitbin.measure.ramp import analyse_ramp
from kitbin.measure.reader import Capture, read_capture

_CELLS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(-(10**6), 10**6).map(str),
    st.sampled_from(["", "nan", "NaN", "1,5", "-", "e", "1e", ".", ",", "Time (s)", "CH1 [mV]"]),
    st.text(max_size=6),
)
_TABLES = st.builds(
    lambda rows, sep, end: end.join(sep.join(r) for r in rows),
    st.lists(st.lists(_CELLS, min_size=1, max_size=4), max_size=40),
    st.sampled_from([",", ";", "\t", " ", "  "]),
    st.sampled_from(["\n", "\r\n", "\r"]),
)


def _check(content) -> None:
    try:
        cap = read_capture(content, min_samples=2)
    except CaptureError as error:
        assert "\n" not in str(error)
        return
    assert isinstance(cap, Capture)
    assert (cap.time[1:] > cap.time[:-1]).all()


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.binary(max_size=400))
def test_arbitrary_bytes(content: bytes) -> None:
    _check(content)


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.text(max_size=400))
def test_arbitrary_text(content: str) -> None:
    _check(content)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_TABLES, st.one_of(st.none(), st.floats(min_value=1e-12, max_value=1.0)))
def test_table_like_text(content: str, dt) -> None:
    try:
        cap = read_capture(content, dt=dt, min_samples=2)
    except CaptureError as error:
        assert "\n" not in str(error)
        return
    assert (cap.time[1:] > cap.time[:-1]).all()


# -- the ramp analysis behind the reader: only CaptureError, never a crash -----------


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    st.lists(st.floats(-1e3, 1e3, allow_nan=False), max_size=300),
    st.sampled_from([1e-9, 1e-6, 1.0]),
)
def test_ramp_analysis_of_arbitrary_samples(values, dt) -> None:
    v = np.asarray(values, dtype=float)
    try:
        result = analyse_ramp(np.arange(v.size) * dt, v, r_sense=0.1, v_l=5.0, r_loop=0.1)
    except CaptureError as error:
        assert "\n" not in str(error)
        return
    assert result.l0_H > 0 and np.isfinite(result.l0_H)


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.integers(20, 400), st.integers(0, 2**32 - 1), st.floats(0.0, 0.5))
def test_ramp_analysis_of_random_quantised_pulses(n: int, seed: int, noise: float) -> None:
    rng = np.random.default_rng(seed)
    phase = (np.arange(n) % rng.integers(5, 60)) / 60
    i = np.where(phase < rng.uniform(0.1, 0.9), phase * rng.uniform(0.1, 5), 0.0)
    i = np.round((i + rng.normal(0, noise, n)) * 50) / 50
    try:
        result = analyse_ramp(np.arange(n) * 1e-8, i * 0.1, r_sense=0.1, v_l=5.0)
    except CaptureError:
        return
    assert result.l0_H > 0

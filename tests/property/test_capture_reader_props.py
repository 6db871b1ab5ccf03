"""The capture reader never raises anything but CaptureError, whatever it is given."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from kitbin.errors import CaptureError
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

"""The array twin of the power stage's per-candidate inductor function.

Reference: :func:`kitbin.stage.demands.inductor_duty` (checked there against
REFERENCES 1.5 worked examples and ngspice). The twin must give the same worst
ripple, peak, RMS, average current and required Isat to 1e-9 relative, in CCM and
DCM, for every topology, with and without drops. Also one hand-checked point:
REFERENCES 1.5, B1 (12 V -> 5 V, 2 A, 500 kHz, 10 uH): ripple 0.5833 A, peak
2.292 A at Vin = 12 V.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from kitbin.errors import SpecError
from kitbin.match.inductor import predicted_rise, worst_full_load
from kitbin.stage.demands import inductor_duty
from kitbin.stage.spec import Spec
from kitbin.stage.thermal import predicted_rise as scalar_rise

SPECS = [
    Spec("buck", 9.0, 15.0, 5.0, 2.0, 500e3),
    Spec("buck", 12.0, 12.0, 5.0, 2.0, 500e3, vf=0.4, rsw=0.1),
    Spec("buck", 10.0, 14.0, 3.3, 1.0, 1e6, rectifier="sync", r_rect=0.03, rsw=0.05),
    Spec("boost", 4.0, 9.0, 12.0, 0.5, 1e6, vf=0.4, rsw=0.1),
    Spec("invert", 10.0, 13.2, 5.0, 1.0, 500e3, vf=0.4, rsw=0.1, ilim=3.0),
]


@pytest.mark.parametrize("spec", SPECS, ids=lambda s: f"{s.topology}-{s.rectifier}")
def test_twin_matches_inductor_duty(spec: Spec) -> None:
    rng = np.random.default_rng(7)
    ind = 10 ** rng.uniform(-6.7, -4.3, 40)  # 0.2 uH ... 50 uH: both CCM and DCM
    dcr = rng.uniform(0.0, 0.25, 40)
    arr = worst_full_load(spec, ind, dcr)
    for k in range(ind.size):
        try:
            ref = inductor_duty(spec, float(ind[k]), float(dcr[k]))
        except SpecError:
            assert not arr.feasible[k]
            continue
        assert arr.feasible[k]
        for name, got in (
            ("ripple_pp", arr.ripple_pp[k]),
            ("ripple_ratio", arr.ripple_ratio[k]),
            ("i_peak", arr.i_peak[k]),
            ("i_rms", arr.i_rms[k]),
            ("i_avg", arr.i_avg[k]),
            ("isat_required", arr.isat_required[k]),
            ("vin_peak", arr.vin_peak[k]),
        ):
            assert got == pytest.approx(getattr(ref, name), rel=1e-9), name
        assert bool(arr.dcm[k]) == (ref.mode == "DCM")


def test_b1_buck_hand_check() -> None:
    # REFERENCES 1.5, B1: 12 V -> 5 V, 2 A, 500 kHz, 10 uH, ideal: ripple 0.5833 A,
    # peak 2.292 A; required Isat with margin 1.25 -> 2.865 A.
    spec = Spec("buck", 12.0, 12.0, 5.0, 2.0, 500e3, vf=0.0)
    arr = worst_full_load(spec, np.array([10e-6]), np.array([0.0]))
    assert arr.ripple_pp[0] == pytest.approx(0.5833, abs=5e-5)
    assert arr.i_peak[0] == pytest.approx(2.292, abs=5e-4)
    assert arr.isat_required[0] == pytest.approx(1.25 * 2.2917, abs=1e-3)


def test_rise_twin() -> None:
    # Same formula as kitbin.stage.thermal.predicted_rise (REFERENCES 5, T2).
    i = np.array([1.0, 3.0, 9.0])
    got = predicted_rise(i, np.full(3, 0.05), np.full(3, 75.53), 25.0)
    for k in range(3):
        ref = scalar_rise(float(i[k]), 0.05, 75.53, 25.0)
        assert (math.isinf(ref) and math.isinf(got[k])) or got[k] == pytest.approx(ref)

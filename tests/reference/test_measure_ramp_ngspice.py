"""Current-ramp analysis of an ngspice simulation of a pulse saturation test.

Reference: the case of REFERENCES.md §3 "Simulation check" (sim-verified): a
flux-controlled soft-saturating inductor i(φ) = (φ/L0)(1 + (φ/φs)^6), L0 = 10 µH,
φs = 50 µV·s, DCR 30 mΩ, on a 12 V supply with 0.1 Ω source resistance and
2200 µF reservoir, 20 mΩ low-side switch, 0.1 Ω low-side sense resistor, one
3.2 µs pulse. Analytic model values: Isat(10/20/30 %) = 2.546/2.972/3.331 A;
L(1.0 A) = 9.996 µH, L(3.0 A) = 7.925 µH (worked example M4).
The simulation runs inside the test; the result is resampled at 5 ns like a
scope, written as a two-channel CSV and analysed as a user would.
"""

from __future__ import annotations

import os
import shutil
import subprocess

import numpy as np
import pytest

from kitbin.measure.ramp import analyse_ramp
from kitbin.measure.reader import read_capture

NETLIST = """* pulse saturation test of a flux-controlled 10 uH inductor (REFERENCES 3)
.param L0=10u phis=50u dcr=30m
Vsup sup 0 12
Rsrc sup top 0.1
Cres top 0 2200u
Rdcr top lmid {dcr}
Bflux 0 phi I = v(lmid,sw)
Cflux phi 0 1
Rflux phi 0 1e12
Bcore lmid sw I = (v(phi)/L0) * (1 + pwr(v(phi)/phis,6))
Vgate g 0 PULSE(0 1 1u 1n 1n 3.2u 1m)
Sw sw rs g 0 swmod
.model swmod sw(vt=0.5 vh=0 ron=20m roff=1G)
Rsense rs 0 0.1
.ic v(phi)=0 v(top)=12
.tran 1n 6u 0 1n uic
.control
set wr_singlescale
set wr_vecnames
option numdgt=9
run
wrdata {out} v(rs) v(top) v(sw)
quit
.endc
.end
"""


def _ngspice() -> str:
    found = shutil.which("ngspice")
    if found is None:
        if os.environ.get("CI") == "true":
            pytest.fail("ngspice is not installed (required in CI)")
        pytest.skip("NGSPICE NOT INSTALLED: saturation-ramp reference check skipped")
    return found


def _l_model(i: float, l0: float = 10e-6, phis: float = 50e-6) -> float:
    """Incremental inductance of the model at current i (bisection on φ)."""
    lo, hi = 0.0, 1e-3
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if (mid / l0) * (1 + (mid / phis) ** 6) < i:
            lo = mid
        else:
            hi = mid
    return l0 / (1 + 7 * (lo / phis) ** 6)


@pytest.mark.ngspice
def test_sat_ramp_simulation_recovers_l_and_isat(tmp_path) -> None:
    exe = _ngspice()
    out = tmp_path / "sat_ramp.dat"
    net = tmp_path / "sat_ramp.cir"
    net.write_text(NETLIST.replace("{out}", str(out)))
    run = subprocess.run([exe, "-b", str(net)], capture_output=True, text=True, timeout=300)
    assert out.exists(), run.stdout[-2000:] + run.stderr[-2000:]
    assert "Error:" not in run.stdout
    data = np.loadtxt(out, skiprows=1)
    t, v_rs, v_top, v_sw = data[:, 0], data[:, 1], data[:, 2], data[:, 3]
    # a scope samples on a uniform grid: resample at 5 ns
    ts = np.arange(0.0, t[-1], 5e-9)
    vs = np.interp(ts, t, v_rs)
    vl = np.interp(ts, t, v_top) - np.interp(ts, t, v_sw)  # across the inductor (+DCR)
    lines = ["Time (s),sense (V),across L (V)"]
    lines += [f"{a:.9e},{b:.9e},{c:.9e}" for a, b, c in zip(ts, vs, vl, strict=True)]
    cap = read_capture("\n".join(lines))
    result = analyse_ramp(
        cap.time,
        cap.channels["sense (V)"],
        r_sense=0.1,
        v_l=cap.channels["across L (V)"],
        r_loop=0.030,  # the winding's DCR inside the measured voltage
    )
    assert result.quality.ramps == 1
    assert result.l0_H == pytest.approx(10e-6, rel=0.01)
    expected = {10: 2.546, 20: 2.972, 30: 3.331}
    for percent, value in expected.items():
        assert result.isat_A[percent] == pytest.approx(value, rel=0.02)
    # M4: L at 1.0 A and 3.0 A from the binned curve
    for current, l_ref in ((1.0, 9.996e-6), (3.0, 7.925e-6)):
        assert _l_model(current) == pytest.approx(l_ref, rel=1e-3)
        got = float(np.interp(current, result.curve_i_A, result.curve_L_H))
        assert got == pytest.approx(l_ref, rel=0.02)

"""LC resonance and time-constant inductance against REFERENCES.md §4 worked examples.

Sources: M1, M2, M2', M3 of REFERENCES.md §4 (f0 = 1/(2π√(LC)), circuit theory as
in Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 1, from memory; the
two-capacitor stray-capacitance line is common practice, no source), and the
ngspice ring-down simulation ``lc_ring.cir`` reproduced here.
"""

from __future__ import annotations

import os
import shutil
import subprocess

import pytest

from kitbin.errors import CaptureError
from kitbin.measure import resonance as rs


def test_m1_inductance_from_one_capacitor() -> None:
    # M1: f0 = 50.00 kHz with C = 100 nF -> L = 101.3 µH
    assert rs.inductance_from_resonance(50e3, 100e-9) == pytest.approx(101.3e-6, rel=5e-4)


def test_m2_two_capacitor_line_gives_l_and_cp() -> None:
    # M2: 1.000 nF -> 157.59 kHz, 10.00 nF -> 50.279 kHz: L = 1000 µH, Cp = 19.96 pF
    fit = rs.fit_stray([1e-9, 10e-9], [157.59e3, 50.279e3])
    assert fit.l_H == pytest.approx(1000e-6, rel=5e-4)
    assert fit.cp_F == pytest.approx(19.96e-12, abs=0.01e-12)
    assert fit.points == 2


def test_m2_prime_single_capacitor_errors_and_fixture_correction() -> None:
    # M2': single-capacitor method: 1020 µH with 1 nF (2 % high), 1002 µH with 10 nF
    assert rs.inductance_from_resonance(157.59e3, 1e-9) == pytest.approx(1020e-6, rel=1e-3)
    assert rs.inductance_from_resonance(50.279e3, 10e-9) == pytest.approx(1002e-6, rel=1e-3)
    # adding the stray capacitance back removes the error
    assert rs.inductance_from_resonance(157.59e3, 1e-9, 19.96e-12) == pytest.approx(
        1000e-6, rel=5e-4
    )
    # and the capacitor from a known inductance is the inverse
    assert rs.capacitance_from_resonance(50e3, 101.32e-6) == pytest.approx(100e-9, rel=1e-3)


def test_m3_rl_time_constant() -> None:
    # M3: τ = 1.6625 µs with 50 Ω + 10 Ω + 0.15 Ω -> L = 100.0 µH (16.87 µH without the 50 Ω)
    assert rs.inductance_from_time_constant(1.6625e-6, 60.15) == pytest.approx(100e-6, rel=1e-3)
    assert rs.inductance_from_time_constant(1.6625e-6, 10.15) == pytest.approx(16.87e-6, rel=1e-3)


def test_damped_ring_frequency() -> None:
    # REFERENCES §4: f_d = f0·√(1 − 1/(4Q²)), < 0.04 % error for Q ≥ 20
    assert rs.undamped_frequency(100e3 * (1 - 1 / 1600) ** 0.5, 20.0) == pytest.approx(100e3)
    with pytest.raises(CaptureError):
        rs.undamped_frequency(1e3, 0.4)


def test_bad_inputs() -> None:
    with pytest.raises(CaptureError):
        rs.inductance_from_resonance(0.0, 1e-9)
    with pytest.raises(CaptureError):
        rs.fit_stray([1e-9], [1e5])
    with pytest.raises(CaptureError):
        rs.fit_stray([1e-9, 1e-9], [1e5, 1.1e5])


def _ngspice() -> str | None:
    found = shutil.which("ngspice")
    if found is None:
        if os.environ.get("CI") == "true":
            pytest.fail("ngspice is not installed (required in CI)")
        pytest.skip("NGSPICE NOT INSTALLED: LC ring-down reference check skipped")
    return found


NETLIST = """* LC ring-down with 20 pF stray capacitance (REFERENCES §4, lc_ring.cir)
L1 a b 1m
Rdcr b 0 5
Cp a 0 20p
Ct a 0 {cval}
.ic v(a)=1
.tran 2n 400u 0 2n uic
.control
run
meas tran tz1 when v(a)=0 rise=2
meas tran tz2 when v(a)=0 rise=4
let fring = 2/(tz2 - tz1)
print fring
quit
.endc
.end
"""


@pytest.mark.ngspice
def test_ngspice_ring_down_line_fit(tmp_path) -> None:
    # ngspice simulation of the 1 mH / 20 pF / 5 Ω part rung with 1, 10 and 100 nF
    exe = _ngspice()
    caps, freqs = [1e-9, 10e-9, 100e-9], []
    for c in caps:
        net = tmp_path / f"ring_{c:g}.cir"
        net.write_text(NETLIST.replace("{cval}", f"{c:g}"))
        out = subprocess.run([exe, "-b", str(net)], capture_output=True, text=True, timeout=120)
        line = next(ln for ln in out.stdout.splitlines() if ln.strip().startswith("fring"))
        freqs.append(float(line.split("=")[1]))
    # REFERENCES §4 sim check: 157.59 / 50.277 / 15.909 kHz
    assert freqs == pytest.approx([157.59e3, 50.277e3, 15.909e3], rel=5e-4)
    # Cp from the two small capacitors (as in M2): at 100 nF a 0.03 % frequency shift
    # from damping (Q ≈ 20) moves the intercept by tens of pF
    fit = rs.fit_stray(caps[:2], freqs[:2])
    assert fit.l_H == pytest.approx(1e-3, rel=2e-3)
    assert fit.cp_F == pytest.approx(20e-12, abs=0.5e-12)
    assert rs.fit_stray(caps, freqs).l_H == pytest.approx(1e-3, rel=2e-3)

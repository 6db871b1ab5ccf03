"""The capture models used by the tests and the demo follow their own physics.

Reference: scipy.integrate.solve_ivp on di/dt = (V − i·R)/L(i), and the closed-form
Isat inverses checked by substitution.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from kitbin.measure.synthetic import InductorModel, heating_curve, ramp_table, scope


@pytest.mark.parametrize(
    "model",
    [
        InductorModel(10e-6, 3.0, "smooth", p=4.0),
        InductorModel(22e-6, 1.6, "hard", l_sat_frac=0.15, width_frac=0.04),
    ],
)
def test_ramp_table_matches_an_ode_solver(model: InductorModel) -> None:
    v, r = 12.0, 0.15
    t_tab, i_tab = ramp_table(model, v, r, 1.4 * model.knee_A)
    sol = solve_ivp(
        lambda t, y: [(v - y[0] * r) / float(model.inductance(y[0]))],
        (0.0, float(t_tab[-1])),
        [0.0],
        t_eval=t_tab[::500],
        rtol=1e-10,
        atol=1e-12,
    )
    np.testing.assert_allclose(sol.y[0], i_tab[::500], rtol=1e-4, atol=1e-6)


@pytest.mark.parametrize("shape", ["smooth", "hard"])
def test_isat_inverse(shape: str) -> None:
    model = InductorModel(10e-6, 2.0, shape)
    l0 = float(model.inductance(0.0))
    for drop in (0.1, 0.2, 0.3):
        assert float(model.inductance(model.isat(drop))) == pytest.approx((1 - drop) * l0)


def test_scope_quantises_to_the_grid() -> None:
    rng = np.random.default_rng(0)
    out = scope(np.linspace(0, 1, 1000), rng, noise=0.0, bits=8, full_scale=(0.0, 1.0))
    assert np.unique(out).size <= 256
    np.testing.assert_allclose(np.unique(np.round(out * 255)), np.arange(256))


def test_heating_curve_is_flat_before_t0() -> None:
    t = np.array([0.0, 10.0, 20.0, 10.0 + 300.0])
    y = heating_curve(t, t_amb=20.0, rise_ss=40.0, tau=300.0, t0=10.0)
    assert y[0] == y[1] == 20.0
    assert y[3] == pytest.approx(20.0 + 40.0 * (1 - np.exp(-1.0)))

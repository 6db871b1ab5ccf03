"""Exact peak-to-peak voltage ripple of a capacitor fed a piecewise-linear current.

The capacitive and ESR ripple terms are not in phase, so their sum is only an
upper bound (REFERENCES section 1.1, notes). Here the capacitor voltage
v(t) = q(t)/C + ESR·i(t) is followed exactly: on each linear piece of the current
q is quadratic, so v's extremes lie at the piece ends or at the one interior point
where dv/dt = i/C + ESR·di/dt = 0. Steps of the current (two points at one time)
give steps of ESR·Δi.
"""

from __future__ import annotations

from collections.abc import Sequence


def ripple_pp(
    times: Sequence[float], currents: Sequence[float], c: float, esr: float = 0.0
) -> float:
    """Peak-to-peak voltage of a capacitor over one period of a periodic current.

    Parameters
    ----------
    times
        Breakpoints over one period (s), non-decreasing; a repeated time is a step.
    currents
        Capacitor current at each breakpoint (A), linear in between. Its mean over
        the period is removed first (steady state has no net charge).
    c
        Capacitance (F), positive.
    esr
        Equivalent series resistance (Ω).

    Returns
    -------
    float
        Peak-to-peak ripple (V).
    """
    t = [float(x) for x in times]
    i = [float(x) for x in currents]
    period = t[-1] - t[0]
    if period <= 0 or c <= 0:
        return 0.0
    charge = sum((t[k + 1] - t[k]) * (i[k] + i[k + 1]) / 2 for k in range(len(t) - 1))
    mean = charge / period
    i = [x - mean for x in i]
    q = 0.0
    values = [esr * i[0]]
    for k in range(len(t) - 1):
        dt = t[k + 1] - t[k]
        i0, i1 = i[k], i[k + 1]
        if dt > 0:
            slope = (i1 - i0) / dt
            if slope != 0:
                tau = -i0 / slope - esr * c
                if 0 < tau < dt:
                    qv = q + i0 * tau + slope * tau * tau / 2
                    values.append(qv / c + esr * (i0 + slope * tau))
            q += (i0 + i1) * dt / 2
        values.append(q / c + esr * i1)
    return max(values) - min(values)

"""Temperature-rise logs: first-order heating fit, thermal resistance and current ratings.

Model (lumped capacitance, Incropera et al., *Fundamentals of Heat and Mass
Transfer*, 7th ed., §5.1–5.3, section numbers from memory; REFERENCES §5):
``T(t) = T_amb + ΔT_ss·(1 − e^(−(t − t0)/τ))`` from cold, ``T = T_amb`` before t0.

The fit is a variable projection: for a given τ the model is linear in T_amb and
ΔT_ss (solved exactly by least squares), so only τ is searched — on a log grid
from 1/20 to 100 times the log's length, then refined by golden section. This
finds the global least-squares optimum without a starting guess and needs only
numpy; tests compare it with ``scipy.optimize.curve_fit``.

Copper (IEC 60028, α20 = 0.00393 /K): ``R(T) = R20·(1 + α20·(T − 20))``. With
``P = I²·R(T)`` the heating stays first order (REFERENCES §5, "derived here,
ODE-checked"): ``k = I²·R20·R_th``, ``ΔT_ss = k(1 + α(T_amb − 20))/(1 − αk)``,
``τ_eff = τ0/(1 − αk)``, thermal runaway when ``αk ≥ 1``.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from kitbin.errors import CaptureError

#: Temperature coefficient of resistance of annealed copper at 20 °C (1/K), IEC 60028.
ALPHA20_CU = 0.00393
#: Allowed temperature rise for a current rating (K): common practice, no source
#: (REFERENCES §2: "DC current giving a 40 K rise (some: 20 K or 30 K)").
DEFAULT_RISE_K = 40.0
#: A log shorter than this many τ gives an extrapolated steady rise.
SETTLED_TAU = 3.0
#: A log shorter than this many τ leaves the fit poorly constrained.
SHORT_TAU = 0.5

FLAG_EXTRAPOLATED = "extrapolated"
FLAG_POORLY_CONSTRAINED = "poorly constrained"
FLAG_ACCELERATING = "accelerating"
FLAG_COPPER_UP = "copper resistance up >10 %"


@dataclass(frozen=True)
class HeatFit:
    """A first-order heating curve fitted to a temperature log.

    Attributes
    ----------
    t_amb_C, rise_ss_K, tau_s
        Ambient (°C), steady rise (K) and time constant (s).
    sigma_t_amb_C, sigma_rise_K, sigma_tau_s
        One-standard-deviation uncertainties from the fit's covariance.
    t0_s
        Start of heating (s, on the log's time axis).
    rms_K
        Rms residual of the fit (K).
    reached
        Fraction of the fitted rise the log reached, (T_last − T_amb)/ΔT_ss.
    length_tau
        Length of the log after t0, in time constants.
    flags
        ``extrapolated``, ``poorly constrained``, ``accelerating`` as they apply.
    """

    t_amb_C: float
    rise_ss_K: float
    tau_s: float
    sigma_t_amb_C: float
    sigma_rise_K: float
    sigma_tau_s: float
    t0_s: float
    rms_K: float
    reached: float
    length_tau: float
    flags: tuple[str, ...]

    def temperature(self, t: np.ndarray | float) -> np.ndarray:
        """Fitted temperature (°C) at times t (s)."""
        x = np.clip((np.asarray(t, dtype=float) - self.t0_s) / self.tau_s, 0.0, None)
        return self.t_amb_C + self.rise_ss_K * (1.0 - np.exp(-x))


@dataclass(frozen=True)
class ThermalRating:
    """What a heating log says about a part's current rating.

    Attributes
    ----------
    fit
        The heating fit.
    current_A
        Test current (A).
    allowed_rise_K
        Rise the rating is for (K).
    r20_ohm
        Winding DC resistance at 20 °C (Ω), or None when unknown.
    t_hot_C
        Steady hot temperature T_amb + ΔT_ss (°C).
    power_W
        Copper loss at the hot temperature, I²·R(T_hot) (W), or None.
    r_th_K_per_W
        Thermal resistance to ambient (K/W), or None without DCR.
    i_for_rise_A
        DC current giving the allowed rise (A): with copper tempco when DCR is
        known, else by the I² rule (REFERENCES §5, common practice, no source).
    seconds_to_limit
        From cold at the test current, seconds until the rise reaches the allowed
        rise; None when the test current never gets there.
    runaway_current_A
        Current with no thermal steady state (αk = 1), or None without DCR.
    flags
        The fit's flags plus ``copper resistance up >10 %``.
    """

    fit: HeatFit
    current_A: float
    allowed_rise_K: float
    r20_ohm: float | None
    t_hot_C: float
    power_W: float | None
    r_th_K_per_W: float | None
    i_for_rise_A: float
    seconds_to_limit: float | None
    runaway_current_A: float | None
    flags: tuple[str, ...]


@dataclass(frozen=True)
class LossSplit:
    """ΔT_ss = a·I² + b over logs at several currents (copper versus fixed loss).

    Attributes
    ----------
    a_K_per_A2
        Rise per square ampere (K/A²): the copper (I²R) part.
    b_K
        Rise independent of current (K): fixed loss or an offset.
    sigma_a, sigma_b
        Standard errors (None with only two logs).
    points
        Logs used.
    """

    a_K_per_A2: float
    b_K: float
    sigma_a: float | None
    sigma_b: float | None
    points: int


def copper_resistance(r_ref: float, t_ref: float, t: float, alpha20: float = ALPHA20_CU) -> float:
    """Resistance (Ω) at ``t`` (°C) of copper measured as ``r_ref`` at ``t_ref`` (IEC 60028)."""
    return r_ref * (1.0 + alpha20 * (t - 20.0)) / (1.0 + alpha20 * (t_ref - 20.0))


def winding_temperature(
    r_cold: float, t_cold: float, r_hot: float, alpha20: float = ALPHA20_CU
) -> float:
    """Winding temperature (°C) from its resistance rise (IEC 60028 tempco)."""
    return 20.0 + ((r_hot / r_cold) * (1.0 + alpha20 * (t_cold - 20.0)) - 1.0) / alpha20


def time_to_limit(
    rise_ss: float, tau: float, rise_limit: float, rise_start: float = 0.0
) -> float | None:
    """Seconds until a first-order rise reaches ``rise_limit`` (K).

    ``t_lim = τ·ln((ΔT_ss − ΔT_0)/(ΔT_ss − ΔT_lim))`` (REFERENCES §5); None when the
    steady rise never reaches the limit, 0 when it starts there.
    """
    if rise_ss <= rise_limit:
        return None
    if rise_start >= rise_limit:
        return 0.0
    return tau * math.log((rise_ss - rise_start) / (rise_ss - rise_limit))


def steady_rise(
    current: float, r20: float, r_th: float, t_amb: float, alpha20: float = ALPHA20_CU
) -> float | None:
    """Steady rise (K) at ``current`` with copper tempco; None past thermal runaway."""
    k = current**2 * r20 * r_th
    if alpha20 * k >= 1.0:
        return None
    return k * (1.0 + alpha20 * (t_amb - 20.0)) / (1.0 - alpha20 * k)


def current_for_rise(
    rise: float, r20: float, r_th: float, t_amb: float, alpha20: float = ALPHA20_CU
) -> float:
    """DC current (A) whose steady rise is ``rise`` (K), solved with copper tempco.

    From ``ΔT = kA/(1 − αk)``, ``A = 1 + α(T_amb − 20)``: ``k = ΔT/(A + αΔT)``.
    """
    a = 1.0 + alpha20 * (t_amb - 20.0)
    k = rise / (a + alpha20 * rise)
    return math.sqrt(k / (r20 * r_th))


def fit_heating(
    time: np.ndarray,
    temperature: np.ndarray,
    *,
    t0: float | None = None,
    source: str = "temperature log",
) -> HeatFit:
    """Fit ``T = T_amb + ΔT_ss(1 − e^(−(t−t0)/τ))`` to a log.

    Parameters
    ----------
    time
        Sample times (s), increasing.
    temperature
        Part temperature (°C).
    t0
        Time the current was switched on (s); the first sample when None.
    source
        Name of the log, for messages.

    Returns
    -------
    HeatFit

    Raises
    ------
    CaptureError
        When the log is too short or shows no rise.
    """
    t = np.asarray(time, dtype=float)
    y = np.asarray(temperature, dtype=float)
    if t.shape[0] < 8 or y.shape != t.shape:
        raise CaptureError(f"{source}: need at least 8 samples of time and temperature")
    start = float(t[0]) if t0 is None else float(t0)
    x = np.clip(t - start, 0.0, None)
    span = float(x[-1])
    if not span > 0:
        raise CaptureError(f"{source}: the log ends before the current was switched on")
    noise = _noise(y)
    rise_seen = float(np.median(y[-max(3, y.size // 20) :]) - np.median(y[: max(3, y.size // 20)]))
    if not rise_seen > max(5.0 * noise, 0.2):
        raise CaptureError(
            f"{source}: no temperature rise found ({rise_seen:.3g} K over the log; "
            "expected a heating curve)"
        )

    grid = np.geomspace(span / 20.0, span * 100.0, 160)
    rss = np.array([_projected(x, y, tau)[0] for tau in grid])
    best = int(np.argmin(rss))
    lo = grid[max(best - 1, 0)]
    hi = grid[min(best + 1, grid.size - 1)]
    tau = _golden(lambda v: _projected(x, y, math.exp(v))[0], math.log(lo), math.log(hi))
    tau = math.exp(tau)
    res, t_amb, rise = _projected(x, y, tau)

    e = np.exp(-x / tau)
    jac = np.column_stack((np.ones_like(x), 1.0 - e, -rise * x / tau**2 * e))
    dof = max(1, x.size - 3)
    s2 = res / dof
    try:
        cov = np.linalg.inv(jac.T @ jac) * s2
        sig = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    except np.linalg.LinAlgError:
        sig = np.full(3, math.inf)

    length_tau = span / tau
    reached = float((np.median(y[-max(3, y.size // 50) :]) - t_amb) / rise) if rise else 0.0
    flags: list[str] = []
    if _accelerating(x, y, noise):
        flags.append(FLAG_ACCELERATING)
    if length_tau < SETTLED_TAU:
        flags.append(FLAG_EXTRAPOLATED)
    if length_tau < SHORT_TAU or best >= grid.size - 2 or not sig[1] < 0.3 * abs(rise):
        flags.append(FLAG_POORLY_CONSTRAINED)
    return HeatFit(
        t_amb_C=float(t_amb),
        rise_ss_K=float(rise),
        tau_s=float(tau),
        sigma_t_amb_C=float(sig[0]),
        sigma_rise_K=float(sig[1]),
        sigma_tau_s=float(sig[2]),
        t0_s=start,
        rms_K=math.sqrt(res / x.size),
        reached=reached,
        length_tau=float(length_tau),
        flags=tuple(flags),
    )


def rate_heating(
    fit: HeatFit,
    current: float,
    *,
    r_dcr: float | None = None,
    t_dcr: float = 20.0,
    allowed_rise: float = DEFAULT_RISE_K,
    alpha20: float = ALPHA20_CU,
) -> ThermalRating:
    """Thermal resistance and current ratings from a heating fit.

    Parameters
    ----------
    fit
        The heating fit of a log taken at ``current``.
    current
        DC test current (A).
    r_dcr
        Winding DC resistance (Ω) measured at ``t_dcr`` (°C), or None when unknown.
    allowed_rise
        Rise (K) the current rating is for.
    alpha20
        Copper tempco at 20 °C (1/K), IEC 60028.
    """
    if not (current > 0 and math.isfinite(current)):
        raise CaptureError(f"test current must be positive, got {current!r}")
    if not allowed_rise > 0:
        raise CaptureError(f"allowed rise must be positive, got {allowed_rise!r}")
    if not (fit.rise_ss_K > 0 and math.isfinite(fit.rise_ss_K) and fit.tau_s > 0):
        raise CaptureError(
            f"the fitted heating curve has no positive steady rise ({fit.rise_ss_K:.3g} K)"
        )
    flags = list(fit.flags)
    t_hot = fit.t_amb_C + fit.rise_ss_K
    seconds = time_to_limit(fit.rise_ss_K, fit.tau_s, allowed_rise)
    if r_dcr is None:
        # I² rule (R constant): common practice, no source (REFERENCES §5)
        i_rise = current * math.sqrt(allowed_rise / fit.rise_ss_K)
        return ThermalRating(
            fit=fit,
            current_A=current,
            allowed_rise_K=allowed_rise,
            r20_ohm=None,
            t_hot_C=t_hot,
            power_W=None,
            r_th_K_per_W=None,
            i_for_rise_A=i_rise,
            seconds_to_limit=seconds,
            runaway_current_A=None,
            flags=tuple(flags),
        )
    r20 = copper_resistance(r_dcr, t_dcr, 20.0, alpha20)
    r_hot = copper_resistance(r20, 20.0, t_hot, alpha20)
    if r_hot / copper_resistance(r20, 20.0, fit.t_amb_C, alpha20) > 1.10:
        flags.append(FLAG_COPPER_UP)
    power = current**2 * r_hot
    r_th = fit.rise_ss_K / power
    return ThermalRating(
        fit=fit,
        current_A=current,
        allowed_rise_K=allowed_rise,
        r20_ohm=r20,
        t_hot_C=t_hot,
        power_W=power,
        r_th_K_per_W=r_th,
        i_for_rise_A=current_for_rise(allowed_rise, r20, r_th, fit.t_amb_C, alpha20),
        seconds_to_limit=seconds,
        runaway_current_A=math.sqrt(1.0 / (alpha20 * r20 * r_th)),
        flags=tuple(flags),
    )


def split_losses(currents: Sequence[float], rises: Sequence[float]) -> LossSplit:
    """Fit ``ΔT_ss = a·I² + b`` to steady rises at two or more different currents.

    Raises
    ------
    CaptureError
        With fewer than two distinct currents.
    """
    i2 = np.asarray(currents, dtype=float) ** 2
    dt = np.asarray(rises, dtype=float)
    if i2.size < 2 or np.unique(i2).size < 2:
        raise CaptureError("splitting copper from fixed loss needs logs at two or more currents")
    design = np.column_stack((i2, np.ones_like(i2)))
    coef, _, _, _ = np.linalg.lstsq(design, dt, rcond=None)
    sig_a = sig_b = None
    if i2.size > 2:
        resid = dt - design @ coef
        s2 = float(resid @ resid) / (i2.size - 2)
        cov = np.linalg.inv(design.T @ design) * s2
        sig_a, sig_b = (float(v) for v in np.sqrt(np.diag(cov)))
    return LossSplit(float(coef[0]), float(coef[1]), sig_a, sig_b, int(i2.size))


def _projected(x: np.ndarray, y: np.ndarray, tau: float) -> tuple[float, float, float]:
    """Residual sum of squares and the best (T_amb, ΔT_ss) for a given τ."""
    g = 1.0 - np.exp(-x / tau)
    n = x.size
    sg, sgg = g.sum(), g @ g
    sy, sgy = y.sum(), g @ y
    det = n * sgg - sg * sg
    if det <= 0:
        return math.inf, float(y.mean()), 0.0
    rise = (n * sgy - sg * sy) / det
    t_amb = (sy - rise * sg) / n
    r = y - t_amb - rise * g
    return float(r @ r), float(t_amb), float(rise)


def _golden(f, a: float, b: float, iterations: int = 60) -> float:
    """Minimum of a unimodal function on [a, b] by golden-section search."""
    ratio = (math.sqrt(5.0) - 1.0) / 2.0
    c, d = b - ratio * (b - a), a + ratio * (b - a)
    fc, fd = f(c), f(d)
    for _ in range(iterations):
        if fc < fd:
            b, d, fd = d, c, fc
            c = b - ratio * (b - a)
            fc = f(c)
        else:
            a, c, fc = c, d, fd
            d = a + ratio * (b - a)
            fd = f(d)
    return (a + b) / 2.0


def _noise(y: np.ndarray) -> float:
    d2 = y[2:] - 2.0 * y[1:-1] + y[:-2]
    return float(1.4826 * np.median(np.abs(d2 - np.median(d2))) / math.sqrt(6.0))


def _accelerating(x: np.ndarray, y: np.ndarray, noise: float) -> bool:
    """True when the heating rate in the last third clearly exceeds the first third.

    A first-order rise only ever slows down; a rate that grows means something
    the model lacks (runaway, a failing part, a changing load).
    """
    on = x > 0
    xs, ys = x[on], y[on]
    if xs.size < 12:
        return False
    third = xs.size // 3
    (s1, e1), (s3, e3) = _line(xs[:third], ys[:third]), _line(xs[-third:], ys[-third:])
    return s3 > s1 + 3.0 * math.hypot(e1, e3) and s3 > 1.1 * max(s1, 0.0)


def _line(x: np.ndarray, y: np.ndarray) -> tuple[float, float]:
    """Slope of a least-squares line and its standard error."""
    xm = x - x.mean()
    sxx = float(xm @ xm)
    slope = float(xm @ (y - y.mean())) / sxx
    resid = y - y.mean() - slope * xm
    se = math.sqrt(float(resid @ resid) / max(1, x.size - 2) / sxx)
    return slope, se

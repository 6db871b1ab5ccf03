"""Evidence: the interval a matcher may rely on for one parameter of one bin.

A bin's number for a parameter can come from bench readings (grade ``measured``),
from its marking or a stated rating with its tolerance (``marked``), from a default
the user can see (``assumed``), or from nothing at all (``unknown``). Whatever the
source, the matcher sees one closed or half-open interval and judges a requirement
against its conservative end ("worst case is the default"): the lowest inductance,
the lowest saturation current, the highest DCR across every specimen and tolerance.

A reading may be a lower bound (bound ``>=``): "no saturation seen up to 3 A" says
only that Isat >= 3 A. Its interval is [3 A, inf): a check needing 2.6 A passes, one
needing 3.4 A is *unverified* (the part may well manage it; nobody has tried), never
failed.

Everything here is pure: frozen dataclasses in, a frozen :class:`Evidence` out.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

from kitbin.quantities import QUANTITIES

Grade = Literal["measured", "marked", "assumed", "unknown"]
Status = Literal["pass", "fail", "unverified"]

#: Grades from strongest to weakest; a verdict reports the weakest grade it used.
GRADES: tuple[str, ...] = ("measured", "marked", "assumed", "unknown")
GRADE_RANK: dict[str, int] = {g: i for i, g in enumerate(GRADES)}

BOUNDS = ("=", ">=")

#: Property sources that count as a measurement or as a default the user set.
_MEASURED_SOURCES = {"measured", "bench", "reading"}
_ASSUMED_SOURCES = {"assumed", "default", "guess", "estimate", "estimated"}
_UNKNOWN_SOURCES = {"", "unknown", "none"}


def grade_of_source(source: str) -> Grade:
    """The evidence grade of a bin property's source text.

    ``measured``/``bench`` -> measured; ``assumed``/``default``/``estimate`` ->
    assumed; empty or ``unknown`` -> unknown; anything else (marking, data sheet,
    seller's listing, label on the bag) -> marked.
    """
    key = (source or "").strip().lower()
    if key in _MEASURED_SOURCES:
        return "measured"
    if key in _ASSUMED_SOURCES:
        return "assumed"
    if key in _UNKNOWN_SOURCES:
        return "unknown"
    return "marked"


@dataclass(frozen=True)
class ReadingValue:
    """One reading of one quantity on a bin's part.

    Parameters
    ----------
    value
        SI value (H, ohm, A, V ...).
    bound
        ``"="`` for a measured value, ``">="`` for "not reached up to" (a lower bound).
    specimen
        Number of the specimen the reading was taken on, or None.
    conditions
        Test conditions (e.g. ``{"freq": 100e3, "bias": 0.0}``), kept for display.
    method
        How it was measured (``ramp``, ``lcr``, ``ring``, ``4wire`` ...).
    """

    value: float
    bound: str = "="
    specimen: int | None = None
    conditions: tuple[tuple[str, Any], ...] = ()
    method: str = ""

    def __post_init__(self) -> None:
        if self.bound not in BOUNDS:
            raise ValueError(f"reading bound must be '=' or '>=', got {self.bound!r}")
        if not math.isfinite(self.value):
            raise ValueError(f"reading value must be finite, got {self.value!r}")
        if isinstance(self.conditions, Mapping):
            object.__setattr__(self, "conditions", tuple(sorted(self.conditions.items())))

    @property
    def is_lower_bound(self) -> bool:
        """True for a "not reached up to" reading."""
        return self.bound == ">="


@dataclass(frozen=True)
class Nominal:
    """A bin's nominal value as marked, with its tolerance.

    Parameters
    ----------
    value
        Nominal SI value.
    tol_minus, tol_plus
        Tolerance as fractions (0.2 for ±20 %); ``tol_plus`` defaults to ``tol_minus``.
    marking
        The marking as printed, for display ("4R7", "brown-black-black-silver").
    """

    value: float
    tol_minus: float = 0.0
    tol_plus: float | None = None
    marking: str = ""

    def __post_init__(self) -> None:
        if self.tol_plus is None:
            object.__setattr__(self, "tol_plus", self.tol_minus)
        if self.tol_minus < 0 or (self.tol_plus or 0) < 0:
            raise ValueError("tolerances are magnitudes and must not be negative")


@dataclass(frozen=True)
class PropertyValue:
    """A named quantity stated for a bin (rating, controller constant, default).

    Parameters
    ----------
    value
        SI value.
    source
        Where it came from: ``marking``, ``datasheet``, ``listing``, ``assumed``,
        ``measured`` ... (see :func:`grade_of_source`).
    tol
        Symmetric tolerance as a fraction, if one is stated (e.g. a reference 1 %).
    """

    value: float
    source: str = "marked"
    tol: float = 0.0


@dataclass(frozen=True)
class Evidence:
    """What a matcher may rely on for one parameter of one bin.

    ``low``/``high`` bound every value the evidence allows (``high`` is ``inf``
    when some reading is only a lower bound). The three extra ends let a check
    tell *fail* from *unverified*: ``closed_low``/``closed_high`` are the extreme
    ends of closed intervals (exact readings, tolerance ranges), which prove a
    failure; ``max_low`` is the highest lower end of any interval (a lower-bound
    reading above a maximum proves a failure of an upper limit).

    All values are SI; ``nan`` where the grade is ``unknown``.
    """

    quantity: str
    grade: Grade
    low: float = math.nan
    high: float = math.nan
    n: int = 0
    mean: float = math.nan
    spread: float = math.nan
    specimens: int = 0
    lower_bound_only: bool = False
    closed_low: float = math.inf
    closed_high: float = -math.inf
    max_low: float = -math.inf
    source: str = ""
    higher_is_better: bool = True
    methods: tuple[str, ...] = field(default=())

    @property
    def known(self) -> bool:
        """False for grade ``unknown``."""
        return self.grade != "unknown"

    @property
    def dimension(self) -> str:
        """The quantity's dimension name (for formatting)."""
        kind = QUANTITIES.get(self.quantity)
        return kind.dimension if kind else ""

    def conservative(self, higher_is_better: bool | None = None) -> float:
        """The worst-case end: ``low`` when more is better, else ``high``.

        Parameters
        ----------
        higher_is_better
            Override the quantity's own direction (e.g. for a check where a
            small inductance is the risk of a different failure).
        """
        hib = self.higher_is_better if higher_is_better is None else higher_is_better
        return self.low if hib else self.high

    def optimistic(self, higher_is_better: bool | None = None) -> float:
        """The best-case end (the other end from :meth:`conservative`)."""
        hib = self.higher_is_better if higher_is_better is None else higher_is_better
        return self.high if hib else self.low

    def typical(self) -> float:
        """The mean of the readings, or the middle of the interval (nan if unknown)."""
        if not self.known:
            return math.nan
        if not math.isnan(self.mean):
            return self.mean
        if math.isinf(self.high):
            return self.low
        return 0.5 * (self.low + self.high)

    def at_least(self, required: float) -> Status:
        """Judge "value >= required" on the worst case.

        ``pass`` when every value the evidence allows meets it; ``fail`` when an
        exact reading or a tolerance range reaches below it (worst case); otherwise
        ``unverified`` (only lower-bound readings sit below the requirement, or
        nothing is known).
        """
        if not self.known:
            return "unverified"
        if self.low >= required:
            return "pass"
        if self.closed_low < required:
            return "fail"
        return "unverified"

    def at_most(self, required: float) -> Status:
        """Judge "value <= required" on the worst case (see :meth:`at_least`)."""
        if not self.known:
            return "unverified"
        if self.high <= required:
            return "pass"
        if self.closed_high > required or self.max_low > required:
            return "fail"
        return "unverified"

    def describe(self) -> str:
        """One line: grade, interval and how it was obtained."""
        dim = self.dimension
        if not self.known:
            return f"{self.quantity}: unknown (no reading, marking or default)"
        lo = _fmt(self.low, dim)
        if self.grade == "measured":
            hi = "∞" if math.isinf(self.high) else _fmt(self.high, dim)
            what = "reading" if self.n == 1 else "readings"
            on = ""
            if self.specimens:
                on = f" on {self.specimens} specimen" + ("s" if self.specimens != 1 else "")
            if self.lower_bound_only:
                return f"{self.quantity}: measured ≥ {lo} (not reached; {self.n} {what}{on})"
            rng = lo if self.low == self.high else f"{lo} … {hi}"
            extra = ""
            if self.n > 1 and not math.isnan(self.mean) and self.mean:
                extra = (
                    f", mean {_fmt(self.mean, dim)}, spread {100 * self.spread / self.mean:.1f} %"
                )
            return f"{self.quantity}: measured {rng} ({self.n} {what}{on}{extra})"
        hi = _fmt(self.high, dim)
        rng = lo if self.low == self.high else f"{lo} … {hi}"
        src = f" from {self.source}" if self.source else ""
        return f"{self.quantity}: {self.grade} {rng}{src}"


def build_evidence(
    quantity: str,
    readings: Iterable[ReadingValue] = (),
    nominal: Nominal | None = None,
    properties: Iterable[PropertyValue] = (),
    assumed: PropertyValue | float | None = None,
) -> Evidence:
    """Combine what is known about one parameter of one bin into its evidence.

    Precedence: bench readings (``measured``), then a property whose source is a
    measurement, then the marking/nominal or a stated property (``marked``), then a
    property or default that is ``assumed``, else ``unknown``.

    Parameters
    ----------
    quantity
        Quantity name from :mod:`kitbin.quantities` (e.g. ``"isat_20"``).
    readings
        Readings of this quantity on this bin (any specimens).
    nominal
        The bin's nominal value and tolerance, when ``quantity`` is the value the
        marking describes (inductance for an inductor, resistance for a resistor).
    properties
        Stated values of this quantity with their sources.
    assumed
        A default the matcher will use and show when nothing better exists.

    Raises
    ------
    KeyError
        For a quantity name that :mod:`kitbin.quantities` does not know.
    """
    kind = QUANTITIES[quantity]
    hib = kind.higher_is_better
    rows = list(readings)
    if rows:
        return _from_readings(quantity, rows, hib)
    props = list(properties)
    if isinstance(assumed, (int, float)):
        assumed = PropertyValue(float(assumed), "assumed")
    for grade in ("measured", "marked", "assumed"):
        for prop in props:
            if grade_of_source(prop.source) == grade:
                return _from_interval(
                    quantity,
                    grade,
                    prop.value * (1 - prop.tol),
                    prop.value * (1 + prop.tol),
                    prop.source,
                    hib,
                    n=1 if grade == "measured" else 0,
                )
        if grade == "marked" and nominal is not None:
            tp = nominal.tol_plus if nominal.tol_plus is not None else nominal.tol_minus
            label = "marking"
            if nominal.marking:
                label = f"marking {nominal.marking}"
            if nominal.tol_minus or tp:
                label += (
                    f" ±{_pct(nominal.tol_minus)}"
                    if nominal.tol_minus == tp
                    else (f" −{_pct(nominal.tol_minus)}/+{_pct(tp)}")
                )
            return _from_interval(
                quantity,
                "marked",
                nominal.value * (1 - nominal.tol_minus),
                nominal.value * (1 + tp),
                label,
                hib,
                mean=nominal.value,
            )
        if grade == "assumed" and assumed is not None:
            return _from_interval(
                quantity,
                "assumed",
                assumed.value * (1 - assumed.tol),
                assumed.value * (1 + assumed.tol),
                "an assumed default",
                hib,
            )
    return Evidence(quantity=quantity, grade="unknown", higher_is_better=hib)


def _from_readings(quantity: str, rows: list[ReadingValue], hib: bool) -> Evidence:
    exact = [r.value for r in rows if not r.is_lower_bound]
    bounds = [r.value for r in rows if r.is_lower_bound]
    values = exact + bounds
    low = min(values)
    high = max(exact) if not bounds else math.inf
    specimens = {r.specimen for r in rows if r.specimen is not None}
    mean = math.fsum(exact) / len(exact) if exact else math.nan
    spread = (max(exact) - min(exact)) if exact else math.nan
    methods = tuple(sorted({r.method for r in rows if r.method}))
    return Evidence(
        quantity=quantity,
        grade="measured",
        low=low,
        high=high,
        n=len(rows),
        mean=mean,
        spread=spread,
        specimens=len(specimens),
        lower_bound_only=not exact,
        closed_low=min(exact) if exact else math.inf,
        closed_high=max(exact) if exact else -math.inf,
        max_low=max(values),
        source="readings",
        higher_is_better=hib,
        methods=methods,
    )


def _from_interval(
    quantity: str,
    grade: Grade,
    low: float,
    high: float,
    source: str,
    hib: bool,
    *,
    n: int = 0,
    mean: float = math.nan,
) -> Evidence:
    low, high = min(low, high), max(low, high)
    return Evidence(
        quantity=quantity,
        grade=grade,
        low=low,
        high=high,
        n=n,
        mean=mean,
        spread=high - low if n > 1 else math.nan,
        closed_low=low,
        closed_high=high,
        max_low=low,
        source=source,
        higher_is_better=hib,
    )


def weakest(grades: Iterable[str]) -> Grade:
    """The weakest of several grades (``unknown`` beats ``assumed`` beats ...)."""
    worst = "measured"
    for g in grades:
        if GRADE_RANK[g] > GRADE_RANK[worst]:
            worst = g
    return worst  # type: ignore[return-value]


def _pct(fraction: float) -> str:
    return f"{100 * fraction:g} %"


_SYMBOL = {
    "inductance": "H",
    "resistance": "Ω",
    "capacitance": "F",
    "current": "A",
    "voltage": "V",
    "frequency": "Hz",
    "time": "s",
    "power": "W",
    "temperature_rise": "K",
    "thermal_resistance": "K/W",
}
_PREFIX = [
    (1e9, "G"),
    (1e6, "M"),
    (1e3, "k"),
    (1.0, ""),
    (1e-3, "m"),
    (1e-6, "µ"),
    (1e-9, "n"),
    (1e-12, "p"),
]


def _fmt(value: float, dimension: str) -> str:
    """Engineering notation with the dimension's SI symbol (3 significant figures)."""
    if math.isnan(value):
        return "?"
    if math.isinf(value):
        return "∞"
    if dimension == "ratio":
        return f"{100 * value:.3g} %"
    try:  # the shared formatter, when present
        from kitbin.units import format_quantity

        return format_quantity(value, dimension)
    except (ImportError, ValueError, KeyError):  # fallback: units missing or no such dimension
        pass
    sym = _SYMBOL.get(dimension, "")
    mag = abs(value)
    for factor, prefix in _PREFIX:
        if mag >= factor * 0.9995 or factor == 1e-12:
            if value == 0:
                return f"0 {sym}".strip()
            return f"{value / factor:.3g} {prefix}{sym}".strip()
    return f"{value:.3g} {sym}".strip()

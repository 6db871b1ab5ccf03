"""IEC 60062 colour code: 3 to 6 bands on resistors, the same code in µH on inductors.

Band layouts (IEC 60062:2016 subclause 3.3):

* 3 bands: digit, digit, multiplier (±20 %);
* 4 bands: digit, digit, multiplier, tolerance;
* 5 bands: digit, digit, digit, multiplier, tolerance;
* 6 bands: the 5-band code plus a TCR band (subclause 3.4).

Pink as the 10⁻³ multiplier is from the 2016 edition. The hobby-table ±3 % (orange)
and ±4 % (yellow) are not IEC values and are never produced. Values here are in the
base unit of the code: Ω for resistors, µH for inductors, pF for capacitors.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from kitbin.errors import MarkingError
from kitbin.markings import series
from kitbin.markings._numbers import from_digits, split_digits

DIGIT: dict[str, int] = {
    "black": 0,
    "brown": 1,
    "red": 2,
    "orange": 3,
    "yellow": 4,
    "green": 5,
    "blue": 6,
    "violet": 7,
    "grey": 8,
    "white": 9,
}

#: Multiplier band: power of ten.
MULTIPLIER: dict[str, int] = {**DIGIT, "gold": -1, "silver": -2, "pink": -3}

#: Tolerance band, fractions. Orange, yellow and grey are from memory (REFERENCES
#: 8.1): older tables give grey ±0.05 %; the newer lists, followed here, ±0.01 % (L).
TOLERANCE: dict[str, float] = {
    "brown": 0.01,
    "red": 0.02,
    "orange": 0.0005,  # from memory (W)
    "yellow": 0.0002,  # from memory (P)
    "green": 0.005,
    "blue": 0.0025,
    "violet": 0.001,
    "grey": 0.0001,  # from memory (L)
    "gold": 0.05,
    "silver": 0.10,
}

#: Tolerance when no tolerance band is present (3-band code).
NO_BAND_TOLERANCE = 0.20

#: Temperature-coefficient band, ppm/K. Black, green and grey are from memory.
TCR: dict[str, int] = {
    "black": 250,  # from memory
    "brown": 100,
    "red": 50,
    "orange": 15,
    "yellow": 25,
    "green": 20,  # from memory
    "blue": 10,
    "violet": 5,
    "grey": 1,  # from memory
}

COLOURS: tuple[str, ...] = (*DIGIT, "gold", "silver", "pink")

# Spellings, three-letter abbreviations and the two-letter codes of IEC 60757
# (BK, BN, RD, OG, YE, GN, BU, VT, GY, WH, GD, SR, PK; from memory).
_ALIASES: dict[str, str] = {
    **{c: c for c in COLOURS},
    "vt": "violet",
    "sr": "silver",
    "gray": "grey",
    "purple": "violet",
    "blk": "black",
    "bk": "black",
    "brn": "brown",
    "bn": "brown",
    "rd": "red",
    "org": "orange",
    "orn": "orange",
    "og": "orange",
    "yel": "yellow",
    "ylw": "yellow",
    "ye": "yellow",
    "grn": "green",
    "gn": "green",
    "blu": "blue",
    "bu": "blue",
    "vio": "violet",
    "vlt": "violet",
    "vi": "violet",
    "pur": "violet",
    "gry": "grey",
    "gra": "grey",
    "gy": "grey",
    "wht": "white",
    "wh": "white",
    "wt": "white",
    "gld": "gold",
    "gd": "gold",
    "au": "gold",
    "slv": "silver",
    "sil": "silver",
    "sv": "silver",
    "ag": "silver",
    "pnk": "pink",
    "pk": "pink",
}

_SPLIT = re.compile(r"[\s,;/_\-]+")


@dataclass(frozen=True)
class BandReading:
    """A decoded colour code in the code's base unit (Ω, µH or pF).

    Attributes
    ----------
    significand, exponent
        The value is ``significand × 10**exponent`` in the base unit.
    tolerance
        Symmetric tolerance as a fraction.
    tcr_ppm
        Temperature coefficient in ppm/K, or None without a TCR band.
    bands
        The canonical colour names in reading order.
    reversed
        True when the bands were read from the other end of the part.
    """

    significand: int
    exponent: int
    tolerance: float
    tcr_ppm: int | None
    bands: tuple[str, ...]
    reversed: bool = False

    @property
    def value(self) -> float:
        """Value in the base unit of the code."""
        return from_digits(self.significand, self.exponent)


def colour_name(word: str) -> str | None:
    """The canonical colour for a spelling or abbreviation, or None."""
    return _ALIASES.get(word.strip().lower())


def looks_like_colours(text: str) -> bool:
    """True when the text is meant as colour bands.

    That is several words without digits (so that a misspelt colour is reported as
    such), or a single colour name.
    """
    words = [w for w in _SPLIT.split(text.strip()) if w]
    if not words or any(c.isdigit() for c in text):
        return False
    return len(words) > 1 or colour_name(words[0]) is not None


def parse_bands(text: str) -> tuple[str, ...]:
    """Split band text into canonical colour names.

    ``'brown black black silver'``, ``'brn-blk-blk-sil'`` and ``'Brown,Black,Gray,Gold'``
    all work; each word is a colour name or a common abbreviation, any case.

    Raises
    ------
    MarkingError
        For an unknown colour word or a band count outside 3..6.
    """
    words = [w for w in _SPLIT.split(text.strip()) if w]
    bands = []
    for w in words:
        name = colour_name(w)
        if name is None:
            raise MarkingError(
                f"{w!r} in {text!r} is not a band colour: expected one of {', '.join(COLOURS)}"
            )
        bands.append(name)
    if not 3 <= len(bands) <= 6:
        raise MarkingError(f"{text!r} is not a colour code: expected 3 to 6 bands")
    return tuple(bands)


def _read(bands: tuple[str, ...]) -> BandReading | str:
    """One reading in the given order, or the reason it is not a valid code."""
    n = len(bands)
    n_digits = 2 if n in (3, 4) else 3
    digits = bands[:n_digits]
    for b in digits:
        if b not in DIGIT:
            return f"{b} is not a digit colour"
    mult = bands[n_digits]
    if digits[0] == "black":
        # a leading zero: no part starts with a black band (common practice, no source)
        return "black is not a first band"
    significand = int("".join(str(DIGIT[b]) for b in digits))
    if n >= 4:
        tol_band = bands[n_digits + 1]
        if tol_band not in TOLERANCE:
            return f"{tol_band} is not a tolerance colour"
        tolerance = TOLERANCE[tol_band]
    else:
        tolerance = NO_BAND_TOLERANCE
    tcr = None
    if n == 6:
        if bands[5] not in TCR:
            return f"{bands[5]} is not a TCR colour"
        tcr = TCR[bands[5]]
    return BandReading(significand, MULTIPLIER[mult], tolerance, tcr, bands)


def _plausible(reading: BandReading) -> bool:
    """True when the value is a preferred value for its tolerance band.

    That is a member of the series the tolerance implies (E6 for ±20 %, E12 for
    ±10 %, E24 for ±5 %, E48/E96/E192 for ±2/1/0.5 % and tighter) or of E24, which
    is also made in the tight tolerances (common practice, no source).
    """
    t = reading.tolerance
    if t >= 0.2:
        names = ("E6",)
    elif t >= 0.1:
        names = ("E12",)
    elif t >= 0.05:
        names = ("E24",)
    elif t >= 0.02:
        names = ("E24", "E48")
    elif t >= 0.01:
        names = ("E24", "E96")
    else:
        names = ("E24", "E192")
    return any(series.is_preferred(reading.value, name) for name in names)


def decode_bands(bands: tuple[str, ...] | str, reverse: bool | None = None) -> BandReading:
    """Decode a colour code, trying both reading directions where that is ambiguous.

    A direction is valid when its digit, multiplier, tolerance and TCR bands are of
    colours allowed there (gold, silver and pink cannot be digits). When both
    directions are valid and only the reversed one gives a preferred value for its
    tolerance (see :func:`_plausible`), the reversed reading wins; otherwise the
    bands are read as written.

    Parameters
    ----------
    bands
        Canonical colour names, or band text for :func:`parse_bands`.
    reverse
        None to choose the direction as above; False to read only as written;
        True to read only from the other end.

    Returns
    -------
    BandReading
        Value in the code's base unit (Ω for resistors, µH for inductors).

    Raises
    ------
    MarkingError
        When neither direction is a valid code.
    """
    text = bands if isinstance(bands, str) else " ".join(bands)
    if isinstance(bands, str):
        bands = parse_bands(bands)
    elif not 3 <= len(bands) <= 6:
        raise MarkingError(f"{text!r} is not a colour code: expected 3 to 6 bands")
    forward = _read(tuple(bands)) if reverse is not True else "not read as written"
    backward = _read(tuple(reversed(bands))) if reverse is not False else "not turned round"
    if reverse is not None:
        reading = backward if reverse else forward
        if isinstance(reading, str):
            raise MarkingError(f"{text!r} is not a valid colour code: {reading}")
    if isinstance(backward, BandReading):
        backward = BandReading(
            backward.significand,
            backward.exponent,
            backward.tolerance,
            backward.tcr_ppm,
            backward.bands,
            reversed=True,
        )
    if isinstance(forward, BandReading) and isinstance(backward, BandReading):
        if not _plausible(forward) and _plausible(backward):
            return backward
        return forward
    if isinstance(forward, BandReading):
        return forward
    if isinstance(backward, BandReading):
        return backward
    raise MarkingError(
        f"{text!r} is not a valid colour code: {forward}, and turned round {backward}"
    )


def _colour_for_tolerance(tolerance: float) -> str | None:
    for colour, t in TOLERANCE.items():
        if abs(t - tolerance) <= 1e-9:
            return colour
    return None


def encode_bands(
    value: float,
    tolerance: float | None = None,
    *,
    n_bands: int | None = None,
    tcr_ppm: int | None = None,
) -> tuple[str, ...]:
    """Colour bands for a value in the code's base unit (Ω, µH or pF).

    Parameters
    ----------
    value
        Value in the base unit, positive.
    tolerance
        Symmetric tolerance (fraction); None or 0.20 means no tolerance band.
    n_bands
        3, 4, 5 or 6; by default 3 without a tolerance band, 4 for ±5 % and wider
        when two digits suffice, else 5 (6 with a TCR).
    tcr_ppm
        Temperature coefficient for a 6-band code, ppm/K.

    Raises
    ------
    MarkingError
        When the value, tolerance or TCR has no colour code of the requested length.
    """
    no_band = tolerance is None or abs(tolerance - NO_BAND_TOLERANCE) <= 1e-9
    if n_bands is None:
        if tcr_ppm is not None:
            n_bands = 6
        elif no_band:
            n_bands = 3
        else:
            try:
                split_digits(value, 2)
                two_digits = True
            except MarkingError:
                two_digits = False
            n_bands = 4 if two_digits and tolerance is not None and tolerance >= 0.05 else 5
    if n_bands not in (3, 4, 5, 6):
        raise MarkingError(f"{n_bands!r} bands is not a colour code: expected 3 to 6 bands")
    if n_bands == 3 and not no_band:
        raise MarkingError(
            f"a 3-band code means ±20 %, not ±{tolerance * 100:g} %: expected 4 or more bands"
        )
    if n_bands >= 4:
        if no_band:
            raise MarkingError(
                f"±20 % has no tolerance colour: expected a 3-band code, not {n_bands} bands"
            )
        assert tolerance is not None
        tol_colour = _colour_for_tolerance(tolerance)
        if tol_colour is None:
            raise MarkingError(
                f"±{tolerance * 100:g} % has no IEC 60062 tolerance colour: expected one of "
                + ", ".join(f"±{t * 100:g} %" for t in sorted(TOLERANCE.values(), reverse=True))
            )
    if (n_bands == 6) != (tcr_ppm is not None):
        raise MarkingError("a TCR needs a 6-band code, and a 6-band code needs a TCR")
    n_digits = 2 if n_bands <= 4 else 3
    significand, exponent = split_digits(value, n_digits)
    names = {v: k for k, v in MULTIPLIER.items()}
    if exponent not in names:
        raise MarkingError(
            f"{value:g} cannot be colour coded: expected a multiplier from 10^-3 (pink) to 10^9"
        )
    digit_names = {v: k for k, v in DIGIT.items()}
    out = [digit_names[int(c)] for c in str(significand)]
    out.append(names[exponent])
    if n_bands >= 4:
        out.append(tol_colour)
    if n_bands == 6:
        tcr_names = {v: k for k, v in TCR.items()}
        if tcr_ppm not in tcr_names:
            raise MarkingError(
                f"{tcr_ppm} ppm/K has no TCR colour: expected one of "
                + ", ".join(str(t) for t in sorted(TCR.values()))
            )
        out.append(tcr_names[tcr_ppm])
    return tuple(out)

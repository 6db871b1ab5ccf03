"""The one entry point other code uses: :func:`decode_marking` and :func:`encode_marking`."""

from __future__ import annotations

from dataclasses import dataclass

from kitbin.errors import MarkingError
from kitbin.markings import codes, colour
from kitbin.markings._numbers import (
    UNIT_SYMBOL,
    format_number,
    format_percent,
    format_si,
    from_digits,
)
from kitbin.markings.tolerance import (
    SMALL_CAPACITOR_PF,
    decode_tolerance_letter,
    encode_tolerance_letter,
)

SCHEMES: tuple[str, ...] = ("colour", "numeric", "rkm", "e96")

#: Power of ten of the unit the colour code counts in, per kind: Ω, µH and pF.
#: Colour-banded inductors in µH: REFERENCES.md 8.1 (common practice). Colour-coded
#: capacitors in pF: common practice, no source.
COLOUR_UNIT_EXP: dict[str, int] = {"resistor": 0, "inductor": -6, "capacitor": -12}

_SCHEME_LABEL = {
    "colour": "colour bands",
    "numeric": "numeric code",
    "rkm": "RKM code",
    "e96": "E96 code",
}


@dataclass(frozen=True)
class Marking:
    """A decoded part marking.

    Attributes
    ----------
    value
        Nominal value in SI units: Ω (resistor), F (capacitor), H (inductor).
    tol_minus, tol_plus
        Tolerance below and above the nominal as positive fractions (0.05 = 5 %),
        or None when the marking carries no tolerance.
    tcr_ppm
        Temperature coefficient of resistance in ppm/K (6-band code), or None.
    scheme
        ``'colour'``, ``'numeric'``, ``'rkm'`` or ``'e96'``.
    text
        The marking normalised: canonical colour names in reading order, or the
        code in its usual case.
    kind
        ``'resistor'``, ``'capacitor'`` or ``'inductor'``.
    reversed
        True when colour bands were read from the other end than written.
    """

    value: float
    tol_minus: float | None
    tol_plus: float | None
    tcr_ppm: float | None
    scheme: str
    text: str
    kind: str
    reversed: bool = False

    @property
    def unit(self) -> str:
        """Symbol of the SI unit of :attr:`value`."""
        return UNIT_SYMBOL[self.kind]

    def tolerance_text(self) -> str:
        """``'±10 %'``, ``'+80/−20 %'`` or ``''`` when no tolerance is marked."""
        if self.tol_minus is None or self.tol_plus is None:
            return ""
        if abs(self.tol_minus - self.tol_plus) <= 1e-12:
            if self.kind == "capacitor" and 0 < self.value < 10e-12:
                # B/C/D/F on small capacitors are absolute (IEC 60062 tolerance code)
                pf = self.tol_plus * self.value * 1e12
                if any(abs(pf - p) <= 1e-9 for p in SMALL_CAPACITOR_PF.values()):
                    return f"±{format_number(pf, 3)} pF"
            return f"±{format_percent(self.tol_plus)} %"
        return f"+{format_percent(self.tol_plus)}/−{format_percent(self.tol_minus)} %"

    def describe(self) -> str:
        """One line for people: ``'10 µH ±10 % (colour bands)'``."""
        parts = [format_si(self.value, self.unit)]
        tol = self.tolerance_text()
        if tol:
            parts.append(tol)
        text = " ".join(parts)
        if self.tcr_ppm is not None:
            text += f", {self.tcr_ppm:g} ppm/K"
        label = _SCHEME_LABEL[self.scheme]
        if self.reversed:
            label += ", read from the other end"
        return f"{text} ({label})"


def _check_scheme(scheme: str | None) -> str | None:
    if scheme is None:
        return None
    s = scheme.strip().lower()
    s = {"color": "colour", "bands": "colour", "eia96": "e96", "eia-96": "e96"}.get(s, s)
    if s not in SCHEMES:
        raise MarkingError(
            f"{scheme!r} is not a marking scheme: expected one of {', '.join(SCHEMES)}"
        )
    return s


def decode_marking(text: str, kind: str, scheme: str | None = None) -> Marking:
    """Decode a marking as printed on a part.

    Parameters
    ----------
    text
        Colour bands (``'brown black black silver'``, ``'brn-blk-blk-sil'``), a
        numeric code (``'104'``, ``'4701'``, ``'101K'``), an RKM code (``'4K7'``,
        ``'470n'``, ``'2N2'``) or an E96 code (``'01C'``).
    kind
        ``'inductor'``, ``'resistor'`` or ``'capacitor'``; decides the unit of the
        code (µH, Ω, pF for colour and numeric codes; RKM letters by kind, not case).
    scheme
        Force one scheme; by default colour words mean colour bands and the other
        schemes are told apart by the rules in :mod:`kitbin.markings.codes`.

    Returns
    -------
    Marking
        Value in SI units (H, Ω, F) with the marked tolerance and TCR.

    Raises
    ------
    MarkingError
        With one line naming the input and what was expected.
    """
    if not isinstance(text, str):
        raise MarkingError(f"{text!r} is not a marking: expected text")
    kind = codes.check_kind(kind)
    scheme = _check_scheme(scheme)
    if not text.strip():
        raise MarkingError(
            f"{text!r} is empty: expected colour bands, a numeric code, an RKM code or an E96 code"
        )
    if scheme == "colour" or (scheme is None and colour.looks_like_colours(text)):
        reading = colour.decode_bands(text)
        value = from_digits(reading.significand, reading.exponent + COLOUR_UNIT_EXP[kind])
        return Marking(
            value=value,
            tol_minus=reading.tolerance,
            tol_plus=reading.tolerance,
            tcr_ppm=reading.tcr_ppm,
            scheme="colour",
            text=" ".join(reading.bands),
            kind=kind,
            reversed=reading.reversed,
        )
    code = codes.decode_code(text, kind, scheme)
    tol_minus = tol_plus = None
    if code.tolerance_letter is not None:
        try:
            tol_minus, tol_plus = decode_tolerance_letter(code.tolerance_letter, kind, code.value)
        except MarkingError as error:
            raise MarkingError(f"in {text!r}: {error.msg}") from None
    return Marking(
        value=code.value,
        tol_minus=tol_minus,
        tol_plus=tol_plus,
        tcr_ppm=None,
        scheme=code.scheme,
        text=code.text,
        kind=kind,
    )


def encode_marking(
    value: float,
    kind: str,
    scheme: str,
    tolerance: float | tuple[float, float] | None = None,
    *,
    tcr_ppm: int | None = None,
    n_bands: int | None = None,
) -> str:
    """The marking for a value, the inverse of :func:`decode_marking`.

    Parameters
    ----------
    value
        Nominal value in SI units (Ω, F, H).
    kind
        ``'inductor'``, ``'resistor'`` or ``'capacitor'``.
    scheme
        ``'colour'`` (band names joined by spaces), ``'numeric'``, ``'rkm'`` or ``'e96'``.
    tolerance
        Fraction (0.05) or ``(minus, plus)``; for codes it becomes a tolerance letter,
        for colour bands a tolerance band (None or 0.2: 3-band code).
    tcr_ppm
        TCR for a 6-band colour code, ppm/K.
    n_bands
        Number of colour bands (3 to 6); chosen from the tolerance by default.

    Returns
    -------
    str
        The marking text, which :func:`decode_marking` reads back to the same
        value and tolerance.

    Raises
    ------
    MarkingError
        When the value or tolerance cannot be written in that scheme.
    """
    kind = codes.check_kind(kind)
    s = _check_scheme(scheme)
    if s is None:
        raise MarkingError("no marking scheme given: expected one of " + ", ".join(SCHEMES))
    if (
        not isinstance(value, int | float)
        or value != value
        or value in (float("inf"), -float("inf"))
    ):
        raise MarkingError(f"{value!r} cannot be marked: expected a finite number")
    if isinstance(tolerance, tuple):
        tol_minus, tol_plus = tolerance
    elif tolerance is not None:
        tol_minus = tol_plus = float(tolerance)
    else:
        tol_minus = tol_plus = None
    if s == "colour":
        if tol_minus is not None and abs(tol_minus - tol_plus) > 1e-12:
            raise MarkingError("a colour code marks only a symmetric tolerance: expected ±x %")
        base = value / 10.0 ** COLOUR_UNIT_EXP[kind]
        base = float(f"{base:.11e}")
        text = " ".join(colour.encode_bands(base, tol_plus, n_bands=n_bands, tcr_ppm=tcr_ppm))
    else:
        if tcr_ppm is not None or n_bands is not None:
            raise MarkingError(f"tcr_ppm and n_bands apply to colour bands, not to the {s} code")
        if s == "numeric":
            text = codes.encode_numeric(value, kind)
        elif s == "rkm":
            text = codes.encode_rkm(value, kind)
        else:
            if kind != "resistor":
                raise MarkingError(f"the E96 code marks resistors, not {codes.a(kind)}")
            if tol_minus is not None:
                raise MarkingError("the E96 code carries no tolerance: expected tolerance=None")
            text = codes.encode_e96(value)
        if tol_minus is not None:
            text += encode_tolerance_letter(tol_minus, tol_plus, kind, value)
    if s == "colour":
        # read as written: a code that would also be valid turned round is still
        # the right code for this value
        reading = colour.decode_bands(text, reverse=False)
        got = from_digits(reading.significand, reading.exponent + COLOUR_UNIT_EXP[kind])
        if abs(got - value) > 1e-9 * abs(value):
            raise MarkingError(
                f"{format_si(value, UNIT_SYMBOL[kind])} cannot be colour coded exactly: "
                f"{text!r} reads {format_si(got, UNIT_SYMBOL[kind])}"
            )
        return text
    back = decode_marking(text, kind)
    if back.scheme != s or abs(back.value - value) > 1e-9 * abs(value):
        raise MarkingError(
            f"{format_si(value, UNIT_SYMBOL[kind])} written as {text!r} would read back as "
            f"{back.describe()}: expected a code that reads back unchanged"
        )
    if tol_minus is not None and (back.tol_minus is None or abs(back.tol_minus - tol_minus) > 1e-9):
        raise MarkingError(
            f"the tolerance letter in {text!r} would not read back as a tolerance "
            f"on {codes.a(kind)}: expected a tolerance this code can carry"
        )
    return text

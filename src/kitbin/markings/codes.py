"""Numeric, RKM (letter-and-digit) and E96 three-character codes.

* Numeric codes (common practice; IEC 60062:2016 fixed-length codes): two
  significant digits and a power of ten. Capacitors are in pF (104 = 100 nF;
  third digit 8 = ×0.01 and 9 = ×0.1, so 109 = 1.0 pF; a bare one- or two-digit
  marking is pF), resistors in Ω (472 = 4.7 kΩ; four digits 4701 = 4.70 kΩ),
  inductors in µH (101 = 100 µH; not standardised, common practice, no source).
* RKM code (IEC 60062 clause 4, 2004 numbering): the multiplier letter stands in
  for the decimal point. The part kind decides what a letter means, not its case:
  ``M`` is mega on a resistor and milli on a capacitor or inductor.
* E96 code (IEC 60062:2016 Annex A): two digits index the E96 table, a letter
  gives the multiplier. The letters are from memory (REFERENCES.md 8.2).

A code may end in one tolerance letter (``104K``, ``4K7J``). Where a final letter
could be either a multiplier or a tolerance, these rules decide (all documented
in docs/marking-codes.md):

* resistor: R, K, M, G, T, L are multipliers (``100K`` = 100 kΩ); two digits and
  an E96 letter are an E96 code (``68X``); otherwise a letter after three or four
  digits is a tolerance (``472J``). ``R`` is always RKM, so use ``Y``/``X`` (not
  ``R``/``S``) for the E96 ×0.01/×0.1;
* capacitor and inductor: a final ``M`` with no digits after it is ±20 %
  (``104M``, ``101M``); p/n/u/R are multipliers (``470n``, ``47N`` nH on an inductor).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from decimal import Decimal

from kitbin.errors import MarkingError
from kitbin.markings._numbers import from_digits, to_decimal
from kitbin.markings.series import E96
from kitbin.markings.tolerance import LETTERS as TOLERANCE_LETTERS

KINDS: tuple[str, ...] = ("inductor", "resistor", "capacitor")

#: Power of ten of the unit a numeric code counts in: Ω, pF, µH.
NUMERIC_UNIT_EXP: dict[str, int] = {"resistor": 0, "capacitor": -12, "inductor": -6}

#: RKM letters and the SI power of ten each stands for, per kind.
RKM_LETTERS: dict[str, dict[str, int]] = {
    # IEC 60062 clause 4 (2004 numbering); L = mΩ is 2016 edition, from memory.
    "resistor": {"L": -3, "R": 0, "K": 3, "M": 6, "G": 9, "T": 12},
    # IEC 60062 clause 4: p, n, µ (u), m. R as a pF decimal point: common practice, no source.
    "capacitor": {"P": -12, "R": -12, "N": -9, "U": -6, "M": -3},
    # Not standardised (common practice, no source): R and U = µH, N = nH, M = mH.
    "inductor": {"N": -9, "R": -6, "U": -6, "M": -3},
}

#: Letters that, at the very end of a code, are a tolerance rather than a multiplier.
_FINAL_TOLERANCE_ONLY: dict[str, frozenset[str]] = {
    "resistor": frozenset(),
    "capacitor": frozenset("M"),
    "inductor": frozenset("M"),
}

#: E96 multiplier letters (IEC 60062:2016 Annex A; letters from memory).
E96_LETTERS: dict[str, int] = {
    "Z": -3,
    "Y": -2,
    "R": -2,
    "X": -1,
    "S": -1,
    "A": 0,
    "B": 1,
    "H": 1,
    "C": 2,
    "D": 3,
    "E": 4,
    "F": 5,
}
_E96_ENCODE = {-3: "Z", -2: "Y", -1: "X", 0: "A", 1: "B", 2: "C", 3: "D", 4: "E", 5: "F"}
_E96_SIGNIFICANDS = tuple(round(m * 100) for m in E96)

_UNIT_SUFFIX = {
    "resistor": re.compile(r"(?:OHMS?|Ω|Ω)$"),
    "capacitor": re.compile(r"(?<=[PNUM])F$"),
    "inductor": re.compile(r"(?<=[PNUM])H$"),
}
# ASCII digits only: str.isdigit() and \d also accept superscripts and other scripts.
_DIGITS = re.compile(r"^[0-9]+$")
_RKM = re.compile(r"^([0-9]*)([A-Z])([0-9]*)([A-Z]?)$")
_DECIMAL = re.compile(r"^([0-9]*)\.([0-9]*)([A-Z])([A-Z]?)$")


@dataclass(frozen=True)
class CodeReading:
    """A decoded numeric, RKM or E96 code.

    Attributes
    ----------
    value
        Value in SI units (Ω, F, H).
    scheme
        ``'numeric'``, ``'rkm'`` or ``'e96'``.
    text
        The code, normalised (upper case for resistors and inductors, lower-case
        multiplier letters for capacitors, tolerance letter upper case).
    tolerance_letter
        The tolerance letter, or None.
    """

    value: float
    scheme: str
    text: str
    tolerance_letter: str | None = None


def a(word: str) -> str:
    """The word with its indefinite article: ``'an inductor'``, ``'a resistor'``."""
    return ("an " if word[:1].lower() in "aeiou" else "a ") + word


def check_kind(kind: str) -> str:
    """The kind in lower case, or MarkingError when it is not a part kind with markings."""
    k = kind.strip().lower() if isinstance(kind, str) else ""
    if k not in KINDS:
        raise MarkingError(
            f"{kind!r} is not a marked part kind: expected one of {', '.join(KINDS)}"
        )
    return k


def _compact(text: str, kind: str) -> str:
    # replace the micro signs before upper(), which would turn them into a Greek capital
    # and take a decimal comma (4,7k) as a decimal point
    s = re.sub(r"\s+", "", text).replace("µ", "u").replace("μ", "u").replace(",", ".").upper()
    return _UNIT_SUFFIX[kind].sub("", s)


def _numeric(digits: str, kind: str, text: str) -> float:
    """The value of an all-digit code in SI units."""
    unit = NUMERIC_UNIT_EXP[kind]
    if kind == "resistor" and set(digits) == {"0"} and len(digits) <= 4:
        return 0.0  # zero-ohm link: 0, 00, 000 or 0000 (common practice, no source)
    if kind == "capacitor" and len(digits) in (1, 2):
        significand, exponent = int(digits), 0
    elif len(digits) == 3 or (kind == "resistor" and len(digits) == 4):
        significand, last = int(digits[:-1]), int(digits[-1])
        if last in (8, 9):
            if kind != "capacitor":
                raise MarkingError(
                    f"{text!r} ends in {last}: expected a third digit 0-7 "
                    f"(8 = ×0.01 and 9 = ×0.1 are used only on capacitors)"
                )
            exponent = -2 if last == 8 else -1
        else:
            exponent = last
    else:
        expected = {
            "capacitor": "2 or 3 digits (pF)",
            "resistor": "3 or 4 digits (Ω)",
            "inductor": "3 digits (µH)",
        }[kind]
        raise MarkingError(f"{text!r} is not a numeric {kind} code: expected {expected}")
    if significand == 0:
        raise MarkingError(f"{text!r} is a zero value: expected a nonzero {kind} code")
    return from_digits(significand, exponent + unit)


def _rkm_value(left: str, letter: str, right: str, kind: str, text: str) -> float:
    if not left and not right:
        raise MarkingError(f"{text!r} has no digits: expected an RKM code such as 4K7 or 470n")
    exponent = RKM_LETTERS[kind][letter]
    value = Decimal(f"{left or '0'}.{right or '0'}").scaleb(exponent)
    if value == 0 and kind != "resistor":
        raise MarkingError(f"{text!r} is a zero value: expected a nonzero {kind} code")
    return float(value)


def _rkm_text(left: str, letter: str, right: str, kind: str) -> str:
    left = left.lstrip("0")
    if not left and not right:
        left = "0"
    shown = letter.lower() if kind == "capacitor" and letter != "R" else letter
    return f"{left}{shown}{right}"


def _e96_value(index: str, letter: str, text: str) -> float:
    n = int(index)
    if not 1 <= n <= 96:
        raise MarkingError(f"{text!r} has E96 index {index}: expected 01 to 96")
    return from_digits(_E96_SIGNIFICANDS[n - 1], E96_LETTERS[letter])


def _tolerance_suffix(letter: str, text: str) -> str | None:
    if not letter:
        return None
    if letter not in TOLERANCE_LETTERS:
        raise MarkingError(
            f"{letter!r} at the end of {text!r} is not a tolerance letter: "
            f"expected one of {', '.join(sorted(TOLERANCE_LETTERS))}"
        )
    return letter


def decode_code(text: str, kind: str, scheme: str | None = None) -> CodeReading:
    """Decode a numeric, RKM or E96 code for a kind of part.

    Parameters
    ----------
    text
        The marking as printed, e.g. ``'104K'``, ``'4K7'``, ``'470n'``, ``'01C'``.
        Spaces are ignored; a unit after an RKM prefix (``'10uF'``, ``'4.7uH'``,
        ``'4K7 ohm'``) is accepted; ``'4.7k'`` is read as ``'4K7'``.
    kind
        ``'resistor'``, ``'capacitor'`` or ``'inductor'``; decides the units.
    scheme
        Force ``'numeric'``, ``'rkm'`` or ``'e96'``; None picks by the rules above.

    Returns
    -------
    CodeReading
        Value in SI units (Ω, F, H).

    Raises
    ------
    MarkingError
        When the text is not a code of that kind of part.
    """
    kind = check_kind(kind)
    original = text
    s = _compact(text, kind)
    if not s:
        raise MarkingError(f"{original!r} is empty: expected a numeric, RKM or E96 code")
    if _DIGITS.match(s):
        if scheme not in (None, "numeric"):
            raise MarkingError(f"{original!r} is a numeric code, not {a(str(scheme))} code")
        return CodeReading(_numeric(s, kind, original), "numeric", s)
    m = _DECIMAL.match(s)
    if m and m.group(3) in RKM_LETTERS[kind] and (m.group(1) or m.group(2)):
        if scheme not in (None, "rkm"):
            raise MarkingError(f"{original!r} is a value with a prefix, not {a(str(scheme))} code")
        left, right, letter, tol = m.groups()
        value = _rkm_value(left, letter, right, kind, original)
        tol_letter = _tolerance_suffix(tol, original)
        return CodeReading(value, "rkm", _rkm_text(left, letter, right, kind) + tol, tol_letter)
    m = _RKM.match(s)
    if not m:
        raise MarkingError(
            f"{original!r} is not {a(kind)} marking: expected colour bands, "
            "a numeric code (472), an RKM code (4K7) or an E96 code (01C)"
        )
    left, letter, right, tol = m.groups()
    rkm_letters = RKM_LETTERS[kind]
    if right:  # a letter between digits (or leading, as in R47) is a decimal point
        if letter not in rkm_letters:
            raise MarkingError(
                f"{letter!r} in {original!r} is not an RKM letter for {a(kind)}: "
                f"expected one of {', '.join(rkm_letters)}"
            )
        if scheme not in (None, "rkm"):
            raise MarkingError(f"{original!r} is an RKM code, not {a(str(scheme))} code")
        value = _rkm_value(left, letter, right, kind, original)
        return CodeReading(
            value,
            "rkm",
            _rkm_text(left, letter, right, kind) + tol,
            _tolerance_suffix(tol, original),
        )
    if not left:
        raise MarkingError(f"{original!r} has no digits: expected a code such as 4K7 or 104")
    if tol:
        # digits, multiplier letter, tolerance letter: 47KJ, 470RF
        if scheme not in (None, "rkm"):
            raise MarkingError(f"{original!r} is an RKM code, not {a(str(scheme))} code")
        if letter not in rkm_letters:
            raise MarkingError(
                f"{original!r} is not {a(kind)} marking: expected at most one letter after "
                "the digits, or an RKM letter then a tolerance letter"
            )
        value = _rkm_value(left, letter, "", kind, original)
        return CodeReading(
            value, "rkm", _rkm_text(left, letter, "", kind) + tol, _tolerance_suffix(tol, original)
        )
    # digits followed by one letter: multiplier, E96 letter or tolerance
    choice = scheme
    if choice is None:
        if letter in rkm_letters and letter not in _FINAL_TOLERANCE_ONLY[kind]:
            choice = "rkm"
        elif kind == "resistor" and len(left) == 2 and letter in E96_LETTERS:
            choice = "e96"
        elif letter in TOLERANCE_LETTERS:
            choice = "numeric"
        else:
            raise MarkingError(
                f"{letter!r} in {original!r} is neither an RKM letter nor a tolerance letter "
                f"for {a(kind)}"
            )
    if choice == "rkm":
        if letter not in rkm_letters:
            raise MarkingError(f"{letter!r} in {original!r} is not an RKM letter for {a(kind)}")
        value = _rkm_value(left, letter, "", kind, original)
        return CodeReading(value, "rkm", _rkm_text(left, letter, "", kind))
    if choice == "e96":
        if kind != "resistor" or len(left) != 2 or letter not in E96_LETTERS:
            raise MarkingError(
                f"{original!r} is not an E96 code: expected two digits and one of "
                f"{''.join(E96_LETTERS)} on a resistor"
            )
        return CodeReading(_e96_value(left, letter, original), "e96", left + letter)
    if choice == "numeric":
        tol_letter = _tolerance_suffix(letter, original)
        return CodeReading(_numeric(left, kind, original), "numeric", left + letter, tol_letter)
    raise MarkingError(f"{scheme!r} is not a code scheme: expected numeric, rkm or e96")


def _mantissa_text(d: Decimal) -> tuple[str, str]:
    """Digits left and right of the decimal point of a positive decimal."""
    text = format(d.normalize(), "f")
    left, _, right = text.partition(".")
    return ("" if left == "0" else left), right


def encode_numeric(value: float, kind: str) -> str:
    """A numeric code for a value in SI units (no tolerance letter).

    Capacitors get three digits in pF (``1e-7`` -> ``'104'``, ``4.7e-12`` ->
    ``'479'``); resistors three digits in Ω when two significant digits suffice,
    else four (``4700`` -> ``'472'``, ``4990`` -> ``'4991'``); inductors three
    digits in µH (``1e-4`` -> ``'101'``).

    Raises
    ------
    MarkingError
        When the value has too many significant digits or is out of the code's range.
    """
    kind = check_kind(kind)
    if kind == "resistor" and value == 0:
        return "000"
    if not value > 0:
        raise MarkingError(f"{value!r} cannot be marked: expected a positive value")
    d = to_decimal(value).scaleb(-NUMERIC_UNIT_EXP[kind])
    sig_digits = d.as_tuple().digits
    n_sig = len(sig_digits)
    while n_sig > 1 and sig_digits[n_sig - 1] == 0:
        n_sig -= 1
    widths = (2, 3) if kind == "resistor" else (2,)
    lowest = -2 if kind == "capacitor" else 0
    for width in widths:
        if n_sig > width:
            continue
        exponent = d.adjusted() - (width - 1)
        if lowest <= exponent <= 7:
            significand = int(d.scaleb(-exponent))
            last = {-2: 8, -1: 9}.get(exponent, exponent)
            return f"{significand}{last}"
    unit = {"resistor": "Ω", "capacitor": "pF", "inductor": "µH"}[kind]
    raise MarkingError(
        f"{format(d, 'f')} {unit} has no numeric {kind} code: expected "
        + {
            "resistor": "10 Ω or more with up to 3 significant digits (use RKM, e.g. 4R7)",
            "capacitor": "0.1 pF or more with up to 2 significant digits",
            "inductor": "10 µH or more with up to 2 significant digits (use RKM, e.g. 4R7)",
        }[kind]
    )


def encode_rkm(value: float, kind: str) -> str:
    """An RKM code for a value in SI units (no tolerance letter).

    ``4700`` Ω -> ``'4K7'``, ``0.47`` Ω -> ``'R47'``, ``4.7e-7`` F -> ``'470n'``,
    ``4.7e-6`` H -> ``'4R7'``, ``2.2e-9`` H -> ``'2N2'``.
    """
    kind = check_kind(kind)
    if kind == "resistor" and value == 0:
        return "0R"
    if not value > 0:
        raise MarkingError(f"{value!r} cannot be marked: expected a positive value")
    d = to_decimal(value)
    if kind == "resistor":
        steps = [(12, "T"), (9, "G"), (6, "M"), (3, "K"), (0, "R")]
        floor_letter = (0, "R")
    elif kind == "capacitor":
        steps = [(-3, "M"), (-6, "U"), (-9, "N"), (-12, "P")]
        floor_letter = (-12, "P")
    else:
        steps = [(-3, "M"), (-6, "R"), (-9, "N")]
        floor_letter = (-9, "N")
    exponent, letter = next(((e, L) for e, L in steps if d >= Decimal(1).scaleb(e)), floor_letter)
    if kind == "inductor" and exponent == -9 and d >= Decimal("1e-7"):
        exponent, letter = -6, "R"  # 100 nH and up is written R10, R47 (µH)
    left, right = _mantissa_text(d.scaleb(-exponent))
    if not left and len(right) < 2:
        right = right.ljust(2, "0")
    if not right and (len(left) == 1 or letter in _FINAL_TOLERANCE_ONLY[kind]):
        right = "0"
    return _rkm_text(left, letter, right, kind)


def encode_e96(value: float) -> str:
    """The E96 three-character code of a resistor value in Ω: ``10e3`` -> ``'01C'``.

    Raises
    ------
    MarkingError
        When the value is not an E96 value between 0.1 Ω and 99.9 MΩ.
    """
    if not value > 0:
        raise MarkingError(f"{value!r} cannot be marked: expected a positive value")
    d = to_decimal(value)
    exponent = d.adjusted() - 2
    significand = d.scaleb(-exponent)
    if significand != significand.to_integral_value() or int(significand) not in _E96_SIGNIFICANDS:
        raise MarkingError(f"{value:g} Ω has no E96 code: expected a value of the E96 series")
    if exponent not in _E96_ENCODE:
        raise MarkingError(f"{value:g} Ω has no E96 code: expected 0.1 Ω to 99.9 MΩ")
    index = _E96_SIGNIFICANDS.index(int(significand)) + 1
    return f"{index:02d}{_E96_ENCODE[exponent]}"

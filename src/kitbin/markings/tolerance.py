"""IEC 60062 tolerance letter code (clause 5 in the 2004 numbering).

Letters marked "from memory" in the project's reference sheet (REFERENCES.md 8.3)
are flagged below. ``P`` has two meanings (±0.02 % on precision resistors,
+100/−0 % on older capacitor tables) and is decoded only with the part kind.
"""

from __future__ import annotations

from kitbin.errors import MarkingError

#: Symmetric tolerance letters, as fractions. Values in a comment "from memory"
#: were not checked against the standard's text.
SYMMETRIC: dict[str, float] = {
    "E": 0.00005,  # ±0.005 % (from memory)
    "L": 0.0001,  # ±0.01 % (from memory)
    "P": 0.0002,  # ±0.02 % on resistors only (from memory)
    "W": 0.0005,  # ±0.05 % (from memory)
    "B": 0.001,
    "C": 0.0025,
    "D": 0.005,
    "F": 0.01,
    "G": 0.02,
    "J": 0.05,
    "K": 0.10,
    "M": 0.20,
    "N": 0.30,
}

#: Asymmetric letters: (minus, plus) fractions.
ASYMMETRIC: dict[str, tuple[float, float]] = {
    "Z": (0.20, 0.80),
    "S": (0.20, 0.50),  # from memory
    "T": (0.10, 0.50),  # from memory
    "Q": (0.10, 0.30),  # from memory
}

#: Older capacitor usage of P: +100 / −0 %.
CAPACITOR_P: tuple[float, float] = (0.0, 1.0)

#: On capacitors below 10 pF, B/C/D/F are absolute tolerances in pF.
SMALL_CAPACITOR_PF: dict[str, float] = {"B": 0.1, "C": 0.25, "D": 0.5, "F": 1.0}

#: Every letter that can be a tolerance letter.
LETTERS: frozenset[str] = frozenset(SYMMETRIC) | frozenset(ASYMMETRIC)


def decode_tolerance_letter(
    letter: str, kind: str, value: float | None = None
) -> tuple[float, float]:
    """The tolerance a letter stands for on a given kind of part.

    Parameters
    ----------
    letter
        One tolerance letter (any case).
    kind
        ``'resistor'``, ``'capacitor'`` or ``'inductor'``; decides ``P`` and the
        absolute-pF reading of B/C/D/F.
    value
        Nominal value in SI units (F for capacitors). For a capacitor below 10 pF,
        B/C/D/F are ±0.1/0.25/0.5/1 pF and are returned as fractions of ``value``.

    Returns
    -------
    tuple[float, float]
        ``(minus, plus)`` as positive fractions.

    Raises
    ------
    MarkingError
        For an unknown letter, or ``P`` on an inductor (no context to decide).
    """
    key = letter.strip().upper()
    if key == "P":
        if kind == "capacitor":
            return CAPACITOR_P
        if kind == "resistor":
            return (SYMMETRIC["P"], SYMMETRIC["P"])
        raise MarkingError(
            f"tolerance letter {letter!r} is ambiguous on a part of kind {kind!r}: "
            "expected P only on resistors (±0.02 %) or capacitors (+100/−0 %)"
        )
    if (
        kind == "capacitor"
        and value is not None
        and 0 < value < 10e-12
        and key in SMALL_CAPACITOR_PF
    ):
        tol = SMALL_CAPACITOR_PF[key] * 1e-12 / value
        return (tol, tol)
    if key in SYMMETRIC:
        return (SYMMETRIC[key], SYMMETRIC[key])
    if key in ASYMMETRIC:
        return ASYMMETRIC[key]
    raise MarkingError(
        f"{letter!r} is not a tolerance letter: expected one of {', '.join(sorted(LETTERS))}"
    )


def encode_tolerance_letter(
    tol_minus: float, tol_plus: float, kind: str, value: float | None = None
) -> str:
    """The letter for a tolerance, the inverse of :func:`decode_tolerance_letter`.

    Raises
    ------
    MarkingError
        When no letter stands for that tolerance on that kind of part.
    """

    def close(a: float, b: float) -> bool:
        return abs(a - b) <= 1e-9 + 1e-6 * abs(b)

    if kind == "capacitor" and value is not None and 0 < value < 10e-12:
        for letter, pf in SMALL_CAPACITOR_PF.items():
            t = pf * 1e-12 / value
            if close(tol_minus, t) and close(tol_plus, t):
                return letter
    if kind == "capacitor" and close(tol_minus, 0.0) and close(tol_plus, 1.0):
        return "P"
    for letter, t in SYMMETRIC.items():
        if letter == "P" and kind != "resistor":
            continue
        small_capacitor = kind == "capacitor" and value is not None and 0 < value < 10e-12
        if small_capacitor and letter in SMALL_CAPACITOR_PF:
            continue  # these letters mean pF, not %, on such a part
        if close(tol_minus, t) and close(tol_plus, t):
            return letter
    for letter, (minus, plus) in ASYMMETRIC.items():
        if close(tol_minus, minus) and close(tol_plus, plus):
            return letter
    raise MarkingError(
        f"tolerance -{tol_minus * 100:g}/+{tol_plus * 100:g} % has no tolerance letter: "
        "expected one of the IEC 60062 tolerances (e.g. ±1, ±5, ±10, ±20 %)"
    )

"""Part markings: IEC 60062 colour, numeric, RKM and E96 codes; IEC 60063 E series.

Pure code, standard library only (no pint, no numpy), so ``kitbin --help`` stays
light. Everything other modules need is importable from here::

    from kitbin.markings import decode_marking
    decode_marking("brown black black silver", "inductor").describe()
    # '10 µH ±10 % (colour bands)'
"""

from kitbin.markings._numbers import format_si
from kitbin.markings.api import SCHEMES, Marking, decode_marking, encode_marking
from kitbin.markings.codes import (
    KINDS,
    decode_code,
    encode_e96,
    encode_numeric,
    encode_rkm,
)
from kitbin.markings.colour import BandReading, decode_bands, encode_bands, parse_bands
from kitbin.markings.series import (
    E3,
    E6,
    E12,
    E24,
    E48,
    E96,
    E192,
    SERIES,
    SERIES_TOLERANCE,
    is_preferred,
    nearest_preferred,
    preferred_neighbours,
    series_containing,
    series_tolerance,
    series_values,
)
from kitbin.markings.tolerance import decode_tolerance_letter, encode_tolerance_letter

__all__ = [
    "E3",
    "E6",
    "E12",
    "E24",
    "E48",
    "E96",
    "E192",
    "KINDS",
    "SCHEMES",
    "SERIES",
    "SERIES_TOLERANCE",
    "BandReading",
    "Marking",
    "decode_bands",
    "decode_code",
    "decode_marking",
    "decode_tolerance_letter",
    "encode_bands",
    "encode_e96",
    "encode_marking",
    "encode_numeric",
    "encode_rkm",
    "encode_tolerance_letter",
    "format_si",
    "is_preferred",
    "nearest_preferred",
    "parse_bands",
    "preferred_neighbours",
    "series_containing",
    "series_tolerance",
    "series_values",
]

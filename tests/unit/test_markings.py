"""Unit tests of kitbin.markings: decoding rules, error lines and formatting.

The checks against outside sources (IEC 60062 / IEC 60063 tables, the ``eseries``
package) are in tests/reference/test_markings_reference.py; this file covers the
project's own rules (scheme choice, reading direction, normalised text, errors).
"""

from __future__ import annotations

import doctest
import re
from pathlib import Path

import pytest

from kitbin.errors import KitbinError, MarkingError
from kitbin.markings import (
    Marking,
    decode_bands,
    decode_marking,
    encode_bands,
    encode_marking,
    encode_numeric,
    encode_rkm,
    format_si,
    is_preferred,
    nearest_preferred,
    parse_bands,
    preferred_neighbours,
    series_containing,
    series_values,
)

# -- colour bands: spellings, direction, normalised text --------------------------------


@pytest.mark.parametrize(
    "text",
    [
        "brown black black silver",
        "Brown Black Black Silver",
        "brn-blk-blk-sil",
        "BN,BK,BK,SR",
        "  brown   black/black_silver ",
    ],
)
def test_band_spellings_all_read_the_same(text: str) -> None:
    m = decode_marking(text, "inductor")
    assert m.value == pytest.approx(10e-6, rel=1e-12)
    assert m.text == "brown black black silver"
    assert m.scheme == "colour"


def test_grey_gray_violet_purple_are_the_same_colours() -> None:
    assert parse_bands("gray purple red gold") == ("grey", "violet", "red", "gold")
    assert decode_marking("grey violet red gold", "resistor") == decode_marking(
        "GRAY PURPLE RED GOLD", "resistor"
    )


def test_bands_written_from_the_other_end_are_turned_round() -> None:
    # gold cannot be a digit, so only the reversed reading is a valid code
    m = decode_marking("gold red violet yellow", "resistor")
    assert m.value == 4700.0
    assert m.reversed
    assert m.text == "yellow violet red gold"
    assert "other end" in m.describe()


def test_both_directions_valid_and_neither_preferred_reads_as_written() -> None:
    # forward red black violet brown brown = 207 × 10 = 2.07 kΩ (not E96);
    # reversed brown brown violet black red = 117 Ω (not E96 either)
    m = decode_bands(("red", "black", "violet", "brown", "brown"))
    assert not m.reversed and m.value == 2070.0


def test_both_directions_valid_and_both_preferred_reads_as_written() -> None:
    # forward 1.00 kΩ ±1 %, reversed brown brown black black brown = 110 Ω ±1 %;
    # both are E96 values, so the bands are read as written
    m = decode_bands(("brown", "black", "black", "brown", "brown"))
    assert not m.reversed and m.value == 1000.0


def test_ambiguous_direction_picks_reversed_when_only_it_is_preferred() -> None:
    # 3 bands mean ±20 %, so E6 decides. Forward "red red orange" = 22 kΩ (E6);
    # reversed "orange red red" = 3.2 kΩ (not E6)
    assert not decode_bands(("red", "red", "orange")).reversed
    # forward "orange red red" = 3.2 kΩ (not E6); reversed "red red orange" = 22 kΩ (E6)
    m = decode_bands(("orange", "red", "red"))
    assert m.reversed and m.value == 22e3


def test_six_band_reads_tcr() -> None:
    m = decode_marking("red red black brown brown red", "resistor")
    assert m.tcr_ppm == 50
    assert m.describe() == "2.2 kΩ ±1 %, 50 ppm/K (colour bands)"


def test_three_band_is_twenty_percent() -> None:
    m = decode_marking("brown black red", "resistor")
    assert (m.value, m.tol_minus, m.tol_plus) == (1000.0, 0.2, 0.2)


def test_colour_coded_capacitor_reads_pf() -> None:
    # common practice, no source: colour-coded capacitors count in pF
    assert decode_marking("yellow violet brown", "capacitor").value == pytest.approx(470e-12)


@pytest.mark.parametrize(
    ("text", "needle"),
    [
        ("brown black", "expected 3 to 6 bands"),
        ("brown black black black black black black", "expected 3 to 6 bands"),
        ("brown black beige gold", "'beige'"),
        ("gold silver gold silver", "not a valid colour code"),
        ("brown black black pink", "not a valid colour code"),  # pink is no tolerance
        ("red", "3 to 6 bands"),
        ("white white white white", "not a valid colour code"),  # white is no tolerance
    ],
)
def test_bad_colour_codes_raise_one_line(text: str, needle: str) -> None:
    with pytest.raises(MarkingError) as info:
        decode_marking(text, "resistor")
    message = str(info.value)
    assert needle in message
    assert "\n" not in message
    assert text in message or repr(text.split()[-1]) in message


def test_error_line_for_two_bands_is_exact() -> None:
    with pytest.raises(
        MarkingError, match=r"^'brown black' is not a colour code: expected 3 to 6 bands$"
    ):
        decode_marking("brown black", "resistor")


def test_encode_bands_chooses_band_count_from_tolerance() -> None:
    assert encode_bands(4700, 0.05) == ("yellow", "violet", "red", "gold")
    assert encode_bands(4700, None) == ("yellow", "violet", "red")
    assert encode_bands(4700, 0.01) == ("yellow", "violet", "black", "brown", "brown")
    assert encode_bands(4990, 0.05) == ("yellow", "white", "white", "brown", "gold")
    assert encode_bands(2200, 0.01, tcr_ppm=50) == ("red", "red", "black", "brown", "brown", "red")
    assert encode_bands(0.047, 0.05) == ("yellow", "violet", "pink", "gold")


@pytest.mark.parametrize(
    ("value", "tolerance", "kwargs", "needle"),
    [
        (4700, 0.03, {}, "±3 % has no IEC 60062 tolerance colour"),
        (4700, 0.04, {}, "±4 % has no IEC 60062 tolerance colour"),
        (4712, 0.05, {"n_bands": 4}, "2 significant digits"),
        (0.0047, 0.05, {}, "multiplier"),
        (4700, 0.05, {"n_bands": 3}, "3-band code means ±20 %"),
        (4700, 0.01, {"tcr_ppm": 7}, "7 ppm/K has no TCR colour"),
        (-1.0, 0.05, {}, "positive"),
    ],
)
def test_encode_bands_refuses_what_has_no_colour(value, tolerance, kwargs, needle) -> None:
    with pytest.raises(MarkingError, match=needle):
        encode_bands(value, tolerance, **kwargs)


# -- numeric, RKM and E96: the scheme-choice rules --------------------------------------


@pytest.mark.parametrize(
    ("text", "kind", "value", "scheme", "normalised", "tol"),
    [
        ("104K", "capacitor", 100e-9, "numeric", "104K", (0.10, 0.10)),
        ("104M", "capacitor", 100e-9, "numeric", "104M", (0.20, 0.20)),
        ("101M", "inductor", 100e-6, "numeric", "101M", (0.20, 0.20)),
        ("101K", "inductor", 100e-6, "numeric", "101K", (0.10, 0.10)),
        ("472J", "resistor", 4.7e3, "numeric", "472J", (0.05, 0.05)),
        ("100K", "resistor", 100e3, "rkm", "100K", None),
        ("470n", "capacitor", 470e-9, "rkm", "470n", None),
        ("470N", "capacitor", 470e-9, "rkm", "470n", None),
        ("47N", "inductor", 47e-9, "rkm", "47N", None),
        ("4K7J", "resistor", 4.7e3, "rkm", "4K7J", (0.05, 0.05)),
        ("47KJ", "resistor", 47e3, "rkm", "47KJ", (0.05, 0.05)),
        ("4k7", "resistor", 4.7e3, "rkm", "4K7", None),
        ("4.7k", "resistor", 4.7e3, "rkm", "4K7", None),
        ("4,7k", "resistor", 4.7e3, "rkm", "4K7", None),
        ("10 µH", "inductor", 10e-6, "rkm", "10U", None),
        ("100nF", "capacitor", 100e-9, "rkm", "100n", None),
        ("4K7 ohm", "resistor", 4.7e3, "rkm", "4K7", None),
        ("10uF", "capacitor", 10e-6, "rkm", "10u", None),
        ("4.7µH", "inductor", 4.7e-6, "rkm", "4U7", None),
        ("2m2", "resistor", 2.2e6, "rkm", "2M2", None),  # kind decides: M is mega here
        ("4m7", "capacitor", 4.7e-3, "rkm", "4m7", None),  # ... and milli here
        ("1M0", "inductor", 1e-3, "rkm", "1M0", None),
        ("68X", "resistor", 49.9, "e96", "68X", None),
        ("68x", "resistor", 49.9, "e96", "68X", None),
        ("10R", "resistor", 10.0, "rkm", "10R", None),  # R is RKM, never the E96 ×0.01
        ("000", "resistor", 0.0, "numeric", "000", None),
        ("0R", "resistor", 0.0, "rkm", "0R", None),
        ("5", "capacitor", 5e-12, "numeric", "5", None),
        ("47J", "capacitor", 47e-12, "numeric", "47J", (0.05, 0.05)),
        ("105Z", "capacitor", 1e-6, "numeric", "105Z", (0.20, 0.80)),
        ("2R2", "capacitor", 2.2e-12, "rkm", "2R2", None),
    ],
)
def test_code_rules(text, kind, value, scheme, normalised, tol) -> None:
    m = decode_marking(text, kind)
    assert m.value == pytest.approx(value, rel=1e-12, abs=0)
    assert m.scheme == scheme
    assert m.text == normalised
    if tol is None:
        assert m.tol_minus is None and m.tol_plus is None
    else:
        assert (m.tol_minus, m.tol_plus) == pytest.approx(tol)


def test_values_are_exact_decimals() -> None:
    # built from decimal digits, not float products: 4.7 kΩ is exactly 4700.0
    assert decode_marking("4K7", "resistor").value == 4700.0
    assert decode_marking("472", "capacitor").value == 4.7e-9
    assert decode_marking("yellow violet gold silver", "inductor").value == 4.7e-6


def test_forced_scheme() -> None:
    # 104P reads as 104 pF (P multiplier) unless the numeric code is asked for
    assert decode_marking("104P", "capacitor").value == pytest.approx(104e-12)
    m = decode_marking("104P", "capacitor", scheme="numeric")
    assert m.value == pytest.approx(100e-9)
    assert (m.tol_minus, m.tol_plus) == (0.0, 1.0)
    assert decode_marking("68R", "resistor", scheme="e96").value == pytest.approx(4.99)
    for text, scheme in (("47KJ", "numeric"), ("4K7", "e96"), ("472", "rkm"), ("4.7k", "e96")):
        with pytest.raises(MarkingError, match=r"not an? .* code"):
            decode_marking(text, "resistor", scheme=scheme)
    with pytest.raises(MarkingError, match="not a marking scheme"):
        decode_marking("104", "capacitor", scheme="morse")


def test_p_needs_context() -> None:
    r = decode_marking("4701P", "resistor")
    assert r.tol_minus == pytest.approx(0.0002)
    with pytest.raises(MarkingError, match="ambiguous"):
        decode_marking("101P", "inductor", scheme="numeric")


def test_small_capacitor_tolerance_letters_are_picofarads() -> None:
    # B/C/D/F on capacitors below 10 pF are absolute: ±0.25 pF on 4.7 pF
    m = decode_marking("4p7C", "capacitor")
    assert m.tol_plus == pytest.approx(0.25 / 4.7)
    assert decode_marking("100p" + "F", "capacitor").tol_plus is None  # 'pF' is a unit here
    assert decode_marking("101F", "capacitor").tol_plus == pytest.approx(0.01)


@pytest.mark.parametrize(
    ("text", "kind", "needle"),
    [
        ("", "resistor", "is empty"),
        ("   ", "capacitor", "is empty"),
        ("47", "resistor", "expected 3 or 4 digits"),
        ("4701", "inductor", "expected 3 digits"),
        ("12345", "capacitor", "expected 2 or 3 digits"),
        ("109", "resistor", "only on capacitors"),
        ("00C", "resistor", "expected 01 to 96"),
        ("97A", "resistor", "expected 01 to 96"),
        ("4X7", "resistor", "not an RKM letter"),
        ("4K7X", "resistor", "not a tolerance letter"),
        ("4K7K7", "resistor", "not a resistor marking"),
        ("000", "capacitor", "zero value"),
        ("R", "resistor", "no digits"),
        ("K", "resistor", "no digits"),
        ("47Q", "inductor", "numeric inductor code"),
        ("hello", "resistor", "not a resistor marking"),
        ("104", "transistor", "not a marked part kind"),
    ],
)
def test_bad_codes_raise_one_line(text: str, kind: str, needle: str) -> None:
    with pytest.raises(MarkingError, match=needle) as info:
        decode_marking(text, kind)
    assert "\n" not in str(info.value)
    assert isinstance(info.value, KitbinError) and isinstance(info.value, ValueError)


def test_non_text_raises_marking_error() -> None:
    with pytest.raises(MarkingError):
        decode_marking(104, "capacitor")  # type: ignore[arg-type]


# -- encoding ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("value", "kind", "expected"),
    [
        (4700.0, "resistor", "4K7"),
        (0.47, "resistor", "R47"),
        (0.047, "resistor", "R047"),
        (4.7, "resistor", "4R7"),
        (470.0, "resistor", "470R"),
        (1000.0, "resistor", "1K0"),
        (10e3, "resistor", "10K"),
        (47.3e3, "resistor", "47K3"),
        (2.2e6, "resistor", "2M2"),
        (4.7e-12, "capacitor", "4p7"),
        (470e-9, "capacitor", "470n"),
        (1e-6, "capacitor", "1u0"),
        (10e-3, "capacitor", "10m0"),
        (4.7e-6, "inductor", "4R7"),
        (0.47e-6, "inductor", "R47"),
        (0.1e-6, "inductor", "R10"),
        (47e-9, "inductor", "47N"),
        (2.2e-9, "inductor", "2N2"),
        (10e-3, "inductor", "10M0"),
    ],
)
def test_encode_rkm(value: float, kind: str, expected: str) -> None:
    assert encode_rkm(value, kind) == expected
    assert decode_marking(expected, kind).value == pytest.approx(value, rel=1e-12)


@pytest.mark.parametrize(
    ("value", "kind", "expected"),
    [
        (100e-9, "capacitor", "104"),
        (4.7e-12, "capacitor", "479"),
        (0.47e-12, "capacitor", "478"),
        (22e-12, "capacitor", "220"),
        (4700.0, "resistor", "472"),
        (4990.0, "resistor", "4991"),
        (10.0, "resistor", "100"),
        (100e-6, "inductor", "101"),
    ],
)
def test_encode_numeric(value: float, kind: str, expected: str) -> None:
    assert encode_numeric(value, kind) == expected


@pytest.mark.parametrize(
    ("value", "kind", "needle"),
    [
        (4.7, "resistor", "use RKM"),
        (4.7e-6, "inductor", "use RKM"),
        (4.75e-9, "capacitor", "up to 2 significant digits"),
        (0.0, "capacitor", "positive"),
    ],
)
def test_encode_numeric_refuses(value: float, kind: str, needle: str) -> None:
    with pytest.raises(MarkingError, match=needle):
        encode_numeric(value, kind)


def test_encode_marking_with_tolerance_letters() -> None:
    assert encode_marking(100e-9, "capacitor", "numeric", 0.10) == "104K"
    assert encode_marking(100e-6, "inductor", "numeric", 0.20) == "101M"
    assert encode_marking(4700.0, "resistor", "rkm", 0.05) == "4K7J"
    assert encode_marking(1e-6, "capacitor", "numeric", (0.20, 0.80)) == "105Z"
    assert encode_marking(10e-6, "inductor", "colour", 0.10) == "brown black black silver"
    assert encode_marking(10e3, "resistor", "e96") == "01C"


def test_encode_marking_refuses_codes_that_would_read_back_wrong() -> None:
    # 472 + K would read back as the RKM code 472 kΩ
    with pytest.raises(MarkingError, match="read back"):
        encode_marking(4700.0, "resistor", "numeric", 0.10)
    with pytest.raises(MarkingError, match="no tolerance"):
        encode_marking(10e3, "resistor", "e96", 0.01)
    with pytest.raises(MarkingError, match="marks resistors"):
        encode_marking(10e-6, "inductor", "e96")
    with pytest.raises(MarkingError, match="no tolerance letter"):
        encode_marking(100e-9, "capacitor", "numeric", 0.03)
    with pytest.raises(MarkingError, match="finite"):
        encode_marking(float("nan"), "resistor", "rkm")


# -- describe and SI formatting ---------------------------------------------------------


def test_describe_examples() -> None:
    assert decode_marking("brown black black silver", "inductor").describe() == (
        "10 µH ±10 % (colour bands)"
    )
    assert decode_marking("105Z", "capacitor").describe() == "1 µF +80/−20 % (numeric code)"
    assert decode_marking("68X", "resistor").describe() == "49.9 Ω (E96 code)"
    assert decode_marking("2N2", "inductor").describe() == "2.2 nH (RKM code)"


def test_marking_is_frozen() -> None:
    m = decode_marking("4K7", "resistor")
    assert isinstance(m, Marking)
    with pytest.raises(AttributeError):
        m.value = 1.0  # type: ignore[misc]


@pytest.mark.parametrize(
    ("value", "unit", "text"),
    [
        (4700.0, "Ω", "4.7 kΩ"),
        (4.7e-6, "H", "4.7 µH"),
        (100e-9, "F", "100 nF"),
        (49.9, "Ω", "49.9 Ω"),
        (0.47, "Ω", "470 mΩ"),
        (999.96, "Ω", "1 kΩ"),
        (0.0, "Ω", "0 Ω"),
        (47.3e3, "Ω", "47.3 kΩ"),
        (1.0e-12, "F", "1 pF"),
    ],
)
def test_format_si(value: float, unit: str, text: str) -> None:
    assert format_si(value, unit) == text


# -- E series helpers (project rules; outside checks are in tests/reference) -------------


def test_series_values_over_decades() -> None:
    assert series_values("E3", 0.5, 50) == [1.0, 2.2, 4.7, 10.0, 22.0, 47.0]
    assert series_values("24", 9.0, 11.0) == [9.1, 10.0, 11.0]


def test_nearest_is_by_ratio() -> None:
    # sqrt(1.0 × 1.2) = 1.0954: 1.096 is nearer 1.2 by ratio although 1.1 < midpoint 1.1
    assert nearest_preferred(1.096, "E12") == 1.2
    assert nearest_preferred(1.094, "E12") == 1.0
    assert preferred_neighbours(9.5e3, "E12") == (8.2e3, 10e3)
    assert preferred_neighbours(4.7e-6, "E6") == (4.7e-6, 4.7e-6)


def test_membership_tolerates_float_noise() -> None:
    assert is_preferred(4.7e-6 * (1 + 1e-9), "E12")
    assert not is_preferred(4.8e-6, "E12")
    assert is_preferred(4.75e-6, "E12", rel_tol=0.02)
    assert not is_preferred(4.7e-6 * 1.00001, "E12")
    assert series_containing(0.0047) == "E3"
    assert series_containing(49.9) == "E96"
    assert series_containing(4.8) is None


def test_bad_series_arguments() -> None:
    with pytest.raises(MarkingError, match="not an E series"):
        series_values("E7", 1, 10)
    with pytest.raises(MarkingError, match="positive"):
        is_preferred(-1.0, "E24")
    with pytest.raises(MarkingError, match="empty"):
        series_values("E6", 10, 1)


# -- the Python examples in docs/marking-codes.md run ------------------------------------

DOC = Path(__file__).resolve().parents[2] / "docs" / "marking-codes.md"


def test_doc_python_examples_run() -> None:
    blocks = re.findall(r"```pycon\n(.*?)```", DOC.read_text(encoding="utf-8"), re.S)
    assert len(blocks) >= 2
    parser = doctest.DocTestParser()
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS)
    for i, block in enumerate(blocks):
        test = parser.get_doctest(block, {}, f"marking-codes.md block {i}", str(DOC), 0)
        assert test.examples
        result = runner.run(test)
        assert result.failed == 0, f"block {i} of docs/marking-codes.md failed"


def test_doc_error_line_matches_the_code() -> None:
    text = DOC.read_text(encoding="utf-8")
    with pytest.raises(MarkingError) as info:
        decode_marking("brown black", "resistor")
    assert f"kitbin: error: {info.value}" in text

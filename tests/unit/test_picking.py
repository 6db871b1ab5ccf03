"""Pick lists and bring-up sheets: arithmetic of quantities and the four renderers.

Shortfall arithmetic is plain counting (total = per board x boards; free = on hand
minus reserved). The CSV neutralisation rule (cells starting with = + - @ tab CR)
follows the OWASP "CSV Injection" guidance (from memory); HTML escaping is checked
against the standard library's :func:`html.escape` and parsed back with
:mod:`html.parser`. Colour bands are IEC 60062 (REFERENCES section 8.1 test vector:
yellow-violet-red-gold = 4.70 kOhm +-5 %).
"""

from __future__ import annotations

import csv
import io
from html.parser import HTMLParser

import pytest

from kitbin.picking import (
    SAFETY_CAUTIONS,
    BringUpSheet,
    CornerExpectation,
    PickLine,
    PickSheet,
    csv_safe,
    describe_part,
    recognise,
    render,
    render_csv,
    render_html,
    render_markdown,
    render_text,
)


def _sheet(boards: int = 3) -> PickSheet:
    lines = (
        PickLine(
            "inductor",
            "L-07",
            "10.0 µH inductor",
            1,
            boards,
            on_hand=5,
            reserved=1,
            kit="Drum kit",
            location="drawer 2",
            recognise="marked 100; 8x8 drum",
        ),
        PickLine(
            "divider_top",
            "R-31",
            "52.3 kΩ resistor",
            1,
            boards,
            on_hand=2,
            kit="Resistor kit",
            location="A3",
            recognise="bands green-red-orange-red-brown",
        ),
        PickLine(
            "catch_diode", None, "diode", 1, boards, verdict="none", note="nothing in stock fits"
        ),
    )
    bu = BringUpSheet(
        vout_nominal=4.984,
        vout_low=4.852,
        vout_high=5.119,
        corners=(
            CornerExpectation(12.0, 0.4167, 0.5833, 2.292, 0.2917),
            CornerExpectation(9.0, 0.5556, 0.4444, 2.222, 0.2222),
        ),
        sense_resistance=0.1,
        temp_rise=18.5,
        sat_margin=1.31,
    )
    return PickSheet("bench-5v", "buck", boards, lines, bu, summary="12 V → 5 V, 2 A")


def test_quantities_and_shortfall() -> None:
    # 3 boards x 1 per board = 3; L-07 has 5 on hand, 1 reserved -> 4 free, no shortfall.
    # R-31 has 2 free -> short by 1. The diode has no bin -> short by 3.
    s = _sheet(3)
    ind, top, diode = s.lines
    assert (ind.qty_total, ind.available, ind.shortfall) == (3, 4, 0)
    assert (top.available, top.shortfall) == (2, 1)
    assert (diode.available, diode.shortfall) == (0, 3)
    assert not s.complete and len(s.shortfalls) == 2


def test_own_reservation_counts_as_free() -> None:
    # A reserved list holding 3 of L-07's 3 reserved still sees all 3 as its own.
    ln = PickLine("inductor", "L-07", "x", 1, 3, on_hand=3, reserved=3, held_by_this=3)
    assert ln.available == 3 and ln.shortfall == 0


def test_bring_up_ripple_in_millivolts_and_ccm_boundary() -> None:
    # 0.5833 A p-p across 0.1 ohm = 58.33 mV p-p (Ohm's law); CCM needs the largest
    # boundary over the corners, 0.2917 A (REFERENCES 1.5, B1: Io,B = dI/2).
    bu = _sheet().bring_up
    assert bu is not None
    assert bu.ripple_mv(bu.corners[0]) == pytest.approx(58.33)
    assert bu.ccm_min_load == pytest.approx(0.2917)


def test_text_render_has_every_part() -> None:
    text = render_text(_sheet())
    assert "Pick list: bench-5v × 3 boards" in text
    assert "SHORTFALL" in text and "catch_diode: nothing fits" in text
    assert "58.3 mV p-p" in text
    assert "41.7 %" in text  # duty 0.4167
    assert "Safety" in text and "licensed practice" in text
    for caution in SAFETY_CAUTIONS:
        assert caution in text


def test_csv_round_trip_and_formula_neutralised() -> None:
    s = _sheet()
    evil = PickLine(
        "extra:boot",
        '=HYPERLINK("x")',
        "@SUM(A1)",
        1,
        1,
        on_hand=1,
        note="-2+3",
        location="\tA1",
        kit="+kit",
    )
    s2 = PickSheet(s.plan, s.topology, 1, (evil,), s.bring_up)
    rows = list(csv.reader(io.StringIO(render_csv(s2))))
    assert rows[0][:3] == ["section", "role", "bin"]
    pick = rows[1]
    assert pick[2] == '\'=HYPERLINK("x")' and pick[3] == "'@SUM(A1)"
    assert pick[8] == "+kit".replace("+", "'+") and pick[9] == "'\tA1"
    assert pick[12] == "'-2+3"
    for row in rows:
        for cell in row:
            assert not cell.startswith(("=", "+", "-", "@", "\t", "\r"))
    assert any(r[0] == "safety" for r in rows)
    assert csv_safe("4.7 kΩ") == "4.7 kΩ"


def test_markdown_escapes_pipes() -> None:
    s = _sheet()
    ln = PickLine("x", "A|B", "p", 1, 1, on_hand=1)
    md = render_markdown(PickSheet("p|q", "buck", 1, (ln,), s.bring_up))
    assert "A\\|B" in md and "## Bring-up sheet" in md and "## Safety" in md


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.text: list[str] = []
        self.tags: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)

    def handle_data(self, data):
        self.text.append(data)


def test_html_is_escaped_and_self_contained() -> None:
    s = _sheet()
    ln = PickLine("inductor", "<script>alert(1)</script>", "a & b", 1, 1, on_hand=1)
    doc = render_html(PickSheet("plan <x>", "buck", 1, (ln,), s.bring_up))
    assert "<script>" not in doc and "&lt;script&gt;" in doc
    p = _Collect()
    p.feed(doc)
    assert "script" not in p.tags and "link" not in p.tags and "img" not in p.tags
    joined = "".join(p.text)
    assert "<script>alert(1)</script>" in joined  # shown as text, literally
    assert "a & b" in joined and "Bring-up sheet" in joined


def test_render_dispatch() -> None:
    s = _sheet()
    for fmt in ("text", "csv", "md", "html"):
        assert render(s, fmt)
    with pytest.raises(ValueError):
        render(s, "pdf")


def test_recognise_resistor_colour_bands() -> None:
    # IEC 60062 (REFERENCES 8.1): 4.70 kOhm +-5 % = yellow-violet-red-gold.
    text = recognise("resistor", 4.7e3, 0.05, None, "0.25 W axial")
    assert "yellow-violet-red-gold" in text and "0.25 W axial" in text
    assert recognise("inductor", 10e-6, 0.2, "100", "CD54") == "marked 100; CD54"
    assert describe_part("inductor", 10e-6) == "10.0 µH inductor"
    assert describe_part("diode", None) == "diode"


def test_missing_bring_up_values_say_unknown() -> None:
    bu = BringUpSheet(None, None, None)
    s = PickSheet("p", "buck", 1, (), bu)
    text = render_text(s)
    assert "unknown (no thermal reading)" in text and "set by the controller" in text


from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=200, deadline=None)
@given(cells=st.lists(st.text(max_size=12), min_size=3, max_size=3))
def test_csv_never_emits_a_formula_and_html_never_emits_a_tag(cells: list[str]) -> None:
    # Any text in a pick line: no CSV cell may start like a formula (OWASP "CSV
    # Injection", from memory), and the HTML text must round-trip through escaping
    # (standard library html.escape) without creating an element.
    role, label, note = cells
    ln = PickLine(role or "r", label or None, "part", 1, 1, on_hand=1, note=note)
    sheet = PickSheet("p", "buck", 1, (ln,), None)
    for row in csv.reader(io.StringIO(render_csv(sheet))):
        for cell in row:
            assert not cell.startswith(("=", "+", "-", "@", "\t", "\r"))
    p = _Collect()
    p.feed(render_html(sheet))
    assert set(p.tags) <= {"html", "head", "meta", "title", "style", "body", "h1", "p",
                           "table", "thead", "tbody", "tr", "th", "td", "em"}  # fmt: skip


def test_json_render_carries_every_line_and_the_bring_up_numbers() -> None:
    import json

    data = json.loads(render(_sheet(3), "json"))
    assert [ln["bin"] for ln in data["lines"]] == ["L-07", "R-31", None]
    assert [ln["shortfall"] for ln in data["lines"]] == [0, 1, 3]
    assert data["complete"] is False and data["state"] == "draft"
    corner = data["bring_up"]["corners"][0]
    # 0.5833 A p-p across 0.1 ohm = 58.33 mV p-p (Ohm's law)
    assert corner["ripple_mVpp_across_sense"] == pytest.approx(58.33)
    assert data["bring_up"]["vout_band_V"] == [4.852, 5.119]
    assert any("local" in c for c in data["cautions"])

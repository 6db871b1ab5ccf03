"""The shelf's row shaping, filter and sort, as plain functions (no app)."""

from __future__ import annotations

import pytest

from kitbin.tui.widgets.shelf.rows import (
    FreeTerm,
    KindTerm,
    TextTerm,
    ValueTerm,
    apply_filter,
    parse_filter,
    shape_row,
    sort_order,
    view,
)


def _ev(quantity: str, dimension: str, grade: str, typical: float, conservative: float) -> dict:
    return {
        "quantity": quantity,
        "dimension": dimension,
        "grade": grade,
        "typical": typical,
        "conservative": conservative,
        "text": f"{quantity}: {grade}",
    }


def _row(label: str, kind: str, nominal=None, dim=None, evidence=(), qty=10, reserved=0, **kw):
    return shape_row(
        {
            "label": label,
            "kind": kind,
            "kit": kw.get("kit"),
            "nominal": nominal,
            "nominal_dimension": dim,
            "marking": kw.get("marking"),
            "package": kw.get("package"),
            "location": kw.get("location", "drawer 1"),
            "notes": None,
            "qty": qty,
            "qty_reserved": reserved,
            "evidence": list(evidence),
        }
    )


@pytest.fixture
def rows():
    return [
        _row(
            "L-07",
            "inductor",
            10e-6,
            "inductance",
            [
                _ev("inductance", "inductance", "measured", 9.6e-6, 9.5e-6),
                _ev("dcr", "resistance", "measured", 0.031, 0.033),
                _ev("isat_20", "current", "measured", 2.4, 2.2),
            ],
            kit="Drum kit",
        ),
        _row(
            "L-08",
            "inductor",
            22e-6,
            "inductance",
            [
                _ev("inductance", "inductance", "marked", 22e-6, 17.6e-6),
                _ev("isat_20", "current", "measured", 1.3, 1.2),
            ],
            qty=3,
        ),
        _row(
            "R-4K7",
            "resistor",
            4700.0,
            "resistance",
            [_ev("resistance", "resistance", "measured", 4690.0, 4680.0)],
            package="0805",
        ),
        _row(
            "C-106",
            "capacitor",
            10e-6,
            "capacitance",
            [
                _ev("capacitance", "capacitance", "measured", 7.7e-6, 7.5e-6),
                _ev("rated_voltage", "voltage", "marked", 16.0, 16.0),
            ],
            qty=30,
            reserved=5,
        ),
        _row("D-02", "diode", None, None, [_ev("vrrm", "voltage", "marked", 40.0, 40.0)]),
    ]


def _labels(rows, text):
    return [rows[i].label for i in apply_filter(rows, parse_filter(text))]


def test_cells_show_typical_value_and_worst_case_ratings(rows):
    l07 = rows[0]
    assert l07.nominal.text == "10.0µH"
    assert l07.slots[0].text == "9.60µH" and l07.slots[0].mark == "✓"
    # ratings show the conservative end: highest DCR, lowest Isat
    assert l07.slots[1].text == "33.0mΩ"
    assert l07.slots[2].number == pytest.approx(2.2)
    assert rows[3].free == 25
    assert rows[1].slots[0].mark == "≈"


def test_filter_terms_are_read():
    f = parse_filter("kind:ind 10u >=2A >=5 drum")
    kinds = [type(t) for t in f.terms]
    assert kinds == [KindTerm, ValueTerm, ValueTerm, FreeTerm, TextTerm]
    assert f.problems == ()
    assert parse_filter(">=2").terms == (FreeTerm(">=", 2),)


def test_filter_narrows_by_kind_value_rating_and_text(rows):
    assert _labels(rows, "") == ["L-07", "L-08", "R-4K7", "C-106", "D-02"]
    assert _labels(rows, "inductor") == ["L-07", "L-08"]
    # 10u: a value of 10 µ-something within 5 %: the 10 µH inductor (9.6 µH measured,
    # 10 µH nominal) and the 10 µF capacitor by its nominal
    assert _labels(rows, "10u") == ["L-07", "C-106"]
    assert _labels(rows, ">=2A") == ["L-07"]
    assert _labels(rows, "<50mohm") == ["L-07"]
    assert _labels(rows, "4k7") == ["R-4K7"]
    assert _labels(rows, ">16V") == ["D-02"]
    assert _labels(rows, ">=10") == ["L-07", "R-4K7", "C-106", "D-02"]
    assert _labels(rows, "0805") == ["R-4K7"]
    assert _labels(rows, "kit:drum") == ["L-07"]
    assert _labels(rows, "ind >=2A 10uH") == ["L-07"]


def test_filter_reports_what_it_cannot_read(rows):
    f = parse_filter(">=2parsecs kind:zz")
    assert len(f.problems) == 2
    assert "not a value" in f.problems[0]


def test_sort_by_rating_with_empty_values_last(rows):
    order = sort_order(rows, "isat_i")
    assert [rows[i].label for i in order][:2] == ["L-08", "L-07"]
    down = sort_order(rows, "free", descending=True)
    assert rows[down[0]].label == "C-106"
    kept = apply_filter(rows, parse_filter("inductor"))
    assert [rows[i].label for i in view(order, kept)] == ["L-08", "L-07"]

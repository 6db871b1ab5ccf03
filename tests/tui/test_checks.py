"""The recording forms' as-you-type checks (plain functions)."""

from __future__ import annotations

import pytest

from kitbin.errors import QuantityError
from kitbin.tui.app import error_line
from kitbin.tui.widgets.record.capture_form import read_form
from kitbin.tui.widgets.record.check import (
    check_conditions,
    check_delta,
    check_quantity,
    check_specimen,
    check_value,
    reading_items,
)


def test_quantity_names_and_aliases():
    assert check_quantity("L").value == "inductance"
    assert check_quantity("isat").value == "isat_20"
    assert check_quantity("").ok is None
    assert check_quantity("flux").ok is False
    assert check_quantity("rise_load").ok is False  # derived, never recorded


def test_value_checked_against_the_quantity_dimension():
    ok = check_value("inductance", "9.6uH")
    assert ok.ok and ok.value == "inductance=9.6uH" and "9.60 µH" in ok.message
    assert check_value("dcr", "31mohm").ok
    bound = check_value("isat_20", ">=3A")
    assert bound.ok and bound.value == "isat_20>=3A" and bound.message.startswith("≥")
    wrong = check_value("inductance", "10uF")
    assert wrong.ok is False and "capacitance" in wrong.message
    assert check_value(None, "3A").ok is False
    assert check_value("inductance", "").ok is None


def test_reading_items_all_or_nothing():
    items, problems = reading_items([("L", "9.6uH"), ("dcr", "31mohm"), ("", "")])
    assert items == ["inductance=9.6uH", "dcr=31mohm"] and problems == []
    items, problems = reading_items([("L", "9.6uH"), ("dcr", "2A")])
    assert problems and problems[0].startswith("row 2")
    assert reading_items([("", ""), ("dcr", "")])[1] == [
        "nothing to record: give a quantity and a value"
    ]
    assert reading_items([("", "3A")])[1] == ["row 1: name the quantity"]


def test_specimen_conditions_and_delta():
    assert check_specimen("3").ok and check_specimen("0").ok is False
    c = check_conditions("freq=100kHz temp=25degC")
    assert c.ok and "100 kHz" in c.message
    assert check_conditions("freq=3A").ok is False
    assert check_delta("+10").value == "10" and check_delta("-3").ok
    assert check_delta("0").ok is False and check_delta("x").ok is False


def test_capture_form_reads_parameters():
    form, problems = read_form(
        "ramp", {"file": "a.csv", "sense": "0.1ohm", "vl": "9V", "r_loop": "0.25ohm"}
    )
    assert problems == [] and form.ramp.sense_ohm == pytest.approx(0.1)
    assert form.ramp.r_loop_ohm == pytest.approx(0.25)
    _, problems = read_form("ramp", {"file": "a.csv", "sense": "9V"})
    assert any("sense" in p for p in problems)
    form, problems = read_form("heat", {"file": "h.tsv", "current": "1.5A"})
    assert form.heat.current_A == pytest.approx(1.5) and form.heat.rise_K == 40.0
    assert read_form("heat", {"file": ""})[1]


def test_error_line_is_one_line_without_traceback():
    assert error_line(QuantityError("bad value", "try 4.7uH")) == "bad value (try 4.7uH)"
    line = error_line(RuntimeError("boom\nsecond line"))
    assert line == "unexpected RuntimeError: boom"


def test_plain_keeps_brackets_through_textual_markup():
    from textual.content import Content

    from kitbin.tui.markup import plain

    text = "role 1/6 ([ and ] switch roles) [b]label[/b]"
    assert Content.from_markup(plain(text)).plain == text


def test_capture_results_named_with_units():
    from kitbin.tui.widgets.bin.text import results_lines

    lines = results_lines(
        "ramp", {"isat_A": {"10": 1.05, "20": None}, "i_max_A": 1.73, "l0_H": 9.59e-6}
    )
    assert lines[0] == "Isat10% 1.05 A, Isat20% not reached (≥ 1.73 A)"
    assert "L0 (low bias): 9.59 µH" in lines


def test_new_bin_arguments():
    from kitbin.tui.screens.newbin import bin_arguments

    args, problems = bin_arguments({"label": "L-21", "kind": "inductor", "marking": "100"})
    assert problems == [] and args == {
        "label": "L-21",
        "kind": "inductor",
        "qty": 0,
        "marking": "100",
    }
    args, problems = bin_arguments({"label": "", "kind": "inductor", "qty": "-3"})
    assert args is None and len(problems) == 2


def test_help_lists_every_binding_of_every_screen():
    from textual.binding import Binding

    from kitbin.tui.screens.help import _screens, bindings_of, key_rows

    screens = _screens()
    rows = key_rows(screens, lambda b: b.key_display or b.key)
    listed = {(screen, what) for screen, _keys, what in rows}
    for name, cls in screens:
        for b in bindings_of(cls):
            assert isinstance(b, Binding)
            assert (name, b.description or b.action) in listed

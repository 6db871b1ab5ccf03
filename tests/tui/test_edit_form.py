"""The bin edit form as plain data: filled from a bin, checked as typed, only changes sent."""

from __future__ import annotations

import pytest

from kitbin.services import inventory
from kitbin.store import open_store
from kitbin.tui.widgets.bin.edit import edit_arguments, form_values, tolerance_input
from kitbin.tui.widgets.record.check import (
    check_marking,
    check_nominal,
    check_properties,
    check_tolerance,
)


def test_nominal_checked_in_the_unit_of_the_kind():
    assert check_nominal("inductor", "22uH").message == "= 22.0 µH"
    assert check_nominal("resistor", "4k7").ok and check_nominal("resistor", "4k7").value == "4k7"
    wrong = check_nominal("inductor", "10uF")
    assert wrong.ok is False and "capacitance" in wrong.message
    assert check_nominal("diode", "1").ok is False  # a diode bin keeps ratings as properties
    assert check_nominal("capacitor", ">=1uF").ok is False
    assert check_nominal("inductor", " ").ok is None


def test_tolerance_marking_and_properties_checks():
    assert check_tolerance("20%").message == "±20 %"
    assert check_tolerance("-20%/+80%").message == "-20/+80 %"
    assert check_tolerance("lots").ok is False
    # 4k7: the RKM code of IEC 60062 (4.7 kΩ)
    assert (
        check_marking("resistor", "4k7").ok and "4.7 kΩ" in check_marking("resistor", "4k7").message
    )
    assert check_marking("resistor", "zz").ok is False
    assert check_marking("diode", "A7").ok  # kept as printed, no value in it
    props = check_properties("vrrm=40V if_avg=1A")
    assert props.ok and "vrrm 40.0 V" in props.message and "if_avg 1.00 A" in props.message
    wrong = check_properties("vrrm=40A")
    assert wrong.ok is False and "voltage" in wrong.message


def test_form_values_read_back_as_the_same_bin(demo_db: str) -> None:
    with open_store(demo_db) as store:
        page = inventory.show_bin(store, "L-05")
        diode = inventory.show_bin(store, "D-02")
    values = form_values(page)
    assert values["location"] == page["location"] and values["kit"] == page["kit"]
    assert check_nominal("inductor", values["nominal"]).ok
    assert tolerance_input(0.2, 0.2) == "20%" and tolerance_input(0.2, 0.8) == "-20%/+80%"
    assert tolerance_input(None, None) == ""
    # a diode's ratings come back as NAME=VALUE items that check
    assert diode["properties"] and check_properties(form_values(diode)["props"]).ok
    # nothing typed: nothing to write
    args, problems = edit_arguments("inductor", values, values)
    assert args == {} and problems == ["no field changed"]


BEFORE = {
    "location": "drawer 1",
    "marking": "100",
    "nominal": "10.0µH",
    "tolerance": "20%",
    "package": "",
    "kit": "bag",
    "notes": "",
    "props": "isat_20=1.00A dcr=50.0mΩ",
}


@pytest.mark.parametrize(
    ("changes", "wanted"),
    [
        ({"location": " drawer 9 "}, {"location": "drawer 9"}),
        ({"location": "", "kit": ""}, {"location": "", "kit": ""}),  # cleared; loose bin
        ({"nominal": "22uH", "tolerance": "10%"}, {"nominal": "22uH", "tolerance": "10%"}),
        ({"props": "isat_20=1.2A dcr=50.0mΩ"}, {"props": ["isat_20=1.2A"]}),
        ({"props": "dcr=50.0mΩ vrrm=20V"}, {"props": ["vrrm=20V"], "drop_props": ["isat_20"]}),
    ],
)
def test_only_changed_fields_are_sent(changes: dict, wanted: dict) -> None:
    args, problems = edit_arguments("inductor", BEFORE, {**BEFORE, **changes})
    assert problems == [] and args == wanted


@pytest.mark.parametrize(
    ("changes", "says"),
    [
        ({"nominal": "10uF"}, "capacitance"),
        ({"nominal": ""}, "not cleared"),
        ({"tolerance": "lots"}, "not a tolerance"),
        ({"props": "isat_20=1V"}, "current"),
        ({"marking": "zz"}, "no digits"),
    ],
)
def test_a_bad_field_stops_the_write(changes: dict, says: str) -> None:
    _args, problems = edit_arguments("inductor", BEFORE, {**BEFORE, "location": "x", **changes})
    assert len(problems) == 1 and says in problems[0]

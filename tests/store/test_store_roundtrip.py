"""Rows go in and come back unchanged; constraints hold on every backend."""

from __future__ import annotations

import datetime as dt
import hashlib
import math
import zlib

import pytest

from kitbin.errors import StoreError
from kitbin.store import queries
from kitbin.store.models import Bin, BinProperty, Capture, Kit, PickLine, PickList, Plan, Reading


def test_inventory_rows_round_trip(store) -> None:
    raw = b"t,i\n0,0\n1e-6,0.5\n"
    with store.transaction() as s:
        kit = Kit(name="Drum kit", source="stall", bought_on=dt.date(2026, 3, 14))
        b = Bin(
            label="L-07",
            kind="inductor",
            kit=kit,
            nominal=4.7e-6,
            tol_minus=0.2,
            tol_plus=0.3,
            marking="4R7",
            package="6x8 drum",
            location="A1",
            qty=5,
            qty_reserved=0,
        )
        b.properties.append(BinProperty(name="isat_20", value=1.8, source="listing"))
        s.add(b)
        s.flush()
        cap = Capture(
            bin_id=b.id,
            kind="ramp",
            file_name="ramp.csv",
            sha256=hashlib.sha256(raw).hexdigest(),
            content=zlib.compress(raw),
            params={"sense_ohm": 0.1},
            results={"isat_20": 2.1},
            curve={"i": [0.0, 0.5], "l": [4.7e-6, 4.6e-6]},
        )
        s.add(cap)
        s.flush()
        s.add(
            Reading(
                bin_id=b.id,
                specimen=2,
                quantity="isat_20",
                value=3.0,
                bound=">=",
                conditions={"temp": 23.0, "freq": 1e5},
                method="ramp",
                capture_id=cap.id,
            )
        )
    with store.transaction() as s:
        b = queries.bin_by_label(s, "L-07")
        assert b is not None and b.kit.name == "Drum kit"
        assert b.kit.bought_on == dt.date(2026, 3, 14)
        assert (b.nominal, b.tol_minus, b.tol_plus) == (4.7e-6, 0.2, 0.3)
        assert [(p.name, p.value, p.source) for p in b.properties] == [("isat_20", 1.8, "listing")]
        (r,) = b.readings
        assert (r.specimen, r.quantity, r.value, r.bound) == (2, "isat_20", 3.0, ">=")
        assert r.conditions == {"temp": 23.0, "freq": 1e5}
        assert r.taken_at.tzinfo is not None
        (c,) = b.captures
        assert zlib.decompress(c.content) == raw
        assert c.curve == {"i": [0.0, 0.5], "l": [4.7e-6, 4.6e-6]}
        assert r.capture_id == c.id


def test_float_values_keep_full_precision(store) -> None:
    values = [1e-7, 4.7e-6, 0.1 + 0.2, 1e6, math.pi * 1e-12]
    with store.transaction() as s:
        b = Bin(label="C-1", kind="capacitor", qty=0, qty_reserved=0)
        s.add(b)
        s.flush()
        for v in values:
            s.add(Reading(bin_id=b.id, quantity="capacitance", value=v))
    with store.transaction() as s:
        got = [r.value for r in queries.bin_by_label(s, "C-1").readings]
    assert got == values


def test_plans_and_pick_lists_round_trip(store) -> None:
    with store.transaction() as s:
        b = Bin(label="L-1", kind="inductor", qty=3, qty_reserved=0)
        plan = Plan(name="5V buck", topology="buck", spec={"vin": [11.0, 15.0], "vout": 5.0})
        pick = PickList(plan=plan, boards=2, state="draft", snapshot={"roles": ["inductor"]})
        pick.lines.append(PickLine(role="inductor", bin=b, qty_per_board=1, qty_total=2))
        s.add_all([b, plan, pick])
    with store.transaction() as s:
        (pick,) = s.query(PickList).all()
        assert pick.plan.spec == {"vin": [11.0, 15.0], "vout": 5.0}
        assert [(line.role, line.bin.label, line.qty_total) for line in pick.lines] == [
            ("inductor", "L-1", 2)
        ]


@pytest.mark.parametrize(
    "bad",
    [
        {"qty": -1, "qty_reserved": 0},
        {"qty": 2, "qty_reserved": 3},
        {"qty": 2, "qty_reserved": -1},
        {"qty": 1, "qty_reserved": 0, "kind": "transformer"},
    ],
    ids=["negative-qty", "reserved-above-qty", "negative-reserved", "unknown-kind"],
)
def test_check_constraints_refuse_bad_bins(store, bad) -> None:
    fields = {"label": "X-1", "kind": "resistor", **bad}
    with pytest.raises(StoreError), store.transaction() as s:
        s.add(Bin(**fields))
    with store.transaction() as s:
        assert queries.counts(s)["bin"] == 0


def test_duplicate_label_is_a_store_error_and_rolls_back(store) -> None:
    with store.transaction() as s:
        s.add(Bin(label="R-1", kind="resistor", qty=1, qty_reserved=0))
    with pytest.raises(StoreError), store.transaction() as s:
        s.add(Kit(name="would be rolled back"))
        s.flush()
        s.add(Bin(label="R-1", kind="resistor", qty=1, qty_reserved=0))
    with store.transaction() as s:
        assert queries.counts(s)["kit"] == 0


def test_reading_bound_must_be_equal_or_at_least(store) -> None:
    with store.transaction() as s:
        b = Bin(label="L-2", kind="inductor", qty=0, qty_reserved=0)
        s.add(b)
    with pytest.raises(StoreError), store.transaction() as s:
        s.add(Reading(bin_id=b.id, quantity="inductance", value=1e-6, bound="<"))


def test_deleting_a_bin_deletes_its_readings_and_properties(store) -> None:
    with store.transaction() as s:
        b = Bin(label="L-3", kind="inductor", qty=0, qty_reserved=0)
        b.properties.append(BinProperty(name="dcr", value=0.1, source="user"))
        b.readings.append(Reading(quantity="dcr", value=0.1))
        s.add(b)
    with store.transaction() as s:
        s.delete(queries.bin_by_label(s, "L-3"))
    with store.transaction() as s:
        assert queries.counts(s)["reading"] == 0

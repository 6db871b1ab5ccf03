"""The matcher's set-based reads return what plain queries return, on both backends.

``kitbin.store.matchreads`` packs several columns into one integer in SQL and
splits them again in numpy; the reference here is the same rows read the plain
way through SQLAlchemy Core, one column each.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from sqlalchemy import insert, select

from kitbin.store import matchreads
from kitbin.store.models import Bin, BinProperty, Reading

QUANTITIES = ["inductance", "dcr", "isat_20", "resistance"]
NAMES = ["rated_voltage", "vrrm", "ilim"]
SOURCES = {"listing": 1, "measured": 0, "estimate": 2, "bag label": 1}


@pytest.fixture
def filled(store):
    rng = np.random.default_rng(7)
    bins, readings, props = [], [], []
    for i in range(1, 61):
        kind = ("inductor", "resistor", "capacitor", "diode")[i % 4]
        bins.append(
            {"id": i * 7, "label": f"B-{i:03d}", "kind": kind, "qty": int(rng.integers(0, 9)),
             "qty_reserved": 0, "nominal": None if i % 5 == 0 else float(i) * 1e-6,
             "tol_minus": None if i % 3 == 0 else 0.1, "tol_plus": 0.2}
        )  # fmt: skip
        for spec in range(int(rng.integers(0, 4))):
            readings.append(
                {"bin_id": i * 7, "quantity": QUANTITIES[int(rng.integers(0, 4))],
                 "value": float(rng.uniform(0.1, 10.0)), "bound": "=" if spec % 2 else ">=",
                 "specimen": None if spec == 3 else spec % 2, "conditions": {}}
            )  # fmt: skip
        for j, name in enumerate(NAMES):
            if (i + j) % 2:
                props.append(
                    {"bin_id": i * 7, "name": name, "value": float(i + j),
                     "source": list(SOURCES)[i % len(SOURCES)]}
                )  # fmt: skip
    with store.transaction() as s:
        s.execute(insert(Bin.__table__), bins)
        s.execute(insert(Reading.__table__), readings)
        s.execute(insert(BinProperty.__table__), props)
    with store.transaction() as s:
        s.execute(Bin.__table__.update().where(Bin.id == 14).values(qty=8, qty_reserved=3))
    return store


def test_candidate_bins(filled) -> None:
    kinds = ["resistor", "inductor"]
    with filled.transaction() as s:
        got = matchreads.candidate_bins(s, kinds)
        plain = s.execute(
            select(Bin.id, Bin.kind, Bin.nominal, Bin.tol_minus, Bin.tol_plus, Bin.qty,
                   Bin.qty_reserved, Bin.label).where(Bin.kind.in_(kinds)).order_by(Bin.id)
        ).all()  # fmt: skip
    assert got["id"].tolist() == [r.id for r in plain]
    assert [kinds[k] for k in got["kind"]] == [r.kind for r in plain]
    for name in ("nominal", "tol_minus", "tol_plus"):
        want = [math.nan if getattr(r, name) is None else getattr(r, name) for r in plain]
        np.testing.assert_array_equal(got[name], want)  # SQL NULL is nan
    assert got["available"].tolist() == [r.qty - r.qty_reserved for r in plain]
    assert got["label"].tolist() == [r.label for r in plain]
    assert 5 in got["available"].tolist()  # bin 14: 8 on hand, 3 reserved


def test_reading_rows(filled) -> None:
    with filled.transaction() as s:
        got = matchreads.reading_rows(s, QUANTITIES[:3])
        plain = s.execute(
            select(Reading.bin_id, Reading.quantity, Reading.value, Reading.bound).where(
                Reading.quantity.in_(QUANTITIES[:3])
            )
        ).all()
    want = sorted((r.bin_id, QUANTITIES.index(r.quantity), r.value, r.bound == ">=") for r in plain)
    have = sorted(zip(got["bin_id"].tolist(), got["quantity"].tolist(), got["value"].tolist(),
                      got["lower_bound"].tolist(), strict=True))  # fmt: skip
    assert have == want and len(have) > 20


def _plain_props(s) -> list[tuple[int, int, float, int]]:
    rows = s.execute(
        select(BinProperty.bin_id, BinProperty.name, BinProperty.value, BinProperty.source)
        .where(BinProperty.name.in_(NAMES))
        .order_by(BinProperty.id)
    ).all()
    return [(r.bin_id, NAMES.index(r.name), r.value, SOURCES[r.source]) for r in rows]


def _as_tuples(got: np.ndarray) -> list[tuple[int, int, float, int]]:
    return list(zip(got["bin_id"].tolist(), got["name"].tolist(), got["value"].tolist(),
                    got["source"].tolist(), strict=True))  # fmt: skip


def test_property_rows_carry_the_source_code(filled) -> None:
    with filled.transaction() as s:
        got = matchreads.property_rows(s, NAMES, SOURCES.__getitem__)
        assert _as_tuples(got) == _plain_props(s) and got.size > 40


def test_a_source_text_the_first_read_missed_is_still_coded(filled, monkeypatch) -> None:
    # Another bench adds a property with a new source text between the two statements
    # (possible on PostgreSQL at READ COMMITTED): the DISTINCT read is made to miss
    # "estimate", and the rows carrying it must still get its code.
    with filled.transaction() as s:
        real = s.execute

        def execute(stmt, *args, **kw):
            result = real(stmt, *args, **kw)
            if "DISTINCT" in str(stmt):
                return [row for row in result.all() if row[0] != "estimate"]
            return result

        monkeypatch.setattr(s, "execute", execute)
        got = matchreads.property_rows(s, NAMES, SOURCES.__getitem__)
        monkeypatch.undo()
        assert _as_tuples(got) == _plain_props(s)
        assert SOURCES["estimate"] in got["source"].tolist()


def test_specimen_counts(filled) -> None:
    with filled.transaction() as s:
        got = matchreads.specimen_counts(s, QUANTITIES)
        rows = s.execute(select(Reading.bin_id, Reading.quantity, Reading.specimen)).all()
        some = matchreads.specimen_counts(s, QUANTITIES, [7, 14, 21])
        # more ids than one IN list takes (10,000): the same answer
        many = matchreads.specimen_counts(s, QUANTITIES, range(0, 70_000, 7))
    want: dict[tuple[int, str], set] = {}
    for r in rows:
        want.setdefault((r.bin_id, r.quantity), set())
        if r.specimen is not None:  # a reading without a specimen number counts none
            want[(r.bin_id, r.quantity)].add(r.specimen)
    assert {(b, q): n for b, q, n in got} == {k: len(v) for k, v in want.items()}
    assert {(b, q) for b, q, _ in some} == {k for k in want if k[0] in (7, 14, 21)}
    assert sorted(many) == sorted(got)


def test_a_roles_tables_are_the_rows_of_the_whole_stocks(filled) -> None:
    # Stock.subset builds a role's evidence tables over its own bins only; each row
    # must be the row of the same bin in the tables built over every bin.
    from kitbin.services.matching import load_stock

    kinds = ["inductor", "resistor", "capacitor", "diode"]
    with filled.transaction() as s:
        stock = load_stock(s, kinds, [*QUANTITIES, *NAMES])
    whole = stock.tables
    fields = ("grade", "low", "high", "closed_low", "closed_high", "max_low", "mean", "n")
    for group in (["inductor"], ["resistor", "diode"], ["capacitor"]):
        rows, cands = stock.subset(group, [*QUANTITIES, *NAMES])
        assert rows.size and list(cands.labels) == list(stock.labels[rows])
        for q, table in cands.tables.items():
            for name in fields:
                np.testing.assert_array_equal(getattr(table, name), getattr(whole[q], name)[rows])


def test_bin_details_of_few_and_of_many_ids(filled) -> None:
    with filled.transaction() as s:
        few = matchreads.bin_details(s, [7, 14, 999])
        # more ids than one IN list takes (the shelf asks for every bin)
        many = matchreads.bin_details(s, range(0, 70_000, 7))
        every = s.execute(select(Bin.id, Bin.label)).all()
    assert sorted(few) == [7, 14] and few[14]["label"] == "B-002"
    assert {i: d["label"] for i, d in many.items()} == {r.id: r.label for r in every}

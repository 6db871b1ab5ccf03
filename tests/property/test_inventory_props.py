"""Round trips: any finite SI value survives the store and a CSV export and import."""

from __future__ import annotations

import math
import tempfile
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from kitbin.services import importexport, inventory
from kitbin.store import open_store

SI = st.floats(min_value=1e-15, max_value=1e9, allow_nan=False, allow_infinity=False)


@settings(max_examples=25, deadline=None)
@given(values=st.lists(SI, min_size=1, max_size=8), qty=st.integers(0, 10_000))
def test_readings_survive_store_and_csv_exactly(values: list[float], qty: int) -> None:
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        first = open_store(str(root / "a.sqlite"))
        inventory.add_bin(first, "L-01", "inductor", nominal="10uH", qty=qty)
        items = [f"inductance={v!r}H" for v in values]
        inventory.record_readings(first, "L-01", items, specimen=1)
        importexport.export_csv(first, str(root / "bins.csv"), what="bins")
        importexport.export_csv(first, str(root / "readings.csv"), what="readings")
        shown = inventory.show_bin(first, "L-01")
        first.close()
        assert [r["value"] for r in shown["readings"]] == [float(repr(v)) for v in values]

        second = open_store(str(root / "b.sqlite"))
        importexport.import_csv(second, str(root / "bins.csv"))
        importexport.import_csv(second, str(root / "readings.csv"))
        again = inventory.show_bin(second, "L-01")
        second.close()
        assert [r["value"] for r in again["readings"]] == [r["value"] for r in shown["readings"]]
        assert again["qty"] == qty and math.isclose(again["nominal"], 10e-6, rel_tol=1e-15)

"""The UI's read services against the inventory service they are built from."""

from __future__ import annotations

import math

import pytest

from kitbin.errors import KitbinError, NotFoundError
from kitbin.services import inventory, ui_support
from kitbin.store import open_store, queries


def test_shelf_rows_agree_with_show_bin(demo_db: str) -> None:
    with open_store(demo_db) as store:
        rows, evidence = ui_support.shelf_rows(store)
        with store.transaction() as session:
            assert len(rows) == queries.counts(session)["bin"]
        assert [r["label"] for r in rows] == sorted(r["label"] for r in rows)
        for label in ("L-05", "C-106", "D-02"):
            row = next(r for r in rows if r["label"] == label)
            page = inventory.show_bin(store, label)
            assert (row["qty"], row["qty_reserved"]) == (page["qty"], page["qty_reserved"])
            for e in row["evidence"]:
                # the set-based loader and the per-bin evidence must say the same
                scalar = page["evidence"][e["quantity"]]
                assert e["grade"] == scalar["grade"]
                if scalar["conservative"] is not None:
                    assert math.isclose(e["conservative"], scalar["conservative"], rel_tol=1e-9)

            # the peek line: grade and interval as the bin view says them (the set-based
            # tables keep no specimen counts or property sources)
            def head(text: str) -> str:
                return text.split(" (")[0].split(" from ")[0]

            texts = [head(t) for t in evidence.lines(row["row"])]
            wanted = [head(page["evidence"][e["quantity"]]["text"]) for e in row["evidence"]]
            assert texts == wanted


def test_bin_page_decodes_the_marking_and_carries_curves(demo_db: str) -> None:
    with open_store(demo_db) as store:
        page = ui_support.bin_page(store, "L-05")
    assert page["marking_decoded"].startswith("10 µH")
    ramp = [c for c in page["captures"] if c["kind"] == "ramp"]
    assert ramp and ramp[0]["id"] in page["curves"]


def test_heat_trace_refits_the_saved_log(demo_db: str) -> None:
    with open_store(demo_db) as store:
        page = inventory.show_bin(store, "L-05")
        heat = next(c for c in page["captures"] if c["kind"] == "heat")
        trace = ui_support.heat_trace(store, heat["id"])
        with pytest.raises(NotFoundError):
            ui_support.heat_trace(store, 999_999)
    # fitted again with the parameters it was saved with: the same steady rise
    assert trace["rise_ss_K"] == pytest.approx(heat["results"]["rise_ss_K"], rel=1e-6)
    assert len(trace["t_s"]) == len(trace["temp_C"]) == len(trace["fit_C"]) > 10


def test_write_sheet_refuses_an_unknown_format(tmp_path) -> None:
    from kitbin.services import picking

    with pytest.raises(KitbinError, match="expected one of"):
        picking.write_sheet(None, "pdf", str(tmp_path / "x"))


def test_plan_page_runs_the_matcher_once(demo_db: str, monkeypatch: pytest.MonkeyPatch) -> None:
    # the plan view's ranked rows and its pick list come from one matcher run, and
    # the pick list is the one `kitbin pick` builds on its own
    from kitbin.picking import sheet_dict
    from kitbin.services import matching, picking

    runs: list[str] = []
    real = matching.match_plan

    def counted(*args, **kwargs):
        runs.append(args[1])
        return real(*args, **kwargs)

    with open_store(demo_db) as store:
        plan = picking.DEMO_PLAN
        picking.demo_build_plan(store)
        alone, _, _ = picking.build_sheet(store, plan)
        monkeypatch.setattr(matching, "match_plan", counted)
        monkeypatch.setattr(picking, "match_plan", counted)
        page = ui_support.plan_page(store, plan)
    assert runs == [plan]
    assert sheet_dict(page["sheet"]) == sheet_dict(alone)

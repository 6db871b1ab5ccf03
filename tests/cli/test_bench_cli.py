"""End-to-end: ``kitbin ramp``, ``kitbin heat``, ``kitbin ring`` on the demo captures.

Numbers are checked against the physical models the invented demo captures were
generated from (``seed_data/make_captures.py``, recorded in the manifest); the
methods themselves are checked against outside sources in tests/reference.
"""

from __future__ import annotations

import json
import sqlite3
import zlib
from importlib import resources
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from kitbin.cli.app import app
from kitbin.measure.synthetic import heating_curve
from kitbin.services import bench, inventory
from kitbin.store import open_store

TABLES = ("bin", "reading", "capture", "stock_move")
CAPTURES = resources.files("kitbin.demo.captures")


def _demo(name: str) -> Path:
    return Path(str(CAPTURES.joinpath(name)))


def _manifest(file: str) -> dict:
    return next(e for e in bench.demo_manifest()["captures"] if e["file"] == file)


def kb(db: Path, *args: str):
    return CliRunner().invoke(app, ["--db", str(db), *args])


def snapshot(db: Path) -> dict:
    if not db.exists():
        return {}
    con = sqlite3.connect(db)
    try:
        return {t: sorted(con.execute(f"SELECT * FROM {t}").fetchall(), key=repr) for t in TABLES}
    finally:
        con.close()


def errors(result) -> list[str]:
    return [ln for ln in result.stderr.splitlines() if ln.startswith("kitbin: error:")]


@pytest.fixture
def db(tmp_path: Path) -> Path:
    path = tmp_path / "bench.sqlite"
    with open_store(str(path)) as store:
        for label, nominal in (("L-05", "10uH"), ("L-11", "10uH"), ("L-14", "47uH")):
            inventory.add_bin(store, label, "inductor", nominal=nominal, tolerance="20%", qty=5)
        inventory.record_readings(store, "L-05", ["dcr=85mohm"], at=["temp=23degC"])
    return path


RAMP_05 = ["--bin", "L-05", "--sense", "0.1ohm", "--vl", "9V", "--r-loop", "0.25ohm"]
RAMP_11 = ["--bin", "L-11", "--sense", "0R1", "--col", "CH1", "--vl-col", "CH2"]
RAMP_11 += ["--r-loop", "32mohm", "--dt", "2ns"]


def test_ramp_json_keys_and_values_without_touching_a_database(tmp_path: Path) -> None:
    db = tmp_path / "never.sqlite"
    result = kb(db, "ramp", str(_demo("L-05_switching_ramps.csv")), *RAMP_05, "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    for key in ("l0_H", "isat_A", "i_max_A", "saturated", "ramps", "noise_A", "curve", "sha256"):
        assert key in data
    assert set(data["isat_A"]) == {"10", "20", "30"}
    model = _manifest("L-05_switching_ramps.csv")["model"]
    assert data["l0_H"] == pytest.approx(model["l0_H"], rel=0.03)
    for percent, value in model["isat_A"].items():
        assert data["isat_A"][percent] == pytest.approx(value, rel=0.05)
    assert data["saturated"] is True and data["ramps"] == 8
    assert data["capture_id"] is None and data["readings"] == []
    assert "caution" in result.stderr
    assert not db.exists()


def test_ramp_save_stores_capture_curve_and_readings(db: Path) -> None:
    path = _demo("L-05_switching_ramps.csv")
    result = kb(db, "ramp", str(path), *RAMP_05, "--save", "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    con = sqlite3.connect(db)
    kind, sha, blob, curve = con.execute(
        "SELECT kind, sha256, content, curve FROM capture WHERE id = ?", (data["capture_id"],)
    ).fetchone()
    assert kind == "ramp" and sha == data["sha256"]
    assert zlib.decompress(blob) == path.read_bytes()
    assert len(json.loads(curve)["L_H"]) == len(data["curve"]["L_H"])
    rows = con.execute(
        "SELECT quantity, value, bound, method FROM reading WHERE capture_id = ? ORDER BY id",
        (data["capture_id"],),
    ).fetchall()
    con.close()
    assert [r[0] for r in rows] == ["inductance", "isat_10", "isat_20", "isat_30"]
    assert rows[0][1] == pytest.approx(data["l0_H"])
    assert all(r[2] == "=" and r[3] == "ramp" for r in rows)
    # the same capture twice is refused and nothing changes
    before = snapshot(db)
    again = kb(db, "ramp", str(path), *RAMP_05, "--save")
    assert again.exit_code != 0 and len(errors(again)) == 1
    assert "already stored" in errors(again)[0]
    assert snapshot(db) == before


def test_ramp_not_reached_is_saved_as_a_lower_bound(db: Path) -> None:
    result = kb(db, "ramp", str(_demo("L-11_pulse_two_channels.txt")), *RAMP_11, "--save", "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["isat_A"] == {"10": None, "20": None, "30": None}
    assert data["saturated"] is False and data["vl_column"] == "CH2 [V]"
    con = sqlite3.connect(db)
    rows = con.execute(
        "SELECT quantity, value, bound FROM reading WHERE capture_id = ? AND quantity LIKE 'isat%'",
        (data["capture_id"],),
    ).fetchall()
    con.close()
    assert {(q, b) for q, _, b in rows} == {("isat_10", ">="), ("isat_20", ">="), ("isat_30", ">=")}
    assert all(v == pytest.approx(data["i_max_A"]) for _, v, _ in rows)


def test_ramp_text_output_says_not_reached(tmp_path: Path) -> None:
    result = kb(tmp_path / "x.sqlite", "ramp", str(_demo("L-11_pulse_two_channels.txt")), *RAMP_11)
    assert result.exit_code == 0, result.stderr
    assert "Isat 20 %  not reached up to" in result.stdout


def test_ramp_plot_writes_a_png(tmp_path: Path, monkeypatch) -> None:
    monkeypatch.setenv("MPLCONFIGDIR", str(tmp_path / "mpl"))
    png = tmp_path / "l05.png"
    result = kb(
        tmp_path / "x.sqlite",
        "ramp",
        str(_demo("L-14_pulse_soft.dat")),
        "--bin",
        "L-14",
        "--sense",
        "0.1ohm",
        "--vl",
        "12V",
        "--r-loop",
        "0.4ohm",
        "--plot",
        str(png),
    )
    assert result.exit_code == 0, result.stderr
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def _flat(path: Path) -> None:
    path.write_text("t,v\n" + "\n".join(f"{k * 1e-8:.3e},0.05" for k in range(2000)))


def _falling(path: Path) -> None:
    path.write_text(
        "t,v\n" + "\n".join(f"{k * 1e-8:.3e},{0.3 - k * 1e-4:.5f}" for k in range(2000))
    )


def _backwards(path: Path) -> None:
    rows = [f"{k * 1e-8:.3e},{k * 1e-4:.5f}" for k in range(200)]
    rows[100] = f"{50e-8:.3e},0.01"
    path.write_text("t,v\n" + "\n".join(rows))


BAD = {
    "empty": (lambda p: p.write_bytes(b""), "the file is empty"),
    "text only": (lambda p: p.write_text("hello\nthis is not a capture\n"), "no numeric data"),
    "flat line": (_flat, "no rising current segment"),
    "no rising segment": (_falling, "no rising current segment"),
    "time backwards": (_backwards, "time does not increase at sample 101"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_captures_give_one_line_and_write_nothing(db: Path, tmp_path: Path, case: str) -> None:
    make, message = BAD[case]
    path = tmp_path / f"{case.replace(' ', '_')}.csv"
    make(path)
    before = snapshot(db)
    result = kb(db, "ramp", str(path), "--bin", "L-05", "--sense", "0.1ohm", "--vl", "9V", "--save")
    assert result.exit_code == 7
    assert len(errors(result)) == 1 and message in errors(result)[0], result.stderr
    assert "Traceback" not in result.stderr + result.stdout
    assert snapshot(db) == before


def test_bad_capture_with_save_does_not_create_a_database(tmp_path: Path) -> None:
    path = tmp_path / "empty.csv"
    path.write_bytes(b"")
    db = tmp_path / "new.sqlite"
    result = kb(db, "ramp", str(path), "--bin", "L-05", "--sense", "0.1ohm", "--vl", "9V", "--save")
    assert result.exit_code == 7 and not db.exists()


def test_unknown_bin_missing_column_and_bad_units(db: Path) -> None:
    before = snapshot(db)
    path = str(_demo("L-05_switching_ramps.csv"))
    r1 = kb(db, "ramp", path, *RAMP_05[2:], "--bin", "L-99", "--save")
    assert r1.exit_code == 4 and "no bin labelled 'L-99'" in errors(r1)[0]
    r2 = kb(db, "ramp", path, *RAMP_05, "--col", "CH3")
    assert r2.exit_code == 7
    assert errors(r2) == [
        "kitbin: error: L-05_switching_ramps.csv: there is no column 'CH3' "
        "(columns found: 1 'Time (s)', 2 'CH1 Sense (V)')"
    ]
    r3 = kb(db, "ramp", path, "--bin", "L-05", "--sense", "10uF", "--vl", "9V")
    assert r3.exit_code == 3 and errors(r3)[0].startswith("kitbin: error: --sense:")
    r4 = kb(db, "ramp", path, "--bin", "L-05", "--sense", "0.1ohm")
    assert r4.exit_code == 7 and "inductor voltage is not given" in errors(r4)[0]
    r5 = kb(db, "ramp", "/no/such/file.csv", *RAMP_05)
    assert r5.exit_code == 7 and "no such file" in errors(r5)[0]
    assert snapshot(db) == before


HEAT_KEYS = {
    "t_amb_C",
    "rise_ss_K",
    "tau_s",
    "r_th_K_per_W",
    "i_for_rise_A",
    "seconds_to_limit",
    "flags",
}


def test_heat_uses_the_bins_dcr_and_saves_readings(db: Path) -> None:
    path = _demo("L-05_heat_1A5.tsv")
    model = _manifest("L-05_heat_1A5.tsv")["model"]
    result = kb(
        db,
        "heat",
        str(path),
        "--bin",
        "L-05",
        "--current",
        "1.5A",
        "--t0",
        "60s",
        "--save",
        "--json",
    )
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert set(data) >= HEAT_KEYS
    assert data["rise_ss_K"] == pytest.approx(model["rise_ss_K"], rel=0.02)
    assert data["tau_s"] == pytest.approx(model["tau_s"], rel=0.03)
    assert data["t_amb_C"] == pytest.approx(model["t_amb_C"], abs=0.2)
    assert data["dcr_source"].startswith("bin reading")
    # R_th = ΔT/(I²·R(T_hot)), R from 85 mΩ at 23 °C with α20 = 0.00393 /K (IEC 60028)
    r_hot = 0.085 * (1 + 0.00393 * (data["t_hot_C"] - 20)) / (1 + 0.00393 * 3)
    assert data["r_th_K_per_W"] == pytest.approx(data["rise_ss_K"] / (1.5**2 * r_hot), rel=1e-9)
    # 43 K at 1.5 A overshoots the 40 K rating: a time to the limit, a lower rating current
    assert data["seconds_to_limit"] == pytest.approx(
        data["tau_s"] * np.log(data["rise_ss_K"] / (data["rise_ss_K"] - 40)), rel=1e-9
    )
    assert data["i_for_rise_A"] < 1.5
    assert data["loss_split"] is None
    con = sqlite3.connect(db)
    quantities = {r[0] for r in con.execute("SELECT quantity FROM reading WHERE method = 'heat'")}
    con.close()
    assert quantities == {"rise", "tau_th", "r_th", "i_rise"}


def test_heat_second_log_at_another_current_splits_the_losses(db: Path, tmp_path: Path) -> None:
    kb(
        db,
        "heat",
        str(_demo("L-05_heat_1A5.tsv")),
        "--bin",
        "L-05",
        "--current",
        "1.5A",
        "--t0",
        "60s",
        "--save",
    )
    t = np.arange(0.0, 1800.0, 5.0)
    y = heating_curve(t, t_amb=22.0, rise_ss=43.0 * (1.0 / 1.5) ** 2, tau=200.0)
    log = tmp_path / "l05_1A.csv"
    log.write_text(
        "time (s),T (°C)\n" + "\n".join(f"{a},{b:.3f}" for a, b in zip(t, y, strict=True)),
        encoding="utf-8",
    )
    result = kb(db, "heat", str(log), "--bin", "L-05", "--current", "1A", "--json")
    assert result.exit_code == 0, result.stderr
    split = json.loads(result.stdout)["loss_split"]
    assert split["logs"] == 2
    assert split["a_K_per_A2"] == pytest.approx(43.0 / 2.25, rel=0.03)
    assert split["b_K"] == pytest.approx(0.0, abs=1.0)


def test_heat_short_log_is_flagged_and_r_th_unknown_without_dcr(db: Path) -> None:
    result = kb(
        db,
        "heat",
        str(_demo("L-11_heat_2A5_short.tsv")),
        "--bin",
        "L-11",
        "--current",
        "2.5A",
        "--t0",
        "1min",
        "--json",
    )
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert "extrapolated" in data["flags"]
    assert data["r_th_K_per_W"] is None and data["seconds_to_limit"] is None
    assert data["length_tau"] < 3


def test_heat_bad_log_writes_nothing(db: Path, tmp_path: Path) -> None:
    log = tmp_path / "flat.csv"
    log.write_text("t,T\n" + "\n".join(f"{k},22.0" for k in range(100)))
    before = snapshot(db)
    result = kb(db, "heat", str(log), "--bin", "L-05", "--current", "1A", "--save")
    assert result.exit_code == 7 and "no temperature rise" in errors(result)[0]
    assert snapshot(db) == before


def test_ring_line_fit_and_save(db: Path) -> None:
    # REFERENCES §4 M2: 1 nF -> 157.59 kHz, 10 nF -> 50.279 kHz: 1000 µH, Cp 19.96 pF
    result = kb(
        db,
        "ring",
        "--bin",
        "L-14",
        "--cap",
        "1nF",
        "--freq",
        "157.59kHz",
        "--cap",
        "10nF",
        "--freq",
        "50.279kHz",
        "--save",
        "--json",
    )
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["l_H"] == pytest.approx(1e-3, rel=5e-4)
    assert data["cp_F"] == pytest.approx(19.96e-12, abs=0.01e-12)
    assert len(data["readings"]) == 1
    # M1 with a fixture capacitance, text output
    one = kb(db, "ring", "--bin", "L-14", "--cap", "100nF", "--freq", "50kHz")
    assert one.exit_code == 0 and "L = 101 µH" in one.stdout
    bad = kb(db, "ring", "--bin", "L-14", "--cap", "1nF", "--freq", "1kHz", "--freq", "2kHz")
    assert bad.exit_code == 7 and "one --freq for each --cap" in errors(bad)[0]


def test_load_demo_captures_saves_every_manifest_entry(db: Path) -> None:
    with open_store(str(db)) as store:
        out = bench.load_demo_captures(store)
    assert len(out) == len(bench.demo_manifest()["captures"])
    con = sqlite3.connect(db)
    n_captures = con.execute("SELECT count(*) FROM capture").fetchone()[0]
    bounds = dict(
        con.execute(
            "SELECT b.label, r.bound FROM reading r JOIN bin b ON b.id = r.bin_id "
            "WHERE r.quantity = 'isat_20'"
        ).fetchall()
    )
    con.close()
    assert n_captures == len(out)
    assert bounds == {"L-05": "=", "L-11": ">=", "L-14": "="}


def test_heat_on_a_bin_not_in_the_inventory(db: Path) -> None:
    path = str(_demo("L-05_heat_1A5.tsv"))
    ok = kb(db, "heat", path, "--bin", "L-77", "--current", "1.5A", "--json")
    assert ok.exit_code == 0, ok.stderr
    assert "no bin labelled 'L-77'" in json.loads(ok.stdout)["notes"][0]
    before = snapshot(db)
    refused = kb(db, "heat", path, "--bin", "L-77", "--current", "1.5A", "--save")
    assert refused.exit_code == 4 and "no bin labelled 'L-77'" in errors(refused)[0]
    assert snapshot(db) == before

"""``kitbin stage``: the calculator end to end (REFERENCES 1.1/1.3 closed forms)."""

from __future__ import annotations

import json
import math

import pytest
from typer.testing import CliRunner

from kitbin.cli.app import app

BASE = ["stage", "buck", "--vin", "11..15V", "--vout", "5.1V", "--iout", "2.4A", "--fsw", "500kHz"]


def run(*args: str):
    return CliRunner().invoke(app, list(args))


def test_json_corners_and_demands() -> None:
    # ideal parts: CCM duty is Vout/Vin for a buck (REFERENCES 1.1; Erickson & Maksimović ch. 2)
    r = run(*BASE, "--l", "10uH", "--cout", "22uF", "--esr", "5mohm", "--vf", "0",
            "--iout-min", "0.1A", "--json")  # fmt: skip
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert data["inductance_source"] == "given" and data["inductance_H"] == pytest.approx(10e-6)
    low, high, light_hi, _light_lo = data["corners"]
    assert low["vin_V"] == 11 and high["vin_V"] == 15
    assert low["mode"] == "CCM" and math.isclose(low["duty"], 5.1 / 11, rel_tol=1e-9)
    assert math.isclose(high["duty"], 5.1 / 15, rel_tol=1e-9)
    ripple = (15 - 5.1) * (5.1 / 15) / (500e3 * 10e-6)
    assert math.isclose(high["ripple_App"], ripple, rel_tol=1e-9)
    assert math.isclose(high["i_peak_A"], 2.4 + ripple / 2, rel_tol=1e-9)
    assert math.isclose(high["ccm_min_load_A"], ripple / 2, rel_tol=1e-9)
    assert light_hi["mode"] == "DCM" and light_hi["iout_A"] == 0.1
    assert high["vout_ripple_Vpp"] < high["vout_ripple_bound_Vpp"]
    for key in ("i_valley_A", "i_rms_A", "i_cin_rms_A", "diode_iavg_A", "vout_ripple_Vpp"):
        assert isinstance(high[key], float)
    assert set(data["demands"]) >= {"inductor", "output_capacitor", "catch_diode", "controller"}
    isat = data["demands"]["inductor"]["constraints"][1]
    assert isat["quantity"] == "isat_20" and isat["op"] == ">=" and isat["reason"]


def test_without_l_uses_l_min_and_says_so() -> None:
    # REFERENCES 2: L = Vo(Vin,max − Vo)/(Vin,max·fs·r·IL)
    r = run(*BASE, "--vf", "0", "--json")
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    lm = 5.1 * (15 - 5.1) / (15 * 500e3 * 0.3 * 2.4)
    assert data["inductance_source"] == "l_min"
    assert math.isclose(data["inductance_H"], lm, rel_tol=1e-9)
    assert "L_min" in r.stderr and "ripple target" in r.stderr


def test_table_and_caution() -> None:
    r = run("stage", "boost", "--vin", "5V", "--vout", "12V", "--iout", "0.5A", "--fsw", "1MHz",
            "--l", "4.7uH", "--cout", "10uF", "--sync", "30mohm")  # fmt: skip
    assert r.exit_code == 0, r.output
    assert "full load" in r.stdout and "Demands" in r.stdout and "catch_diode" not in r.stdout
    assert "local codes" in r.stderr


def test_flags_from_controller_limits() -> None:
    r = run(*BASE, "--l", "10uH", "--ton-min", "800ns", "--ilim", "2.5A", "--json")
    flags = [f for c in json.loads(r.stdout)["corners"] for f in c["flags"]]
    assert any("minimum" in f for f in flags) and any("current limit" in f for f in flags)


@pytest.mark.parametrize(
    ("args", "words"),
    [
        (["stage", "buck", "--vin", "4..6V", "--vout", "5.1V", "--iout", "1A", "--fsw", "500kHz"],
         "buck cannot make"),
        (["stage", "boost", "--vin", "11..15V", "--vout", "12V", "--iout", "1A", "--fsw", "1MHz"],
         "boost cannot make"),
        ([*BASE[:-1], "0Hz"], "switching frequency"),
        (["stage", "buck", "--vin", "15..11V", "--vout", "5.1V", "--iout", "1A", "--fsw", "1MHz"],
         "written backwards"),
        ([*BASE, "--iout-min", "3A"], "above full load"),
        ([*BASE, "--l", "10uF"], "--l"),
        (["stage", "flyback", *BASE[2:]], "topology"),
        ([*BASE, "--isat-drop", "25%"], "Isat criterion"),
    ],
)  # fmt: skip
def test_bad_input_gives_one_error_line(args: list[str], words: str) -> None:
    r = run(*args)
    assert r.exit_code != 0
    lines = [ln for ln in r.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("kitbin: error:") and words in lines[0], lines
    assert "Traceback" not in r.output


def test_stage_and_plans_take_the_same_spec_options() -> None:
    # one declaration (kitbin.cli.specopts): a spec option of `plan new` is one of
    # `stage` too, with the same help, and only the converter's basics are required
    import typer.main

    root = typer.main.get_command(app)
    stage = root.commands["stage"]  # type: ignore[attr-defined]
    new = root.commands["plan"].commands["new"]  # type: ignore[attr-defined]

    def spec_options(cmd) -> dict[str, object]:
        return {p.opts[0]: p for p in cmd.params if p.opts and p.opts[0].startswith("--")}

    from kitbin.cli.specopts import SPEC_HELP

    on_stage, on_new = spec_options(stage), spec_options(new)
    for option in SPEC_HELP:
        assert option in on_new and on_new[option].help == SPEC_HELP[option]
        if option != "--topology":  # the stage's topology is its argument
            assert on_stage[option].help == SPEC_HELP[option]
    required = {o for o, p in on_stage.items() if p.required}
    assert required == {"--vin", "--vout", "--iout", "--fsw"}
    assert not any(p.required for p in on_new.values())


def test_stage_takes_a_set_current_limit_target() -> None:
    # a controller with a resistor-set limit: Rset = ilim_gain / Ilim, the set relation
    # regulator data sheets give (from memory); the window Ilim to 1.1 Ilim is common
    # practice, no source. With 100 kV and 2 A: 100k/2.2 = 45.5k to 100k/2 = 50k
    r = run(*BASE, "--ilim-gain", "100kV", "--ilim-target", "2A", "--json")
    assert r.exit_code == 0, r.output
    (low, high) = json.loads(r.stdout)["demands"]["set_resistor"]["constraints"]
    assert low["limit"] == pytest.approx(100e3 / 2.2) and high["limit"] == pytest.approx(50e3)

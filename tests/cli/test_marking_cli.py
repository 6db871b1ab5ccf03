"""kitbin marking: decode a marking without a database."""

import json

from typer.testing import CliRunner

from kitbin.cli.app import app


def test_colour_bands_decode_with_other_markings_and_nearest_values(tmp_path) -> None:
    # IEC 60062:2016 colour code (REFERENCES 8.1 test vector): yellow-violet-red-gold
    # = 4.70 kΩ ±5 %; the same value is 472J numerically and 4K7J in RKM (IEC 60062
    # clauses 4 and 5); nearest E96 value 4.75 kΩ (IEC 60063 E96 table).
    result = CliRunner().invoke(
        app, ["marking", "yellow violet red gold", "--kind", "resistor", "--json"]
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["value"] == 4700.0 and data["tol_minus"] == data["tol_plus"] == 0.05
    assert data["also_marked"]["numeric"] == "472J" and data["also_marked"]["rkm"] == "4K7J"
    assert data["nearest_preferred"]["E96"] == 4750.0


def test_bad_marking_is_one_line_and_touches_no_database(tmp_path) -> None:
    db = tmp_path / "inv.sqlite"
    result = CliRunner().invoke(
        app, ["--db", str(db), "marking", "brown black", "--kind", "resistor"]
    )
    assert result.exit_code == 3
    assert result.output.strip() == (
        "kitbin: error: 'brown black' is not a colour code: expected 3 to 6 bands"
    )
    assert not db.exists()

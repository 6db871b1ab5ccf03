"""Usage errors (unknown command, missing option, wrong type) are one line and exit 2."""

import pytest
from typer.testing import CliRunner

from kitbin.cli.app import app


@pytest.mark.parametrize(
    ("argv", "fragment"),
    [
        (["stock", "L-07", "x", "--why", "t"], "Invalid value for 'delta'"),
        (["bogus"], "No such command 'bogus'"),
        (["stage", "buck", "--vin", "12V"], "Missing option"),
        (["bin", "list", "--no-such-option"], "No such option"),
    ],
)
def test_usage_error_is_one_line_naming_the_help(argv: list[str], fragment: str, tmp_path):
    result = CliRunner().invoke(app, ["--db", str(tmp_path / "inv.sqlite"), *argv])
    assert result.exit_code == 2
    lines = result.output.strip().splitlines()
    assert len(lines) == 1, result.output
    assert lines[0].startswith("kitbin: error: ") and fragment in lines[0]
    assert "--help`)" in lines[0]
    assert not (tmp_path / "inv.sqlite").exists()  # nothing was created


def test_bare_group_prints_its_help() -> None:
    result = CliRunner().invoke(app, ["bin"])
    assert "Usage: kitbin bin" in result.output

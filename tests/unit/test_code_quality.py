"""The layer contracts (import-linter) and the linter (ruff) hold for the whole tree."""

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _tool(name: str) -> str:
    found = shutil.which(name, path=str(Path(sys.executable).parent)) or shutil.which(name)
    if found is None:
        pytest.fail(f"{name} is not installed; install the test extras: pip install -e '.[test]'")
    return found


def test_layer_contracts_hold() -> None:
    # Contracts in pyproject.toml: stage/measure/match/units/markings never import the
    # store, services, front ends or their toolkits; layers point downward.
    result = subprocess.run(
        [_tool("lint-imports"), "--no-cache"], cwd=ROOT, capture_output=True, text=True
    )
    assert result.returncode == 0, result.stdout + result.stderr


def test_ruff_is_clean() -> None:
    result = subprocess.run(
        [_tool("ruff"), "check", "src", "tests", "benchmarks", "seed_data"],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert result.returncode == 0, result.stdout + result.stderr


def test_ruff_format_is_clean() -> None:
    result = subprocess.run(
        [_tool("ruff"), "format", "--check", "src", "tests", "benchmarks", "seed_data"],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert result.returncode == 0, result.stdout + result.stderr

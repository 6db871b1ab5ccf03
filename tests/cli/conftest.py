"""Fixtures shared by the match and pick command tests."""

from __future__ import annotations

from pathlib import Path

import pytest
from match_helpers import build, copy_of


@pytest.fixture(scope="session")
def match_template(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The inventory and plan of tests/cli/match_helpers.py, built once."""
    path = tmp_path_factory.mktemp("match") / "inv.sqlite"
    build(path)
    return path


@pytest.fixture
def match_db(match_template: Path, tmp_path: Path) -> Path:
    """A private copy of :func:`match_template` for one test."""
    return copy_of(match_template, tmp_path / "inv.sqlite")

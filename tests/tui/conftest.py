"""Fixtures for the terminal-UI tests: the invented demo workshop, built once, copied per test."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest


@pytest.fixture(scope="session")
def demo_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo workshop's SQLite file, built once by the demo builder."""
    from kitbin.services import demo

    path = tmp_path_factory.mktemp("demo") / "demo.sqlite"
    demo.build_demo(str(path))
    return path


@pytest.fixture
def demo_db(demo_file: Path, tmp_path: Path) -> str:
    """A private copy of the demo database for one test (its path)."""
    target = tmp_path / "shop.sqlite"
    shutil.copy(demo_file, target)
    for suffix in ("-wal", "-shm"):
        side = demo_file.with_name(demo_file.name + suffix)
        if side.exists():
            shutil.copy(side, target.with_name(target.name + suffix))
    return str(target)

"""Fixtures for every test: no test may touch the user's own data or caches."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from hypothesis import settings

# Property tests are deterministic and have no per-example deadline (a busy 2-core CI
# machine must not turn a slow example into a failure). KITBIN_HYPOTHESIS_RANDOM=1
# explores with fresh random examples instead.
settings.register_profile("kitbin", derandomize=True, deadline=None, print_blob=True)
settings.register_profile("explore", deadline=None, print_blob=True)
settings.load_profile("explore" if os.environ.get("KITBIN_HYPOTHESIS_RANDOM") == "1" else "kitbin")


@pytest.fixture(autouse=True)
def _private_dirs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Point the user data directory, ``KITBIN_DB`` and matplotlib's cache into tmp_path.

    ``KITBIN_DB`` names a file under tmp_path, so a command run without ``--db`` can
    never open the real inventory; platformdirs is redirected as well, for code
    that asks it directly (the demo's own file, the default inventory).
    """
    data = tmp_path / "user-data"
    monkeypatch.setenv("XDG_DATA_HOME", str(data))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "user-config"))
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "user-cache"))
    monkeypatch.setenv("KITBIN_DB", str(tmp_path / "default-inventory.sqlite"))
    monkeypatch.setenv("MPLCONFIGDIR", str(tmp_path / "mpl"))
    monkeypatch.setenv("MPLBACKEND", "Agg")
    import platformdirs

    monkeypatch.setattr(
        platformdirs,
        "user_data_dir",
        lambda appname=None, *args, **kwargs: str(data / (appname or "")),
    )

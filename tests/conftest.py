"""Fixtures for every test: no test may touch the user's own data or caches."""

from __future__ import annotations

from pathlib import Path

import pytest


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

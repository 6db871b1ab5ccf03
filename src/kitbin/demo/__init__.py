"""The demo workshop: invented data for ``kitbin demo`` (see ``workshop.toml``)."""

from __future__ import annotations

from pathlib import Path

WORKSHOP = Path(__file__).with_name("workshop.toml")


def load_workshop() -> dict:
    """The demo workshop description (parsed TOML)."""
    import tomllib

    with WORKSHOP.open("rb") as f:
        return tomllib.load(f)

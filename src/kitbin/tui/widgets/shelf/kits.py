"""Kit-filter text for a kit name (pure)."""

from __future__ import annotations


def kit_term(name: str) -> str:
    """The filter term selecting a kit: ``kit:`` and the name, spaces as ``_``."""
    return "kit:" + "_".join(name.lower().split())

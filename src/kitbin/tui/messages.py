"""Messages the app's workers post when a piece of work has finished.

Workers run in threads, touch no widget and only post these (``post_message`` is
thread-safe); handlers on the screens change what is shown.
"""

from __future__ import annotations

from typing import Any

from textual.message import Message


class StoreOpened(Message):
    """The database is open (``store`` is a :class:`kitbin.store.Store`)."""

    def __init__(self, store: Any) -> None:
        super().__init__()
        self.store = store


class ShelfLoaded(Message):
    """Every bin was read and shaped (``rows``: list of ShelfRow; ``evidence``: a
    :class:`kitbin.services.ui_support.ShelfEvidence`; ``seconds``: load time)."""

    def __init__(
        self, rows: list[Any], kits: list[dict[str, Any]], evidence: Any, seconds: float
    ) -> None:
        super().__init__()
        self.rows = rows
        self.kits = kits
        self.evidence = evidence
        self.seconds = seconds


class BinLoaded(Message):
    """One bin's page (:func:`kitbin.services.ui_support.bin_page`) was read."""

    def __init__(self, page: dict[str, Any]) -> None:
        super().__init__()
        self.page = page


class ReadingRecorded(Message):
    """Readings were written (``rows``: the service's reading dicts)."""

    def __init__(self, label: str, rows: list[dict[str, Any]]) -> None:
        super().__init__()
        self.label = label
        self.rows = rows


class StockAdjusted(Message):
    """A stock move was written (``result``: the service's dict)."""

    def __init__(self, label: str, result: dict[str, Any]) -> None:
        super().__init__()
        self.label = label
        self.result = result


class InventoryChanged(Message):
    """Something on a bin changed; the shelf and any open bin view reload."""

    def __init__(self, label: str | None = None) -> None:
        super().__init__()
        self.label = label

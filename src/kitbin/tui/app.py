"""The kitbin terminal app: one factory, one store, screens over the services.

``make_app(db_url)`` is what ``kitbin ui`` and the tests call. The app opens the
database in a worker thread (creating or checking its schema can take a moment)
and every screen's database or numeric work runs in its own thread worker, which
opens its own session through ``store.transaction()`` and posts a message when done.
A worker that raises ends as an error notification with the error's one line:
:class:`kitbin.errors.KitbinError` as it is, anything else with its type name
(never a traceback).
"""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import App
from textual.binding import Binding, BindingType
from textual.notifications import SeverityLevel
from textual.worker import Worker, WorkerState

from kitbin.errors import KitbinError
from kitbin.tui.messages import InventoryChanged, StoreOpened


def error_line(error: BaseException) -> str:
    """The one line shown for an error raised by the layers below."""
    if isinstance(error, KitbinError):
        return str(error)
    first = (str(error).strip().splitlines() or [""])[0]
    return f"unexpected {type(error).__name__}: {first}" if first else type(error).__name__


class KitbinApp(App[None]):
    """Shelf, bins, readings, captures and plans of one kitbin database."""

    CSS_PATH = "kitbin.tcss"
    TITLE = "kitbin"
    ENABLE_COMMAND_PALETTE = False
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("question_mark", "help", "keys", key_display="?"),
        Binding("ctrl+q", "quit", "quit", show=False, priority=True),
    ]

    def __init__(self, db_url: str | None = None) -> None:
        super().__init__()
        self.db_url = db_url
        self.store: Any = None

    def notify(
        self,
        message: str,
        *,
        title: str = "",
        severity: SeverityLevel = "information",
        timeout: float | None = None,
        markup: bool = False,
    ) -> None:
        """A notification; kitbin's messages are plain text (no markup) by default."""
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=markup)

    def on_mount(self) -> None:
        from kitbin.tui.screens.shelf import ShelfScreen

        self.shelf = ShelfScreen()
        self.push_screen(self.shelf)
        self.open_database()

    @work(thread=True, exclusive=True, exit_on_error=False, group="store")
    def open_database(self) -> None:
        """Open (or create) the database named by ``db_url``."""
        from kitbin.store import open_store

        self.post_message(StoreOpened(open_store(self.db_url)))

    @on(StoreOpened)
    def _store_opened(self, message: StoreOpened) -> None:
        self.store = message.store
        self.sub_title = _masked(self.store.url)
        self.shelf.reload()

    @on(InventoryChanged)
    def _inventory_changed(self, message: InventoryChanged) -> None:
        self.shelf.reload(keep_label=message.label)
        for screen in self.screen_stack:
            hook = getattr(screen, "inventory_changed", None)
            if hook is not None:
                hook(message.label)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.state == WorkerState.ERROR and event.worker.error is not None:
            line = error_line(event.worker.error)
            self.notify(line, title="kitbin", severity="error")
            if event.worker.group == "store":
                self.shelf.database_failed(line)

    def action_help(self) -> None:
        from kitbin.tui.screens.help import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def on_unmount(self) -> None:
        if self.store is not None:
            self.store.close()


def _masked(url: str) -> str:
    from kitbin.store import mask_url

    return mask_url(url)


def make_app(db_url: str | None = None) -> KitbinApp:
    """The app over the database at ``db_url`` (URL or SQLite path; None: the default)."""
    return KitbinApp(db_url)


__all__ = ["KitbinApp", "error_line", "make_app"]

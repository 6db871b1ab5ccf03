"""Add a kit from the kits dialog: its name, where and when it was bought, notes."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import Footer, Input, Label, Static

from kitbin.tui.markup import plain
from kitbin.tui.messages import InventoryChanged
from kitbin.tui.screens.base import KitbinModal

#: (field, label, hint): the arguments of :func:`kitbin.services.inventory.add_kit`.
KIT_FIELDS: tuple[tuple[str, str, str], ...] = (
    ("name", "name", "e.g. assorted inductors 2026 (required)"),
    ("source", "bought from", "shop or market (optional)"),
    ("bought_on", "bought on", "YYYY-MM-DD (optional)"),
    ("notes", "notes", "anything worth keeping (optional)"),
)


class KitAdded(Message):
    """A kit was stored (``data``: the service's kit dict)."""

    def __init__(self, data: dict[str, Any]) -> None:
        super().__init__()
        self.data = data


class NewKitScreen(KitbinModal):
    """A new kit; bins join it with their kit field."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "save", "add kit", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static("New kit", classes="dialog-title")
            for key, label, hint in KIT_FIELDS:
                with Horizontal(classes="field-row"):
                    yield Label(label)
                    yield Input(placeholder=hint, id=f"newkit-{key}", classes="field-input")
            yield Static("", id="newkit-problems", classes="check-bad")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#newkit-name", Input).focus()

    @on(Input.Changed)
    def _changed(self) -> None:
        self.query_one("#newkit-problems", Static).update("")

    @on(Input.Submitted)
    def _next(self) -> None:
        self.focus_next()

    def action_save(self) -> None:
        values = {k: self.query_one(f"#newkit-{k}", Input).value for k, *_ in KIT_FIELDS}
        if not values["name"].strip():
            text = "nothing written: give the kit a name"
            self.query_one("#newkit-problems", Static).update(plain(text))
            self.notify(text, severity="error")
            return
        self.add(self.app.store, values)

    @work(thread=True, exclusive=True, exit_on_error=False, group="newkit")
    def add(self, store: Any, values: dict[str, str]) -> None:
        """Store the kit (in a thread; nothing written on a taken name or a bad date)."""
        from kitbin.services import inventory

        self.post_message(KitAdded(inventory.add_kit(store, **values)))

    @on(KitAdded)
    def _added(self, message: KitAdded) -> None:
        self.notify(f"added kit {message.data['name']}")
        self.app.post_message(InventoryChanged())
        self.dismiss(message.data["name"])

    def worker_failed(self, worker: Any) -> None:
        from kitbin.tui.app import error_line

        line = "nothing written: " + error_line(worker.error)
        self.query_one("#newkit-problems", Static).update(plain(line))

    def action_cancel(self) -> None:
        self.dismiss(None)

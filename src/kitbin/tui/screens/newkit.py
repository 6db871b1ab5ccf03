"""Add a kit from the kits dialog: its name, where and when it was bought, notes."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.binding import Binding, BindingType
from textual.message import Message
from textual.widgets import Input

from kitbin.tui.messages import InventoryChanged
from kitbin.tui.screens.form import FormModal

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


class NewKitScreen(FormModal):
    """A new kit; bins join it with their kit field."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("ctrl+s", "save", "add kit", priority=True)]
    FIELDS = KIT_FIELDS
    PREFIX = "newkit"

    def form_title(self) -> str:
        return "New kit"

    @on(Input.Changed)
    def _changed(self) -> None:
        self.clear_problems()

    def action_save(self) -> None:
        values = self.values()
        if not values["name"].strip():
            self.refuse("give the kit a name")
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

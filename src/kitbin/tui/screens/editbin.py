"""Edit a bin's description from the bin view: place, marking, value, kit, notes, properties."""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any, ClassVar

from textual import on, work
from textual.binding import Binding, BindingType
from textual.message import Message
from textual.widget import Widget
from textual.widgets import Input, Static

from kitbin.tui.messages import InventoryChanged
from kitbin.tui.screens.form import FormModal
from kitbin.tui.widgets.bin.edit import EDIT_FIELDS, edit_arguments, field_check, form_values
from kitbin.tui.widgets.record.show import show_check


class BinEdited(Message):
    """A bin's description was written (``data``: the service's bin dict)."""

    def __init__(self, data: dict[str, Any]) -> None:
        super().__init__()
        self.data = data


class EditBinScreen(FormModal):
    """A bin's description, filled in; only the fields you change are written."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("ctrl+s", "save", "save", priority=True)]
    FIELDS = EDIT_FIELDS
    PREFIX = "editbin"
    CANCELLED = False

    def __init__(self, page: dict[str, Any]) -> None:
        super().__init__()
        self.label: str = page["label"]
        self.kind: str = page["kind"]
        self.start = form_values(page)
        self.before: dict[str, str] = {}

    def form_title(self) -> str:
        return f"Edit {self.label} ({self.kind}; label and kind: `kitbin bin edit`)"

    def start_value(self, key: str) -> str:
        return self.start[key]

    def after_field(self, key: str) -> Iterable[Widget]:
        if field_check(self.kind, key, "") is not None:
            yield Static("", id=f"editbin-{key}-check", classes="check")

    def on_mount(self) -> None:
        # what the inputs hold at the start is what "unchanged" means
        self.before = self.values()
        for key, text in self.before.items():
            self._show(key, text)
        self.query_one("#editbin-location", Input).focus()

    def _show(self, key: str, text: str) -> None:
        check = field_check(self.kind, key, text)
        if check is not None:
            show_check(self.query_one(f"#editbin-{key}-check", Static), check)

    @on(Input.Changed)
    def _changed(self, event: Input.Changed) -> None:
        self._show((event.input.id or "").removeprefix("editbin-"), event.value)
        self.clear_problems()

    def action_save(self) -> None:
        args, problems = edit_arguments(self.kind, self.before, self.values())
        if problems:
            self.refuse("; ".join(problems))
            return
        self.edit(self.app.store, args)

    @work(thread=True, exclusive=True, exit_on_error=False, group="editbin")
    def edit(self, store: Any, args: dict[str, Any]) -> None:
        """Write the changed fields (in a thread; nothing written on a bad value)."""
        from kitbin.services import inventory

        self.post_message(BinEdited(inventory.edit_bin(store, self.label, **args)))

    @on(BinEdited)
    def _edited(self, message: BinEdited) -> None:
        self.notify(f"saved bin {message.data['label']}")
        self.app.post_message(InventoryChanged(message.data["label"]))
        self.dismiss(True)

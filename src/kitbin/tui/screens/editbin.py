"""Edit a bin's description from the bin view: place, marking, value, kit, notes, properties."""

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
from kitbin.tui.widgets.bin.edit import EDIT_FIELDS, edit_arguments, field_check, form_values
from kitbin.tui.widgets.record.show import show_check


class BinEdited(Message):
    """A bin's description was written (``data``: the service's bin dict)."""

    def __init__(self, data: dict[str, Any]) -> None:
        super().__init__()
        self.data = data


class EditBinScreen(KitbinModal):
    """A bin's description, filled in; only the fields you change are written."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "save", "save", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, page: dict[str, Any]) -> None:
        super().__init__()
        self.label: str = page["label"]
        self.kind: str = page["kind"]
        self.start = form_values(page)
        self.before: dict[str, str] = {}

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(
                plain(f"Edit {self.label} ({self.kind}; label and kind: `kitbin bin edit`)"),
                classes="dialog-title",
            )
            for key, label, hint in EDIT_FIELDS:
                with Horizontal(classes="field-row"):
                    yield Label(label)
                    yield Input(
                        value=self.start[key],
                        placeholder=hint,
                        id=f"editbin-{key}",
                        classes="field-input",
                    )
                if field_check(self.kind, key, "") is not None:
                    yield Static("", id=f"editbin-{key}-check", classes="check")
            yield Static("", id="editbin-problems", classes="check-bad")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        # what the inputs hold at the start is what "unchanged" means
        self.before = self._values()
        for key, text in self.before.items():
            self._show(key, text)
        self.query_one("#editbin-location", Input).focus()

    def _show(self, key: str, text: str) -> None:
        check = field_check(self.kind, key, text)
        if check is not None:
            show_check(self.query_one(f"#editbin-{key}-check", Static), check)

    def _values(self) -> dict[str, str]:
        return {k: self.query_one(f"#editbin-{k}", Input).value for k, *_ in EDIT_FIELDS}

    @on(Input.Changed)
    def _changed(self, event: Input.Changed) -> None:
        self._show((event.input.id or "").removeprefix("editbin-"), event.value)
        self.query_one("#editbin-problems", Static).update("")

    @on(Input.Submitted)
    def _next(self) -> None:
        self.focus_next()

    def action_save(self) -> None:
        args, problems = edit_arguments(self.kind, self.before, self._values())
        if problems:
            text = "nothing written: " + "; ".join(problems)
            self.query_one("#editbin-problems", Static).update(plain(text))
            self.notify(text, severity="error")
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

    def worker_failed(self, worker: Any) -> None:
        from kitbin.tui.app import error_line

        line = "nothing written: " + error_line(worker.error)
        self.query_one("#editbin-problems", Static).update(plain(line))

    def action_cancel(self) -> None:
        self.dismiss(False)

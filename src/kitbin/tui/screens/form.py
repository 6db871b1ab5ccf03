"""A dialog of labelled one-line fields: the new-bin, new-kit, bin-edit and new-plan forms.

Enter moves to the next field, ``ctrl+s`` saves (each form names it in its own
``BINDINGS``), escape cancels. The form writes through a service in a worker; when
the input is refused, by the form or by the service, one line under the fields says
why and nothing is written.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any, ClassVar

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.widget import Widget
from textual.widgets import Footer, Input, Label, Static

from kitbin.tui.markup import plain
from kitbin.tui.screens.base import KitbinModal


class FormModal(KitbinModal):
    """Fields ``FIELDS`` = (key, label, hint), their inputs named ``{PREFIX}-{key}``, and
    a problems line ``{PREFIX}-problems``; escape dismisses with ``CANCELLED``."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "cancel", "cancel")]
    FIELDS: ClassVar[tuple[tuple[str, str, str], ...]] = ()
    PREFIX: ClassVar[str] = "form"
    CANCELLED: ClassVar[Any] = None
    #: What a refused save says first.
    REFUSED: ClassVar[str] = "nothing written"

    def form_title(self) -> str:
        """The dialog's title (plain text)."""
        return ""

    def start_value(self, key: str) -> str:
        """What field ``key`` holds when the form opens."""
        return ""

    def after_field(self, key: str) -> Iterable[Widget]:
        """Widgets shown under field ``key`` (e.g. a check line)."""
        return ()

    def field_id(self, key: str) -> str:
        """The widget id of field ``key``."""
        return f"{self.PREFIX}-{key.lstrip('-')}"

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(plain(self.form_title()), classes="dialog-title")
            for key, label, hint in self.FIELDS:
                with Horizontal(classes="field-row"):
                    yield Label(label)
                    yield Input(
                        value=self.start_value(key),
                        placeholder=hint,
                        id=self.field_id(key),
                        classes="field-input",
                    )
                yield from self.after_field(key)
            yield Static("", id=f"{self.PREFIX}-problems", classes="check-bad")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        if self.FIELDS:
            self.query_one(f"#{self.field_id(self.FIELDS[0][0])}", Input).focus()

    def values(self) -> dict[str, str]:
        """The text of every field, by key."""
        return {k: self.query_one(f"#{self.field_id(k)}", Input).value for k, *_ in self.FIELDS}

    def refuse(self, why: str, *, notify: bool = True) -> None:
        """Show why nothing was written, under the fields (and as a notification)."""
        line = f"{self.REFUSED}: {why}"
        self.query_one(f"#{self.PREFIX}-problems", Static).update(plain(line))
        if notify:
            self.notify(line, severity="error")

    def clear_problems(self) -> None:
        """Empty the problems line (the user is typing again)."""
        self.query_one(f"#{self.PREFIX}-problems", Static).update("")

    @on(Input.Submitted)
    def _next(self) -> None:
        self.focus_next()

    def worker_failed(self, worker: Any) -> None:
        from kitbin.tui.app import error_line

        # the failure was already notified: the line stays under the fields
        self.refuse(error_line(worker.error), notify=False)

    def action_cancel(self) -> None:
        self.dismiss(self.CANCELLED)

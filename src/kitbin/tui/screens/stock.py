"""Add or take parts from a bin, with the reason logged."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.widgets import Footer, Input, Label, Static

from kitbin.tui.markup import plain
from kitbin.tui.messages import InventoryChanged, StockAdjusted
from kitbin.tui.screens.base import KitbinModal
from kitbin.tui.widgets.record.check import check_delta
from kitbin.tui.widgets.record.show import show_check


class StockScreen(KitbinModal):
    """A stock move: a signed count and why."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "save", "apply", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, label: str) -> None:
        super().__init__()
        self.label = label

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(f"Stock change on {self.label}", classes="dialog-title")
            with Horizontal(classes="field-row"):
                yield Label("change")
                yield Input(
                    placeholder="+10 adds, -3 takes", id="stock-delta", classes="field-input"
                )
            yield Static("", id="stock-delta-check", classes="check")
            with Horizontal(classes="field-row"):
                yield Label("reason")
                yield Input(
                    placeholder="counted the bag, used on a board …",
                    id="stock-why",
                    classes="field-input",
                )
            yield Static("", id="stock-problems", classes="check-bad")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#stock-delta", Input).focus()

    @on(Input.Changed, "#stock-delta")
    def _delta_changed(self, event: Input.Changed) -> None:
        show_check(self.query_one("#stock-delta-check", Static), check_delta(event.value))

    @on(Input.Submitted, "#stock-delta")
    def _to_reason(self) -> None:
        self.query_one("#stock-why", Input).focus()

    @on(Input.Submitted, "#stock-why")
    def _submit(self) -> None:
        self.action_save()

    def action_save(self) -> None:
        delta = check_delta(self.query_one("#stock-delta", Input).value)
        why = self.query_one("#stock-why", Input).value.strip()
        problems = []
        if not delta.ok:
            problems.append(delta.message or "give a change such as +10 or -3")
        if not why:
            problems.append("give a reason")
        if problems:
            text = "nothing written: " + "; ".join(problems)
            self.query_one("#stock-problems", Static).update(plain(text))
            self.notify(text, severity="error")
            return
        self.adjust(self.app.store, int(delta.value), why)

    @work(thread=True, exclusive=True, exit_on_error=False, group="stock")
    def adjust(self, store: Any, delta: int, why: str) -> None:
        """Write the stock move (in a thread)."""
        from kitbin.services import inventory

        self.post_message(
            StockAdjusted(self.label, inventory.adjust_stock(store, self.label, delta, why))
        )

    @on(StockAdjusted)
    def _adjusted(self, message: StockAdjusted) -> None:
        r = message.result
        self.notify(
            f"{message.label}: {r['delta']:+d}, now {r['qty']} on hand, {r['qty_free']} free"
        )
        self.app.post_message(InventoryChanged(message.label))
        self.dismiss(True)

    def action_cancel(self) -> None:
        self.dismiss(False)

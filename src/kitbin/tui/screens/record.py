"""Record one or several readings on a bin, with units checked as you type."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.widgets import Footer, Input, Label, Static

from kitbin.tui.markup import plain as _escape
from kitbin.tui.messages import InventoryChanged, ReadingRecorded
from kitbin.tui.screens.base import KitbinModal
from kitbin.tui.widgets.record.check import (
    Check,
    check_conditions,
    check_quantity,
    check_specimen,
    check_value,
    reading_items,
)
from kitbin.tui.widgets.record.show import show_check

#: Reading rows offered first, per kind of bin (more with ctrl+n).
FIRST_ROWS: dict[str, tuple[str, ...]] = {
    "inductor": ("inductance", "dcr", "isat_20"),
    "resistor": ("resistance",),
    "capacitor": ("capacitance", "esr"),
    "diode": ("vf", "vrrm"),
    "controller": ("vref", "fsw"),
}
MAX_ROWS = 6


class RecordScreen(KitbinModal):
    """Readings: quantity and value per row; specimen, conditions and method for all."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "save", "record", priority=True),
        Binding("ctrl+n", "add_row", "add row", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, label: str, kind: str | None = None) -> None:
        super().__init__()
        self.label = label
        self.kind = kind
        self.rows = 0

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog", id="record-dialog"):
            yield Static(f"Record readings on {self.label}", classes="dialog-title")
            yield Static(
                "quantity (L, dcr, isat_20 …) and value with unit (9.6uH, 31mohm, >=3A)",
                classes="hint",
            )
            kind = self.kind or self._kind_from_shelf()
            with Vertical(id="record-rows"):
                for quantity in FIRST_ROWS.get(kind or "", ("inductance",)):
                    yield from self._row_widgets(quantity)
            for name, label, hint in (
                ("specimen", "specimen", "number, or empty"),
                ("conditions", "conditions", "freq=100kHz temp=25degC bias=0.5A"),
                ("method", "method", "LCR meter, ramp, 4-wire …"),
            ):
                with Horizontal(classes="field-row"):
                    yield Label(label)
                    yield Input(placeholder=hint, id=f"record-{name}", classes="field-input")
                yield Static("", id=f"record-{name}-check", classes="check")
            yield Static("", id="record-problems", classes="check-bad")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#record-value-1", Input).focus()

    def _kind_from_shelf(self) -> str | None:
        for row in getattr(self.app.shelf, "rows", ()):
            if row.label == self.label:
                return row.kind
        return None

    def _row_widgets(self, quantity: str = "") -> list[Any]:
        self.rows += 1
        n = self.rows
        row = Horizontal(
            Input(
                value=quantity, placeholder="quantity", id=f"record-q-{n}", classes="field-input q"
            ),
            Input(placeholder="value", id=f"record-value-{n}", classes="field-input v"),
            classes="field-row",
        )
        return [row, Static("", id=f"record-check-{n}", classes="check")]

    def _add_row(self, quantity: str = "") -> None:
        self.query_one("#record-rows", Vertical).mount(*self._row_widgets(quantity))

    def action_add_row(self) -> None:
        if self.rows >= MAX_ROWS:
            self.notify(f"at most {MAX_ROWS} readings at once", severity="warning")
            return
        self._add_row()
        self.call_after_refresh(lambda: self.query_one(f"#record-q-{self.rows}", Input).focus())

    # -- checks as you type ----------------------------------------------------------

    def _row_check(self, n: int) -> Check:
        qtext = self.query_one(f"#record-q-{n}", Input).value
        vtext = self.query_one(f"#record-value-{n}", Input).value
        q = check_quantity(qtext)
        if q.ok is False:
            return q
        v = check_value(q.value if q.ok else None, vtext)
        if v.ok is None and q.ok:
            return Check(None, q.message)
        return v

    @on(Input.Changed)
    def _changed(self, event: Input.Changed) -> None:
        wid = event.input.id or ""
        if wid.startswith(("record-q-", "record-value-")):
            n = int(wid.rsplit("-", 1)[1])
            show_check(self.query_one(f"#record-check-{n}", Static), self._row_check(n))
        elif wid == "record-specimen":
            show_check(
                self.query_one("#record-specimen-check", Static), check_specimen(event.value)
            )
        elif wid == "record-conditions":
            show_check(
                self.query_one("#record-conditions-check", Static), check_conditions(event.value)
            )
        self.query_one("#record-problems", Static).update("")

    @on(Input.Submitted)
    def _submitted(self) -> None:
        self.focus_next()

    # -- saving ----------------------------------------------------------------------

    def collect(self) -> tuple[dict[str, Any] | None, list[str]]:
        """The service arguments, or None and the problems that stop a write."""
        pairs = [
            (
                self.query_one(f"#record-q-{n}", Input).value,
                self.query_one(f"#record-value-{n}", Input).value,
            )
            for n in range(1, self.rows + 1)
        ]
        items, problems = reading_items(pairs)
        specimen = check_specimen(self.query_one("#record-specimen", Input).value)
        conditions = check_conditions(self.query_one("#record-conditions", Input).value)
        if specimen.ok is False:
            problems.append(specimen.message)
        if conditions.ok is False:
            problems.append(conditions.message)
        if problems:
            return None, problems
        method = self.query_one("#record-method", Input).value.strip() or None
        return {
            "items": items,
            "specimen": int(specimen.value) if specimen.ok else None,
            "at": conditions.value.split() if conditions.ok else [],
            "method": method,
        }, []

    def action_save(self) -> None:
        args, problems = self.collect()
        if args is None:
            text = "nothing written: " + "; ".join(problems)
            self.query_one("#record-problems", Static).update(_escape(text))
            self.notify(text, severity="error")
            return
        self.record(self.app.store, args)

    @work(thread=True, exclusive=True, exit_on_error=False, group="record")
    def record(self, store: Any, args: dict[str, Any]) -> None:
        """Write the readings (all or none, in a thread)."""
        from kitbin.services import inventory

        rows = inventory.record_readings(store, self.label, **args)
        self.post_message(ReadingRecorded(self.label, rows))

    @on(ReadingRecorded)
    def _recorded(self, message: ReadingRecorded) -> None:
        n = len(message.rows)
        self.notify(f"recorded {n} reading{'s' if n != 1 else ''} on {message.label}")
        self.app.post_message(InventoryChanged(message.label))
        self.dismiss(True)

    def action_cancel(self) -> None:
        self.dismiss(False)

"""The kits: pick one to narrow the shelf to its bins."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.widgets import DataTable, Footer, Static

from kitbin.tui.markup import cells
from kitbin.tui.screens.base import KitbinModal
from kitbin.tui.widgets.shelf.kits import kit_term


class KitsScreen(KitbinModal):
    """Kits as bought: name, where from, when, bins; enter filters the shelf to one."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "choose", "show its bins"),
        Binding("x", "clear", "all kits"),
        Binding("escape", "close", "back"),
    ]

    def __init__(self, kits: list[dict[str, Any]]) -> None:
        super().__init__()
        self.kits = kits

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static("Kits — enter shows a kit's bins", classes="dialog-title")
            table: DataTable = DataTable(id="kits-table", cursor_type="row")
            table.add_columns("kit", "from", "bought", "bins")
            for k in self.kits:
                row = [
                    k["name"],
                    k.get("source") or "",
                    k.get("bought_on") or "",
                    k.get("bins") or 0,
                ]
                table.add_row(*cells(row), key=k["name"])
            yield table
            if not self.kits:
                yield Static("no kits yet: add one with `kitbin kit add NAME`", classes="hint")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one(DataTable).focus()

    @on(DataTable.RowSelected)
    def _selected(self, event: DataTable.RowSelected) -> None:
        self.dismiss(kit_term(str(event.row_key.value)))

    def action_choose(self) -> None:
        table = self.query_one(DataTable)
        if table.row_count:
            key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key
            self.dismiss(kit_term(str(key.value)))

    def action_clear(self) -> None:
        self.dismiss("")

    def action_close(self) -> None:
        self.dismiss(None)

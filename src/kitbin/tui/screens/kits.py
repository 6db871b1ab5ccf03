"""The kits: pick one to narrow the shelf to its bins, or add one."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import DataTable, Footer, Static
from textual.worker import get_current_worker

from kitbin.tui.markup import cells
from kitbin.tui.screens.base import KitbinModal
from kitbin.tui.widgets.shelf.kits import kit_term

NO_KITS = "no kits yet: press n to add one"


class KitsLoaded(Message):
    """The kits were read again (``kits``: :func:`kitbin.services.inventory.list_kits`)."""

    def __init__(self, kits: list[dict[str, Any]]) -> None:
        super().__init__()
        self.kits = kits


class KitsScreen(KitbinModal):
    """Kits as bought: name, where from, when, bins; enter filters the shelf to one."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "choose", "show its bins"),
        Binding("n", "new_kit", "new kit"),
        Binding("x", "clear", "all kits"),
        Binding("escape", "close", "back"),
    ]

    def __init__(self, kits: list[dict[str, Any]]) -> None:
        super().__init__()
        self.kits = kits
        #: The kit to put the cursor on when the list is next drawn.
        self.pending: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static("Kits — enter shows a kit's bins", classes="dialog-title")
            table: DataTable = DataTable(id="kits-table", cursor_type="row")
            table.add_columns("kit", "from", "bought", "bins")
            yield table
            yield Static("", id="kits-hint", classes="hint")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self._draw()
        self.query_one(DataTable).focus()

    def _draw(self) -> None:
        table = self.query_one(DataTable)
        keep = self.pending
        if keep is None and table.row_count:
            keep = str(table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value)
        table.clear()
        for k in self.kits:
            row = [k["name"], k.get("source") or "", k.get("bought_on") or "", k.get("bins") or 0]
            table.add_row(*cells(row), key=k["name"])
        self.query_one("#kits-hint", Static).update("" if self.kits else NO_KITS)
        names = [k["name"] for k in self.kits]
        if keep in names:
            table.move_cursor(row=names.index(keep))
            if keep == self.pending:
                self.pending = None

    @work(thread=True, exclusive=True, exit_on_error=False, group="kits")
    def load_kits(self, store: Any) -> None:
        """Read the kits again (in a thread)."""
        from kitbin.services import inventory

        kits = inventory.list_kits(store)
        if not get_current_worker().is_cancelled:
            self.post_message(KitsLoaded(kits))

    @on(KitsLoaded)
    def _loaded(self, message: KitsLoaded) -> None:
        self.kits = message.kits
        self._draw()

    def inventory_changed(self, label: str | None) -> None:
        """Read the kits again after any change (a new kit, a bin moved between kits)."""
        if self.app.store is not None:
            self.load_kits(self.app.store)

    @on(DataTable.RowSelected)
    def _selected(self, event: DataTable.RowSelected) -> None:
        self.dismiss(kit_term(str(event.row_key.value)))

    def action_choose(self) -> None:
        table = self.query_one(DataTable)
        if table.row_count:
            key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key
            self.dismiss(kit_term(str(key.value)))

    def action_new_kit(self) -> None:
        from kitbin.tui.screens.newkit import NewKitScreen

        if self.app.store is None:
            self.notify("the database is not open", severity="warning")
            return

        def added(name: str | None) -> None:
            if name is not None:
                self.pending = name
                self.load_kits(self.app.store)

        self.app.push_screen(NewKitScreen(), added)

    def action_clear(self) -> None:
        self.dismiss("")

    def action_close(self) -> None:
        self.dismiss(None)

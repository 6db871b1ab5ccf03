"""The shelf: every bin, a filter that narrows as you type, sortable columns.

Rows are read once in a worker and shaped into :class:`ShelfRow` tuples; the
filter and the sort then work in memory and only swap the grid's list of indices.
"""

from __future__ import annotations

import time
from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.widgets import Footer, Input, Static
from textual.worker import get_current_worker

from kitbin.tui.markup import plain as _escape
from kitbin.tui.messages import ShelfLoaded
from kitbin.tui.screens.base import KitbinScreen
from kitbin.tui.widgets.shelf.grid import ShelfGrid, header_text
from kitbin.tui.widgets.shelf.rows import (
    SORT_COLUMNS,
    ShelfRow,
    apply_filter,
    parse_filter,
    sort_order,
    view,
)

#: Actions on the highlighted bin, off while the filter box has the keys.
_GRID_ACTIONS = {
    "sort_next",
    "sort_reverse",
    "record",
    "adjust",
    "capture",
    "kits",
    "plans",
    "quit",
    "open_bin",
    "reload",
    "new_bin",
}


class ShelfScreen(KitbinScreen):
    """Kits and bins with their key evidence, stock and location."""

    TITLE = "shelf"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("slash", "focus_filter", "filter", key_display="/"),
        Binding("escape", "leave_filter", "to the list", show=False),
        Binding("down", "leave_filter", "to the list", show=False),
        Binding("o", "open_bin", "open", show=False),
        Binding("r", "record", "record"),
        Binding("a", "adjust", "stock±"),
        Binding("c", "capture", "capture"),
        Binding("p", "plans", "plans"),
        Binding("k", "kits", "kits"),
        Binding("n", "new_bin", "new bin", show=False),
        Binding("s", "sort_next", "sort"),
        Binding("S", "sort_reverse", "reverse sort", key_display="S", show=False),
        Binding("ctrl+r", "reload", "reload", show=False),
        Binding("q", "quit", "quit"),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.rows: list[ShelfRow] = []
        self.kits: list[dict[str, Any]] = []
        self.evidence: Any = None
        self.sort_column = "label"
        self.descending = False
        self.order: list[int] = []
        self.load_seconds: float | None = None
        self._pending_label: str | None = None

    def compose(self) -> ComposeResult:
        yield Static("kitbin · shelf", id="shelf-title", classes="title")
        yield Input(
            placeholder="filter: text  kind:ind  10u  >=2A  <50mohm  >=10 (free)  kit:name",
            id="shelf-filter",
        )
        yield Static("opening the database…", id="shelf-status", classes="status")
        yield Static("", id="shelf-header", classes="grid-header")
        yield ShelfGrid(id="shelf-grid")
        yield Static("", id="shelf-peek", classes="peek")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one(ShelfGrid).focus()
        self._draw_header()

    # -- loading ---------------------------------------------------------------------

    def reload(self, keep_label: str | None = None) -> None:
        """Read every bin again (after a change, or on ctrl+r)."""
        if self.app.store is None:
            return
        current = self.query_one(ShelfGrid).current
        self._pending_label = keep_label or (current.label if current else None)
        self.query_one("#shelf-status", Static).update("reading bins…")
        self.load_rows(self.app.store)

    @work(thread=True, exclusive=True, exit_on_error=False, group="shelf")
    def load_rows(self, store: Any) -> None:
        """Read and shape every bin (in a thread)."""
        from kitbin.services import inventory, ui_support
        from kitbin.tui.widgets.shelf.rows import shape_row

        start = time.perf_counter()
        data, evidence = ui_support.shelf_rows(store)
        rows = [shape_row(d) for d in data]
        kits = inventory.list_kits(store)
        if not get_current_worker().is_cancelled:  # a newer reload has started
            self.post_message(ShelfLoaded(rows, kits, evidence, time.perf_counter() - start))

    @on(ShelfLoaded)
    def _loaded(self, message: ShelfLoaded) -> None:
        self.rows = message.rows
        self.kits = message.kits
        self.evidence = message.evidence
        self.load_seconds = message.seconds
        self.order = sort_order(self.rows, self.sort_column, self.descending)
        grid = self.query_one(ShelfGrid)
        grid.rows = self.rows
        self.refilter(keep_label=self._pending_label)

    # -- filter and sort -------------------------------------------------------------

    @on(Input.Changed, "#shelf-filter")
    def _filter_changed(self) -> None:
        self.refilter()

    @on(Input.Submitted, "#shelf-filter")
    def _filter_done(self) -> None:
        self.query_one(ShelfGrid).focus()

    def refilter(self, keep_label: str | None = None) -> None:
        """Apply the filter box's text to the rows in memory and redraw the grid."""
        grid = self.query_one(ShelfGrid)
        if keep_label is None and grid.current is not None:
            keep_label = grid.current.label
        wanted = parse_filter(self.query_one("#shelf-filter", Input).value)
        kept = apply_filter(self.rows, wanted)
        grid.show(view(self.order, kept), keep_label=keep_label)
        self._draw_status(len(grid.shown), wanted.problems)

    def _draw_status(self, shown: int, problems: tuple[str, ...]) -> None:
        status = self.query_one("#shelf-status", Static)
        if problems:
            status.update("[b red]" + "; ".join(problems) + "[/]")
            return
        total = len(self.rows)
        arrow = "▼" if self.descending else "▲"
        text = f"{shown:,} of {total:,} bins · sorted by {self.sort_column} {arrow}"
        if total == 0:
            text = "no bins yet: press n to add one, or try `kitbin demo --ui`"
        status.update(text)

    def _draw_header(self) -> None:
        grid = self.query_one(ShelfGrid)
        self.query_one("#shelf-header", Static).update(
            header_text(grid.columns, self.sort_column, self.descending)
        )

    def on_resize(self) -> None:
        self.call_after_refresh(self._draw_header)

    def _resort(self) -> None:
        self.order = sort_order(self.rows, self.sort_column, self.descending)
        self._draw_header()
        self.refilter()

    def action_sort_next(self) -> None:
        pos = SORT_COLUMNS.index(self.sort_column)
        self.sort_column = SORT_COLUMNS[(pos + 1) % len(SORT_COLUMNS)]
        self._resort()

    def action_sort_reverse(self) -> None:
        self.descending = not self.descending
        self._resort()

    def action_focus_filter(self) -> None:
        self.query_one("#shelf-filter", Input).focus()

    def action_leave_filter(self) -> None:
        self.query_one(ShelfGrid).focus()

    def action_reload(self) -> None:
        self.reload()

    # -- keys that apply ---------------------------------------------------------------

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        typing = isinstance(self.focused, Input)
        if action in _GRID_ACTIONS:
            return not typing
        if action == "focus_filter":
            return not typing
        if action == "leave_filter":
            return typing
        return True

    def on_descendant_focus(self) -> None:
        self.refresh_bindings()

    def on_descendant_blur(self) -> None:
        self.refresh_bindings()

    # -- the highlighted bin -------------------------------------------------------------

    @on(ShelfGrid.Highlighted)
    def _highlighted(self, message: ShelfGrid.Highlighted) -> None:
        peek = self.query_one("#shelf-peek", Static)
        row = message.row
        if row is None:
            peek.update("")
            return
        where = row.location
        head = f"[b]{_escape(row.label)}[/b] {row.kind}" + (f" · {_escape(where)}" if where else "")
        head += f" · {row.qty} on hand, {row.reserved} reserved"
        if row.kit:
            head += f" · {_escape(row.kit)}"
        lines = list(row.evidence_lines)
        if not lines and self.evidence is not None and row.row >= 0:
            lines = self.evidence.lines(row.row)
        evidence = "; ".join(lines) or "no evidence"
        peek.update(head + "\n" + _escape(evidence))

    @on(ShelfGrid.Chosen)
    def _chosen(self, message: ShelfGrid.Chosen) -> None:
        self._open(message.row.label)

    def database_failed(self, line: str) -> None:
        """Say on the shelf that the database could not be opened."""
        self.query_one("#shelf-status", Static).update(
            _escape(f"no database: {line} — quit with q and start again with --db FILE")
        )

    def _store_ready(self) -> bool:
        if self.app.store is None:
            self.notify("the database is not open", severity="warning")
            return False
        return True

    def _current_label(self) -> str | None:
        if not self._store_ready():
            return None
        row = self.query_one(ShelfGrid).current
        if row is None:
            self.notify("no bin highlighted", severity="warning")
            return None
        return row.label

    def _open(self, label: str) -> None:
        from kitbin.tui.screens.bin import BinScreen

        self.app.push_screen(BinScreen(label))

    def action_open_bin(self) -> None:
        label = self._current_label()
        if label:
            self._open(label)

    def action_record(self) -> None:
        from kitbin.tui.screens.record import RecordScreen

        label = self._current_label()
        if label:
            self.app.push_screen(RecordScreen(label))

    def action_adjust(self) -> None:
        from kitbin.tui.screens.stock import StockScreen

        label = self._current_label()
        if label:
            self.app.push_screen(StockScreen(label))

    def action_capture(self) -> None:
        from kitbin.tui.screens.capture import CaptureScreen

        label = self._current_label()
        if label:
            self.app.push_screen(CaptureScreen(label))

    def action_plans(self) -> None:
        from kitbin.tui.screens.plans import PlanScreen

        if not self._store_ready():
            return
        self.app.push_screen(PlanScreen())

    def action_kits(self) -> None:
        from kitbin.tui.screens.kits import KitsScreen

        def chosen(term: str | None) -> None:
            if term is not None:
                box = self.query_one("#shelf-filter", Input)
                box.value = term
                self.refilter()

        self.app.push_screen(KitsScreen(self.kits), chosen)

    def action_new_bin(self) -> None:
        from kitbin.tui.screens.newbin import NewBinScreen

        if self._store_ready():
            self.app.push_screen(NewBinScreen())

    def action_quit(self) -> None:
        self.app.exit()

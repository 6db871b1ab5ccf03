"""One bin: its marking, evidence, readings, captures with results, curves and stock log."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, VerticalScroll
from textual.widgets import DataTable, Footer, Static, TabbedContent, TabPane
from textual.worker import get_current_worker
from textual_plotext import PlotextPlot

from kitbin.tui.markup import cells
from kitbin.tui.markup import plain as _escape
from kitbin.tui.messages import BinLoaded
from kitbin.tui.screens.base import KitbinScreen
from kitbin.tui.widgets.bin.text import (
    capture_cells,
    evidence_lines,
    head_lines,
    l_curve,
    move_cells,
    reading_cells,
    results_lines,
)

TABS = ("evidence", "readings", "captures", "curves", "stock")
#: The widget of each tab that takes the focus when the tab is shown (curves: the tabs).
PANE_FOCUS = {
    "evidence": ".scroll-text",
    "readings": "#bin-readings",
    "captures": "#bin-captures",
    "stock": "#bin-moves",
}


class HeatTraced(BinLoaded):
    """A heating capture's log and fitted curve were read back (``page`` holds them)."""


class BinScreen(KitbinScreen):
    """Everything known about one bin."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "back", "back"),
        Binding("r", "record", "record"),
        Binding("a", "adjust", "stock±"),
        Binding("c", "capture", "capture"),
        Binding("e", "edit", "edit"),
        Binding("1", "tab('evidence')", "evidence", show=False),
        Binding("2", "tab('readings')", "readings", show=False),
        Binding("3", "tab('captures')", "captures", show=False),
        Binding("4", "tab('curves')", "curves", show=False),
        Binding("5", "tab('stock')", "stock", show=False),
        Binding("ctrl+r", "reload", "reload", show=False),
    ]

    def __init__(self, label: str) -> None:
        super().__init__()
        self.label = label
        self.page: dict[str, Any] | None = None

    def compose(self) -> ComposeResult:
        yield Static(f"kitbin · bin {self.label}  (keys 1-5 switch tabs)", classes="title")
        yield Static("reading…", id="bin-head", classes="bin-head")
        with TabbedContent(id="bin-tabs"):
            with TabPane("1 evidence", id="evidence"), VerticalScroll(classes="scroll-text"):
                yield Static("", id="bin-evidence")
            with TabPane("2 readings", id="readings"):
                yield DataTable(id="bin-readings", cursor_type="row", zebra_stripes=True)
            with TabPane("3 captures", id="captures"):
                yield DataTable(id="bin-captures", cursor_type="row")
                yield Static("", id="bin-capture-results", classes="results")
            with TabPane("4 curves", id="curves"), Horizontal():
                yield PlotextPlot(id="bin-lcurve")
                yield PlotextPlot(id="bin-heat")
            with TabPane("5 stock", id="stock"):
                yield DataTable(id="bin-moves", cursor_type="row", zebra_stripes=True)
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#bin-readings", DataTable).add_columns(
            "quantity", "value", "spec.", "conditions", "method", "taken (UTC)", "capture"
        )
        self.query_one("#bin-captures", DataTable).add_columns(
            "id", "kind", "file", "result", "saved (UTC)"
        )
        self.query_one("#bin-moves", DataTable).add_columns(
            "when (UTC)", "change", "after", "reason", "pick list"
        )
        self.action_reload()

    # -- loading ---------------------------------------------------------------------

    def action_reload(self) -> None:
        self.load_page(self.app.store, self.label)

    @work(thread=True, exclusive=True, exit_on_error=False, group="bin")
    def load_page(self, store: Any, label: str) -> None:
        """Read the bin's page (in a thread)."""
        from kitbin.services import ui_support

        page = ui_support.bin_page(store, label)
        if not get_current_worker().is_cancelled:  # a newer reload has started
            self.post_message(BinLoaded(page))

    @work(thread=True, exclusive=True, exit_on_error=False, group="bin-heat")
    def load_heat(self, store: Any, capture_id: int) -> None:
        """Read back a heating log and its fit (in a thread)."""
        from kitbin.services import ui_support

        trace = ui_support.heat_trace(store, capture_id)
        trace["capture_id"] = capture_id
        self.post_message(HeatTraced(trace))

    @on(BinLoaded)
    def _loaded(self, message: BinLoaded) -> None:
        if isinstance(message, HeatTraced):
            self._draw_heat(message.page)
            return
        page = self.page = message.page
        self.query_one("#bin-head", Static).update(_escape("\n".join(head_lines(page))))
        self.query_one("#bin-evidence", Static).update(
            _escape("\n".join(evidence_lines(page)) or "nothing known yet")
        )
        readings = self.query_one("#bin-readings", DataTable)
        readings.clear()
        for r in page["readings"]:
            readings.add_row(*cells(reading_cells(r)), key=str(r["id"]))
        captures = self.query_one("#bin-captures", DataTable)
        captures.clear()
        for c in page["captures"]:
            captures.add_row(*cells(capture_cells(c)), key=str(c["id"]))
        self._show_capture_results(page["captures"][0] if page["captures"] else None)
        moves = self.query_one("#bin-moves", DataTable)
        moves.clear()
        for m in reversed(page["moves"]):
            moves.add_row(*cells(move_cells(m)))
        self._draw_lcurve(page)
        heat = [c for c in page["captures"] if c["kind"] == "heat"]
        if heat:
            self.load_heat(self.app.store, heat[-1]["id"])
        else:
            self._empty_plot("#bin-heat", "no heating capture")

    def _show_capture_results(self, capture: dict[str, Any] | None) -> None:
        box = self.query_one("#bin-capture-results", Static)
        if capture is None:
            box.update("no captures yet: press c to attach a ramp or heating log")
            return
        lines = [f"#{capture['id']} {capture['kind']} · {capture.get('file_name') or ''}"]
        lines += results_lines(capture["kind"], capture.get("results") or {})
        box.update(_escape("\n".join(lines)))

    @on(DataTable.RowHighlighted, "#bin-captures")
    def _capture_highlighted(self, event: DataTable.RowHighlighted) -> None:
        if self.page is None or event.row_key is None:
            return
        for c in self.page["captures"]:
            if str(c["id"]) == event.row_key.value:
                self._show_capture_results(c)

    # -- plots -----------------------------------------------------------------------

    def _empty_plot(self, selector: str, title: str) -> None:
        plot = self.query_one(selector, PlotextPlot)
        plot.plt.clear_data()
        plot.plt.clear_figure()
        plot.plt.title(title)
        plot.refresh()

    def _draw_lcurve(self, page: dict[str, Any]) -> None:
        plot = self.query_one("#bin-lcurve", PlotextPlot)
        plt = plot.plt
        plt.clear_data()
        plt.clear_figure()
        drawn = False
        for capture_id, curve in sorted(page.get("curves", {}).items()):
            pts = l_curve(curve)
            if pts is None:
                continue
            plt.plot(pts[0], pts[1], label=f"#{capture_id}", marker="braille")
            drawn = True
        if drawn:
            plt.title("L(i) from ramp captures")
            plt.xlabel("current (A)")
            plt.ylabel("L (µH)")
        else:
            plt.title("no L(i) curve: attach a ramp capture (c)")
        plot.refresh()

    def _draw_heat(self, trace: dict[str, Any]) -> None:
        plot = self.query_one("#bin-heat", PlotextPlot)
        plt = plot.plt
        plt.clear_data()
        plt.clear_figure()
        plt.scatter(trace["t_s"], trace["temp_C"], label="log", marker="dot")
        plt.plot(trace["t_s"], trace["fit_C"], label="fit", marker="braille")
        plt.title(
            f"#{trace['capture_id']} heating: rise {trace['rise_ss_K']:.3g} K, "
            f"tau {trace['tau_s']:.3g} s"
        )
        plt.xlabel("time (s)")
        plt.ylabel("°C")
        plot.refresh()

    # -- keys -------------------------------------------------------------------------

    def action_tab(self, tab: str) -> None:
        # Focus moves into the new pane at once: a TabbedContent switches back to the
        # pane that still holds the focus (seen with Textual 8.2.8).
        self.query_one(TabbedContent).active = tab
        target = PANE_FOCUS.get(tab)
        if target:
            self.query_one(f"#{tab} {target}").focus()
        else:
            self.query_one(TabbedContent).query_one("ContentTabs").focus()

    def action_back(self) -> None:
        self.app.pop_screen()

    def action_record(self) -> None:
        from kitbin.tui.screens.record import RecordScreen

        self.app.push_screen(RecordScreen(self.label))

    def action_adjust(self) -> None:
        from kitbin.tui.screens.stock import StockScreen

        self.app.push_screen(StockScreen(self.label))

    def action_capture(self) -> None:
        from kitbin.tui.screens.capture import CaptureScreen

        self.app.push_screen(CaptureScreen(self.label))

    def action_edit(self) -> None:
        from kitbin.tui.screens.editbin import EditBinScreen

        if self.page is None:
            self.notify("the bin is still being read", severity="warning")
            return
        self.app.push_screen(EditBinScreen(self.page))

    def inventory_changed(self, label: str | None) -> None:
        """Reload when this bin (or any, for None) changed."""
        if label in (None, self.label):
            self.action_reload()

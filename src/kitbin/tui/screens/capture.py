"""Attach a bench capture to a bin: analyse it, look at the results, then save."""

from __future__ import annotations

from pathlib import Path
from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, VerticalScroll
from textual.message import Message
from textual.widgets import Footer, Input, Label, RadioButton, RadioSet, Static
from textual_plotext import PlotextPlot

from kitbin.tui.markup import plain as _escape
from kitbin.tui.messages import InventoryChanged
from kitbin.tui.screens.base import KitbinModal
from kitbin.tui.widgets.bin.text import l_curve, results_lines
from kitbin.tui.widgets.record.capture_form import FIELDS, CaptureForm, read_form

CAUTION = (
    "Caution: pulse tests store ½·L·I² in the inductor (give it a freewheel path); "
    "heating runs make parts hot. See docs/measuring.md."
)


class CaptureAnalysed(Message):
    """A capture was analysed (not yet saved)."""

    def __init__(self, form: CaptureForm, summary: dict[str, Any], run: Any) -> None:
        super().__init__()
        self.form = form
        self.summary = summary
        self.run = run


class CaptureSaved(Message):
    """A capture and its readings were saved."""

    def __init__(self, summary: dict[str, Any]) -> None:
        super().__init__()
        self.summary = summary


class CaptureScreen(KitbinModal):
    """A ramp or heating capture: file, test parameters, results before saving."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+a", "analyse", "analyse", priority=True),
        Binding("ctrl+s", "save", "save", priority=True),
        Binding("ctrl+t", "toggle_kind", "ramp/heat", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, label: str) -> None:
        super().__init__()
        self.label = label
        self.analysed: CaptureAnalysed | None = None

    def compose(self) -> ComposeResult:
        with VerticalScroll(classes="dialog", id="capture-dialog"):
            yield Static(f"Capture on {self.label}", classes="dialog-title")
            with RadioSet(id="capture-kind"):
                yield RadioButton("ramp (current ramp → L(i), Isat)", value=True, id="kind-ramp")
                yield RadioButton("heat (temperature log → rise, R_th)", id="kind-heat")
            for key, label, hint, kinds in FIELDS:
                with Horizontal(classes=f"field-row capture-field {' '.join(kinds)}"):
                    yield Label(label)
                    yield Input(placeholder=hint, id=f"capture-{key}", classes="field-input")
            yield Static("", id="capture-results", classes="results")
            yield PlotextPlot(id="capture-plot", classes="small-plot")
            yield Static(CAUTION, classes="hint")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#capture-plot").display = False
        self._show_fields()
        self.query_one("#capture-file", Input).focus()

    @property
    def kind(self) -> str:
        return "heat" if self.query_one("#kind-heat", RadioButton).value else "ramp"

    def _show_fields(self) -> None:
        kind = self.kind
        for row in self.query(".capture-field"):
            row.display = row.has_class(kind)

    @on(RadioSet.Changed)
    def _kind_changed(self) -> None:
        self._show_fields()
        self.analysed = None

    def action_toggle_kind(self) -> None:
        target = "#kind-ramp" if self.kind == "heat" else "#kind-heat"
        self.query_one(target, RadioButton).value = True

    @on(Input.Changed)
    def _edited(self) -> None:
        self.analysed = None  # what is shown no longer matches the fields

    @on(Input.Submitted)
    def _next(self) -> None:
        self.focus_next()

    def _form(self) -> CaptureForm | None:
        values = {key: self.query_one(f"#capture-{key}", Input).value for key, *_ in FIELDS}
        form, problems = read_form(self.kind, values)
        if problems:
            text = "; ".join(problems)
            self.query_one("#capture-results", Static).update(_escape(text))
            self.notify(text, severity="error")
            return None
        return form

    # -- analyse ---------------------------------------------------------------------

    def action_analyse(self) -> None:
        form = self._form()
        if form is None:
            return
        self.query_one("#capture-results", Static).update("analysing…")
        self.analyse(self.app.store, form)

    @work(thread=True, exclusive=True, exit_on_error=False, group="capture")
    def analyse(self, store: Any, form: CaptureForm) -> None:
        """Read and analyse the file without saving (in a thread)."""
        from kitbin.services import bench

        content = bench.read_file(form.path)
        name = Path(form.path).name
        if form.kind == "ramp":
            run = bench.analyse_ramp_bytes(content, form.ramp, source=name)
            summary = bench.ramp(content, form.ramp, label=self.label, file_name=name, run=run)
        else:
            run = None
            summary = bench.heat(
                content, form.heat, label=self.label, file_name=name, store=store, save=False
            )
        self.post_message(CaptureAnalysed(form, summary, run))

    @on(CaptureAnalysed)
    def _analysed(self, message: CaptureAnalysed) -> None:
        self.analysed = message
        s = message.summary
        lines = [f"{message.form.kind} · {s.get('file')} — not saved yet: ctrl+s saves"]
        lines += results_lines(message.form.kind, s)
        self.query_one("#capture-results", Static).update(_escape("\n".join(lines)))
        plot = self.query_one("#capture-plot", PlotextPlot)
        pts = l_curve(s.get("curve") or {}) if message.form.kind == "ramp" else None
        plot.display = pts is not None
        if pts is not None:
            plot.plt.clear_data()
            plot.plt.clear_figure()
            plot.plt.plot(pts[0], pts[1], marker="braille")
            plot.plt.title("L(i)")
            plot.plt.xlabel("A")
            plot.plt.ylabel("µH")
            plot.refresh()

    def worker_failed(self, worker: Any) -> None:
        self.query_one("#capture-results", Static).update("nothing saved (see the message)")

    # -- save ------------------------------------------------------------------------

    def action_save(self) -> None:
        if self.analysed is None:
            self.notify(
                "analyse first (ctrl+a): saving stores what you have seen", severity="warning"
            )
            return
        self.save(self.app.store, self.analysed)

    @work(thread=True, exclusive=True, exit_on_error=False, group="capture")
    def save(self, store: Any, analysed: CaptureAnalysed) -> None:
        """Store the capture with its readings (one unit of work, in a thread)."""
        from kitbin.services import bench

        form = analysed.form
        content = bench.read_file(form.path)
        name = Path(form.path).name
        if form.kind == "ramp":
            summary = bench.ramp(
                content, form.ramp, label=self.label, file_name=name, store=store, run=analysed.run
            )
        else:
            summary = bench.heat(
                content, form.heat, label=self.label, file_name=name, store=store, save=True
            )
        self.post_message(CaptureSaved(summary))

    @on(CaptureSaved)
    def _saved(self, message: CaptureSaved) -> None:
        s = message.summary
        n = len(s.get("readings") or [])
        self.notify(f"saved capture #{s.get('capture_id')} on {self.label} with {n} readings")
        self.app.post_message(InventoryChanged(self.label))
        self.dismiss(True)

    def action_cancel(self) -> None:
        self.dismiss(False)

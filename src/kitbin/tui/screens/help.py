"""Every key of every screen, read from the screens' own bindings (so it cannot drift)."""

from __future__ import annotations

from collections.abc import Iterable
from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.widgets import Footer, Static

from kitbin.tui.screens.base import KitbinScreen

#: Grade marks shown after values on the shelf.
LEGEND = (
    "Marks after a value: ✓ measured (readings), ≈ marked (nominal ± tolerance), "
    "? assumed (a default). Ratings (DCR, Isat, voltages, currents) show their "
    "worst-case end, the one the matcher relies on."
)


def _screens() -> list[tuple[str, type]]:
    from kitbin.tui.app import KitbinApp
    from kitbin.tui.screens.bin import BinScreen
    from kitbin.tui.screens.capture import CaptureScreen
    from kitbin.tui.screens.editbin import EditBinScreen
    from kitbin.tui.screens.kits import KitsScreen
    from kitbin.tui.screens.newbin import NewBinScreen
    from kitbin.tui.screens.newkit import NewKitScreen
    from kitbin.tui.screens.plans import ExportScreen, NewPlanScreen, PlanScreen
    from kitbin.tui.screens.record import RecordScreen
    from kitbin.tui.screens.shelf import ShelfScreen
    from kitbin.tui.screens.stock import StockScreen
    from kitbin.tui.widgets.shelf.grid import ShelfGrid

    return [
        ("everywhere", KitbinApp),
        ("shelf", ShelfScreen),
        ("shelf list", ShelfGrid),
        ("kits", KitsScreen),
        ("new kit", NewKitScreen),
        ("new bin", NewBinScreen),
        ("bin", BinScreen),
        ("edit bin", EditBinScreen),
        ("record readings", RecordScreen),
        ("stock ±", StockScreen),
        ("capture", CaptureScreen),
        ("plans", PlanScreen),
        ("new plan", NewPlanScreen),
        ("export pick list", ExportScreen),
        ("help", HelpScreen),
    ]


def bindings_of(cls: type) -> list[Binding]:
    """The class's own bindings as :class:`Binding` objects."""
    out = []
    for item in getattr(cls, "BINDINGS", []):
        if isinstance(item, Binding):
            out.append(item)
        else:
            key, action, *rest = item
            out.append(Binding(key, action, rest[0] if rest else ""))
    return out


def key_rows(screens: Iterable[tuple[str, type]], display) -> list[tuple[str, str, str]]:
    """(screen, keys, what) for every binding; ``display`` turns a binding into key text."""
    rows = []
    for name, cls in screens:
        seen: dict[str, list[str]] = {}
        order: list[str] = []
        for b in bindings_of(cls):
            what = b.description or b.action
            if what not in seen:
                seen[what] = []
                order.append(what)
            for key in b.key.split(","):
                shown = display(
                    Binding(key.strip(), b.action, b.description, key_display=b.key_display)
                )
                if shown not in seen[what]:
                    seen[what].append(shown)
        rows.extend((name, "/".join(seen[w]), w) for w in order)
    return rows


class HelpScreen(KitbinScreen):
    """All keys, grouped by screen."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "close", "back"),
        Binding("q", "close", "back", show=False),
    ]

    def compose(self) -> ComposeResult:
        yield Static("kitbin · keys", classes="title")
        with VerticalScroll(id="help-body"):
            yield Static(self._text(), id="help-text")
        yield Footer(compact=True)

    def _text(self) -> str:
        from kitbin.tui.markup import plain as escape

        lines = []
        current = None
        for screen, keys, what in key_rows(_screens(), self.app.get_key_display):
            if screen != current:
                lines.append(f"\n[b]{escape(screen)}[/b]")
                current = screen
            lines.append(f"  {escape(keys):<18} {escape(what)}")
        lines.append("\n" + LEGEND)
        lines.append(
            "\nFilter terms: free text, kind:ind, a value (10u, 4k7, 100nF; within 5 %), "
            ">=2A or <50mohm (evidence of that unit), >=10 (parts free), kit:name."
        )
        return "\n".join(lines).lstrip("\n")

    def on_mount(self) -> None:
        self.query_one("#help-body").focus()

    def action_close(self) -> None:
        self.app.pop_screen()

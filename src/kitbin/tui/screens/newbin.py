"""Add a bin from the shelf: label, kind, value or marking, place and count."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.binding import Binding, BindingType
from textual.message import Message

from kitbin.tui.messages import InventoryChanged
from kitbin.tui.screens.form import FormModal

#: (field, label, hint)
BIN_FIELDS: tuple[tuple[str, str, str], ...] = (
    ("label", "label", "e.g. L-21"),
    ("kind", "kind", "inductor, resistor, capacitor, diode, controller or other"),
    ("marking", "marking", "as printed: 100, 4k7, brown black red gold (optional)"),
    ("nominal", "nominal", "e.g. 10uH (optional when the marking says it)"),
    ("tolerance", "tolerance", "e.g. 20% (optional)"),
    ("location", "location", "e.g. cabinet A, drawer 3"),
    ("kit", "kit", "name of an existing kit (optional; new ones: k, then n)"),
    ("qty", "count", "parts in the bin now, e.g. 12"),
)


class BinAdded(Message):
    """A bin was stored."""

    def __init__(self, data: dict[str, Any]) -> None:
        super().__init__()
        self.data = data


def bin_arguments(values: dict[str, str]) -> tuple[dict[str, Any] | None, list[str]]:
    """Arguments of :func:`kitbin.services.inventory.add_bin` from the field texts, or
    None and the problems (the service checks values, units and markings itself)."""
    problems = []
    label = values.get("label", "").strip()
    kind = values.get("kind", "").strip()
    if not label:
        problems.append("give the bin a label")
    if not kind:
        problems.append("give its kind")
    qty_text = values.get("qty", "").strip() or "0"
    if not qty_text.isdigit():
        problems.append(f"count '{qty_text}': a whole number, 0 or more")
    if problems:
        return None, problems
    args: dict[str, Any] = {"label": label, "kind": kind, "qty": int(qty_text)}
    for key in ("marking", "nominal", "tolerance", "location", "kit"):
        text = values.get(key, "").strip()
        if text:
            args[key] = text
    return args, []


class NewBinScreen(FormModal):
    """A new bin; its starting count is logged as its first stock move."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("ctrl+s", "save", "add bin", priority=True)]
    FIELDS = BIN_FIELDS
    PREFIX = "newbin"

    def form_title(self) -> str:
        return "New bin (more later: e in the bin view)"

    def action_save(self) -> None:
        args, problems = bin_arguments(self.values())
        if args is None:
            self.refuse("; ".join(problems))
            return
        self.add(self.app.store, args)

    @work(thread=True, exclusive=True, exit_on_error=False, group="newbin")
    def add(self, store: Any, args: dict[str, Any]) -> None:
        """Store the bin (in a thread; nothing written on a bad value or marking)."""
        from kitbin.services import inventory

        label, kind = args.pop("label"), args.pop("kind")
        self.post_message(BinAdded(inventory.add_bin(store, label, kind, **args)))

    @on(BinAdded)
    def _added(self, message: BinAdded) -> None:
        d = message.data
        self.notify(f"added bin {d['label']} ({d['kind']}, {d['qty']} parts)")
        self.app.post_message(InventoryChanged(d["label"]))
        self.dismiss(d["label"])

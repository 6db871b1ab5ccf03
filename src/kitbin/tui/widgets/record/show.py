"""A form field's check line drawn on its widget (shared by every form)."""

from __future__ import annotations

from textual.widgets import Static

from kitbin.tui.markup import plain
from kitbin.tui.widgets.record.check import Check


def show_check(widget: Static, check: Check) -> None:
    """Draw a field's check line: green when read, red with the reason when not."""
    widget.set_class(check.ok is True, "check-ok")
    widget.set_class(check.ok is False, "check-bad")
    mark = {True: "✓ ", False: "✗ ", None: "· "}[check.ok]
    widget.update(plain(mark + check.message) if check.message else "")

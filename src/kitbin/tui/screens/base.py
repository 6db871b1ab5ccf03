"""What every kitbin screen shares: failed workers become one-line error notifications."""

from __future__ import annotations

from textual.notifications import SeverityLevel
from textual.screen import ModalScreen, Screen
from textual.worker import Worker, WorkerState


def report_failed_worker(screen: Screen, event: Worker.StateChanged) -> bool:
    """Notify the error of a worker that ended in error; True when it did."""
    if event.state != WorkerState.ERROR or event.worker.error is None:
        return False
    from kitbin.tui.app import error_line

    screen.notify(error_line(event.worker.error), title="kitbin", severity="error")
    return True


class _ReportsFailures:
    """Shared by kitbin's screens and dialogs: plain-text notifications, and worker
    failures reported as one notification line."""

    def notify(
        self,
        message: str,
        *,
        title: str = "",
        severity: SeverityLevel = "information",
        timeout: float | None = None,
        markup: bool = False,
    ) -> None:
        """A notification; kitbin's messages are plain text (no markup) by default."""
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=markup)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if report_failed_worker(self, event):
            self.worker_failed(event.worker)

    def worker_failed(self, worker: Worker) -> None:
        """Called after a failed worker was reported (override to undo a busy state)."""


class KitbinScreen(_ReportsFailures, Screen):
    """A full screen whose workers report failures as notifications."""


class KitbinModal(_ReportsFailures, ModalScreen):
    """A dialog whose workers report failures as notifications."""

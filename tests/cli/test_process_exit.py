"""The console entry point leaves with ``os._exit`` after a command: exit codes,
output and exit handlers must be exactly as on a normal interpreter exit."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest


def _kitbin(*args: str, env: dict[str, str] | None = None, **kw: object):
    return subprocess.run(
        [sys.executable, "-m", "kitbin", *args],
        capture_output=True,
        text=True,
        env={**os.environ, **(env or {})},
        check=False,
        **kw,
    )


def test_success_keeps_exit_code_and_all_output() -> None:
    out = _kitbin("stage", "buck", "--vin", "12", "--vout", "5", "--iout", "1", "--fsw", "500k",
                  "--json")  # fmt: skip
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)  # the whole document arrived, not a cut-off buffer
    assert data["topology"] == "buck" and data["corners"]
    assert out.stderr.startswith("note: no --l given")  # and standard error too


@pytest.mark.parametrize(
    ("args", "code"),
    [
        (("match", "no-such-plan"), 4),  # ExitCode.NOT_FOUND
        (("--bogus",), 2),  # a usage error
    ],
)
def test_errors_keep_their_exit_code_and_one_line(
    tmp_path: Path, args: tuple[str, ...], code: int
) -> None:
    out = _kitbin("--db", str(tmp_path / "inv.sqlite"), *args)
    assert out.returncode == code
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("kitbin: error:")


def test_exit_handlers_still_run() -> None:
    code = (
        "import atexit, sys\n"
        "atexit.register(lambda: print('handler ran', file=sys.stderr))\n"
        "sys.argv = ['kitbin', '--version']\n"
        "from kitbin.cli.app import main\n"
        "main()\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert out.returncode == 0
    assert out.stdout.startswith("kitbin ")
    assert "handler ran" in out.stderr


def test_a_closed_pipe_is_not_an_error(monkeypatch: pytest.MonkeyPatch) -> None:
    # `kitbin ... | head`: the reader went away before the last output was flushed
    from kitbin.cli import app

    class ClosedPipe:
        def flush(self) -> None:
            raise BrokenPipeError(32, "Broken pipe")

    left: list[int] = []
    monkeypatch.delenv("KITBIN_FULL_EXIT", raising=False)
    monkeypatch.setattr(sys, "stdout", ClosedPipe())
    monkeypatch.setattr(os, "_exit", left.append)
    monkeypatch.setattr("atexit._run_exitfuncs", lambda: None)
    app._leave(3)
    assert left == [3]


def test_full_exit_can_be_asked_for() -> None:
    out = _kitbin("--version", env={"KITBIN_FULL_EXIT": "1"})
    assert out.returncode == 0 and out.stdout.startswith("kitbin ")

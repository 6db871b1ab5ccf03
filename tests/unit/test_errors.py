"""Every error is one line, whatever the user typed into it."""

from __future__ import annotations

import pytest

from kitbin.errors import ExitCode, ImportRowError, KitbinError, NotFoundError


@pytest.mark.parametrize(
    "typed", ["0\n0", "L-1\r\nL-2", "tab\there", "bell\x07", "nel\x85x", "sep\u2028x", "\x1c"]
)
def test_control_characters_from_input_are_shown_escaped(typed: str) -> None:
    error = NotFoundError(f"no bin labelled {typed}", f"hint for {typed}")
    text = str(error)
    assert len(text.splitlines()) == 1  # str.splitlines knows every line boundary
    assert text.isprintable()
    assert repr(typed)[1:-1] in text  # the escaped form, as Python writes it


def test_plain_messages_are_unchanged() -> None:
    error = KitbinError("value '4k7 Ω' for µ: ±5 % — ok", "see `kitbin bin list`")
    assert str(error) == "value '4k7 Ω' for µ: ±5 % — ok (see `kitbin bin list`)"
    assert error.msg == "value '4k7 Ω' for µ: ±5 % — ok"  # the raw message is kept


def test_import_row_errors_are_one_line_too() -> None:
    assert "\n" not in str(ImportRowError("line 2: no bin labelled '0\n0'"))
    assert ImportRowError.exit_code == ExitCode.INPUT

"""The project's error types.

Every error the user can cause is a :class:`KitbinError`. The command line turns
one into a single line ``kitbin: error: ...`` on stderr and an exit code from
:class:`ExitCode`; the terminal UI shows it as a notification. Subclasses also
inherit the matching builtin (as pint's errors do), so callers may catch either.
"""

from __future__ import annotations

from enum import IntEnum


class ExitCode(IntEnum):
    """Process exit codes of the command line, one per error area."""

    OK = 0
    FAILURE = 1
    USAGE = 2
    INPUT = 3
    NOT_FOUND = 4
    STOCK = 5
    STORE = 6
    CAPTURE = 7


#: Characters that would break the one line of an error (line breaks, tabs and other
#: control characters, Unicode line and paragraph separators), shown escaped instead.
_UNPRINTABLE = {
    c: repr(chr(c))[1:-1] for c in (*range(0x20), 0x7F, *range(0x80, 0xA0), 0x2028, 0x2029)
}


def one_line(text: str) -> str:
    """``text`` with line breaks and other control characters shown escaped."""
    return text.translate(_UNPRINTABLE)


class KitbinError(Exception):
    """Base of every error kitbin reports to a user.

    Parameters
    ----------
    msg
        One line that names the input and what was expected.
    hint
        Optional advice, e.g. the option that fixes the problem.
    """

    exit_code: ExitCode = ExitCode.FAILURE

    def __init__(self, msg: str, hint: str = "") -> None:
        super().__init__(msg)
        self.msg = msg
        self.hint = hint

    def __str__(self) -> str:
        """The message and hint on one line: a newline or other control character
        taken from the user's input (a label, a CSV cell) is shown escaped (``\\n``)."""
        return one_line(f"{self.msg} ({self.hint})" if self.hint else self.msg)


class QuantityError(KitbinError, ValueError):
    """A value that does not parse, or has the wrong dimension."""

    exit_code = ExitCode.INPUT

    def __init__(
        self, msg: str, hint: str = "", *, text: str = "", expected: str = "", got: str = ""
    ) -> None:
        super().__init__(msg, hint)
        self.text = text
        self.expected = expected
        self.got = got


class MarkingError(KitbinError, ValueError):
    """A colour code, numeric code or letter code that cannot be decoded."""

    exit_code = ExitCode.INPUT


class SpecError(KitbinError, ValueError):
    """A converter specification that is inconsistent or out of range."""

    exit_code = ExitCode.INPUT


class CaptureError(KitbinError, ValueError):
    """A bench capture that cannot be read or analysed."""

    exit_code = ExitCode.CAPTURE


class ImportRowError(KitbinError, ValueError):
    """A bad row in an imported file; the whole file is rejected."""

    exit_code = ExitCode.INPUT

    def __init__(self, msg: str, hint: str = "", *, line: int | None = None) -> None:
        super().__init__(msg, hint)
        self.line = line


class NotFoundError(KitbinError, LookupError):
    """A kit, bin, plan or pick list that does not exist."""

    exit_code = ExitCode.NOT_FOUND


class StockError(KitbinError):
    """A stock move that would drive a quantity below zero, or a reservation conflict."""

    exit_code = ExitCode.STOCK


class StoreError(KitbinError):
    """The database could not be opened, migrated or written."""

    exit_code = ExitCode.STORE


def exit_code_for(error: BaseException) -> ExitCode:
    """The exit code for an error: its own for a :class:`KitbinError`, else FAILURE."""
    return error.exit_code if isinstance(error, KitbinError) else ExitCode.FAILURE

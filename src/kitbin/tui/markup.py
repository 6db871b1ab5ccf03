"""Text shown in widgets that read markup: every ``[`` made literal.

Rich's and Textual's own ``escape`` leave ``[ and ]`` alone, which Textual's markup
parser then reads as a tag and drops (measured with Textual 8.2.8), so kitbin's
texts (``[`` and ``]`` keys, ``≥ [1, 2]`` ranges, labels) go through this instead.
"""

from __future__ import annotations


def plain(text: str) -> str:
    """``text`` with every opening bracket escaped, for a markup-reading widget."""
    return text.replace("[", r"\[")


def cells(values: tuple[object, ...] | list[object]) -> list[object]:
    """Table cells shown as they are: text becomes a Rich ``Text`` (a DataTable reads a
    plain ``str`` cell as markup)."""
    from rich.text import Text

    return [Text(v) if isinstance(v, str) else v for v in values]

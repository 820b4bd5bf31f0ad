"""Compact HTML tables for results shown in a notebook.

Notebook front ends stretch a table over the whole output width and right-align every cell, so
a label and its value end up at opposite edges.  These tables keep their natural width, start at
the left edge, put each value right beside its label, right-align numbers (so their digits line
up) and left-align text.  Styling is inline and plain: no classes, no colours of their own.
Every cell's text is escaped here; callers pass plain strings.
"""

from __future__ import annotations

import html
import re
from collections.abc import Sequence

__all__ = ["field_table", "grid_table", "is_number_text"]

_TABLE = "border-collapse:collapse;width:auto;margin:0.25em 0 0.5em 0;table-layout:auto"
_CELL = "padding:1px 0.9em 1px 0;vertical-align:top;border:none"
_LABEL = f"{_CELL};text-align:left;font-weight:bold;white-space:nowrap"
_TEXT = f"{_CELL};text-align:left;max-width:46em"
_NUMBER = f"{_CELL};text-align:right;white-space:nowrap;font-variant-numeric:tabular-nums"
_NUMBER_HEAD = f"{_CELL};text-align:right;font-weight:bold;white-space:nowrap"

_REAL = r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?"
_NUMBER_RE = re.compile(rf"(\u00b1 ?)?{_REAL}([+-](\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?j)?")


def is_number_text(text: str) -> bool:
    """True for a printed number: ``-2.46194``, ``64``, ``1.9e-16``, ``0.5-1.2j``, ``± 3e-9``."""
    return _NUMBER_RE.fullmatch(text.strip()) is not None


def _cell(tag: str, text: str, style: str) -> str:
    return f'<{tag} style="{style}">{html.escape(text)}</{tag}>'


def field_table(rows: Sequence[tuple[str, str]]) -> str:
    """A two-column table of ``(label, value)`` rows: each value right beside its label.

    Numbers are right-aligned within the value column; other text is left-aligned.
    """
    body = "".join(
        "<tr>"
        + _cell("th", label, _LABEL)
        + _cell("td", value, _NUMBER if is_number_text(value) else _TEXT)
        + "</tr>"
        for label, value in rows
    )
    return f'<table style="{_TABLE}"><tbody>{body}</tbody></table>'


def grid_table(
    header: Sequence[str], rows: Sequence[Sequence[str]], numeric: Sequence[int] = ()
) -> str:
    """A table with a header row; the columns listed in ``numeric`` are right-aligned."""
    right = set(numeric)
    head = "".join(
        _cell(
            "th", h, _LABEL.replace("text-align:left", "text-align:right") if k in right else _LABEL
        )
        for k, h in enumerate(header)
    )
    body = "".join(
        "<tr>"
        + "".join(_cell("td", t, _NUMBER if k in right else _TEXT) for k, t in enumerate(row))
        + "</tr>"
        for row in rows
    )
    return f'<table style="{_TABLE}"><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>'

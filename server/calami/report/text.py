"""The human-readable report: where, what, the line with a marker, the fixes.

    docs/guide.md:12:17: recieve (unknown word)
       12 | The daemon will recieve the batch.
          |                 ^^^^^^^
          = suggestions: receive, relieve

Colour is used only when asked for (the caller decides: a terminal and no
``NO_COLOR``).  The marker lines up under the word even when the line holds
tabs or wide characters (CJK, emoji), which take two terminal cells.
"""

from __future__ import annotations

import os
import unicodedata
from typing import IO, Sequence

from calami.report import Located, Summary

TAB_WIDTH = 4
MAX_CONTEXT = 100  # terminal cells of context shown before cutting the line

_RESET = "\x1b[0m"
_BOLD = "\x1b[1m"
_DIM = "\x1b[2m"
_RED = "\x1b[31m"
_YELLOW = "\x1b[33m"
_GREEN = "\x1b[32m"

_KIND_LABEL = {"nonword": "unknown word", "realword": "possibly the wrong word"}


def use_colour(stream: IO[str], choice: str = "auto") -> bool:
    """``auto``: colour only on a terminal and when ``NO_COLOR`` is unset or empty."""
    if choice == "always":
        return True
    if choice == "never":
        return False
    if os.environ.get("NO_COLOR"):
        return False
    isatty = getattr(stream, "isatty", None)
    return bool(isatty and isatty())


def cell_width(ch: str) -> int:
    """Terminal cells one character takes (stdlib approximation of wcwidth)."""
    if unicodedata.combining(ch) or unicodedata.category(ch) in ("Mn", "Me", "Cf"):
        return 0
    return 2 if unicodedata.east_asian_width(ch) in ("W", "F") else 1


def _expand(text: str) -> tuple[str, list[int]]:
    """Tabs expanded; and for each code point of ``text``, its starting cell."""
    out: list[str] = []
    cells: list[int] = []
    col = 0
    for ch in text:
        cells.append(col)
        if ch == "\t":
            pad = TAB_WIDTH - col % TAB_WIDTH
            out.append(" " * pad)
            col += pad
        else:
            out.append(ch)
            col += cell_width(ch)
    cells.append(col)
    return "".join(out), cells


def render_one(item: Located, colour: bool = False) -> str:
    """The block of lines for one finding."""
    finding = item.finding
    paint = _painter(colour)
    accent = _RED if finding.kind == "nonword" else _YELLOW
    label = _KIND_LABEL.get(finding.kind, finding.kind)
    if finding.confident:
        label += ", confident fix"
    head = f"{paint(_BOLD, f'{item.path}:{item.line}:{item.column}')}: {paint(accent + _BOLD, finding.word)} ({label})"

    start = item.column - 1
    end = item.end_column - 1 if item.end_line == item.line else len(item.context)
    shown, cells = _expand(item.context)
    left_cell, right_cell = cells[start], cells[min(end, len(item.context))]
    cut = 0
    if right_cell > MAX_CONTEXT:
        cut = max(0, left_cell - MAX_CONTEXT // 2)
    gutter = str(item.line)
    pad = " " * len(gutter)
    before = _cells_slice(shown, cut, left_cell)
    word_part = _cells_slice(shown, left_cell, right_cell)
    after = _cells_slice(shown, right_cell, right_cell + MAX_CONTEXT)
    ellipsis = "…" if cut else ""
    context = f"{ellipsis}{before}{paint(accent, word_part)}{after}"
    marker = " " * (len(ellipsis) + left_cell - cut) + paint(accent, "^" * max(1, right_cell - left_cell))
    lines = [
        head,
        f"  {gutter} {paint(_DIM, '|')} {context}".rstrip(),
        f"  {pad} {paint(_DIM, '|')} {marker}",
    ]
    if finding.suggestions:
        names = ", ".join(paint(_GREEN, s.text) for s in finding.suggestions)
        lines.append(f"  {pad} {paint(_DIM, '=')} suggestions: {names}")
    return "\n".join(lines)


def _cells_slice(shown: str, lo: int, hi: int) -> str:
    """The part of ``shown`` (tabs already expanded) between two cell positions."""
    out: list[str] = []
    col = 0
    for ch in shown:
        width = cell_width(ch)
        if col >= hi:
            break
        if col >= lo:
            out.append(ch)
        col += width
    return "".join(out)


def _painter(colour: bool):
    if not colour:
        return lambda code, text: text
    return lambda code, text: f"{code}{text}{_RESET}" if text else text


def summary_line(summary: Summary) -> str:
    """One closing line: what was found, in how many files."""
    files = _plural(summary.files_checked, "file")
    skipped = f", {_plural(summary.files_skipped, 'file')} skipped" if summary.files_skipped else ""
    if not summary.findings:
        return f"No findings in {files} checked{skipped}."
    kinds = []
    if summary.nonword:
        kinds.append(f"{summary.nonword} unknown")
    if summary.realword:
        kinds.append(f"{summary.realword} wrong-word")
    where = _plural(summary.files_with_findings, "file")
    return f"{_plural(summary.findings, 'finding')} ({', '.join(kinds)}) in {where}; {files} checked{skipped}."


def _plural(count: int, noun: str) -> str:
    return f"{count} {noun}" if count == 1 else f"{count} {noun}s"


def write_document(stream: IO[str], located: Sequence[Located], colour: bool) -> None:
    """Print the findings of one document, separated by blank lines."""
    for item in located:
        stream.write(render_one(item, colour) + "\n\n")

"""The human-readable report: where, what, the line with the word marked, the fixes.

    docs/guide.md:12:17: recieve (non-word, confident fix)
        The daemon will >>recieve<< the batch.
        fixes: receive, relieve

The first line is the GNU ``file:line:column:`` form editors and CI logs
link.  The word is marked inline (``>>word<<``), so the marking needs no
colour and cannot drift from the word when the line holds tabs or wide
characters (CJK, emoji take two terminal cells).  Colour is used only when
asked for (the caller decides: a terminal and no ``NO_COLOR``).
"""

from __future__ import annotations

import os
import unicodedata
from typing import IO, Sequence

from calami.findings import KIND_LABELS
from calami.report import Located, Summary

TAB_WIDTH = 4
MAX_CONTEXT = 100  # terminal cells of context shown before cutting the line

_RESET = "\x1b[0m"
_BOLD = "\x1b[1m"
_DIM = "\x1b[2m"
_RED = "\x1b[31m"
_YELLOW = "\x1b[33m"
_GREEN = "\x1b[32m"

INDENT = "    "
MARK_OPEN, MARK_CLOSE = ">>", "<<"  # around the flagged word in the excerpt


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
    """The block of lines for one finding: the place, the line with the word marked, the fixes."""
    finding = item.finding
    paint = _painter(colour)
    accent = _RED if finding.kind == "nonword" else _YELLOW
    label = KIND_LABELS.get(finding.kind, finding.kind)
    if finding.confident:
        label += ", confident fix"
    head = f"{paint(_BOLD, f'{item.path}:{item.line}:{item.column}')}: {paint(accent + _BOLD, finding.word)} ({label})"
    lines = [head, INDENT + excerpt(item, lambda word: f"{MARK_OPEN}{paint(accent + _BOLD, word)}{MARK_CLOSE}")]
    if finding.suggestions:
        names = ", ".join(paint(_GREEN, s.text) for s in finding.suggestions)
        lines.append(f"{INDENT}{paint(_DIM, 'fixes:')} {names}")
    return "\n".join(lines)


def excerpt(item: Located, mark) -> str:
    """The word's line, tabs expanded, indentation dropped, cut to about ``MAX_CONTEXT`` cells around the word.

    ``mark`` wraps the word itself; the marking is inline, so it stays with
    the word whatever the tabs or wide characters before it.
    """
    start = item.column - 1
    end = item.end_column - 1 if item.end_line == item.line else len(item.context)
    shown, cells = _expand(item.context)
    left_cell, right_cell = cells[start], cells[min(end, len(item.context))]
    cut = max(0, left_cell - MAX_CONTEXT // 2) if right_cell > MAX_CONTEXT else 0
    before = _cells_slice(shown, cut, left_cell)
    word_part = _cells_slice(shown, left_cell, right_cell)
    rest = _cells_slice(shown, right_cell, cells[-1])
    after = _cells_slice(rest, 0, MAX_CONTEXT)
    tail = "…" if len(after) < len(rest) else ""
    if not cut:
        before = before.lstrip()  # the line's own indentation says nothing here
    return f"{'…' if cut else ''}{before}{mark(word_part)}{after.rstrip()}{tail}"


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
    """One closing line: what was found, in how many files and words, and what was left out."""
    skipped = ""
    if summary.files_skipped:
        reasons = ", ".join(f"{n} {why}" for why, n in sorted(summary.skipped.items(), key=lambda kv: (-kv[1], kv[0])))
        skipped = f"{summary.files_skipped} skipped ({reasons})" if reasons else f"{summary.files_skipped} skipped"
    if not summary.files_checked:
        return f"Nothing checked: {skipped}; --verbose names them." if skipped else "Nothing checked: no files found."
    checked = f"{_plural(summary.files_checked, 'file')} checked ({_plural(summary.words, 'word', thousands=True)})"
    tail = f"; {skipped}." if skipped else "."
    if not summary.findings:
        return f"No findings in {checked}{tail}"
    kinds = []
    if summary.nonword:
        kinds.append(_plural(summary.nonword, KIND_LABELS["nonword"]))
    if summary.realword:
        kinds.append(_plural(summary.realword, KIND_LABELS["realword"]))
    where = _plural(summary.files_with_findings, "file")
    rate = f", {1000 * summary.findings / summary.words:.2f} findings per 1,000 words" if summary.words else ""
    return f"{_plural(summary.findings, 'finding')} ({', '.join(kinds)}) in {where}; {checked}{rate}{tail}"


def _plural(count: int, noun: str, thousands: bool = False) -> str:
    number = f"{count:,}" if thousands else str(count)
    return f"{number} {noun}" if count == 1 else f"{number} {noun}s"


def write_document(stream: IO[str], located: Sequence[Located], colour: bool) -> None:
    """Print the findings of one document, separated by blank lines."""
    for item in located:
        stream.write(render_one(item, colour) + "\n\n")

"""Small scanning helpers shared by the extractors.

Every extractor walks the original string and reports offsets into it; these
helpers keep line handling (``\\n``, ``\\r\\n``, lone ``\\r``) and whitespace
trimming in one place so offsets stay exact everywhere.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterator

import regex

from calami.text.spans import Span, subtract

_LINE_END = regex.compile(r"\r\n|\r|\n")
_WS = " \t\f\v\u00a0\u3000\ufeff"


@dataclass(frozen=True, slots=True)
class ExtractOptions:
    """Knobs every extractor accepts; unknown ones are simply ignored.

    ``strings``: also check string literals in source files.
    ``comment_char``: the comment character of commit messages (git's
    ``core.commentChar``).
    """

    strings: bool = False
    comment_char: str = "#"


def iter_lines(text: str, start: int = 0, end: int | None = None) -> Iterator[tuple[int, int, int]]:
    """Yield (line_start, content_end, next_line_start) for each line.

    ``content_end`` excludes the line break.  A text ending with a break
    has no extra empty line after it.
    """
    if end is None:
        end = len(text)
    pos = start
    search = _LINE_END.search
    while pos < end:
        m = search(text, pos, end)
        if m is None:
            yield pos, end, end
            return
        yield pos, m.start(), m.end()
        pos = m.end()


def lines(text: str, start: int = 0, end: int | None = None) -> list[tuple[int, int, int]]:
    return list(iter_lines(text, start, end))


def trim(text: str, start: int, end: int) -> tuple[int, int]:
    """Shrink [start, end) so it neither starts nor ends with whitespace."""
    while start < end and (text[start] in _WS or text[start] in "\r\n"):
        start += 1
    while end > start and (text[end - 1] in _WS or text[end - 1] in "\r\n"):
        end -= 1
    return start, end


def indent_of(text: str, start: int, end: int) -> tuple[int, int]:
    """(column width with tabs to multiples of 4, offset of first non-blank)."""
    col = 0
    pos = start
    while pos < end:
        c = text[pos]
        if c == " ":
            col += 1
        elif c == "\t":
            col += 4 - col % 4
        else:
            break
        pos += 1
    return col, pos


def is_blank(text: str, start: int, end: int) -> bool:
    return trim(text, start, end)[0] >= end


class SpanList:
    """Collects spans in document order, trimming and dropping empty ones.

    ``brk()`` marks that the next span starts a new block, whatever the
    caller passes as ``breaks_before``.
    """

    __slots__ = ("spans", "_pending_break", "_text")

    def __init__(self, text: str) -> None:
        self._text = text
        self.spans: list[Span] = []
        self._pending_break = True

    def brk(self) -> None:
        self._pending_break = True

    def add(self, start: int, end: int, kind: str = "text", breaks_before: bool = False) -> None:
        start, end = trim(self._text, start, end)
        if end <= start:
            return
        breaks = breaks_before or self._pending_break
        self._pending_break = False
        self.spans.append(Span(start, end, kind, breaks))


class ForwardFinder:
    """``str.find``/regex search that stays linear when asked again and again.

    Openers are met in increasing order; remembering the last answer means
    an unclosed construct repeated n times costs O(n), not O(n^2).
    """

    __slots__ = ("_text", "_search", "_last_from", "_last_hit", "_end")

    def __init__(self, text: str, needle: "str | regex.Pattern[str]", end: int | None = None) -> None:
        self._text = text
        self._end = len(text) if end is None else end
        if isinstance(needle, str):
            pattern = regex.compile(regex.escape(needle))
        else:
            pattern = needle
        self._search = pattern.search
        self._last_from = -1
        self._last_hit: tuple[int, int] | None = None

    def find(self, pos: int) -> tuple[int, int] | None:
        """First match (start, end) at or after ``pos``, or None."""
        if self._last_from >= 0 and pos >= self._last_from:
            hit = self._last_hit
            if hit is None:
                return None
            if hit[0] >= pos:
                return hit
        m = self._search(self._text, pos, self._end)
        self._last_from = pos
        self._last_hit = (m.start(), m.end()) if m else None
        return self._last_hit


def cut(text: str, spans: list[Span], holes: list[tuple[int, int]]) -> list[Span]:
    """``spans.subtract`` plus trimming: no piece starts or ends with blanks.

    A piece that trims to nothing hands its ``breaks_before`` to the next
    piece, so a block still starts a new sentence context.
    """
    pieces = subtract(spans, holes) if holes else spans
    out: list[Span] = []
    carry = False
    for piece in pieces:
        s, e = trim(text, piece.start, piece.end)
        if e <= s:
            carry = carry or piece.breaks_before
            continue
        out.append(Span(s, e, piece.kind, piece.breaks_before or carry))
        carry = False
    return out

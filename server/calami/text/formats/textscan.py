"""Small scanning helpers shared by the extractors.

Every extractor walks the original string and reports offsets into it; these
helpers keep line handling (``\\n``, ``\\r\\n``, lone ``\\r``) and whitespace
trimming in one place so offsets stay exact everywhere.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterator

import regex

from calami.text.spans import Span

_LINE_END = regex.compile(r"\r\n|\r|\n")


@dataclass(frozen=True, slots=True)
class ExtractOptions:
    """Knobs every extractor accepts; unknown ones are simply ignored.

    ``strings``: also check string literals in source files.
    ``comment_char``: the comment character of commit messages (git's
    ``core.commentChar``).
    """

    strings: bool = False
    comment_char: str = "#"


_ODD_BREAKS = regex.compile("[\v\f\x1c\x1d\x1e\x85\u2028\u2029]")


def iter_lines(text: str, start: int = 0, end: int | None = None) -> Iterator[tuple[int, int, int]]:
    """Yield (line_start, content_end, next_line_start) for each line.

    Lines end at "\\n", "\\r\\n" or a lone "\\r" only (as LSP counts them);
    ``content_end`` excludes the break.  A text ending with a break has no
    extra empty line after it.
    """
    if end is None:
        end = len(text)
    if start >= end:
        return
    chunk = text[start:end] if (start or end != len(text)) else text
    if _ODD_BREAKS.search(chunk) is None:
        # str.splitlines is fast and agrees with us when no other separators occur.
        pos = start
        for line in chunk.splitlines(True):
            nxt = pos + len(line)
            if line.endswith("\r\n"):
                yield pos, nxt - 2, nxt
            elif line.endswith(("\n", "\r")):
                yield pos, nxt - 1, nxt
            else:
                yield pos, nxt, nxt
            pos = nxt
        return
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
    """Shrink [start, end) so it neither starts nor ends with whitespace (or a BOM)."""
    while start < end and (text[start].isspace() or text[start] == "\ufeff"):
        start += 1
    while end > start and (text[end - 1].isspace() or text[end - 1] == "\ufeff"):
        end -= 1
    return start, end


def indent_of(text: str, start: int, end: int) -> tuple[int, int]:
    """(column width with tabs to multiples of 4, offset of first non-blank)."""
    return indent_from(text, start, end, 0)


def indent_from(text: str, pos: int, end: int, col: int) -> tuple[int, int]:
    """Column reached and offset of the first non-blank at or after ``pos``, starting at column ``col``."""
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

    __slots__ = ("rows", "_pending_break", "_text")

    def __init__(self, text: str) -> None:
        self._text = text
        self.rows: list[tuple[int, int, str, bool]] = []  # (start, end, kind, breaks_before)
        self._pending_break = True

    @property
    def spans(self) -> list[Span]:
        return [Span(*row) for row in self.rows]

    def brk(self) -> None:
        self._pending_break = True

    def add(self, start: int, end: int, kind: str = "text", breaks_before: bool = False) -> None:
        start, end = trim(self._text, start, end)
        if end <= start:
            return
        breaks = breaks_before or self._pending_break
        self._pending_break = False
        self.rows.append((start, end, kind, breaks))


class ForwardFinder:
    """``str.find``/regex search that stays linear when asked again and again.

    Openers are met in increasing order; remembering the last answer means
    an unclosed construct repeated n times costs O(n), not O(n^2).
    """

    __slots__ = ("_text", "_pattern", "_needle", "_last_from", "_last_hit", "_end")

    def __init__(self, text: str, needle: "str | regex.Pattern[str]", end: int | None = None) -> None:
        self._text = text
        self._end = len(text) if end is None else end
        self._needle = needle if isinstance(needle, str) else ""
        self._pattern = None if isinstance(needle, str) else needle
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
        if self._pattern is None:
            i = self._text.find(self._needle, pos, self._end)
            hit = (i, i + len(self._needle)) if i >= 0 else None
        else:
            m = self._pattern.search(self._text, pos, self._end)
            hit = (m.start(), m.end()) if m else None
        self._last_from = pos
        self._last_hit = hit
        return hit


def cut(text: str, spans: "list[tuple[int, int, str, bool]]", holes: list[tuple[int, int]]) -> list[Span]:
    """Cut holes out of spans and trim the pieces; linear in spans + holes.

    Same meaning as ``spans.subtract`` (the piece after a hole does not
    start a new sentence), but one merge walk over both sorted lists, and
    no piece starts or ends with blanks.  A piece that trims to nothing
    hands its ``breaks_before`` to the next piece, so a block still starts
    a new sentence context.  ``spans`` are (start, end, kind, breaks_before) rows, sorted and
    non-overlapping.
    """
    out: list[Span] = []
    if not holes:
        carry = False
        for start, end, kind, breaks in spans:
            if end > start and not (text[start].isspace() or text[end - 1].isspace() or "\ufeff" in (text[start], text[end - 1])):
                out.append(Span(start, end, kind, breaks or carry))
                carry = False
                continue
            s, e = trim(text, start, end)
            if e > s:
                out.append(Span(s, e, kind, breaks or carry))
                carry = False
            else:
                carry = carry or breaks
        return out
    cuts = sorted(h for h in holes if h[1] > h[0])
    carry = False
    i = 0
    nh = len(cuts)
    for start, end, kind, breaks in spans:
        pos = start
        while i < nh and cuts[i][1] <= pos:
            i += 1
        j = i
        while True:
            if j < nh and cuts[j][0] < end:
                piece_end = max(pos, min(cuts[j][0], end))
                next_pos = max(pos, cuts[j][1])
                j += 1
            else:
                piece_end = end
                next_pos = -1
            if piece_end > pos:
                if text[pos].isspace() or text[piece_end - 1].isspace() or "\ufeff" in (text[pos], text[piece_end - 1]):
                    s, e = trim(text, pos, piece_end)
                else:
                    s, e = pos, piece_end
                if e > s:
                    out.append(Span(s, e, kind, breaks or carry))
                    carry = False
                else:
                    carry = carry or breaks
                breaks = False
            if next_pos < 0 or next_pos >= end:
                break
            pos = next_pos
        carry = carry or breaks
    return out


class LineEnds:
    """End of the line holding an offset (before its break), remembered.

    Scanners ask for the line end at many offsets of the same line; a fresh
    search each time would make one very long line cost O(n^2).
    """

    __slots__ = ("_text", "_start", "_end")

    def __init__(self, text: str) -> None:
        self._text = text
        self._start = 0
        self._end = -1

    def at(self, pos: int) -> int:
        if self._start <= pos <= self._end:
            return self._end
        text = self._text
        n = text.find("\n", pos)
        limit = n if n >= 0 else len(text)
        r = text.find("\r", pos, limit)
        end = r if r >= 0 else limit
        self._start, self._end = pos, end
        return end

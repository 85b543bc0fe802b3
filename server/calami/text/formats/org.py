"""Org documents (``.org``): headlines, paragraphs, lists, quotes, table cells.

One pass over the lines.  Not prose: source, example, export and comment
blocks (``#+BEGIN_SRC`` ... ``#+END_SRC``, any case), ``#+KEYWORD:`` lines
other than the title, subtitle and caption, ``#`` comment lines,
fixed-width ``:`` lines, drawers (``:PROPERTIES:`` ... ``:END:``), planning
lines (``SCHEDULED:``, ``DEADLINE:``, ``CLOSED:``) and table rules.  In a
headline the stars, a TODO keyword, a priority cookie and trailing tags are
cut off; in a list item the bullet, a checkbox and a counter.  Inline holes:
``~code~``, ``=verbatim=``, ``src_lang{...}``, inline math, link targets
(``[[target][description]]`` keeps the description), footnote references
and timestamps.  Every inline pattern is bounded, so the scan stays linear.
"""

from __future__ import annotations

import regex

from calami.text.formats.textscan import ExtractOptions, SpanList, cut, is_blank, iter_lines
from calami.text.spans import Span

_HEADLINE = regex.compile(r"(\*+)[ \t]+(?:(?:TODO|DONE|NEXT|WAITING|HOLD|CANCELLED|CANCELED)(?=[ \t]|$)[ \t]*)?"
                          r"(?:\[#[A-Za-z0-9]\][ \t]*)?")
_TAGS = regex.compile(r"[ \t]+:(?:[\w@#%]+:)+[ \t]*$")
_BLOCK_BEGIN = regex.compile(r"[ \t]*#\+begin_(\w+)", regex.IGNORECASE)
_KEYWORD = regex.compile(r"[ \t]*#\+(\w+):[ \t]*", regex.IGNORECASE)
_PROSE_KEYWORDS = frozenset({"title", "subtitle", "caption"})
_PROSE_BLOCKS = frozenset({"quote", "verse", "center"})
_COMMENT = regex.compile(r"[ \t]*#(?:[ \t]|$)")
_FIXED = regex.compile(r"[ \t]*:(?:[ \t]|$)")
_DRAWER = regex.compile(r"[ \t]*:[\w-]+:[ \t]*$")
_DRAWER_END = regex.compile(r"[ \t]*:end:[ \t]*$", regex.IGNORECASE)
_BLOCK_CLOSE = regex.compile(r"[ \t]*#\+end_\w+", regex.IGNORECASE)
_PLANNING = regex.compile(r"[ \t]*(?:SCHEDULED|DEADLINE|CLOSED):")
_TABLE = regex.compile(r"[ \t]*\|")
_TABLE_RULE = regex.compile(r"[ \t]*\|[-+|: \t]*$")
_ITEM = regex.compile(r"([ \t]*)(?:[-+]|(?<=^[ \t]+)\*|\d+[.)])[ \t]+(?:\[@\d+\][ \t]*)?(?:\[[ xX-]\][ \t]*)?")
_FOOTNOTE_DEF = regex.compile(r"\[fn:[\w-]+\][ \t]*")
_INLINE = regex.compile(
    r"~[^~\s](?:[^~\r\n]{0,500}[^~\s])?~"
    r"|=[^=\s](?:[^=\r\n]{0,500}[^=\s])?="
    r"|src_[\w+-]{1,40}(?:\[[^\]\r\n]{0,200}\])?\{[^}\r\n]{0,500}\}"
    r"|\\\([^\r\n]{0,500}?\\\)|\$[^$\s](?:[^$\r\n]{0,300}[^$\s])?\$"
    r"|\[\[[^\[\]\r\n]{1,1000}\]\]"  # [[target]]: the reader sees the target itself
    r"|\[\[[^\[\]\r\n]{1,1000}\]\[|\]\]"  # [[target][ and the closing ]] of a described link
    r"|\[fn:[\w-]{0,60}\]"
    r"|[<\[]\d{4}-\d\d-\d\d[^\]>\r\n]{0,60}[\]>]"
)


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    """Prose spans of an Org document."""
    rows = SpanList(text)
    holes: list[tuple[int, int]] = []
    block_end: regex.Pattern[str] | None = None  # inside a non-prose block until this line
    in_drawer = False
    for start, end, _next in iter_lines(text):
        line = text[start:end]
        if block_end is not None:
            if block_end.match(line):
                block_end = None
                rows.brk()
            continue
        if in_drawer:
            in_drawer = not _DRAWER_END.match(line)
            continue
        if is_blank(text, start, end):
            rows.brk()
            continue
        begin = _BLOCK_BEGIN.match(line)
        if begin:
            rows.brk()
            name = begin.group(1).lower()
            if name not in _PROSE_BLOCKS:
                block_end = regex.compile(r"[ \t]*#\+end_" + regex.escape(name) + r"\b", regex.IGNORECASE)
            continue
        if _BLOCK_CLOSE.match(line):
            rows.brk()
            continue
        keyword = _KEYWORD.match(line)
        if keyword:
            rows.brk()
            if keyword.group(1).lower() in _PROSE_KEYWORDS:
                rows.add(start + keyword.end(), end, "heading", True)
            continue
        if _COMMENT.match(line) or _FIXED.match(line) or _PLANNING.match(line):
            rows.brk()
            continue
        if _DRAWER.match(line):
            rows.brk()
            in_drawer = not _DRAWER_END.match(line)
            continue
        head = _HEADLINE.match(line)
        if head and line.startswith("*"):
            title_end = end
            tags = _TAGS.search(line)
            if tags:
                title_end = start + tags.start()
            rows.add(start + head.end(), title_end, "heading", True)
            _inline(text, start + head.end(), title_end, holes)
            rows.brk()
            continue
        if _TABLE.match(line):
            rows.brk()
            if not _TABLE_RULE.match(line):
                _cells(text, start, end, rows, holes)
            rows.brk()
            continue
        body = start
        item = _ITEM.match(line)
        if item:
            body = start + item.end()
            rows.brk()
        elif start == 0 or text[start - 1] in "\r\n":
            note = _FOOTNOTE_DEF.match(line)
            if note:
                body = start + note.end()
                rows.brk()
        rows.add(body, end, "text")
        _inline(text, body, end, holes)
    return cut(text, rows.rows, holes)


def _inline(text: str, start: int, end: int, holes: list[tuple[int, int]]) -> None:
    for m in _INLINE.finditer(text, start, end):
        holes.append(m.span())


def _cells(text: str, start: int, end: int, rows: SpanList, holes: list[tuple[int, int]]) -> None:
    """Each table cell is a span of its own (a cell is not a sentence with its neighbour)."""
    pos = text.index("|", start) + 1
    while pos < end:
        bar = text.find("|", pos, end)
        stop = end if bar < 0 else bar
        rows.add(pos, stop, "table-cell", True)
        _inline(text, pos, stop, holes)
        pos = stop + 1

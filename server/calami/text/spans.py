"""Prose spans: the pieces of a document that are meant to be read as prose.

Every extractor (Markdown, LaTeX, source comments, ...) turns document text
into a list of spans; everything downstream (tokens, findings, positions) is
expressed in offsets into the *original* document string, so a span never
copies or rewrites text.  Offsets are Python string indices (code points).
"""

from __future__ import annotations

import bisect
import re
from dataclasses import dataclass
from typing import Iterable, Sequence


_BREAK = re.compile(r"\r\n|\r|\n")


@dataclass(frozen=True, slots=True)
class Span:
    """A half-open range [start, end) of prose in the document.

    ``kind`` says where the prose came from ("text", "heading", "comment",
    "docstring", "link-text", ...).  ``breaks_before`` is true when the span
    does not continue the sentence of the previous span (a new paragraph,
    a new comment block); bigram context never crosses such a break.
    """

    start: int
    end: int
    kind: str = "text"
    breaks_before: bool = True

    def __post_init__(self) -> None:
        if self.start < 0 or self.end < self.start:
            raise ValueError(f"bad span [{self.start}, {self.end})")

    def text(self, document: str) -> str:
        return document[self.start : self.end]


def normalise(spans: Iterable[Span]) -> list[Span]:
    """Sort spans, drop empty ones and merge overlaps, so tokenizing is simple."""
    ordered = sorted((s for s in spans if s.end > s.start), key=lambda s: (s.start, s.end))
    merged: list[Span] = []
    for span in ordered:
        if merged and span.start < merged[-1].end:
            last = merged[-1]
            if span.end > last.end:
                merged[-1] = Span(last.start, span.end, last.kind, last.breaks_before)
            continue
        merged.append(span)
    return merged


def subtract(spans: Sequence[Span], holes: Iterable[tuple[int, int]]) -> list[Span]:
    """Cut ranges out of spans (inline code, URLs inside a paragraph, ...).

    The pieces left of one span keep its kind; the piece after a hole does
    not start a new sentence, but context across the hole is lost anyway
    because tokens never straddle it.
    """
    cuts = sorted(h for h in holes if h[1] > h[0])
    out: list[Span] = []
    for span in spans:
        pos = span.start
        first = True
        for hs, he in cuts:
            if he <= pos or hs >= span.end:
                continue
            if hs > pos:
                out.append(Span(pos, hs, span.kind, span.breaks_before if first else False))
                first = False
            pos = max(pos, he)
        if pos < span.end:
            out.append(Span(pos, span.end, span.kind, span.breaks_before if first else False))
    return out


class LineIndex:
    """Maps string offsets to (line, column) and back, for any line ending.

    Lines end at "\\n", "\\r\\n" or a lone "\\r" (as LSP defines them).
    """

    def __init__(self, text: str) -> None:
        # One scan for every break ("\r\n" before a lone "\r" or "\n").
        self.line_starts = [0] + [m.end() for m in _BREAK.finditer(text)]
        self.length = len(text)

    def position(self, offset: int) -> tuple[int, int]:
        """0-based (line, column in code points) of an offset."""
        line = bisect.bisect_right(self.line_starts, offset) - 1
        return line, offset - self.line_starts[line]

    def offset(self, line: int, column: int) -> int:
        if line >= len(self.line_starts):
            return self.length
        return min(self.line_starts[line] + column, self.length)

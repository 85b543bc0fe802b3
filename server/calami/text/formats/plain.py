"""Plain text: every character is prose; blank lines separate paragraphs."""

from __future__ import annotations

from calami.text.formats.textscan import ExtractOptions, SpanList, is_blank, iter_lines
from calami.text.spans import Span


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    out = SpanList(text)
    para_start = -1
    para_end = -1
    for start, end, _next in iter_lines(text):
        if is_blank(text, start, end):
            if para_start >= 0:
                out.add(para_start, para_end, "text", True)
                para_start = -1
            continue
        if para_start < 0:
            para_start = start
        para_end = end
    if para_start >= 0:
        out.add(para_start, para_end, "text", True)
    return out.spans

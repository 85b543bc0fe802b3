"""Markdown extraction after an edit, re-parsing only the blocks it touched.

The editor sends a keystroke; re-parsing a 20,000-word document for it costs
several milliseconds.  The parser records *checkpoints*: line starts where
its state is pristine (no open container or leaf block), so the lines after
one parse alike whatever came before.  After an edit we restart at the last
checkpoint before the changed text and stop at the first checkpoint after
it that the previous parse also had (shifted by the edit's length change);
the spans before and after are reused.  Property-tested: the result always
equals a full extraction (tests/property/test_markdown_incremental.py).
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass

from calami.text.formats.markdown import _Parser
from calami.text.formats.markdown_lines import front_matter_end
from calami.text.spans import Span

_BLOCK = 4096  # chars compared per step when looking for the first difference


@dataclass(frozen=True)
class MarkdownState:
    """One extraction: the text, its spans, and the parser's checkpoints."""

    text: str
    spans: list[Span]
    checkpoints: list[int]
    front_matter: int


def extract_state(text: str) -> MarkdownState:
    """A full extraction that remembers what ``update`` needs."""
    marks: list[int] = []
    parser = _Parser(text, marks)
    return MarkdownState(text, parser.run(), marks, front_matter_end(text))


def update(state: MarkdownState, text: str) -> MarkdownState:
    """The extraction of ``text``, reusing ``state`` (of an earlier text) where the edit allows."""
    old = state.text
    if text == old:
        return state
    prefix = common_prefix(old, text)
    suffix = common_suffix(old, text, limit=min(len(old), len(text)) - prefix)
    old_end, new_end = len(old) - suffix, len(text) - suffix
    marks = state.checkpoints
    i = bisect.bisect_left(marks, prefix) - 1
    if i < 0 or front_matter_end(text) != state.front_matter:
        return extract_state(text)
    begin = marks[i]
    delta = len(text) - len(old)
    # Old checkpoints at or after the edit, met in increasing order.
    j = bisect.bisect_left(marks, old_end)

    def resync(pos: int) -> bool:
        nonlocal j
        if pos < new_end:
            return False
        while j < len(marks) and marks[j] < pos - delta:
            j += 1
        return j < len(marks) and marks[j] == pos - delta

    fresh_marks = marks[:i]
    parser = _Parser(text, fresh_marks)
    middle = parser.run(begin, resync)
    spans = state.spans
    head = bisect.bisect_left(spans, begin, key=_start)
    out = spans[:head]
    out.extend(middle)
    if parser.stopped is not None:
        old_stop = parser.stopped - delta
        tail = bisect.bisect_left(spans, old_stop, key=_start)
        if delta:
            out.extend([Span(s.start + delta, s.end + delta, s.kind, s.breaks_before) for s in spans[tail:]])
            fresh_marks.extend([m + delta for m in marks[j:]])
        else:
            out.extend(spans[tail:])
            fresh_marks.extend(marks[j:])
    return MarkdownState(text, out, fresh_marks, state.front_matter)


def _start(span: Span) -> int:
    return span.start


def common_prefix(a: str, b: str) -> int:
    """Length of the longest common prefix (block compares in C, then a binary search)."""
    n = min(len(a), len(b))
    lo = 0
    while lo + _BLOCK <= n and a[lo : lo + _BLOCK] == b[lo : lo + _BLOCK]:
        lo += _BLOCK
    hi = min(n, lo + _BLOCK)  # a[:lo] == b[:lo]; the first difference is before hi (or none)
    if a[lo:hi] == b[lo:hi]:
        return hi
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if a[lo:mid] == b[lo:mid]:
            lo = mid
        else:
            hi = mid
    return lo


def common_suffix(a: str, b: str, limit: int) -> int:
    """Length of the longest common suffix, at most ``limit``."""
    la, lb = len(a), len(b)
    lo = 0
    while lo + _BLOCK <= limit and a[la - lo - _BLOCK : la - lo] == b[lb - lo - _BLOCK : lb - lo]:
        lo += _BLOCK
    hi = min(limit, lo + _BLOCK)
    if a[la - hi : la - lo] == b[lb - hi : lb - lo]:
        return hi
    # a[la-lo:] == b[lb-lo:]; they differ somewhere in the last hi characters.
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if a[la - mid : la - lo] == b[lb - mid : lb - lo]:
            lo = mid
        else:
            hi = mid
    return lo

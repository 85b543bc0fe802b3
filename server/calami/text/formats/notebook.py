"""The Markdown cells of a Jupyter notebook (``.ipynb``, nbformat 4 JSON).

Spans are offsets into the notebook's JSON text, as for every kind, so one
linear scan finds each markdown cell's ``source`` string literals, decodes
them into the cell's Markdown (keeping, for each character, its offset in
the JSON), runs the Markdown extractor on that, and maps the spans back.
A JSON escape (``\\"``, ``\\n``, ``\\u00e9``) is never inside a span: a span is
cut around it, and a word that holds an escaped letter is left out whole
rather than checked in pieces.  Code cells, outputs and metadata are not
prose.  Text that is not a notebook yields no spans.
"""

from __future__ import annotations

from array import array

import regex

from calami.text.formats.textscan import ExtractOptions
from calami.text.spans import Span

_TOKEN = regex.compile(r'"(?:[^"\\]|\\.)*"|[{}\[\]:,]|[^\s{}\[\]:,"]+', regex.DOTALL)
_ESCAPE = regex.compile(r"\\(?:u[0-9a-fA-F]{4}|.)", regex.DOTALL)
_SIMPLE = {'"': '"', "\\": "\\", "/": "/", "b": "\b", "f": "\f", "n": "\n", "r": "\r", "t": "\t"}


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    """Prose spans of the notebook's Markdown cells."""
    from calami.text.formats import markdown

    spans: list[Span] = []
    for literals in _markdown_sources(text):
        cell, offsets, escaped = _decode(text, literals)
        for span in markdown.extract(cell, options):
            spans.extend(_mapped(span, cell, offsets, escaped))
    return spans


def _markdown_sources(text: str) -> list[list[tuple[int, int]]]:
    """For each markdown cell, the (start, end) of its source string literals' contents.

    A scan of the JSON tokens keeping a path of container kinds and keys;
    it needs the cells at ``/cells/N`` and their ``cell_type`` and
    ``source`` members, in whatever order they come.
    """
    # One entry per open container: [kind ("obj"/"arr"), the object's current key, a key comes next].
    stack: list[list] = []
    cells: list[list[tuple[int, int]]] = []
    cell_type: str | None = None
    sources: list[tuple[int, int]] = []
    for m in _TOKEN.finditer(text):
        tok = m.group()
        c = tok[0]
        if c == "{" or c == "[":
            stack.append(["obj" if c == "{" else "arr", None, c == "{"])
            if _path(stack) == "cell":
                cell_type, sources = None, []
        elif c == "}" or c == "]":
            if not stack:
                return []
            if _path(stack) == "cell" and cell_type == "markdown":
                cells.append(sources)
            stack.pop()
        elif c == ":":
            continue
        elif c == ",":
            if stack and stack[-1][0] == "obj":
                stack[-1][2] = True
        elif c == '"':
            if stack and stack[-1][0] == "obj" and stack[-1][2]:
                stack[-1][1] = tok[1:-1]
                stack[-1][2] = False
                continue
            where = _path(stack)
            if where == "cell" and stack[-1][1] == "cell_type":
                cell_type = tok[1:-1]
            elif where == "cell" and stack[-1][1] == "source" or where == "source-line":
                sources.append((m.start() + 1, m.end() - 1))
    return cells


def _path(stack: list[list]) -> str:
    """Where the scan is: "cell" inside /cells/N, "source-line" inside /cells/N/source, or ""."""
    depth = len(stack)
    if depth >= 3 and stack[0][0] == "obj" and stack[0][1] == "cells" and stack[1][0] == "arr" and stack[2][0] == "obj":
        if depth == 3:
            return "cell"
        if depth == 4 and stack[2][1] == "source" and stack[3][0] == "arr":
            return "source-line"
    return ""


def _decode(text: str, literals: list[tuple[int, int]]) -> tuple[str, array, bytearray]:
    """The cell's text; for each of its characters, the JSON offset and whether it came from an escape."""
    out: list[str] = []
    offsets = array("q")
    escaped = bytearray()
    for start, end in literals:
        pos = start
        for m in _ESCAPE.finditer(text, start, end):
            piece = text[pos : m.start()]
            out.append(piece)
            offsets.extend(range(pos, m.start()))
            escaped.extend(b"\0" * len(piece))
            seq = m.group()
            char = chr(int(seq[2:], 16)) if seq[1] == "u" else _SIMPLE.get(seq[1], seq[1])
            out.append(char)
            offsets.append(m.start())
            escaped.append(1)
            pos = m.end()
        piece = text[pos:end]
        out.append(piece)
        offsets.extend(range(pos, end))
        escaped.extend(b"\0" * len(piece))
    return "".join(out), offsets, escaped


def _mapped(span: Span, cell: str, offsets: array, escaped: bytearray) -> list[Span]:
    """A cell span as JSON spans: cut at each escape, and without words holding an escaped letter."""
    pieces: list[Span] = []
    i = span.start
    end = span.end
    while i < end:
        if escaped[i]:
            j = i + 1
            if cell[i].isalnum():  # an escaped letter: leave its whole word out
                while pieces and i > span.start and _wordish(cell[i - 1]):
                    i -= 1
                    pieces = _trim_last(pieces, offsets[i])
                while j < end and _wordish(cell[j]):
                    j += 1
            i = j
            continue
        j = i
        while j < end and not escaped[j] and offsets[j] - offsets[i] == j - i:
            j += 1
        pieces.append(Span(offsets[i], offsets[j - 1] + 1, span.kind, False))
        i = j
    if pieces and span.breaks_before:
        pieces[0] = Span(pieces[0].start, pieces[0].end, span.kind, True)
    return pieces


def _wordish(ch: str) -> bool:
    return ch.isalnum() or ch in "'’_-"


def _trim_last(pieces: list[Span], cut: int) -> list[Span]:
    """Drop what lies at or after JSON offset ``cut`` from the last piece."""
    last = pieces[-1]
    if cut <= last.start:
        pieces.pop()
    elif cut < last.end:
        pieces[-1] = Span(last.start, cut, last.kind, last.breaks_before)
    return pieces

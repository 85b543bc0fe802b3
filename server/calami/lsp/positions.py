"""LSP positions <-> code-point offsets, in the negotiated encoding.

LSP counts columns in UTF-16 code units unless the client offers another
encoding (LSP 3.17 ``general.positionEncodings``); Python strings index code
points (UTF-32).  Conversions go through the codecs in C (encode, slice,
decode) instead of a Python loop, so a 5 MB single-line document does not
make every position conversion crawl.
"""

from __future__ import annotations

import re
from itertools import accumulate

from lsprotocol import types

from calami.text.spans import LineIndex

UTF8 = "utf-8"
UTF16 = "utf-16"
UTF32 = "utf-32"

_CODECS = {UTF8: ("utf-8", 1), UTF16: ("utf-16-le", 2), UTF32: ("utf-32-le", 4)}


def choose_encoding(offered: list[str] | None) -> str:
    """UTF-16 unless the client offers UTF-8 (cheaper for us to honour)."""
    offered = [getattr(e, "value", e) for e in offered or []]  # enum members or plain strings
    if UTF8 in offered:
        return UTF8
    if UTF16 in offered or not offered:
        return UTF16
    if UTF32 in offered:
        return UTF32
    return UTF16


def units(text: str, encoding: str) -> int:
    """Length of ``text`` in code units of ``encoding``."""
    if encoding == UTF32 or text.isascii():
        return len(text)
    codec, width = _CODECS[encoding]
    return len(text.encode(codec, "surrogatepass")) // width


def column_to_units(line: str, column: int, encoding: str) -> int:
    """Code-point column -> code-unit column."""
    return units(line[:column], encoding)


def units_to_column(line: str, count: int, encoding: str) -> int:
    """Code-unit column -> code-point column, clamped to the line.

    A column inside a multi-unit character (half a surrogate pair, the
    middle of a UTF-8 sequence) snaps back to the character's start.
    """
    if count <= 0:
        return 0
    if encoding == UTF32 or line.isascii():
        return min(count, len(line))
    codec, width = _CODECS[encoding]
    data = line.encode(codec, "surrogatepass")
    return len(data[: count * width].decode(codec, "ignore"))


_BREAK = re.compile(r"\r\n|\r|\n")
# Characters str.splitlines also breaks at, but LSP does not.
_OTHER_BREAKS = "\x0b\x0c\x1c\x1d\x1e\x85\u2028\u2029"


class _Lines(LineIndex):
    """The same line index, built without a Python-level step per line.

    The map is rebuilt after every edit; even a generator over the matches
    of a 20,000-word document's lines cost a millisecond per keystroke.
    ``str.splitlines`` does it in C, and agrees with LSP's line breaks
    unless the text holds one of the extra breaks it knows.
    """

    def __init__(self, text: str) -> None:  # noqa: super().__init__ is the slow path this replaces
        if not any(c in text for c in _OTHER_BREAKS):  # one C search each
            starts = [0, *accumulate(map(len, text.splitlines(True)))]
            if len(starts) > 1 and text[-1] not in "\r\n":
                starts.pop()  # the end of a last line without a break starts nothing
        else:
            starts = [0, *(m.end() for m in _BREAK.finditer(text))]
        self.line_starts = starts
        self.length = len(text)


class PositionMap:
    """Offsets of one document text <-> LSP positions."""

    def __init__(self, text: str, encoding: str = UTF16) -> None:
        self.text = text
        self.encoding = encoding
        self.index = _Lines(text)

    def _line(self, line: int) -> str:
        starts = self.index.line_starts
        start = starts[line]
        end = starts[line + 1] if line + 1 < len(starts) else len(self.text)
        return self.text[start:end].rstrip("\r\n")

    def position(self, offset: int) -> types.Position:
        offset = max(0, min(offset, len(self.text)))
        line, column = self.index.position(offset)
        start = self.index.line_starts[line]
        return types.Position(line, units(self.text[start : start + column], self.encoding))

    def range(self, start: int, end: int) -> types.Range:
        return types.Range(self.position(start), self.position(end))

    def offset(self, position: types.Position) -> int:
        """Offset of a client position, clamped the way LSP asks (past the end -> end)."""
        if position.line < 0 or position.character < 0:
            raise ValueError(f"negative position {position.line}:{position.character}")
        if position.line >= len(self.index.line_starts):
            return len(self.text)
        line = self._line(position.line)
        return self.index.line_starts[position.line] + units_to_column(line, position.character, self.encoding)

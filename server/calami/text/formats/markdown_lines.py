"""Line-level helpers of the Markdown parser: columns, blanks, front matter, ATX ends.

Tabs count to the next multiple of four columns, as CommonMark says.
"""

from __future__ import annotations

import regex
from calami.text.formats.textscan import indent_from

_FRONT_YAML = regex.compile(r"---[ \t]*(?:\r\n|\n|\r)")
_FRONT_YAML_END = regex.compile(r"(?m)^(?:---|\.\.\.)[ \t]*(?:\r\n|\n|\r|\Z)")
_FRONT_TOML = regex.compile(r"\+\+\+[ \t]*(?:\r\n|\n|\r)")
_FRONT_TOML_END = regex.compile(r"(?m)^\+\+\+[ \t]*(?:\r\n|\n|\r|\Z)")


def front_matter_end(text: str) -> int:
    """Offset after a YAML (---) or TOML (+++) front matter block, or 0 (after a BOM)."""
    start = 1 if text.startswith("\ufeff") else 0
    for opener, closer in ((_FRONT_YAML, _FRONT_YAML_END), (_FRONT_TOML, _FRONT_TOML_END)):
        m = opener.match(text, start)
        if m:
            c = closer.search(text, m.end())
            if c:
                return c.end()
    return start


def atx_content_end(text: str, start: int, end: int) -> int:
    """End of an ATX heading's text, before an optional closing run of '#'."""
    e = end
    while e > start and text[e - 1] in " \t":
        e -= 1
    h = e
    while h > start and text[h - 1] == "#":
        h -= 1
    if h < e and (h == start or text[h - 1] in " \t"):
        return h
    return e


indent = indent_from  # column reached and offset of the first non-blank at or after ``pos``


def advance(text: str, pos: int, end: int, col: int, target: int) -> tuple[int, int]:
    """Consume blanks up to column ``target`` (a container's content column)."""
    while pos < end and col < target and text[pos] in " \t":
        col = col + 1 if text[pos] == " " else col + 4 - col % 4
        pos += 1
    return pos, col


def rest_blank(text: str, pos: int, end: int) -> bool:
    """True when only spaces and tabs remain before ``end``."""
    while pos < end:
        if text[pos] not in " \t":
            return False
        pos += 1
    return True


def strip_blanks(text: str, s: int, e: int) -> tuple[int, int]:
    """Drop spaces and tabs from both ends of [s, e)."""
    while s < e and text[s] in " \t":
        s += 1
    while e > s and text[e - 1] in " \t":
        e -= 1
    return s, e

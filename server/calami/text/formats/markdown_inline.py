"""Inline Markdown: the pieces of a paragraph that are not prose.

Returns *holes* (ranges to cut out of a paragraph's spans): code spans of
any backtick count, autolinks, bare URLs, raw HTML tags and comments (and
the content of inline ``<code>``-like elements), link/image destinations and
titles, reference labels, inline math, emphasis underscores, and the
backslash of an escape.  One left-to-right pass; every search is either
bounded or memoised so the pass stays linear on adversarial input.
"""

from __future__ import annotations

import regex

from calami.text.formats.textscan import ForwardFinder

_INTERESTING = regex.compile(r"[`\\<\]$_]|(?:https?|ftp)://|www\.")
_BACKTICKS = regex.compile(r"`+")
_ASCII_PUNCT = frozenset("!\"#$%&'()*+,-./:;<=>?@[\\]^_`{|}~")
_AUTOLINK = regex.compile(r"<(?:[A-Za-z][A-Za-z0-9+.\-]{1,31}:[^\s<>]{0,4000}|[\w.!#$%&'*+/=?^`{|}~\-]{1,200}@[\w\-.]{1,250})>")
_TAG = regex.compile(
    r"<(?:(?P<open>[A-Za-z][A-Za-z0-9\-]{0,40})(?:\s(?:[^>\"'<]|\"[^\"]{0,2000}\"|'[^']{0,2000}'){0,2000})?/?"
    r"|/[A-Za-z][A-Za-z0-9\-]{0,40}\s*|!--|\?|!\[CDATA\[|![A-Za-z])",
)
_LINK_TAIL = regex.compile(
    r"""\(\s*(?:<[^<>\n]{0,2000}>|[^\s()<>]{0,4000}(?:\([^\s()]{0,2000}\)[^\s()<>]{0,2000}){0,16})"""
    r"""(?:\s+(?:"[^"]{0,2000}"|'[^']{0,2000}'|\([^()]{0,2000}\)))?\s*\)""",
)
_REF_LABEL = regex.compile(r"\[[^\[\]]{0,999}\]")
_MATH = regex.compile(r"\$\$[^$]{1,20000}?\$\$|\$(?![\s$])[^$]{0,20000}?(?<![\s\\])\$(?!\d)")
_URL_END = regex.compile(r"[^\s<>\"'`]*")
_URL_TRAIL = ".,;:!?*_~'\")]"
_WORDISH = regex.compile(r"[\w\\]+")

# Inline HTML elements whose content is code, not prose.
_CODE_ELEMENTS = frozenset({"code", "kbd", "samp", "var", "pre", "script", "style", "math", "tt"})


def inline_holes(text: str, start: int, end: int) -> list[tuple[int, int]]:
    """Ranges inside [start, end) that are Markdown syntax or code."""
    holes: list[tuple[int, int]] = []
    search = _INTERESTING.search
    m = search(text, start, end)
    if m is None:
        return holes
    closers: _BacktickClosers | None = None
    finders: dict[str, ForwardFinder] = {}
    pos = start
    while True:
        if pos > start:
            m = search(text, pos, end)
        if m is None:
            break
        p = m.start()
        c = text[p]
        if c == "`":
            if closers is None:
                closers = _BacktickClosers(text, start, end)
            run = _BACKTICKS.match(text, p, end).end()
            close = closers.after(run, run - p)
            if close is None:
                pos = run  # literal backticks
                continue
            holes.append((p, close))
            pos = close
        elif c == "\\":
            nxt = text[p + 1] if p + 1 < end else ""
            if nxt == "_":
                # An escaped underscore sits inside an identifier: drop the whole word.
                s = p
                while s > start and (text[s - 1].isalnum() or text[s - 1] in "_\\"):
                    s -= 1
                e = _WORDISH.match(text, p, end).end()
                holes.append((s, e))
                pos = e
            elif nxt in _ASCII_PUNCT or nxt in "\r\n":
                holes.append((p, p + 1))
                pos = p + 2
            else:
                pos = p + 1
        elif c == "<":
            pos = _angle(text, p, end, holes, finders)
        elif c == "]":
            pos = p + 1
            if p + 1 < end and text[p + 1] == "(":
                lm = _LINK_TAIL.match(text, p + 1, end)
                if lm:
                    holes.append((p + 1, lm.end()))
                    pos = lm.end()
            elif p + 1 < end and text[p + 1] == "[":
                lm = _REF_LABEL.match(text, p + 1, end)
                if lm:
                    holes.append((p + 1, lm.end()))
                    pos = lm.end()
        elif c == "$":
            mm = _MATH.match(text, p, end)
            if mm:
                holes.append((p, mm.end()))
                pos = mm.end()
            else:
                pos = p + 1
        elif c == "_":
            e = p
            while e < end and text[e] == "_":
                e += 1
            before = text[p - 1] if p > start else " "
            after = text[e] if e < end else " "
            if not (before.isalnum() and after.isalnum()):
                holes.append((p, e))
            pos = e
        else:  # a bare URL
            e = _URL_END.match(text, p, end).end()
            while e > p and text[e - 1] in _URL_TRAIL:
                e -= 1
            holes.append((p, e))
            pos = max(e, p + 1)
    return holes


def _angle(text: str, p: int, end: int, holes: list[tuple[int, int]], finders: dict[str, ForwardFinder]) -> int:
    am = _AUTOLINK.match(text, p, end)
    if am:
        holes.append((p, am.end()))
        return am.end()
    tm = _TAG.match(text, p, end)
    if tm is None:
        return p + 1
    opener = tm.group()
    if opener == "<!--":
        key = "-->"
    elif opener == "<?":
        key = "?>"
    elif opener == "<![CDATA[":
        key = "]]>"
    elif opener.startswith("<!"):
        key = ">"
    else:
        if not text.startswith(">", tm.end()):
            return p + 1
        tag_end = tm.end() + 1
        name = (tm.group("open") or "").lower()
        if name in _CODE_ELEMENTS and not text.startswith("/>", tag_end - 2):
            finder = finders.get(name)
            if finder is None:
                finder = finders[name] = ForwardFinder(
                    text, regex.compile(r"</" + name + r"\s*>", regex.IGNORECASE), end
                )
            hit = finder.find(tag_end)
            if hit is not None:
                holes.append((p, hit[1]))
                return hit[1]
        holes.append((p, tag_end))
        return tag_end
    finder = finders.get(key)
    if finder is None:
        finder = finders[key] = ForwardFinder(text, key, end)
    hit = finder.find(tm.end())
    if hit is None:
        return p + 1
    holes.append((p, hit[1]))
    return hit[1]


class _BacktickClosers:
    """Finds the next backtick run of exactly n backticks, in amortised O(1).

    All runs in the paragraph are listed once; a cursor per run length only
    moves forward because openers are met left to right.
    """

    def __init__(self, text: str, start: int, end: int) -> None:
        self._runs: dict[int, list[int]] = {}
        for m in _BACKTICKS.finditer(text, start, end):
            self._runs.setdefault(m.end() - m.start(), []).append(m.start())
        self._cursor: dict[int, int] = {}

    def after(self, pos: int, length: int) -> int | None:
        """End offset of the first run of ``length`` backticks starting at or after ``pos``."""
        runs = self._runs.get(length)
        if not runs:
            return None
        i = self._cursor.get(length, 0)
        while i < len(runs) and runs[i] < pos:
            i += 1
        self._cursor[length] = i
        if i == len(runs):
            return None
        return runs[i] + length

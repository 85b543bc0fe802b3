"""Inline reStructuredText: the pieces of a paragraph that are not prose.

Holes: inline literals ````x````, interpreted text with a code-like role
(``:func:`x```) or no role, the role names and ``<target>`` parts of
roles that carry text (``:ref:`Title <label>```), the whole of a bare
``:ref:`label``` or ``:doc:`path``` (the reader sees the target's title), hyperlink references'
``<url>``, substitution references ``|name|``, footnote and citation
references ``[1]_``, and field names at a line start (``:param x:``).
Also used for Python docstrings.
"""

from __future__ import annotations

import regex

from calami.text.formats.textscan import ForwardFinder

# Roles whose content is prose a reader sees (Sphinx/docutils names, common practice).
TEXT_ROLES = frozenset(
    "ref doc term abbr emphasis strong sup sub subscript superscript guilabel menuselection dfn "
    "numref title-reference title t any".split()
)

# Roles whose bare content is a label or a path, not the text shown (Sphinx).
LABEL_ROLES = frozenset("ref doc numref any".split())

_NEXT = regex.compile(r"(?m)``|`|\||\[|(?<=^[ \t]*):(?=[^:\s])")
_ROLE_BEFORE = regex.compile(r":(?P<role>[A-Za-z][\w:.+-]{0,60}):$")
_INTERPRETED = regex.compile(r"`(?P<body>(?:[^`\\]|\\[\s\S]){1,4000})`(?::[A-Za-z][\w:.+-]{0,60}:)?(?P<ref>__?)?")
_TARGET = regex.compile(r"\s*<[^<>`]{1,2000}>$")
_SUBST = regex.compile(r"\|[^|\s](?:[^|\r\n]{0,200}[^|\s])?\|(?:__?)?")
_FOOTREF = regex.compile(r"\[(?:#[\w.-]*|\*|\d+|[A-Za-z][\w.-]*)\]_")
_FIELD = regex.compile(r":(?:[^:\\\r\n]|\\.){1,200}:(?=\s|$)")


def inline_holes(text: str, start: int, end: int) -> list[tuple[int, int]]:
    """Ranges inside [start, end) that are reStructuredText markup or code."""
    holes: list[tuple[int, int]] = []
    literal_close = ForwardFinder(text, "``", end)
    pos = start
    while True:
        m = _NEXT.search(text, pos, end)
        if m is None:
            break
        p = m.start()
        tok = m.group()
        if tok == "``":
            hit = literal_close.find(p + 2)
            if hit is None:
                pos = p + 2
                continue
            holes.append((p, hit[1]))
            pos = hit[1]
        elif tok == "`":
            pos = _interpreted(text, p, start, end, holes)
        elif tok == "|":
            sm = _SUBST.match(text, p, end)
            if sm and (p == start or not text[p - 1].isalnum()):
                holes.append(sm.span())
                pos = sm.end()
            else:
                pos = p + 1
        elif tok == "[":
            fm = _FOOTREF.match(text, p, end)
            if fm:
                holes.append(fm.span())
                pos = fm.end()
            else:
                pos = p + 1
        else:  # a field name at a line start
            fm = _FIELD.match(text, p, end)
            if fm:
                holes.append(fm.span())
                pos = fm.end()
            else:
                pos = m.end() + 1
    return holes


def _interpreted(text: str, p: int, start: int, end: int, holes: list[tuple[int, int]]) -> int:
    im = _INTERPRETED.match(text, p, end)
    if im is None:
        return p + 1
    role_start = p
    role = ""
    # A role prefix such as :func: ends right before the backtick.
    look = max(start, p - 64)
    rm = _ROLE_BEFORE.search(text, look, p)
    if rm:
        role = rm.group("role").split(":")[-1].lower()
        role_start = rm.start()
    body_start, body_end = im.start("body"), im.end("body")
    is_reference = im.group("ref") is not None
    if role in TEXT_ROLES or (not role and is_reference):
        tm = _TARGET.search(text, body_start, body_end)
        if tm is None and role in LABEL_ROLES:
            # :ref:`label` shows the target's title, not the label: not prose here.
            holes.append((role_start, im.end()))
            return im.end()
        holes.append((role_start, body_start))  # role name and opening backtick
        if tm:
            holes.append((tm.start(), im.end()))
        else:
            holes.append((body_end, im.end()))
    else:
        holes.append((role_start, im.end()))
    return im.end()

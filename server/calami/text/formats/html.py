"""HTML: text nodes only.

Skipped: tags and their attributes, comments, doctype, processing
instructions, CDATA, character references, and the content of elements
that hold code or data (script, style, pre, code, textarea, ...).  Block
elements (p, li, td, h1, br, ...) start a new sentence context; inline
elements (a, em, span, ...) do not.  Not a full HTML5 tokenizer: a scanner
good enough for prose, linear on any input.
"""

from __future__ import annotations

import regex

from calami.text.formats.textscan import ExtractOptions, ForwardFinder, SpanList
from calami.text.spans import Span

_NEXT = regex.compile(r"[<&]")
_TAG = regex.compile(
    r"<(?P<close>/)?(?P<name>[A-Za-z][A-Za-z0-9\-:]{0,40})"
    r"(?:[\s/](?:[^>\"'<]|\"[^\"]{0,4000}\"|'[^']{0,4000}'){0,4000})?>"
)
_ENTITY = regex.compile(r"&(?:#[0-9]{1,8}|#[xX][0-9A-Fa-f]{1,8}|[A-Za-z][A-Za-z0-9]{0,31});")
_SPECIAL = (("<!--", "-->"), ("<![CDATA[", "]]>"), ("<?", ">"), ("<!", ">"))

SKIP_CONTENT = frozenset(
    "script style pre code textarea kbd samp var math svg template tt listing xmp plaintext".split()
)
_INLINE_CODE = frozenset("code kbd samp var tt math".split())
BLOCK = frozenset(
    """address article aside blockquote body br caption center dd details dialog dir div dl dt
    fieldset figcaption figure footer form frame frameset h1 h2 h3 h4 h5 h6 head header hr html
    iframe img legend li link main menu menuitem meta nav noframes ol optgroup option p param
    section source summary table tbody td tfoot th thead title tr track ul""".split()
)


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    return extract_range(text, 0, len(text))


def extract_range(text: str, start: int, end: int, kind: str = "text") -> list[Span]:
    """Prose spans of the HTML fragment text[start:end]."""
    out = SpanList(text)
    finders: dict[str, ForwardFinder] = {}
    pos = start
    piece = start
    while pos < end:
        m = _NEXT.search(text, pos, end)
        if m is None:
            break
        p = m.start()
        if text[p] == "&":
            em = _ENTITY.match(text, p, end)
            if em:
                out.add(piece, p, kind)
                piece = pos = em.end()
            else:
                pos = p + 1
            continue
        skip_to, is_break = _markup_end(text, p, end, finders)
        if skip_to is None:
            pos = p + 1
            continue
        out.add(piece, p, kind)
        if is_break:
            out.brk()
        piece = pos = skip_to
    out.add(piece, end, kind)
    return out.spans


def _markup_end(text: str, p: int, end: int, finders: dict[str, ForwardFinder]) -> tuple[int | None, bool]:
    """Where the markup starting at ``p`` ends, and whether it breaks the sentence."""
    tm = _TAG.match(text, p, end)
    if tm is not None:
        name = tm.group("name").lower()
        if tm.group("close") is None and name in SKIP_CONTENT and not tm.group().endswith("/>"):
            finder = finders.get("</" + name)
            if finder is None:
                closer = regex.compile(r"</" + regex.escape(name) + r"\s*>", regex.I)
                finder = finders["</" + name] = ForwardFinder(text, closer, end)
            hit = finder.find(tm.end())
            return (hit[1] if hit else end), name not in _INLINE_CODE
        return tm.end(), name in BLOCK
    for opener, closer in _SPECIAL:
        if text.startswith(opener, p):
            finder = _finder(finders, text, closer, None, end)
            hit = finder.find(p + len(opener))
            return (hit[1] if hit else end), True
    return None, False


def _finder(
    finders: dict[str, ForwardFinder], text: str, key: str, pattern: "regex.Pattern[str] | None", end: int
) -> ForwardFinder:
    f = finders.get(key)
    if f is None:
        f = finders[key] = ForwardFinder(text, pattern if pattern is not None else key, end)
    return f

"""AsciiDoc documents (``.adoc``): titles, paragraphs, lists, admonitions, prose blocks, table cells.

One pass over the lines.  Not prose: listing, literal, passthrough and
comment blocks (``----``, ``....``, ``++++``, ``////``; closed by the same
line), ``//`` comment lines, the header lines under the document title
(author, revision), attribute entries (``:name: value``), block
attribute and anchor lines (``[source,python]``, ``[[id]]``), block macros
on their own line (``image::x.png[]``, ``include::x[]``) and literal
paragraphs (indented lines).  Example, sidebar, quote and open blocks
(``====``, ``****``, ``____``, ``--``) hold prose.  Cut off: the ``=`` of
titles, list markers and checkboxes, admonition labels (``NOTE:``), the
``|`` of table cells.  Inline holes: backtick monospace, ``+passthrough+``,
``{attribute}`` references, macro targets (``link:url[text]`` and
``https://url[text]`` keep the text), cross references (``<<id,text>>``
keeps the text) and role attributes (``[.role]#text#``).  Every inline
pattern is bounded, so the scan stays linear.
"""

from __future__ import annotations

import regex

from calami.text.formats.textscan import ExtractOptions, SpanList, cut, is_blank, iter_lines
from calami.text.spans import Span

_DELIMITER = regex.compile(r"(----+|\.\.\.\.+|\+\+\+\++|////+|====+|\*\*\*\*+|____+|--|\|===+)[ \t]*$")
_CODE_BLOCKS = frozenset("-.+/")  # first character of delimiters whose content is not prose
_TITLE = regex.compile(r"(?:=|#){1,6}[ \t]+")
_BLOCK_TITLE = regex.compile(r"\.(?=[^.\s])")
_ATTRIBUTE_ENTRY = regex.compile(r":!?[\w-]+!?:(?:[ \t]|$)")
_BLOCK_ATTRIBUTES = regex.compile(r"\[[^\]]*\][ \t]*$")
_BLOCK_MACRO = regex.compile(r"[a-z][\w-]*::[^\s\[]*\[[^\]\r\n]*\][ \t]*$")
_COMMENT = regex.compile(r"//(?!//)")
_ADMONITION = regex.compile(r"(?:NOTE|TIP|IMPORTANT|WARNING|CAUTION):[ \t]+")
_ITEM = regex.compile(r"[ \t]*(?:[*\-]{1,5}|\.{1,5}|\d+\.)[ \t]+(?:\[[ xX*]\][ \t]+)?")
_DESCRIPTION = regex.compile(r"(?<=\S)(?::{2,4}|;;)(?=[ \t]|$)")
_INLINE = regex.compile(
    r"`[^`\s](?:[^`\r\n]{0,500}[^`\s])?`"
    r"|\+\+?[^+\s](?:[^+\r\n]{0,500}[^+\s])?\+\+?"
    r"|\{[\w-]{1,60}\}"
    r"|(?:(?:link|xref|mailto|image|kbd|btn|menu|footnote|pass|stem|latexmath|asciimath|icon|anchor):"
    r"[^\s\[:]{0,300}|(?:https?|ftp|irc)://[^\s\[]{1,500})\[(?=[^\]\r\n]{0,500}\])"
    r"|\](?<=\[[^\[\]\r\n]{0,500}\])"  # the closing bracket of a macro's text (bracket first: cheap)
    r"|<<[^,<>\r\n]{1,200}(?:,|>>)|>>"
    r"|\[[.#%][^\]\r\n]{0,200}\](?=#)|#"
)


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    """Prose spans of an AsciiDoc document."""
    rows = SpanList(text)
    holes: list[tuple[int, int]] = []
    closer: str | None = None  # inside a non-prose block until this exact line
    literal = False  # inside a literal (indented) paragraph
    in_text = False  # the previous line was paragraph or list text (an indented line continues it)
    header = False  # the lines under the document title (author, revision, attributes)
    for start, end, _next in iter_lines(text):
        line = text[start:end]
        if closer is not None:
            if line.rstrip() == closer:
                closer = None
                rows.brk()
            continue
        if is_blank(text, start, end):
            literal = in_text = header = False
            rows.brk()
            continue
        if literal or header:
            continue
        was_text, in_text = in_text, False
        delimiter = _DELIMITER.match(line)
        if delimiter:
            rows.brk()
            if delimiter.group(1)[0] in _CODE_BLOCKS and delimiter.group(1) != "--":
                closer = delimiter.group(1)
            continue
        if line[0] in " \t" and not was_text:
            literal = True  # an indented paragraph is shown verbatim
            rows.brk()
            continue
        if _COMMENT.match(line) or _ATTRIBUTE_ENTRY.match(line) or _BLOCK_ATTRIBUTES.match(line) or _BLOCK_MACRO.match(line):
            rows.brk()
            continue
        title = _TITLE.match(line)
        if title:
            header = line.startswith("= ")  # the document title: its header lines follow
            rows.add(start + title.end(), end, "heading", True)
            _inline(text, start + title.end(), end, holes)
            rows.brk()
            continue
        block_title = _BLOCK_TITLE.match(line)
        if block_title:
            rows.add(start + 1, end, "heading", True)
            _inline(text, start + 1, end, holes)
            rows.brk()
            continue
        if line.startswith("|"):
            rows.brk()
            _cells(text, start, end, rows, holes)
            rows.brk()
            continue
        body = start
        in_text = True
        item = _ITEM.match(line)
        admonition = _ADMONITION.match(line)
        if item:
            body = start + item.end()
            rows.brk()
        elif admonition:
            body = start + admonition.end()
            rows.brk()
        term = _DESCRIPTION.search(text, body, end)
        if term:  # "term:: description": two pieces
            rows.brk()
            rows.add(body, term.start(), "text", True)
            _inline(text, body, term.start(), holes)
            body = term.end()
            rows.brk()
        content_end = end - 2 if line.endswith(" +") else end  # a hard line break
        rows.add(body, content_end, "text")
        _inline(text, body, content_end, holes)
    return cut(text, rows.rows, holes)


def _inline(text: str, start: int, end: int, holes: list[tuple[int, int]]) -> None:
    for m in _INLINE.finditer(text, start, end):
        holes.append(m.span())


def _cells(text: str, start: int, end: int, rows: SpanList, holes: list[tuple[int, int]]) -> None:
    """Each table cell is a span of its own."""
    pos = start + 1
    while pos < end:
        bar = text.find("|", pos, end)
        stop = end if bar < 0 else bar
        rows.add(pos, stop, "table-cell", True)
        _inline(text, pos, stop, holes)
        pos = stop + 1

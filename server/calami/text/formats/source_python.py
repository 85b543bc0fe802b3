"""Python: comments and docstrings; other string literals when asked.

A forward scan over comments and string literals (all prefixes, single
and triple quotes).  A docstring is a string that stands alone as a
statement right after a ``def``/``class`` header line, at the top of the
module, or after an assignment (attribute docstrings): it is read as
reStructuredText-ish prose (doctests, literal blocks and field names are
skipped).  The shebang and encoding lines are never prose.
"""

from __future__ import annotations

import regex

from calami.text.formats.comments import CommentCollector
from calami.text.formats.textscan import ExtractOptions, LineEnds
from calami.text.spans import Span

_TOKEN = regex.compile(r"(?P<comment>#)|(?<![\w])(?P<prefix>[rRbBuUfF]{0,2})(?P<quote>'''|\"\"\"|'|\")")
_BODY = {
    "'": regex.compile(r"(?:[^'\\\r\n]|\\(?:\r\n|[\s\S]))*'?"),
    '"': regex.compile(r"(?:[^\"\\\r\n]|\\(?:\r\n|[\s\S]))*\"?"),
    "'''": regex.compile(r"(?:[^'\\]|\\[\s\S]|'(?!''))*(?:''')?"),
    '"""': regex.compile(r"(?:[^\"\\]|\\[\s\S]|\"(?!\"\"))*(?:\"\"\")?"),
}
_AFTER_STRING = regex.compile(r"[ \t]*(?:#[^\r\n]*)?(?:\r\n|\r|\n|$)")


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    """Prose in the comments and docstrings of a Python file."""
    strings = bool(options and options.strings)
    sink = CommentCollector(text)
    line_end = LineEnds(text).at
    n = len(text)
    pos = 0
    seen_code = False  # anything but comments before: no module docstring any more
    while pos < n:
        m = _TOKEN.search(text, pos)
        if m is None:
            break
        p = m.start()
        if m.lastgroup == "comment":
            e = line_end(p)
            if not (p == 0 and text.startswith("#!", 0)):
                sink.line_comment(p, p + 1, e)
            if not seen_code and text[pos:p].strip():
                seen_code = True
            pos = e
            continue
        quote = m.group("quote")
        body = _BODY[quote].match(text, m.end(), n if len(quote) == 3 else line_end(m.end()))
        e = body.end()
        close = len(quote) if text.endswith(quote, m.end(), e) and e - m.end() >= len(quote) else 0
        content_start, content_end = m.end(), e - close
        if _is_docstring(text, p, e, seen_code or bool(text[pos:p].strip())):
            sink.docstring(content_start, content_end)
        elif strings and "b" not in m.group("prefix").lower():
            sink.string(content_start, content_end)
        seen_code = True
        pos = max(e, p + 1)
    return sink.spans()




def _is_docstring(text: str, start: int, end: int, seen_code: bool) -> bool:
    """A string statement alone on its lines after a header, an assignment or at the top."""
    line_start = start
    while line_start > 0 and text[line_start - 1] in " \t":
        line_start -= 1
    if line_start > 0 and text[line_start - 1] not in "\r\n":
        return False
    if not _AFTER_STRING.match(text, end):
        return False
    if not seen_code:
        return True
    # The previous non-blank, non-comment line.
    i = line_start - 1
    while i >= 0:
        while i >= 0 and text[i] in " \t\r\n":
            i -= 1
        if i < 0:
            return True
        ls = i
        while ls > 0 and text[ls - 1] not in "\r\n":
            ls -= 1
        stripped = text[ls : i + 1].strip()
        if stripped.startswith("#"):
            i = ls - 1
            continue
        if stripped.endswith(":"):
            return True
        # attribute docstring: a complete simple assignment right above
        if stripped.endswith(_CONTINUES):
            return False
        return bool(_ASSIGNMENT.match(stripped))
    return True


_CONTINUES = tuple("([{,\\+-*/%=&|<>@")
_ASSIGNMENT = regex.compile(r"[A-Za-z_][\w.]*\s*(?::[^=]{1,200})?=[^=]")

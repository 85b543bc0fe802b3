"""From comment bodies to prose spans, for every source language.

The language scanners find where comments, docstrings and strings are;
this module decides which lines of them are prose.  Dropped: comment
markers and the leading ``*`` of block comment lines, SPDX/copyright
lines, tool directives (``noqa``, ``eslint-disable``, ``go:build``...),
lines that look like commented-out code, fenced code inside doc comments,
doctest lines, JSDoc/Javadoc tags with their types and parameter names,
and inline code in backticks.
"""

from __future__ import annotations

import regex

from calami.text.formats.markdown_inline import inline_holes as markdown_holes
from calami.text.formats.rst_inline import inline_holes as rst_holes
from calami.text.formats.textscan import SpanList, cut, indent_of, iter_lines, trim
from calami.text.spans import Span

# Comment lines that are not prose: licence headers, tool directives, code
# (a line ending in ';', '{' or '}' is tested separately, more cheaply).
_NOT_PROSE = regex.compile(
    r"""\s*(?:
        (?i:spdx-[\w-]+:|copyright\b|\(c\)\s+\d{4}|@license\b|all\s+rights\s+reserved)
      | (?:type:\s|noqa\b|pragma[:\s]|pylint:|mypy:|fmt:\s|isort:|ruff:|pyright:|eslint[\s-]|prettier-ignore
           |@ts-|tslint:|jshint|istanbul\s|c8\s|go:\w|\+build\s|nolint|NOLINT|clang-format\s|rustfmt::
           |\#(?:end)?region\b|vim?:\s|-\*-|shellcheck\s|language=|@flow\b|@jsx\b|<reference\s)
      | [\w.$\[\]'"]+\s*(?:[-+*/%|&^]|<<|>>|\?\?)?=(?!=)\s*\S      # x = y, x += 1
      | [\w.$]+(?:\[[^\]\n]*\])?\([^\n]*\)\s*[;,]?\s*$             # f(x)
      | (?:import|from|def|class|fn|func|function|let|const|var|return|if|elif|else|for|while|try|except|catch|
           switch|case|package|using|namespace|struct|enum|impl|pub|use|mod|include|define|ifdef|ifndef|endif|
           echo|export|local|print)\b[^\n]*[(){}\[\]=:;]\s*$
      | [\#@]\w+.*[(){}\[\]<>"]\s*$                                # #include <x>, @decorator(...)
      | (?:>>>|\.\.\.)(?:\s|$)                                     # doctest
    )""",
    regex.VERBOSE,
)
# Characters without which a comment line has no markup to cut (a quick reject).
_ANY_MARKUP = regex.compile(r"[`\\<\]$_@{|:\[]|(?:https?|ftp)://|www\.")
_FENCE = regex.compile(r"\s*(?:```|~~~)")
_DOC_TAG = regex.compile(
    r"\{@\w+[^}\n]{0,500}\}"
    r"|(?<![\w.@])@(?:param|arg|argument|property|prop|typedef|template|tparam|callback|throws|throw|exception|"
    r"retval|see|since|version|module|memberof|name|class|extends|implements|requires|default|file|author|"
    r"link|fires|event)\b[ \t]*(?:\{[^}\n]{0,500}\}[ \t]*)?(?:\[[^\]\n]{0,200}\]|[\w$.:<>#/-]+)?"
    r"|(?<![\w.@])@\w+(?:[ \t]*\{[^}\n]{0,500}\})?"
)


class CommentCollector:
    """Turns comment lines into spans; consecutive line comments form one block."""

    def __init__(self, text: str, code_indent: bool = False) -> None:
        self.text = text
        self.out = SpanList(text)
        self._prev_end = -1
        self._in_fence = False
        self._code_indent = code_indent  # Go: indented doc lines are code
        self._base_indent = -1
        self.extra_holes: list[tuple[int, int]] = []

    def line_comment(self, marker_start: int, body_start: int, body_end: int, doc: bool = False) -> None:
        """A ``//`` or ``#`` comment; full-line comments on consecutive lines form one block."""
        own_line = _own_line(self.text, marker_start)
        if not (own_line and self._continues(marker_start)):
            self._new_block()
        self._body_line(body_start, body_end, "doc" if doc else "comment")
        # A trailing comment (after code) never continues into the next line's comment.
        self._prev_end = body_end if own_line else -1

    def block_comment(self, body_start: int, body_end: int, doc: bool = False) -> None:
        """A ``/* ... */`` body (markers already excluded)."""
        self._new_block()
        text = self.text
        kind = "doc" if doc else "comment"
        for start, end, _ in iter_lines(text, body_start, body_end):
            _, p = indent_of(text, start, end)
            while p < end and text[p] == "*":
                p += 1
            self._body_line(p, end, kind)
        self._new_block()

    def string(self, start: int, end: int, kind: str = "string") -> None:
        """A string literal's content: prose only when the user asked for it."""
        self._new_block()
        text = self.text
        for s, e, _ in iter_lines(text, start, end):
            self.out.add(s, e, kind)
        self._new_block()

    def spans(self) -> list[Span]:
        text = self.text
        holes: list[tuple[int, int]] = []
        for start, end, kind, _breaks in self.out.rows:
            if kind == "string":
                holes.extend(_escape_holes(text, start, end))
                continue
            if _ANY_MARKUP.search(text, start, end) is None:
                continue
            if kind == "docstring":
                holes.extend(rst_holes(text, start, end))
            else:
                holes.extend(markdown_holes(text, start, end))
            holes.extend(m.span() for m in _DOC_TAG.finditer(text, start, end))
        holes.extend(self.extra_holes)
        return cut(text, self.out.rows, holes)

    # -- internals ---------------------------------------------------------
    def _continues(self, marker_start: int) -> bool:
        """True when only one line break and blanks separate us from the previous line comment."""
        if self._prev_end < 0:
            return False
        gap = self.text[self._prev_end : marker_start]
        return gap.count("\n") + gap.count("\r") - gap.count("\r\n") == 1 and not gap.strip()

    def _new_block(self) -> None:
        self.out.brk()
        self._in_fence = False
        self._prev_end = -1
        self._base_indent = -1

    def _body_line(self, start: int, end: int, kind: str) -> None:
        text = self.text
        s, e = trim(text, start, end)
        if e <= s:
            self.out.brk()
            return
        if _FENCE.match(text, s, e):
            self._in_fence = not self._in_fence
            self.out.brk()
            return
        if self._in_fence:
            return
        if self._code_indent:
            ind, _ = indent_of(text, start, end)
            if self._base_indent < 0:
                self._base_indent = ind
            elif ind > self._base_indent:
                self.out.brk()
                return
        if text[e - 1] in ";{}" or _NOT_PROSE.match(text, s, e):  # ';{}' at the end: a statement
            self.out.brk()
            return
        self.out.add(s, e, kind)

    def docstring(self, start: int, end: int) -> None:
        """A docstring body: reStructuredText-ish prose with doctests and literal blocks."""
        self._new_block()
        text = self.text
        literal_indent = -1  # inside a '::' literal block: lines indented more than this
        section_indent = -1  # inside a Google-style "Args:" section: lines indented more than this
        in_doctest = False
        for s, e, _ in iter_lines(text, start, end):
            ts, te = trim(text, s, e)
            if te <= ts:
                self.out.brk()
                in_doctest = False
                continue
            line_start = s
            if s == start:  # the first line begins after the quotes: measure from its real start
                while line_start > 0 and text[line_start - 1] not in "\r\n":
                    line_start -= 1
            ind, _ = indent_of(text, line_start, e)
            if literal_indent >= 0:
                if ind > literal_indent:
                    continue
                literal_indent = -1
            if section_indent >= 0 and ind <= section_indent:
                section_indent = -1
            if _SECTION.match(text, ts, te):
                section_indent = ind
            elif section_indent >= 0 and (pm := _PARAM_HEAD.match(text, ts, te)):
                self.extra_holes.append((ts, pm.end()))  # "name (type):" is code, its description prose
            if in_doctest or text.startswith(">>>", ts):
                in_doctest = True
                self.out.brk()
                continue
            if _UNDERLINE.match(text, ts, te) or _NUMPY_PARAM.match(text, ts, te):
                self.out.brk()
                continue
            self._body_line(ts, te, "docstring")
            if text.endswith("::", ts, te):
                literal_indent = ind
        self._new_block()


# Google-style docstring sections whose entries start with a name (common practice).
_SECTION = regex.compile(
    r"(?:Args|Arguments|Parameters|Params|Keyword Args|Keyword Arguments|Other Parameters|Attributes|"
    r"Raises|Returns|Yields|Warns|Exceptions):[ \t]*$"
)
_PARAM_HEAD = regex.compile(r"\*{0,2}[A-Za-z_][\w.]*(?:[ \t]*\([^)\r\n]{0,100}\))?:(?=\s|$)")
_UNDERLINE = regex.compile(r"([=\-~^\"'`#*+])\1{2,}\s*$")
_NUMPY_PARAM = regex.compile(r"\*{0,2}[\w.]+(?:\s*,\s*\*{0,2}[\w.]+)*\s+:\s*(?:\S[^\n]{0,200})?$")
_ESCAPE = regex.compile(
    r"\\(?:x[0-9a-fA-F]{2}|u\{[0-9a-fA-F]{1,6}\}|u[0-9a-fA-F]{4}|U[0-9a-fA-F]{8}|[0-7]{1,3}|.)"  # escapes
    r"|\$\{[^}\n]{0,500}\}"  # template substitutions
    r"|%[-+ #0]*\d*(?:\.\d+)?[sdifxXrcoeEgGu%]|\{[\w.:!\[\]]{0,100}\}"  # format placeholders
)


def _own_line(text: str, pos: int) -> bool:
    """True when only blanks precede ``pos`` on its line."""
    i = pos - 1
    while i >= 0 and text[i] in " \t":
        i -= 1
    return i < 0 or text[i] in "\r\n"


def _escape_holes(text: str, start: int, end: int) -> list[tuple[int, int]]:
    """Escape sequences and format placeholders inside a string literal."""
    return [m.span() for m in _ESCAPE.finditer(text, start, end)]

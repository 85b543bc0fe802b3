"""reStructuredText: paragraphs, titles, lists, tables and prose directives.

A line-based scanner driven by indentation, as the format is.  Skipped:
literal blocks after ``::``, doctest blocks, comments, hyperlink targets,
substitution definitions, directive options, the arguments of directives
(except admonition-like titles and text on the directive line of note-like
directives), the bodies of code-like directives (code-block, literalinclude,
math, raw, toctree, ...), section adornments, table borders, list markers,
and the inline markup of :mod:`rst_inline`.
"""

from __future__ import annotations

import regex

from calami.text.formats.rst_inline import inline_holes
from calami.text.formats.textscan import ExtractOptions, cut, indent_of, iter_lines
from calami.text.spans import Span

_ADORNMENT = regex.compile(r"([!-/:-@\[-`{-~])\1{2,}[ \t]*$")
_SIMPLE_TABLE_BORDER = regex.compile(r"=+(?:[ \t]+=+)+[ \t]*$")
_GRID_BORDER = regex.compile(r"\+[-=+]+\+?[ \t]*$")
_DIRECTIVE = regex.compile(r"\.\.[ \t]+(?P<name>[\w][\w:.+-]{0,80})::(?=[ \t]|$)")
_EXPLICIT = regex.compile(r"\.\.(?:[ \t]|$)")
_FOOTNOTE = regex.compile(r"\.\.[ \t]+\[(?:#[\w.-]*|\*|\d+|[\w.-]+)\](?=[ \t]|$)")
_SUBST_DEF = regex.compile(r"\.\.[ \t]+\|[^|]+\|")
_TARGET_DEF = regex.compile(r"\.\.[ \t]+_")
_BULLET = regex.compile(r"(?:[-*+\u2022\u2023\u2043]|\(?(?:\d+|[A-Za-z#]|[ivxlcdm]+)[.)])[ \t]+(?=\S)")
_FIELD_START = regex.compile(r":(?:[^:\\\s]|\\.)(?:[^:\\\r\n]|\\.){0,200}:(?=[ \t]|$)")
_VERSION_ARG = regex.compile(r"[ \t]*\S+")

# Directive bodies that are code, data or configuration (docutils/Sphinx names; common practice).
SKIP_BODY = frozenset(
    """code-block code sourcecode literalinclude highlight math raw include toctree csv-table graphviz
    digraph graph testcode testoutput testsetup testcleanup doctest productionlist index meta image
    autosummary automodule autoclass autofunction automethod autoattribute autodata autoexception
    parsed-literal ipython jupyter-execute mermaid uml plantuml plot program-output command-output
    code-cell exec runblock tabularcolumns default-role role currentmodule module sectionauthor
    moduleauthor codeauthor contents sectnum header footer unicode replace date bibliography prompt
    literal cssclass""".split()
)
# Directives whose argument is a title or whose directive line carries the first sentence.
ARG_PROSE = frozenset(
    """admonition note warning tip hint important caution danger attention error seealso todo topic
    sidebar rubric deprecated versionadded versionchanged versionremoved table list-table centered""".split()
)
_VERSIONED = frozenset({"deprecated", "versionadded", "versionchanged", "versionremoved"})


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    return _Scanner(text).run()


class _Scanner:
    def __init__(self, text: str) -> None:
        self.text = text
        self.spans: list[Span] = []
        self.para: list[tuple[int, int]] = []
        self.para_indent = 0
        self.skip_indent = -1  # skipping lines indented more than this
        self.skip_until_blank = False
        self.literal_pending = -1
        self.options_indent = -1
        self.grid = False

    def run(self) -> list[Span]:
        text = self.text
        start = 1 if text.startswith("\ufeff") else 0
        for s, e, _ in iter_lines(text, start):
            self._line(s, e)
        self._flush()
        return self.spans

    def _line(self, s: int, e: int) -> None:
        text = self.text
        ind, p = indent_of(text, s, e)
        blank = p >= e
        if self.skip_indent >= 0:
            if blank or ind > self.skip_indent:
                return
            self.skip_indent = -1
        if blank:
            self._flush()
            self.skip_until_blank = False
            self.grid = False
            self.options_indent = -1
            return
        if self.skip_until_blank:
            return
        if self.literal_pending >= 0:
            pending, self.literal_pending = self.literal_pending, -1
            if ind > pending:
                self.skip_indent = pending
                return
        if self.options_indent >= 0:
            if ind > self.options_indent and text[p] == ":":
                return
            self.options_indent = -1
        c = text[p]
        if _ADORNMENT.match(text, p, e):
            if len(self.para) == 1:
                self._flush("heading")
            else:
                self._flush()
            return
        if c == "." and text.startswith("..", p) and _EXPLICIT.match(text, p, e):
            self._flush()
            self._explicit(ind, p, e)
            return
        if text.startswith("__ ", p):
            self._flush()
            self.skip_indent = ind
            return
        if text.startswith(">>>", p):
            self._flush()
            self.skip_until_blank = True
            return
        if c in "+=" and (_GRID_BORDER.match(text, p, e) or _SIMPLE_TABLE_BORDER.match(text, p, e)):
            self._flush()
            self.grid = c == "+"
            return
        if self.grid and c == "|":
            self._cells(p, e)
            return
        if c == "|" and text.startswith("| ", p):
            self._flush()
            self.para_indent = ind
            self.para.append((p + 2, e))
            return
        if c == ":" and _FIELD_START.match(text, p, e):
            self._flush()  # each field of a field list is its own block
            self.para_indent = ind
            self.para.append((p, e))
            return
        bm = _BULLET.match(text, p, e)
        if bm:
            self._flush()
            self.para_indent = indent_of(text, s, bm.end())[0] + (bm.end() - p)
            self.para.append((bm.end(), e))
            return
        if self.para and ind != self.para_indent:
            self._flush()
        if not self.para:
            self.para_indent = ind
        self.para.append((p, e))

    def _explicit(self, ind: int, p: int, e: int) -> None:
        text = self.text
        dm = _DIRECTIVE.match(text, p, e)
        if dm:
            name = dm.group("name").lower()
            short = name.rsplit(":", 1)[-1]
            if short in SKIP_BODY or short.startswith("code-"):  # code-tab (sphinx-tabs), code-example, ...
                self.skip_indent = ind
                return
            self.options_indent = ind
            if short in ARG_PROSE:
                arg = dm.end()
                if short in _VERSIONED:
                    vm = _VERSION_ARG.match(text, arg, e)
                    arg = vm.end() if vm else e
                self.para_indent = ind + 3
                self.para.append((arg, e))
            return
        fm = _FOOTNOTE.match(text, p, e)
        if fm:
            self.para_indent = ind + 3
            self.para.append((fm.end(), e))
            return
        # Substitution definitions, hyperlink targets and comments hold no prose.
        self.skip_indent = ind

    def _cells(self, p: int, e: int) -> None:
        text = self.text
        self._flush()
        cell = p + 1
        for i in range(p + 1, e + 1):
            if i == e or text[i] == "|":
                self._emit([(cell, i)], "table")
                cell = i + 1

    def _flush(self, kind: str = "text") -> None:
        rows = self.para
        if not rows:
            return
        self.para = []
        last_s, last_e = rows[-1]
        if len(rows) == 1 and self.text[last_s:last_e].strip() == "::":
            self.literal_pending = self.para_indent
            return
        if self.text[last_s:last_e].rstrip().endswith("::"):
            self.literal_pending = self.para_indent
        self._emit(rows, kind)

    def _emit(self, rows: list[tuple[int, int]], kind: str) -> None:
        spans = [(s, e, kind, False) for s, e in rows if e > s]
        if spans:
            spans[0] = (spans[0][0], spans[0][1], kind, True)
        if not spans:
            return
        holes = inline_holes(self.text, spans[0][0], spans[-1][1])
        self.spans.extend(cut(self.text, spans, holes))

"""Markdown (CommonMark blocks, GFM tables, YAML/TOML front matter).

A line-by-line block parser in the CommonMark style: containers (block
quotes, list items) are matched first, then the leaf (paragraph, heading,
fenced/indented code, HTML block, table).  Kept: paragraphs, headings, list
items, block quotes, table cells, link text and image alt text, text
between HTML tags.  Skipped: front matter, code of any kind, thematic
breaks, reference definitions, HTML block syntax, ``$$`` math blocks, plus
the inline syntax listed in :mod:`markdown_inline`.
"""

from __future__ import annotations

from typing import Callable

import regex

from calami.text.formats import html as html_format
from calami.text.formats.markdown_inline import inline_holes
from calami.text.formats.markdown_lines import (
    advance,
    atx_content_end,
    front_matter_end,
    indent,
    rest_blank,
    strip_blanks,
)
from calami.text.formats.textscan import ExtractOptions, cut, iter_lines
from calami.text.spans import Span

_ATX = regex.compile(r"#{1,6}(?=[ \t]|$)")
_FENCE = regex.compile(r"`{3,}(?=[^`]*$)|~{3,}")
_THEMATIC = regex.compile(r"(?:(?:\*[ \t]*){3,}|(?:-[ \t]*){3,}|(?:_[ \t]*){3,})$")
_SETEXT = regex.compile(r"(?:=+|-+)[ \t]*$")
_BULLET = regex.compile(r"(?:[-+*]|(?P<num>[0-9]{1,9})[.)])(?=[ \t]|$)")
# [label]: destination "optional title" -- the whole line, or the label alone
# with the destination on the next line.  A footnote label ([^1]) is prose.
_REFDEF = regex.compile(
    r"\[(?!\^)(?:[^\]\\\r\n]|\\.){1,999}\]:[ \t]*"
    r"(?:(?P<dest><[^<>\r\n]*>|\S+)(?:[ \t]+(?:\"[^\"\r\n]*\"|'[^'\r\n]*'|\([^()\r\n]*\)))?)?[ \t]*$"
)
_TITLE_LINE = regex.compile(r"[ \t]*(?:\"[^\"]*\"|'[^']*'|\([^()]*\))[ \t]*$")
_DELIM_ROW = regex.compile(r"\|?[ \t]*:?-+:?[ \t]*(?:\|[ \t]*:?-+:?[ \t]*)*\|?[ \t]*$")
_HTML_RAW = regex.compile(r"<(?:script|pre|style|textarea)(?:[ \t>]|$)", regex.I)
_HTML_RAW_END = regex.compile(r"</(?:script|pre|style|textarea)>", regex.I)
_HTML_BLOCK6 = regex.compile(
    r"</?(?:address|article|aside|base|basefont|blockquote|body|caption|center|col|colgroup|dd|details|"
    r"dialog|dir|div|dl|dt|fieldset|figcaption|figure|footer|form|frame|frameset|h[1-6]|head|header|hr|"
    r"html|iframe|legend|li|link|main|menu|menuitem|nav|noframes|ol|optgroup|option|p|param|search|"
    r"section|summary|table|tbody|td|tfoot|th|thead|title|tr|track|ul)(?:[ \t>]|/>|$)",
    regex.I,
)
_HTML_BLOCK7 = regex.compile(r"(?:<[A-Za-z][A-Za-z0-9\-]*(?:\s[^<>]{0,2000})?/?>|</[A-Za-z][A-Za-z0-9\-]*\s*>)[ \t]*$")
_HTML_ENDS = {2: "-->", 3: "?>", 4: ">", 5: "]]>"}

PARA, FENCE, ICODE, HTML, TABLE, MATH = "para", "fence", "icode", "html", "table", "math"


class _Leaf:
    __slots__ = ("kind", "depth", "lines", "fence", "html_type", "heading")

    def __init__(self, kind: str, depth: int) -> None:
        self.kind = kind
        self.depth = depth
        self.lines: list[tuple[int, int]] = []
        self.fence = ""
        self.html_type = 0
        self.heading = False


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    return _Parser(text).run()


class _Parser:
    def __init__(self, text: str, checkpoints: list[int] | None = None) -> None:
        self.text = text
        self.spans: list[Span] = []
        # Containers: ("quote", 0) or ("item", content column).
        self.containers: list[tuple[str, int]] = []
        self.leaf: _Leaf | None = None
        self.after_refdef = 0
        # Line starts where the parser state is pristine (no container, no open
        # leaf): what follows parses alike whatever came before, which is what
        # lets an edit re-parse only from the checkpoint before it.
        self.checkpoints = checkpoints
        self.stopped: int | None = None

    def run(self, begin: int | None = None, resync: Callable[[int], bool] | None = None) -> list[Span]:
        """Parse from ``begin`` (a checkpoint; default: after front matter) to the
        end, or to the first checkpoint where ``resync`` says the rest is known."""
        text = self.text
        line = self._line
        marks = self.checkpoints
        for start, end, _ in iter_lines(text, front_matter_end(text) if begin is None else begin):
            if marks is not None and self.leaf is None and not self.containers and not self.after_refdef:
                if resync is not None and resync(start):
                    self.stopped = start
                    break
                marks.append(start)
            # Inlined fast path: a top-level line starting with a letter continues
            # or opens a paragraph (letters start no other block).
            if not self.containers and start < end and text[start].isalpha():
                leaf = self.leaf
                if leaf is not None and leaf.kind == PARA:
                    leaf.lines.append((start, end))
                    continue
                if leaf is None:
                    self.after_refdef = 0
                    leaf = self.leaf = _Leaf(PARA, 0)
                    leaf.lines.append((start, end))
                    continue
            line(start, end)
        self._close_leaf()
        self.spans.sort(key=lambda s: s.start)
        return self.spans

    # -- one line ---------------------------------------------------------
    def _line(self, start: int, end: int) -> None:
        text = self.text
        leaf = self.leaf
        if not self.containers:
            # Fast paths for the common top-level lines (no container to match).
            if leaf is not None and leaf.kind in (FENCE, HTML, MATH):
                self._in_leaf(start, end, start)
                return
            if start == end:
                if leaf is not None and leaf.kind != ICODE:
                    self._close_leaf()
                self.after_refdef = 0
                return
            if text[start].isalpha() and (leaf is None or leaf.kind == PARA):
                self._paragraph_line(start, end, 0)
                return
        pos, col, matched = self._match_containers(start, end)
        all_matched = matched == len(self.containers)
        if not all_matched:
            if leaf is not None and leaf.kind == PARA and self._is_lazy(pos, end):
                leaf.lines.append((pos, end))
                return
            self._close_leaf()
            del self.containers[matched:]
            leaf = None
        if leaf is not None and leaf.kind in (FENCE, HTML, MATH):
            self._in_leaf(start, end, pos)
            return
        if leaf is not None and leaf.kind == ICODE:
            ind, p = indent(text, pos, end, col)
            if p >= end or ind - col >= 4:
                return
            self._close_leaf()
        pos, col = self._open_containers(pos, end, col)
        self._leaf_start(start, end, pos, col)

    def _match_containers(self, pos: int, end: int) -> tuple[int, int, int]:
        text = self.text
        col = 0
        matched = 0
        for kind, content_col in self.containers:
            ind, p = indent(text, pos, end, col)
            if kind == "quote":
                if ind - col <= 3 and p < end and text[p] == ">":
                    pos, col = p + 1, ind + 1
                    if pos < end and text[pos] in " \t":
                        pos += 1
                        col += 1
                else:
                    break
            else:
                if p >= end:
                    pos = end
                elif ind >= content_col:
                    pos, col = advance(text, pos, end, col, content_col)
                else:
                    break
            matched += 1
        return pos, col, matched

    def _is_lazy(self, pos: int, end: int) -> bool:
        text = self.text
        ind, p = indent(text, pos, end, 0)
        if p >= end:
            return False
        if ind >= 4:
            return True
        c = text[p]
        if c == ">" or _ATX.match(text, p, end) or _FENCE.match(text, p, end) or _THEMATIC.match(text, p, end):
            return False
        # Any list marker starts an item here: the rule that only "1." may
        # interrupt a paragraph applies when all containers matched.
        if _BULLET.match(text, p, end):
            return False
        if c == "<" and self._html_start(p, end, False):
            return False
        return True

    def _open_containers(self, pos: int, end: int, col: int) -> tuple[int, int]:
        text = self.text
        while True:
            ind, p = indent(text, pos, end, col)
            if p >= end or ind - col >= 4:
                return pos, col
            c = text[p]
            if c == ">":
                self._close_leaf()
                self.containers.append(("quote", 0))
                pos, col = p + 1, ind + 1
                if pos < end and text[pos] in " \t":
                    pos += 1
                    col += 1
                continue
            bm = _BULLET.match(text, p, end) if c in "-+*0123456789" else None
            if bm is None or _THEMATIC.match(text, p, end):
                return pos, col
            empty = rest_blank(text, bm.end(), end)
            leaf = self.leaf
            if leaf is not None and leaf.kind in (PARA, TABLE):
                if empty or bm.group("num") not in (None, "1"):
                    return pos, col
                if leaf.kind == PARA and c == "-" and _SETEXT.match(text, p, end):
                    return pos, col
            self._close_leaf()
            marker_col = ind + (bm.end() - p)
            sp, q = indent(text, bm.end(), end, marker_col)
            if empty:
                content_col, pos = marker_col + 1, end
            elif sp - marker_col > 4:
                content_col, pos = marker_col + 1, bm.end() + 1
            else:
                content_col, pos = sp, q
            self.containers.append(("item", content_col))
            col = content_col

    def _leaf_start(self, start: int, end: int, pos: int, col: int) -> None:
        text = self.text
        ind, p = indent(text, pos, end, col)
        leaf = self.leaf
        if p >= end:
            self._close_leaf()
            self.after_refdef = 0
            return
        in_para = leaf is not None and leaf.kind == PARA
        if ind - col >= 4 and not in_para:
            self._close_leaf()
            self.leaf = _Leaf(ICODE, len(self.containers))
            return
        c = text[p]
        if c == "#" and (m := _ATX.match(text, p, end)):
            self._close_leaf()
            self._emit([(m.end(), atx_content_end(text, m.end(), end))], "heading")
            return
        if c in "`~" and (m := _FENCE.match(text, p, end)):
            self._close_leaf()
            self.leaf = _Leaf(FENCE, len(self.containers))
            self.leaf.fence = m.group()
            return
        if c == "$" and text.startswith("$$", p) and not in_para:
            self._close_leaf()
            if text.find("$$", p + 2, end) < 0:
                self.leaf = _Leaf(MATH, len(self.containers))
            return
        if c == "<":
            kind = self._html_start(p, end, in_para)
            if kind:
                self._close_leaf()
                self.leaf = _Leaf(HTML, len(self.containers))
                self.leaf.html_type = kind
                self._in_leaf(start, end, p)
                return
        if in_para and c in "=-" and _SETEXT.match(text, p, end) and leaf is not None and leaf.depth == len(self.containers):
            leaf.heading = True
            self._close_leaf()
            return
        if c in "*-_" and _THEMATIC.match(text, p, end):
            self._close_leaf()
            return
        if in_para and leaf is not None and len(leaf.lines) == 1 and "|" in text[p:end] and _DELIM_ROW.match(text, p, end):
            header = leaf.lines[0]
            if "|" in text[header[0] : header[1]]:
                self.leaf = None
                self._table_row(*header)
                self.leaf = _Leaf(TABLE, len(self.containers))
                return
        if leaf is not None and leaf.kind == TABLE:
            self._table_row(p, end)
            return
        if not in_para:
            if c == "[" and (rm := _REFDEF.match(text, p, end)):
                self._close_leaf()
                # 1: a title line may follow; 2: the destination is on the next line
                self.after_refdef = 1 if rm.group("dest") else 2
                return
            if self.after_refdef == 2 and " " not in text[p:end].strip():
                self.after_refdef = 1
                return
            if self.after_refdef == 1 and _TITLE_LINE.match(text, p, end):
                self.after_refdef = 0
                return
        self._paragraph_line(p, end, col)

    def _paragraph_line(self, p: int, end: int, col: int) -> None:
        self.after_refdef = 0
        leaf = self.leaf
        if leaf is None or leaf.kind != PARA:
            self._close_leaf()
            leaf = self.leaf = _Leaf(PARA, len(self.containers))
        leaf.lines.append((p, end))

    def _in_leaf(self, start: int, end: int, pos: int) -> None:
        """A line inside a fence, math block or HTML block."""
        text = self.text
        leaf = self.leaf
        assert leaf is not None
        if leaf.kind == FENCE:
            ind, p = indent(text, pos, end, 0)
            fence = leaf.fence
            if ind < 4 and text.startswith(fence, p):
                q = p
                while q < end and text[q] == fence[0]:
                    q += 1
                if rest_blank(text, q, end):
                    self.leaf = None
            return
        if leaf.kind == MATH:
            if text.find("$$", pos, end) >= 0:
                self.leaf = None
            return
        # HTML block
        if leaf.html_type >= 6:
            if rest_blank(text, pos, end):
                self._close_leaf()
                return
            leaf.lines.append((pos, end))
            return
        if leaf.html_type == 1:
            done = _HTML_RAW_END.search(text, pos, end) is not None
        else:
            done = text.find(_HTML_ENDS[leaf.html_type], pos, end) >= 0
        leaf.lines.append((pos, end))
        if done:
            self.leaf = None  # types 1-5 hold no prose

    def _html_start(self, p: int, end: int, in_para: bool) -> int:
        text = self.text
        if _HTML_RAW.match(text, p, end):
            return 1
        if text.startswith("<!--", p):
            return 2
        if text.startswith("<?", p):
            return 3
        if text.startswith("<![CDATA[", p):
            return 5
        if text.startswith("<!", p) and p + 2 < end and text[p + 2].isalpha():
            return 4
        if _HTML_BLOCK6.match(text, p, end):
            return 6
        if not in_para and _HTML_BLOCK7.match(text, p, end):
            return 7
        return 0

    # -- output ------------------------------------------------------------
    def _close_leaf(self) -> None:
        leaf = self.leaf
        self.leaf = None
        if leaf is None or not leaf.lines:
            return
        if leaf.kind == PARA:
            self._emit(leaf.lines, "heading" if leaf.heading else "text")
        elif leaf.kind == HTML and leaf.html_type >= 6:
            self.spans.extend(html_format.extract_range(self.text, leaf.lines[0][0], leaf.lines[-1][1]))

    def _emit(self, rows: list[tuple[int, int]], kind: str) -> None:
        """Spans of one block: one per line, the first starts a new sentence context."""
        if not rows:
            return
        spans = [(s, e, kind, False) for s, e in rows]
        spans[0] = (rows[0][0], rows[0][1], kind, True)
        holes = inline_holes(self.text, rows[0][0], rows[-1][1])
        self.spans.extend(cut(self.text, spans, holes))

    def _table_row(self, start: int, end: int) -> None:
        text = self.text
        s, e = strip_blanks(text, start, end)
        if s < e and text[s] == "|":
            s += 1
        if e > s and text[e - 1] == "|" and text[e - 2] != "\\":
            e -= 1
        cell = s
        i = s
        while i <= e:
            if i == e or (text[i] == "|" and text[i - 1] != "\\"):
                self._emit([(cell, i)], "table")
                cell = i + 1
            i += 1

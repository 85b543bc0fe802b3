"""``#`` comments of shell scripts, YAML and TOML files.

Each language has its own idea of where a ``#`` starts a comment and what
a string is: shell (word-initial ``#``; quotes, ``$'..'``, here-documents,
backslash escapes), YAML (``#`` after a blank; quoted scalars only where a
value starts; block scalars ``|``/``>`` hold text, not comments) and TOML
(``#`` anywhere outside basic/literal, single/multi-line strings).  With
``strings`` on, string contents (and YAML values) are prose too.
"""

from __future__ import annotations

import regex

from calami.text.formats.comments import CommentCollector
from calami.text.formats.textscan import ExtractOptions, LineEnds, indent_of, iter_lines, trim
from calami.text.spans import Span

_SHELL = regex.compile(
    r"(?P<esc>\\[\s\S])|(?P<comment>(?<![^\s;|&()`])#)|(?P<ansi>\$')|(?P<sq>')|(?P<dq>\")|(?P<bt>`)"
    r"|(?P<heredoc><<(?P<dash>-)?[ \t]*(?P<q>['\"]?)(?P<word>[A-Za-z_][\w.-]*)(?P=q))"
)
_SHELL_DQ = regex.compile(r"\"(?:[^\"\\]|\\[\s\S])*\"?")
_SHELL_SQ = regex.compile(r"'[^']*'?")
_SHELL_ANSI = regex.compile(r"\$'(?:[^'\\]|\\[\s\S])*'?")
_SHELL_BT = regex.compile(r"`(?:[^`\\]|\\[\s\S])*`?")

_TOML = regex.compile(r"(?P<comment>#)|(?P<tdq>\"\"\")|(?P<tsq>''')|(?P<dq>\")|(?P<sq>')")
_TOML_DQ = regex.compile(r"\"(?:[^\"\\\r\n]|\\.)*\"?")
_TOML_SQ = regex.compile(r"'[^'\r\n]*'?")

_YAML_BLOCK_SCALAR = regex.compile(r"(?:^|[ \t])[|>][-+1-9]{0,2}[ \t]*$")
_YAML_VALUE_START = frozenset(":-[{,?")


def extract(text: str, options: ExtractOptions | None = None, *, language: str = "shell") -> list[Span]:
    """Prose in the ``#`` comments of a shell, YAML or TOML file."""
    strings = bool(options and options.strings)
    if language == "yaml":
        return _yaml(text, strings)
    if language == "toml":
        return _toml(text, strings)
    return _shell(text, strings)




def _shell(text: str, strings: bool) -> list[Span]:
    sink = CommentCollector(text)
    line_end = LineEnds(text).at
    n = len(text)
    pos = 0
    while pos < n:
        m = _SHELL.search(text, pos)
        if m is None:
            break
        p = m.start()
        group = m.lastgroup if m.lastgroup not in ("dash", "q", "word") else "heredoc"
        if group == "esc":
            pos = m.end()
        elif group == "comment":
            e = line_end(p)
            if not (p == 0 and text.startswith("#!")):
                sink.line_comment(p, p + 1, e)
            pos = e
        elif group == "heredoc":
            pos = _heredoc(text, m, sink, strings)
        else:
            pattern = {"ansi": _SHELL_ANSI, "sq": _SHELL_SQ, "dq": _SHELL_DQ, "bt": _SHELL_BT}[group]
            sm = pattern.match(text, p)
            e = sm.end()
            if strings and group != "bt":
                start = p + (2 if group == "ansi" else 1)
                close = e - 1 if e - 1 >= start and text[e - 1] in "'\"" else e
                sink.string(start, close)
            pos = max(e, p + 1)
    return sink.spans()


def _heredoc(text: str, m: "regex.Match[str]", sink: CommentCollector, strings: bool) -> int:
    """Skip a here-document body; returns where scanning resumes (after its end line)."""
    word = m.group("word")
    body_start = LineEnds(text).at(m.end())
    if body_start >= len(text):
        return len(text)
    body_start += 2 if text.startswith("\r\n", body_start) else 1
    tabs = "\t*" if m.group("dash") is not None else ""
    end_line = regex.compile(r"(?m)^" + tabs + regex.escape(word) + r"(?=\r\n|\r|\n|\Z)")
    hit = end_line.search(text, body_start)
    body_end = hit.start() if hit else len(text)
    if strings:
        sink.string(body_start, body_end, "string")
    return hit.end() if hit else len(text)


def _toml(text: str, strings: bool) -> list[Span]:
    sink = CommentCollector(text)
    line_end = LineEnds(text).at
    n = len(text)
    pos = 0
    while pos < n:
        m = _TOML.search(text, pos)
        if m is None:
            break
        p = m.start()
        group = m.lastgroup
        if group == "comment":
            e = line_end(p)
            sink.line_comment(p, p + 1, e)
            pos = e
            continue
        if group in ("tdq", "tsq"):
            quote = text[p : p + 3]
            close = _find_triple(text, p + 3, quote)
            start, end, pos = p + 3, close, min(n, close + 3)
        else:
            sm = (_TOML_DQ if group == "dq" else _TOML_SQ).match(text, p, line_end(p))
            e = sm.end()
            start, end, pos = p + 1, (e - 1 if e - 1 > p and text[e - 1] == text[p] else e), max(e, p + 1)
        if strings:
            sink.string(start, end)
    return sink.spans()


def _find_triple(text: str, start: int, quote: str) -> int:
    pos = start
    while True:
        close = text.find(quote, pos)
        if close < 0:
            return len(text)
        if quote == '"""':
            backslashes = 0
            i = close - 1
            while i >= start and text[i] == "\\":
                backslashes += 1
                i -= 1
            if backslashes % 2:
                pos = close + 1
                continue
        # A closing run may be up to five quotes long; the last three close it.
        extra = 0
        while extra < 2 and text.startswith(quote[0], close + 3):
            close += 1
            extra += 1
        return close


def _yaml(text: str, strings: bool) -> list[Span]:
    sink = CommentCollector(text)
    block_indent = -1  # inside a block scalar: lines indented more than this
    quote = ""  # an open multi-line quoted scalar
    for s, e, _ in iter_lines(text):
        ind, first = indent_of(text, s, e)
        if block_indent >= 0:
            if first >= e or ind > block_indent:
                if strings and first < e:
                    sink.string(first, e)
                continue
            block_indent = -1
        pos = s
        code_end = e
        value_start = True
        while pos < e:
            c = text[pos]
            if quote:
                close = _yaml_quote_end(text, pos, e, quote)
                if strings:
                    sink.string(pos, close if close >= 0 else e)
                if close < 0:
                    pos = e
                    break
                quote = ""
                pos = close + 1
                value_start = False
                continue
            if c == "#" and (pos == s or text[pos - 1] in " \t"):
                sink.line_comment(pos, pos + 1, e)
                code_end = pos
                break
            if c in "'\"" and value_start:
                quote = c
                pos += 1
                continue
            if c not in " \t":
                value_start = c in _YAML_VALUE_START and (pos + 1 >= e or text[pos + 1] in " \t")
                if c in "[{,":
                    value_start = True
                if strings and c == ":" and value_start:
                    _yaml_plain_value(text, pos + 1, e, sink)
            pos += 1
        if not quote and _YAML_BLOCK_SCALAR.search(text, s, code_end):
            block_indent = ind
    return sink.spans()


def _yaml_quote_end(text: str, pos: int, end: int, quote: str) -> int:
    while pos < end:
        c = text[pos]
        if quote == '"' and c == "\\":
            pos += 2
            continue
        if c == quote:
            if quote == "'" and pos + 1 < end and text[pos + 1] == "'":
                pos += 2
                continue
            return pos
        pos += 1
    return -1


def _yaml_plain_value(text: str, start: int, end: int, sink: CommentCollector) -> None:
    """A plain (unquoted) scalar after ``key:`` when strings are prose."""
    s, e = trim(text, start, end)
    if s >= e or text[s] in "'\"|>&*![{#":
        return
    hash_at = text.find(" #", s, e)
    if hash_at >= 0:
        e = hash_at
    if " " in text[s:e]:
        sink.string(s, e)

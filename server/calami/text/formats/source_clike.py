"""Comments (and optionally strings) of C-family languages.

One forward scan per file with a per-language "next interesting token"
regex: comments, string and character literals (so that ``//`` or ``/*``
inside a string is not a comment), raw strings, and for JavaScript regex
literals.  Languages: C, C++, Java, JavaScript, TypeScript, Go, Rust, and
CSS (block comments only: ``//`` is not a comment there, and is common in
``url(http://...)``).
Doc comments (``///``, ``//!``, ``/** */``, ``/*! */``) get kind "doc".
"""

from __future__ import annotations

import regex

from calami.text.formats.comments import CommentCollector
from calami.text.formats.textscan import ExtractOptions, LineEnds
from calami.text.spans import Span

_COMMON = r"(?P<line>//)|(?P<block>/\*)"
_TOKENS = {
    "c": _COMMON + r"|(?P<dq>\")|(?P<sq>')",
    "cpp": _COMMON + r"|(?P<cppraw>(?<![\w])(?:u8|[uUL])?R\"(?P<delim>[^()\\\s\"]{0,16})\()|(?P<dq>\")|(?P<sq>')",
    "java": _COMMON + r"|(?P<textblock>\"\"\")|(?P<dq>\")|(?P<sq>')",
    "javascript": _COMMON + r"|(?P<dq>\")|(?P<sqstr>')|(?P<template>`)|(?P<slash>/)",
    "go": _COMMON + r"|(?P<dq>\")|(?P<sq>')|(?P<rawbt>`)",
    "rust": _COMMON + r"|(?P<rustraw>(?<![\w])b?r(?P<hashes>#*)\")|(?P<dq>\")|(?P<sq>')",
}
_TOKENS["typescript"] = _TOKENS["javascript"]
_TOKENS["css"] = r"(?P<block>/\*)|(?P<dq>\")|(?P<sqstr>')"
_COMPILED = {lang: regex.compile(p) for lang, p in _TOKENS.items()}

_DQ_LINE = regex.compile(r"\"(?:[^\"\\\r\n]|\\(?:\r\n|[\s\S]))*\"?")  # C, Java, JS, Go
_DQ_MULTI = regex.compile(r"\"(?:[^\"\\]|\\[\s\S])*\"?")  # Rust strings may span lines
_SQ_STR = regex.compile(r"'(?:[^'\\\r\n]|\\(?:\r\n|[\s\S]))*'?")
_CHAR = regex.compile(r"'(?:\\(?:u\{[0-9a-fA-F]{1,6}\}|x[0-9a-fA-F]{2}|u[0-9a-fA-F]{4}|[0-7]{1,3}|[^\r\n])|[^'\\\r\n]{1,2})'")
_TEMPLATE = regex.compile(r"`(?:[^`\\]|\\[\s\S])*`?")
_RAW_BT = regex.compile(r"`[^`]*`?")
_REGEX_LITERAL = regex.compile(r"/(?![*/])(?:[^/\\\[\r\n]|\\[^\r\n]|\[(?:[^\]\\\r\n]|\\[^\r\n])*\])+/[A-Za-z]*")
_REGEX_PRECEDERS = frozenset("(,=:[!&|?{};+-*%<>~^")
_REGEX_KEYWORDS = ("return", "typeof", "case", "do", "else", "in", "of", "void", "yield", "await", "delete")
_NESTING = frozenset({"rust"})


def extract(text: str, options: ExtractOptions | None = None, *, language: str = "c") -> list[Span]:
    """Prose in the comments of a C-family source file."""
    strings = bool(options and options.strings)
    tokens = _COMPILED[language]
    sink = CommentCollector(text, code_indent=language == "go")
    line_end = LineEnds(text).at
    n = len(text)
    pos = 0
    while pos < n:
        m = tokens.search(text, pos)
        if m is None:
            break
        p = m.start()
        group = m.lastgroup
        if group == "line":
            e = line_end(p)
            q = p + 2
            doc = False
            if q < n and text[q] == "/" and not text.startswith("//", q):
                doc, q = True, q + 1
            elif q < n and text[q] == "!":
                doc, q = True, q + 1
            while q < e and text[q] == "/":
                q += 1
            sink.line_comment(p, q, e, doc)
            pos = e
        elif group == "block":
            body_end, after = _block_end(text, p + 2, language in _NESTING)
            q = p + 2
            doc = q < body_end and text[q] in "*!" and not text.startswith("*/", q)
            sink.block_comment(q, body_end, doc)
            pos = after
        elif group in ("dq", "sqstr"):
            if language == "rust":
                sm = _DQ_MULTI.match(text, p)
            else:
                sm = (_DQ_LINE if group == "dq" else _SQ_STR).match(text, p, line_end(p))
            e = sm.end()
            if strings:
                sink.string(p + 1, _content_end(text, p + 1, e, text[p]))
            pos = max(e, p + 1)
        elif group == "sq":
            cm = _CHAR.match(text, p, p + 16)
            pos = cm.end() if cm else p + 1
        elif group in ("template", "rawbt"):
            sm = (_TEMPLATE if group == "template" else _RAW_BT).match(text, p)
            e = sm.end()
            if strings:
                sink.string(p + 1, _content_end(text, p + 1, e, "`"))
            pos = max(e, p + 1)
        elif group == "textblock":
            close = text.find('"""', p + 3)
            e = n if close < 0 else close + 3
            if strings:
                sink.string(p + 3, n if close < 0 else close)
            pos = e
        elif group == "cppraw":
            closer = ")" + m.group("delim") + '"'
            close = text.find(closer, m.end())
            if strings:
                sink.string(m.end(), n if close < 0 else close)
            pos = n if close < 0 else close + len(closer)
        elif group == "rustraw":
            closer = '"' + m.group("hashes")
            close = text.find(closer, m.end())
            if strings:
                sink.string(m.end(), n if close < 0 else close)
            pos = n if close < 0 else close + len(closer)
        else:  # "/" in JavaScript: division or a regex literal
            pos = p + 1
            if _regex_allowed(text, p):
                rm = _REGEX_LITERAL.match(text, p, min(line_end(p), p + 500))
                if rm:
                    pos = rm.end()
    return sink.spans()




_BLOCK_TOKENS = regex.compile(r"/\*|\*/")


def _block_end(text: str, start: int, nesting: bool) -> tuple[int, int]:
    """(end of body, offset after the closing marker) of a block comment."""
    if not nesting:
        close = text.find("*/", start)
        return (len(text), len(text)) if close < 0 else (close, close + 2)
    depth = 1
    pos = start
    while True:
        m = _BLOCK_TOKENS.search(text, pos)
        if m is None:
            return len(text), len(text)
        if m.group() == "/*":
            depth += 1
        else:
            depth -= 1
            if depth == 0:
                return m.start(), m.end()
        pos = m.end()


def _content_end(text: str, start: int, end: int, quote: str) -> int:
    """End of a string's content: before the closing quote when there is one."""
    if end > start and text[end - 1] == quote:
        return end - 1
    return end


def _regex_allowed(text: str, p: int) -> bool:
    """A '/' starts a regex literal after an operator, an opening bracket or a keyword."""
    i = p - 1
    while i >= 0 and text[i] in " \t\r\n":
        i -= 1
    if i < 0:
        return True
    c = text[i]
    if c in _REGEX_PRECEDERS:
        return True
    if c.isalpha():
        j = i
        while j >= 0 and (text[j].isalnum() or text[j] in "_$"):
            j -= 1
        return text[j + 1 : i + 1] in _REGEX_KEYWORDS
    return False

"""Comments (and optionally strings) of Ruby files.

One forward scan with a "next interesting token" regex, as for the C family:
``#`` comments, ``=begin``/``=end`` documentation blocks (kind "doc"), and
everything in which a ``#`` is not a comment, skipped whole: single-,
double- and back-quoted strings, ``%q(...)``-style literals, regular
expressions after an operator or keyword, character literals (``?#``) and
here-documents (``<<~EOS``).  ``__END__`` at the start of a line ends the
code: what follows is data.  Interpolation (``"#{...}"``) stays inside its
string; a quote inside an interpolation ends the string early (rare, and
never a reason to read code as prose: the scan re-synchronises at the next
line of comments).  A comment after a here-document's opening marker, on
the same line, is not read.
"""

from __future__ import annotations

import regex

from calami.text.formats.comments import CommentCollector
from calami.text.formats.textscan import ExtractOptions, LineEnds
from calami.text.spans import Span

_TOKENS = regex.compile(
    r"(?P<comment>\#)"
    r"|(?P<begin>^=begin(?=[ \t\r\n]|$))"
    r"|(?P<end_data>^__END__[ \t]*(?:\r?\n|$))"
    r"|(?P<heredoc><<(?P<flag>[~-]?)(?P<q>['\"`]?)(?P<word>[A-Z_][A-Z0-9_]*)(?P=q))"
    r"|(?P<percent>(?<![\w)\]}])%[qQwWiIsrx]?(?P<open>[(\[{<|!/^]))"
    r"|(?P<char>(?<![\w)\]}?])\?(?:\\.|[^\s\\]))"
    r"|(?P<dq>\")|(?P<sq>')|(?P<bt>`)"
    r"|(?P<slash>/)",
    regex.MULTILINE,
)
_DQ = regex.compile(r"\"(?:[^\"\\]|\\[\s\S])*\"?")
_SQ = regex.compile(r"'(?:[^'\\]|\\[\s\S])*'?")
_BT = regex.compile(r"`(?:[^`\\]|\\[\s\S])*`?")
_END_DOC = regex.compile(r"^=end(?=[ \t\r\n]|$)", regex.MULTILINE)
_REGEX_LITERAL = regex.compile(r"/(?:[^/\\\r\n]|\\[^\r\n])*/[a-z]*")
_CLOSERS = {"(": ")", "[": "]", "{": "}", "<": ">"}
_REGEX_PRECEDERS = frozenset("(,=~!&|;{[?:+-*%<>^")
_REGEX_KEYWORDS = ("if", "elsif", "unless", "when", "while", "until", "and", "or", "not", "return", "then", "puts", "p")


def extract(text: str, options: ExtractOptions | None = None, *, language: str = "ruby") -> list[Span]:
    """Prose in the comments of a Ruby file."""
    strings = bool(options and options.strings)
    sink = CommentCollector(text)
    line_end = LineEnds(text).at
    n = len(text)
    pos = 0
    while pos < n:
        m = _TOKENS.search(text, pos)
        if m is None:
            break
        p = m.start()
        group = m.lastgroup
        if group in ("flag", "q", "word"):
            group = "heredoc"
        elif group == "open":
            group = "percent"
        if group == "comment":
            e = line_end(p)
            sink.line_comment(p, p + 1, e, False)
            pos = e
        elif group == "begin":
            body = line_end(p)
            close = _END_DOC.search(text, body)
            stop = n if close is None else close.start()
            sink.block_comment(body, stop, True)
            pos = n if close is None else line_end(close.start())
        elif group == "end_data":
            break
        elif group == "heredoc":
            pos = _after_heredoc(text, m, line_end, sink if strings else None)
        elif group == "percent":
            opener = m.group("open")
            closer = _CLOSERS.get(opener, opener)
            close = _matching(text, m.end(), opener, closer)
            if strings and text[p + 1] in "qQ" + opener:  # a string literal, not a word or symbol list
                sink.string(m.end(), close)
            pos = min(n, close + 1)
        elif group == "char":
            pos = m.end()
        elif group in ("dq", "sq", "bt"):
            sm = {"dq": _DQ, "sq": _SQ, "bt": _BT}[group].match(text, p)
            e = sm.end()
            if strings and group != "bt":
                sink.string(p + 1, e - 1 if e - 1 > p and text[e - 1] == text[p] else e)
            pos = max(e, p + 1)
        else:  # "/": division or a regular expression
            pos = p + 1
            if _regex_allowed(text, p):
                rm = _REGEX_LITERAL.match(text, p, min(line_end(p), p + 1000))
                if rm:
                    pos = rm.end()
    return sink.spans()


def _after_heredoc(text: str, m: "regex.Match[str]", line_end, sink: CommentCollector | None) -> int:
    """Offset after a here-document's terminator line.

    The rest of the opening line (``foo(<<~EOS, x) # note``) is skipped with
    the body, comment included: reading it would need a second pass.
    """
    n = len(text)
    word = m.group("word")
    indented = bool(m.group("flag"))
    body = line_end(m.start())
    body = body + 2 if text.startswith("\r\n", body) else body + 1
    line = body
    while line < n:
        e = line_end(line)
        content = text[line:e]
        if (content.strip() if indented else content.rstrip("\r")) == word:
            if sink is not None and line > body:
                sink.string(body, line)
            return e
        line = e + 1
    return n


def _matching(text: str, start: int, opener: str, closer: str) -> int:
    """Offset of the closer of a %-literal (nesting brackets, honouring escapes); len(text) if none."""
    depth = 1
    i = start
    n = len(text)
    nests = opener != closer
    while i < n:
        c = text[i]
        if c == "\\":
            i += 2
            continue
        if nests and c == opener:
            depth += 1
        elif c == closer:
            depth -= 1
            if depth == 0:
                return i
        i += 1
    return n


def _regex_allowed(text: str, p: int) -> bool:
    """A '/' starts a regular expression after an operator, an opening bracket or a keyword."""
    i = p - 1
    while i >= 0 and text[i] in " \t":
        i -= 1
    if i < 0 or text[i] in "\r\n":
        return True
    c = text[i]
    if c in _REGEX_PRECEDERS:
        return True
    if c.isalpha():
        j = i
        while j >= 0 and (text[j].isalnum() or text[j] == "_"):
            j -= 1
        return text[j + 1 : i + 1] in _REGEX_KEYWORDS
    return False

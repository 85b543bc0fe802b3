"""Text edits that write an in-file directive (``calami.text.directives``).

The quick fixes "skip this line" and "accept in this file" change the
document itself, so the decision travels with the file (CI and colleagues
see it too), unlike "ignore in this document", which lives in the session.
"""

from __future__ import annotations

from lsprotocol import types

from calami.findings import Finding
from calami.lsp.documents import Document
from calami.text import directives
from calami.text.spans import LineIndex

# Kinds whose comment can end a line without changing how the line reads
# (an own line would split a Markdown paragraph in two when rendered).
_TRAILING = {"markdown", "html"}


def read(doc: Document) -> directives.Directives:
    return directives.read(doc.text, doc.kind)


def _line_break(text: str) -> str:
    at = text.find("\n")
    return "\r\n" if at > 0 and text[at - 1] == "\r" else "\n"


def skip_line(doc: Document, finding: Finding) -> types.TextEdit:
    """Hush the finding's line: a trailing comment in Markdown/HTML, else a comment line above it."""
    text = doc.text
    index = LineIndex(text)
    line, _ = index.position(finding.start)
    start = index.line_starts[line]
    end = index.line_starts[line + 1] if line + 1 < len(index.line_starts) else len(text)
    content = text[start:end].rstrip("\r\n")
    if doc.kind in _TRAILING:
        at = start + len(content)
        comment = directives.comment_line(doc.kind, directives.directive_text(directives.HUSH_HERE))
        position = doc.positions.position(at)
        return types.TextEdit(types.Range(position, position), f" {comment}")
    indent = content[: len(content) - len(content.lstrip(" \t"))]
    comment = directives.comment_line(doc.kind, directives.directive_text(directives.HUSH_NEXT))
    position = doc.positions.position(start)
    return types.TextEdit(types.Range(position, position), f"{indent}{comment}{_line_break(text)}")


def accept_in_file(doc: Document, word: str, marks: directives.Directives) -> types.TextEdit:
    """Add ``word`` to the file's first known directive, or write one at the top (commit messages: at the end)."""
    text = doc.text
    if marks.known_at:
        _, end = marks.known_at[0]
        position = doc.positions.position(end - 1)  # before the closing parenthesis
        return types.TextEdit(types.Range(position, position), f" {word}")
    comment = directives.comment_line(doc.kind, directives.directive_text(directives.KNOWN, [word]))
    eol = _line_break(text)
    if doc.kind == "commit":
        at = len(text)
        prefix = "" if not text or text.endswith(("\n", "\r")) else eol
        position = doc.positions.position(at)
        return types.TextEdit(types.Range(position, position), f"{prefix}{comment}{eol}")
    at = 0
    if text.startswith("#!"):  # keep the interpreter line first
        index = LineIndex(text)
        at = index.line_starts[1] if len(index.line_starts) > 1 else len(text)
        if at == len(text) and not text.endswith(("\n", "\r")):
            position = doc.positions.position(at)
            return types.TextEdit(types.Range(position, position), f"{eol}{comment}{eol}")
    position = doc.positions.position(at)
    return types.TextEdit(types.Range(position, position), f"{comment}{eol}")

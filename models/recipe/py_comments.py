"""Python source file -> paragraphs of its docstring and comment prose.

Docstrings and comments are exactly what calami checks in Python files, so
the standard library's own are a good, permissively licensed sample of them.
Indented blocks, doctest lines (>>>), reST directives and field lines are
code or markup, not prose, and are dropped.
"""

from __future__ import annotations

import ast
import io
import re
import tokenize

_LIST_ITEM = re.compile(r"^(?:[-*+•]|\d+[.)])\s+")
_MARKUP_LINE = re.compile(r"^(?:>>>|\.\.\.|\.\. |:[\w ]+:|[=\-~^*#]{3,}$|[A-Za-z_]\w*\s*:\s*$)")


def _paragraphs(lines: list[str]) -> list[str]:
    """Split text lines at blanks, indented (code) lines, list items and markup."""
    out: list[str] = []
    current: list[str] = []
    base = min((len(l) - len(l.lstrip()) for l in lines if l.strip()), default=0)

    def flush() -> None:
        if current:
            out.append(" ".join(current))
            current.clear()

    for line in lines:
        text = line[base:] if len(line) >= base else line.strip()
        stripped = text.strip()
        if not stripped or text[:1].isspace() or _MARKUP_LINE.match(stripped):
            flush()
            continue
        if _LIST_ITEM.match(stripped):
            flush()
            stripped = _LIST_ITEM.sub("", stripped)
        current.append(stripped)
    flush()
    return out


def docstrings(tree: ast.AST) -> list[str]:
    out: list[str] = []
    for node in ast.walk(tree):
        if isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef)):
            doc = ast.get_docstring(node, clean=True)
            if doc:
                # clean=True has already removed the common indentation.
                out.extend(_paragraphs(doc.splitlines()))
    return out


def comments(source: str) -> list[str]:
    """Consecutive whole-line # comments joined into paragraphs."""
    blocks: list[list[str]] = []
    last_row = -2
    lines = source.splitlines()
    try:
        for tok in tokenize.generate_tokens(io.StringIO(source).readline):
            if tok.type != tokenize.COMMENT:
                continue
            row, col = tok.start
            if lines[row - 1][:col].strip():
                continue  # trailing comment after code: usually terse, often code-like
            text = tok.string.lstrip("#")
            if text.startswith("!") or "coding" in text[:20] and row <= 2:
                continue
            text = text[1:] if text.startswith(" ") else text
            if row == last_row + 1 and blocks:
                blocks[-1].append(text)
            else:
                blocks.append([text])
            last_row = row
    except (tokenize.TokenError, IndentationError, SyntaxError):
        pass
    out: list[str] = []
    for block in blocks:
        joined = " ".join(block).lower()
        if "copyright" in joined and ("license" in joined or "rights reserved" in joined):
            continue
        out.extend(_paragraphs(block))
    return out


def source_paragraphs(source: str) -> list[str]:
    """Docstring and comment paragraphs of one Python file (comments only if it does not parse)."""
    try:
        tree = ast.parse(source)
    except (SyntaxError, ValueError):
        return comments(source)
    return docstrings(tree) + comments(source)

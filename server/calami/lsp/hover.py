"""Hover on a flagged word: why it was flagged and what else it could be."""

from __future__ import annotations

from typing import Any, Sequence

import regex
from lsprotocol import types

from calami.findings import DIRECTIVE, NONWORD, Finding
from calami.lsp.documents import Document


def explain(finding: Finding, limit: int) -> str:
    """Markdown text: the verdict, the ranked fixes with probabilities, the context."""
    lines = []
    percent = round(finding.confidence * 100)
    if finding.kind == DIRECTIVE:
        fix = f"\n\nProbably meant: `{finding.best}`" if finding.best else ""
        return f"**calami**: this directive is not read: {finding.note}.{fix}"
    if finding.kind == NONWORD:
        lines.append(f"**calami**: `{finding.word}` is probably a misspelling ({percent}% sure).")
    else:
        context = " ".join(w for w in (finding.left, "…", finding.right) if w)
        lines.append(
            f"**calami**: `{finding.word}` is a real word, but unlikely between its neighbours "
            f"({percent}% sure it is a slip)."
        )
        if finding.left or finding.right:
            lines.append("")
            lines.append(f"Context that made it unlikely: `{context}`")
    if finding.suggestions:
        lines.append("")
        lines.append("Possible fixes:")
        for n, suggestion in enumerate(finding.suggestions[:limit], 1):
            lines.append(f"{n}. `{suggestion.text}` — {suggestion.probability:.0%}")
        if finding.confident:
            lines.append("")
            lines.append("The first fix is safe to apply without a second look.")
    return "\n".join(lines)


def hover(doc: Document, findings: Sequence[Finding], position: types.Position, limit: int) -> types.Hover | None:
    offset = doc.positions.offset(position)
    for finding in findings:
        if finding.start <= offset <= finding.end:
            return types.Hover(
                contents=types.MarkupContent(kind=types.MarkupKind.Markdown, value=explain(finding, limit)),
                range=doc.positions.range(finding.start, finding.end),
            )
    return None


_WORD = regex.compile(r"[\p{L}\p{M}]+(?:['’][\p{L}\p{M}]+)*")


def workspace_hover(doc: Document, checker: Any, position: types.Position) -> types.Hover | None:
    """On an unflagged word the lexicon lacks: say that the workspace's own use accepted it."""
    note = getattr(checker, "workspace_note", None)
    if note is None:
        return None
    offset = doc.positions.offset(position)
    text = doc.text
    start = offset
    while start > 0 and (text[start - 1].isalpha() or text[start - 1] in "'’"):
        start -= 1
    match = _WORD.match(text, start)
    if match is None or not match.start() <= offset <= match.end():
        return None
    said = note(match.group())
    if said is None:
        return None
    return types.Hover(
        contents=types.MarkupContent(kind=types.MarkupKind.Markdown, value=f"**calami**: `{match.group()}` is {said}."),
        range=doc.positions.range(match.start(), match.end()),
    )

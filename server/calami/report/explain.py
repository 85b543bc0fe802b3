"""``calami check --explain``: why words were flagged, and why others were not.

For each finding: how sure the model is, the context it used, and what the
workspace says of the word (a word the project uses that still is flagged
is one edit from a frequent word and used too seldom to be trusted).  For
each word that a rule kept from being flagged (the workspace's own use, a
place where names stand, a closed compound, a function-word swap on thin
evidence): the rule and its reason.  Rows are plain data so they cross the
``--jobs`` process boundary as msgpack.
"""

from __future__ import annotations

from typing import Any, Iterable, Sequence, TextIO

from calami.findings import KIND_LABELS
from calami.text.spans import LineIndex


def explain_findings(findings: Sequence[Any], usage: Any, text: str) -> list[list[Any]]:
    """[line, column, word, rule, detail] for each finding (1-based positions)."""
    index = LineIndex(text)
    rows = []
    for f in findings:
        line, column = index.position(f.start)
        kind = KIND_LABELS.get(f.kind, f.kind)
        detail = f"{kind}, {f.confidence:.0%} sure it is wrong; context '{f.left} _ {f.right}'"
        if f.suggestions:
            detail += f"; best fix '{f.suggestions[0].text}' ({f.suggestions[0].probability:.0%})"
            detail += ", confident" if f.confident else ""
        use = usage.use(f.word.lower()) if usage is not None else None
        if use is not None and use.raw > 1:
            detail += f"; the workspace has {use.describe()}, too little against a likely slip"
        rows.append([line + 1, column + 1, f.word, "flagged", detail])
    return rows


def explain_events(text: str, events: Iterable[tuple[int, str, str, str]]) -> list[list[Any]]:
    """[line, column, word, rule, detail] for each decision a rule changed."""
    index = LineIndex(text)
    rows = []
    for at, word, rule, detail in events:
        line, column = index.position(at)
        rows.append([line + 1, column + 1, word, rule, detail])
    return rows


_RULE_TEXT = {
    "flagged": "flagged",
    "workspace": "accepted: the workspace uses it",
    "name": "accepted: stands where names stand",
    "compound": "not a confident fix: closed compound",
    "function word": "not flagged: function-word swap",
}


def write_explained(out: TextIO, display: str, rows: Sequence[Sequence[Any]]) -> None:
    """One line per row, GNU-style location first so editors can jump to it."""
    for line, column, word, rule, detail in sorted(rows, key=lambda r: (r[0], r[1])):
        label = _RULE_TEXT.get(rule, rule)
        out.write(f"{display}:{line}:{column}: why: '{word}' {label}" + (f" ({detail})" if detail else "") + "\n")

"""The JSON report: one array of findings, stable keys, for scripts and CI.

Each item: ``path``, ``line``, ``column``, ``end_line``, ``end_column``
(1-based, columns in Unicode code points, end exclusive), ``word``, ``kind``
(``"nonword"`` or ``"realword"``), ``confidence`` (probability the word is
wrong) and ``suggestions`` (``text`` and ``probability``, best first).
"""

from __future__ import annotations

import json
from typing import Any, Iterable

from calami.report import Located


def finding_record(item: Located) -> dict[str, Any]:
    finding = item.finding
    return {
        "path": item.path,
        "line": item.line,
        "column": item.column,
        "end_line": item.end_line,
        "end_column": item.end_column,
        "word": finding.word,
        "kind": finding.kind,
        "confidence": round(float(finding.confidence), 4),
        "suggestions": [{"text": s.text, "probability": round(float(s.probability), 4)} for s in finding.suggestions],
    }


def render(located: Iterable[Located]) -> str:
    """The whole report; non-ASCII words are written as they are (UTF-8)."""
    return json.dumps([finding_record(item) for item in located], ensure_ascii=False, indent=2) + "\n"

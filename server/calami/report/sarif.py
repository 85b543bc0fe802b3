"""The SARIF 2.1.0 report (OASIS Static Analysis Results Interchange Format).

Choices, all from the SARIF 2.1.0 specification:

* ``run.columnKind`` is ``"unicodeCodePoints"`` so region columns mean the
  same as in our other formats (the default would be UTF-16 code units);
* artifact locations are relative URIs under ``%SRCROOT%``, whose absolute
  value (the folder ``calami check`` ran in) is given in
  ``originalUriBaseIds``, so results are portable between machines;
* two rules, named for the literature's two kinds of spelling error:
  ``nonword`` / ``NonWord`` (not a word of the vocabulary) and ``realword``
  / ``RealWordSlip`` (a real word that context says is likely a slip); level ``warning`` when the best fix is
  confident, ``note`` otherwise;
* the best suggestion of a confident finding is also offered as a ``fix``;
* notes (skipped files, slow ignore patterns) become tool execution
  notifications, and ``executionSuccessful`` is false after an I/O or config
  error.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any, Sequence
from urllib.parse import quote

from calami import __version__
from calami.report import Located, Summary

SCHEMA_URI = "https://json.schemastore.org/sarif-2.1.0.json"

RULES = [
    {
        "id": "nonword",
        "name": "NonWord",
        "shortDescription": {"text": "A word that is not in the vocabulary and looks like a misspelling."},
        "fullDescription": {
            "text": "The word is not known to the model, the project word list or the user's profile, "
            "and a known word within a few edits fits the context better."
        },
        "defaultConfiguration": {"level": "note"},
    },
    {
        "id": "realword",
        "name": "RealWordSlip",
        "shortDescription": {"text": "A real word that the context suggests is a slip for a similar word."},
        "fullDescription": {
            "text": "The word exists, but a word one edit away is much more likely in this context "
            "(for example 'form' where 'from' was meant)."
        },
        "defaultConfiguration": {"level": "note"},
    },
]
_RULE_INDEX = {rule["id"]: number for number, rule in enumerate(RULES)}


def _uri(path: str) -> str:
    if path == "-":
        return "stdin"
    return quote(Path(path).as_posix(), safe="/")


def _message(item: Located) -> str:
    finding = item.finding
    if finding.kind == "realword":
        text = f"'{finding.word}' may be the wrong word here."
    else:
        text = f"'{finding.word}' is not a known word."
    if finding.suggestions:
        text += " Suggestions: " + ", ".join(f"'{s.text}'" for s in finding.suggestions) + "."
    return text


def _result(item: Located) -> dict[str, Any]:
    finding = item.finding
    region = {
        "startLine": item.line,
        "startColumn": item.column,
        "endLine": item.end_line,
        "endColumn": item.end_column,
        "snippet": {"text": finding.word},
    }
    if Path(item.path).is_absolute():
        artifact = {"uri": Path(item.path).as_uri()}
    else:
        artifact = {"uri": _uri(item.path), "uriBaseId": "%SRCROOT%"}
    location = {"artifactLocation": artifact, "region": region}
    result: dict[str, Any] = {
        "ruleId": finding.kind,
        "ruleIndex": _RULE_INDEX.get(finding.kind, 0),
        "level": "warning" if finding.confident else "note",
        "message": {"text": _message(item)},
        "locations": [{"physicalLocation": location}],
        "properties": {
            "confidence": round(float(finding.confidence), 4),
            "suggestions": [{"text": s.text, "probability": round(float(s.probability), 4)} for s in finding.suggestions],
        },
    }
    if finding.confident and finding.suggestions:
        best = finding.suggestions[0].text
        result["fixes"] = [
            {
                "description": {"text": f"Replace '{finding.word}' with '{best}'."},
                "artifactChanges": [
                    {
                        "artifactLocation": location["artifactLocation"],
                        "replacements": [
                            {
                                "deletedRegion": {k: region[k] for k in ("startLine", "startColumn", "endLine", "endColumn")},
                                "insertedContent": {"text": best},
                            }
                        ],
                    }
                ],
            }
        ]
    return result


def build(located: Sequence[Located], summary: Summary, base: Path) -> dict[str, Any]:
    """The SARIF log as a dict; ``base`` is the folder relative paths start from."""
    notifications = [{"level": "note", "message": {"text": note}} for note in (summary.notes or [])]
    invocation: dict[str, Any] = {"executionSuccessful": not summary.failed}
    if notifications:
        invocation["toolExecutionNotifications"] = notifications
    base_uri = base.resolve().as_uri().rstrip("/") + "/"
    return {
        "$schema": SCHEMA_URI,
        "version": "2.1.0",
        "runs": [
            {
                "tool": {
                    "driver": {
                        "name": "calami",
                        "version": __version__,
                        "semanticVersion": __version__,
                        "rules": RULES,
                    }
                },
                "invocations": [invocation],
                "originalUriBaseIds": {"%SRCROOT%": {"uri": base_uri}},
                "columnKind": "unicodeCodePoints",
                "results": [_result(item) for item in located],
            }
        ],
    }


def render(located: Sequence[Located], summary: Summary, base: Path) -> str:
    return json.dumps(build(located, summary, base), ensure_ascii=False, indent=2) + "\n"

"""Prose held in data files rather than pages: WordNet glosses and API descriptions in JSON.

WordNet's data files (``data.noun`` ...) carry for every synset a gloss after
``|``: a definition and, in double quotes, example sentences of everyday
English ("he ran down the street"), which no software manual has.  The
service descriptions of ``python3-botocore`` keep their documentation as HTML
fragments inside JSON.
"""

from __future__ import annotations

import json

from html_prose import paragraphs


def wordnet_paragraphs(text: str) -> list[str]:
    """Definitions and example sentences of one WordNet data file, one a line."""
    out: list[str] = []
    for line in text.splitlines():
        if line.startswith("  ") or "| " not in line:
            continue  # the licence header lines start with two spaces
        gloss = line.split("| ", 1)[1].strip()
        for part in gloss.split("; "):
            part = part.strip()
            if part.startswith('"'):
                part = part.strip('"').strip()
                if part:
                    out.append(part[0].upper() + part[1:] + ("" if part.endswith((".", "!", "?")) else "."))
            elif part:
                out.append(part[0].upper() + part[1:] + ".")
    return out


def json_doc_paragraphs(text: str) -> list[str]:
    """Prose of every ``documentation`` string (HTML) in a botocore service description."""
    out: list[str] = []

    def walk(node) -> None:
        if isinstance(node, dict):
            for key, value in node.items():
                if key == "documentation" and isinstance(value, str):
                    out.extend(paragraphs(value))
                else:
                    walk(value)
        elif isinstance(node, list):
            for value in node:
                walk(value)

    walk(json.loads(text))
    return out

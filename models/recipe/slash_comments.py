"""Go or Rust source file -> paragraphs of its comment prose.

The Go standard library and Rust crates document themselves in comments:
careful English right beside code, the very kind of text calami checks in
source files.  Indented comment lines (Go's convention for code) and fenced
blocks (Rust doc comments are Markdown) are code and are dropped; so are
compiler directives, licence headers and generated files.
"""

from __future__ import annotations

import re

_DIRECTIVE = re.compile(r"^(?:go:|line |export |extern |\+build|nolint|lint:|#cgo)")
_GENERATED = re.compile(r"^// (?:Code generated .* DO NOT EDIT\.|This file is (?:auto-?)?generated)", re.MULTILINE)
_LIST_ITEM = re.compile(r"^\s*(?:[-*+•]|\d+[.)])\s+")


def comment_blocks(source: str) -> list[list[str]]:
    """Runs of whole-line comments (// lines or a /* */ region), markers removed."""
    blocks: list[list[str]] = []
    current: list[str] = []
    in_star = False
    for raw in source.splitlines():
        line = raw.strip()
        if in_star:
            if "*/" in line:
                current.append(raw.split("*/", 1)[0].rstrip())
                in_star = False
                blocks.append(current)
                current = []
            else:
                current.append(raw.rstrip())
            continue
        if line.startswith("//"):
            text = line[2:]
            if text.startswith(("/", "!")) and not text.startswith("//"):
                text = text[1:]  # Rust doc comment: /// or //!
            elif _DIRECTIVE.match(text):
                continue
            current.append(text[1:] if text.startswith(" ") else text)
            continue
        if current:
            blocks.append(current)
            current = []
        if line.startswith("/*") and "*/" not in line:
            in_star = True
            rest = line[2:].strip()
            if rest:
                current.append(rest)
    if current:
        blocks.append(current)
    return blocks


def block_paragraphs(lines: list[str]) -> list[str]:
    """Paragraphs of one block: blank lines, indented code, list items and headings split it."""
    out: list[str] = []
    current: list[str] = []

    def flush() -> None:
        if current:
            out.append(" ".join(current))
            current.clear()

    fenced = False
    for text in lines:
        if text.lstrip().startswith(("```", "~~~")):
            flush()
            fenced = not fenced
            continue
        if fenced:
            continue
        is_item = bool(_LIST_ITEM.match(text))
        if not text.strip() or (text.startswith(("\t", "  ")) and not is_item):
            flush()
        elif text.startswith("#"):  # doc comment (Go) or Markdown (Rust) heading
            flush()
            out.append(text.lstrip("#").strip())
        elif text.startswith("[") and "]:" in text:  # Markdown link definition
            flush()
        else:
            if is_item:
                flush()
                text = _LIST_ITEM.sub("", text)
            current.append(text.strip())
    flush()
    return out


def comment_paragraphs(source: str, generated: bool = False) -> list[str]:
    """Prose paragraphs of the comments of one Go or Rust file (none for generated files,
    unless ``generated``: API clients generated from service descriptions carry their
    hand-written documentation as comments)."""
    if not generated and _GENERATED.search(source):
        return []
    out: list[str] = []
    for block in comment_blocks(source):
        joined = " ".join(block).lower()
        if "copyright" in joined and "license" in joined and len(joined) < 400:
            continue  # licence header
        out.extend(block_paragraphs(block))
    return out

#!/usr/bin/env python3
"""Sample clean English sentences from sqlite3-doc for evaluation.

sqlite3-doc is public domain and is never part of the training corpus, so its
sentences are honest test material for the real-word error benchmark.  A
sentence is kept only when it is complete and plain: 8 to 40 words, starts
with a capital, ends with . ? or !, and holds no code, no placeholder, no
technical token (URL, path, identifier, number), no brackets or symbols.

Usage: python models/recipe/sample_heldout.py [--count 4000] [--seed 20240601]
       [--out tests/data/heldout-prose/sqlite-sentences.txt]
"""

from __future__ import annotations

import argparse
import os
import random
import re
import sys

_HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, _HERE)
sys.path.insert(1, os.path.join(_HERE, "..", "..", "server"))

from calami.text.tokens import CAPS, SKIP, WORD, tokenize  # noqa: E402
from html_prose import CODE, paragraphs  # noqa: E402

ROOT = "/usr/share/doc/sqlite3"
# Release notes and change logs are lists of terse fragments, not prose.
EXCLUDE = re.compile(r"/(?:releaselog|syntax)/|/(?:changes|chronology|news|doclist|keyword_index|sitemap|toc)\.html$")

# Sentence ends: . ? ! followed by space and a capital; abbreviations guarded.
_SPLIT = re.compile(r"(?<=[.?!])[\"”’)]?\s+(?=[\"“‘(]?[A-Z])")
_ABBREV_END = re.compile(r"\b(?:e\.g|i\.e|etc|vs|cf|approx|Mr|Dr|No|Fig|Sec)\.$", re.IGNORECASE)
_ALLOWED = re.compile(r"^[A-Za-z ,.;:'’?!\-]+$")
MIN_WORDS, MAX_WORDS = 8, 40
FUNCTION_WORDS = frozenset("the a an of to in is are be and or that this it for with as on by not can".split())


def split_sentences(paragraph: str) -> list[str]:
    """Cut a paragraph at sentence ends, gluing back cuts made after an abbreviation."""
    parts = _SPLIT.split(paragraph)
    out: list[str] = []
    for part in parts:
        if out and _ABBREV_END.search(out[-1]):
            out[-1] = out[-1] + " " + part
        else:
            out.append(part)
    return [p.strip() for p in out if p.strip()]


def clean_sentence(s: str) -> bool:
    """True for a complete, plain English sentence of the wanted length."""
    if CODE in s or not _ALLOWED.match(s):
        return False
    if not s[0].isupper() or s[-1] not in ".?!" or s.endswith(("..", ":.")):
        return False
    if _ABBREV_END.search(s) or "  " in s:
        return False
    tokens = tokenize(s)
    if any(t.kind == SKIP for t in tokens):
        return False
    if len({t.sentence for t in tokens}) != 1:
        return False  # the tokenizer saw more than one sentence in it
    words = [t for t in tokens if t.kind in (WORD, CAPS)]
    if not MIN_WORDS <= len(words) <= MAX_WORDS:
        return False
    if sum(1 for t in words if t.kind == CAPS) > 3 or sum(1 for t in words if t.text.lower() in FUNCTION_WORDS) < 2:
        return False
    # Title Case headings and lists of names are not sentences.
    capitalised = sum(1 for t in words[1:] if t.text[0].isupper())
    return capitalised <= len(words) // 3


def pages(root: str) -> list[str]:
    found = []
    for folder, dirs, names in os.walk(root):
        dirs.sort()
        for name in names:
            path = os.path.join(folder, name)
            if name.endswith(".html") and not os.path.islink(path) and not EXCLUDE.search(path):
                found.append(path)
    return sorted(found)


def candidates(root: str) -> list[str]:
    """All distinct clean sentences, in file order."""
    seen: set[str] = set()
    out: list[str] = []
    for path in pages(root):
        with open(path, "rb") as fh:
            html = fh.read().decode("utf-8", errors="replace")
        for para in paragraphs(html):
            for sentence in split_sentences(para):
                if sentence not in seen and clean_sentence(sentence):
                    seen.add(sentence)
                    out.append(sentence)
    return out


# Written in fragments so that this file itself keeps the same rule.
OFF_LIMITS = re.compile(r"(?i)\b(?:lect" r"ures?|trans" r"cripts?|cour" r"sework|the cour" r"se)\b")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--root", default=ROOT)
    parser.add_argument("--count", type=int, default=4000)
    parser.add_argument("--seed", type=int, default=20240601)
    parser.add_argument("--out", default=os.path.join(_HERE, "..", "..", "tests", "data", "heldout-prose",
                                                      "sqlite-sentences.txt"))
    args = parser.parse_args(argv)
    if not os.path.isdir(args.root):
        raise SystemExit(f"error: {args.root} not found; apt-get install sqlite3-doc")
    pool = candidates(args.root)
    rng = random.Random(args.seed)
    chosen = rng.sample(pool, min(args.count, len(pool)))
    # House naming rule (DEVELOPERS.md): the project's files never use the
    # words OFF_LIMITS matches, even in quoted text; the few sampled sentences
    # that do are dropped after sampling, so the rest of the sample stays as it was.
    chosen = [s for s in chosen if not OFF_LIMITS.search(s)]
    with open(args.out, "w", encoding="utf-8") as fh:
        fh.write("\n".join(chosen) + "\n")
    print(f"{len(pool)} clean sentences found, {len(chosen)} written to {os.path.normpath(args.out)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())

"""Precision of the fixes ``calami check --fix`` would apply (only confident ones).

    python tests/benchmarks/bench_fix_precision.py [--model PATH] [--sentences N] [--seed 11]

Two kinds of documents, checked exactly as ``calami check`` checks a
Markdown file (``commands.check.check_document``, then ``fixes.edits_for``):

* **planted**: held-out prose (tests/data/heldout-prose/sqlite-sentences.txt,
  SQLite documentation, never used for training), ten sentences per
  document; in every other sentence one word whose lower-case form is the
  correction of a dev-split misspelling pair (models/data/misspellings/*.tsv,
  split by ``model.pairs.split``; the error model never saw these words
  misspelt) is replaced by that misspelling (each pair at most twice).  A fix is right when it sits on
  a planted word and restores the original (case-insensitive).
* **clean**: the other sentences untouched, and this repository's own
  README.md and DEVELOPERS.md.  Every fix there is wrong by construction
  (unless the text itself holds a typo: the list is printed to judge).

Printed: fixes applied, right, precision (goal of issue 11: >= 0.98), share
of planted mistakes repaired, wrong fixes on planted words and fixes on
untouched words, per 1,000 words; then the same for stricter confident
thresholds (a fix is confident when its own posterior passes the threshold,
so the figures for a higher threshold come from the same findings).
"""

from __future__ import annotations

import argparse
import random
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(REPO / "server"))

from calami.checker import Checker  # noqa: E402
from calami.commands.check import check_document  # noqa: E402
from calami.fixes import edits_for  # noqa: E402
from calami.model import load  # noqa: E402
from calami.model.pairs import read_pairs, split  # noqa: E402
from calami.text.tokens import WORD, tokenize  # noqa: E402
from calami.vocab.project import Project  # noqa: E402

SENTENCES = REPO / "tests" / "data" / "heldout-prose" / "sqlite-sentences.txt"
PAIRS = REPO / "models" / "data" / "misspellings"
THRESHOLDS = (0.95, 0.97, 0.98, 0.99, 0.995)


def dev_misspellings() -> dict[str, list[str]]:
    """correction (lower case) -> misspellings, from the dev split of every set."""
    out: dict[str, list[str]] = {}
    for path in sorted(PAIRS.glob("*.tsv")):
        for typed, correct in split(read_pairs(path))[1]:
            if " " in typed or " " in correct or not typed.isalpha() or typed.lower() == correct.lower():
                continue
            out.setdefault(correct.lower(), []).append(typed.lower())
    return out


def match_case(template: str, word: str) -> str:
    return word[:1].upper() + word[1:] if template[:1].isupper() else word


def planted_documents(lines: list[str], rng: random.Random, per_doc: int = 10, max_reuse: int = 2):
    """(text, {offset: (typed, intended)}) documents, and clean ones.

    A pair is planted at most ``max_reuse`` times, so a frequent word (``it``)
    with an odd learner's misspelling does not dominate the figures.
    """
    errors = dev_misspellings()
    used: dict[tuple[str, str], int] = {}
    planted, clean = [], []
    for start in range(0, len(lines), per_doc * 2):
        chunk = lines[start:start + per_doc * 2]
        text_parts, marks, offset = [], {}, 0
        clean_parts = []
        for i, line in enumerate(chunk):
            if i % 2:
                clean_parts.append(line)
                continue
            options = [(t, typed) for t in tokenize(line) if t.kind == WORD
                       for typed in errors.get(t.text.lower(), ()) if used.get((typed, t.text.lower()), 0) < max_reuse]
            if options:
                tok, typed = rng.choice(options)
                used[(typed, tok.text.lower())] = used.get((typed, tok.text.lower()), 0) + 1
                typed = match_case(tok.text, typed)
                marks[offset + tok.start] = (typed, tok.text)
                line = line[:tok.start] + typed + line[tok.end:]
            text_parts.append(line)
            offset += len(line) + 2  # "\n\n" between sentences: one paragraph each
        planted.append(("\n\n".join(text_parts) + "\n", marks))
        clean.append("\n\n".join(clean_parts) + "\n")
    return planted, clean


def fixes_of(text: str, project: Project, checker: Checker) -> list:
    findings, _ = check_document(text, "markdown", project, checker)
    return findings


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--model")
    ap.add_argument("--sentences", type=int, default=4000)
    ap.add_argument("--seed", type=int, default=11)
    ap.add_argument("--max-reuse", type=int, default=2, help="times one misspelling pair may be planted")
    ap.add_argument("--workspace", action="store_true",
                    help="learn the workspace vocabulary from all the documents first, as calami check does")
    args = ap.parse_args()
    model = load(args.model)
    checker = Checker(model)
    default = checker.thresholds.confident
    lines = [l.strip() for l in SENTENCES.read_text(encoding="utf-8").splitlines() if l.strip()][: args.sentences]
    planted, clean = planted_documents(lines, random.Random(args.seed), max_reuse=args.max_reuse)
    own = [(REPO / name).read_text(encoding="utf-8") for name in ("README.md", "DEVELOPERS.md")]
    if args.workspace:
        # As `calami check --fix .` runs: every checked document teaches the workspace vocabulary.
        from calami.vocab.usage import WorkspaceVocabulary

        vocabulary = WorkspaceVocabulary(model.lexicon.ids.__contains__)
        for n, text in enumerate([t for t, _ in planted] + clean + own):
            vocabulary.add_text(f"doc{n}.md", text, "markdown")
        checker = Checker(model, usage=vocabulary)
    started = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder:
        project = Project(Path(folder))  # defaults: no project words, no skip patterns
        planted_findings = [(text, marks, fixes_of(text, project, checker)) for text, marks in planted]
        clean_findings = [(text, fixes_of(text, project, checker)) for text in clean]
        own_findings = [(text, fixes_of(text, project, checker)) for text in own]
    seconds = time.perf_counter() - started

    def words(text: str) -> int:
        return sum(1 for t in tokenize(text) if t.kind == WORD)

    planted_words = sum(words(t) for t, _, _ in planted_findings)
    clean_words = sum(words(t) for t, _ in clean_findings)
    own_words = sum(words(t) for t, _ in own_findings)
    total_planted = sum(len(m) for _, m, _ in planted_findings)
    print(f"planted: {len(planted_findings)} documents, {planted_words} words, {total_planted} planted misspellings "
          f"(dev split); clean: {clean_words} held-out words + {own_words} words of README.md/DEVELOPERS.md; "
          f"checked in {seconds:.1f} s")
    print(f"{'threshold':>9}{'applied':>9}{'right':>7}{'precision':>11}{'repaired':>10}"
          f"{'wrong@planted':>15}{'false@planted/1k':>18}{'false@clean/1k':>16}{'false@own/1k':>14}")
    wrong_examples: list[str] = []
    for threshold in (t for t in THRESHOLDS if t >= default):
        def edits(text, findings):
            kept = [f for f in findings if f.confident and f.suggestions and f.suggestions[0].probability >= threshold]
            return edits_for(text, kept)

        right = wrong_planted = false_planted = 0
        for text, marks, findings in planted_findings:
            for e in edits(text, findings):
                mark = marks.get(e.start)
                if mark and text[e.start:e.end] == mark[0]:
                    if e.replacement.lower() == mark[1].lower():
                        right += 1
                    else:
                        wrong_planted += 1
                        if threshold == default:
                            wrong_examples.append(f"planted {mark[0]!r} (meant {mark[1]!r}) -> {e.replacement!r}")
                else:
                    false_planted += 1
                    if threshold == default:
                        wrong_examples.append(f"untouched {text[e.start:e.end]!r} -> {e.replacement!r}: "
                                              f"{_context(text, e.start)}")
        false_clean = 0
        for text, findings in clean_findings:
            for e in edits(text, findings):
                false_clean += 1
                if threshold == default:
                    wrong_examples.append(f"clean {text[e.start:e.end]!r} -> {e.replacement!r}: {_context(text, e.start)}")
        false_own = 0
        for text, findings in own_findings:
            for e in edits(text, findings):
                false_own += 1
                if threshold == default:
                    wrong_examples.append(f"own docs {text[e.start:e.end]!r} -> {e.replacement!r}: {_context(text, e.start)}")
        applied = right + wrong_planted + false_planted + false_clean + false_own
        precision = right / applied if applied else float("nan")
        print(f"{threshold:>9.3f}{applied:>9}{right:>7}{precision:>11.3f}{right / max(1, total_planted):>10.3f}"
              f"{wrong_planted:>15}{1000 * false_planted / planted_words:>18.2f}"
              f"{1000 * false_clean / clean_words:>16.2f}{1000 * false_own / max(1, own_words):>14.2f}")
    print(f"\nwrong fixes at the shipped threshold ({default}): {len(wrong_examples)}; the first 40:")
    for line in wrong_examples[:40]:
        print("  " + line)


def _context(text: str, offset: int, width: int = 40) -> str:
    return " ".join(text[max(0, offset - width): offset + width].split())


if __name__ == "__main__":
    main()

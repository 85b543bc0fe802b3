"""Real-word error detection on held-out prose.

    python tests/benchmarks/bench_realword.py [--model PATH] [--sentences N]

Sentences: tests/data/heldout-prose/sqlite-sentences.txt (SQLite
documentation, public domain; never used for training).  Half of them are
candidates for corruption: one word that belongs to a confusion set (the
published sets of Golding & Roth 1999 plus frequent one-edit slips, see
calami/model/confusables.py) is replaced by another member of its set.
The other half stay untouched.  Printed: detection precision and recall,
correction accuracy, false flags per 1,000 words of untouched text, at the
shipped settings; then precision/recall curves over alpha, for members of
confusion sets and for every other word.  Every figure is given twice, side
by side: with the trigram window (P(c | l2 l1) P(r1 | l1 c) P(r2 | c r1), what
calami uses) and with the same model as a bigram model (P(c | l1) P(r1 | c),
``Checker(lm_order=2)``).
"""

from __future__ import annotations

import argparse
import random
import sys
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(REPO / "server"))

from calami.checker import Checker  # noqa: E402
from calami.findings import REALWORD  # noqa: E402
from calami.model import load  # noqa: E402
from calami.model.confusables import PUBLISHED_SETS, SLIPS  # noqa: E402
from calami.text.tokens import WORD, tokenize  # noqa: E402

DATA = REPO / "tests" / "data" / "heldout-prose" / "sqlite-sentences.txt"


def match_case(template: str, word: str) -> str:
    if template[:1].isupper():
        return word[:1].upper() + word[1:]
    return word


def make_cases(n: int, seed: int = 11, lines: list[str] | None = None):
    if lines is None:
        lines = [l.strip() for l in DATA.read_text(encoding="utf-8").splitlines() if l.strip()]
    groups = {}
    for group in PUBLISHED_SETS + SLIPS:
        for w in group:
            groups.setdefault(w, set()).update(x for x in group if x != w)
    rng = random.Random(seed)
    corrupted, clean = [], []
    for i, line in enumerate(lines):
        if i % 2 == 1:
            clean.append(line)
            continue
        options = [t for t in tokenize(line) if t.kind == WORD and t.norm.lower() in groups]
        if not options:
            continue
        tok = rng.choice(options)
        wrong = match_case(tok.text, rng.choice(sorted(groups[tok.norm.lower()])))
        text = line[: tok.start] + wrong + line[tok.end :]
        corrupted.append((text, tok.start, tok.start + len(wrong), tok.text))
    return corrupted[:n], clean[:n]


def score(checker: Checker, corrupted, clean):
    tp = fp = correct = 0
    clean_words = clean_rw = clean_nw = 0
    for text, start, end, original in corrupted:
        for f in checker.check(text):
            if f.kind != REALWORD:
                continue
            if f.start == start and f.end == end:
                tp += 1
                correct += bool(f.suggestions) and f.suggestions[0].text == original
            else:
                fp += 1
    for text in clean:
        clean_words += sum(1 for t in tokenize(text) if t.kind == WORD)
        for f in checker.check(text):
            if f.kind == REALWORD:
                fp += 1
                clean_rw += 1
            else:
                clean_nw += 1
    precision = tp / (tp + fp) if tp + fp else 1.0
    recall = tp / len(corrupted) if corrupted else 0.0
    return {
        "precision": precision, "recall": recall, "tp": tp, "fp": fp,
        "correction": correct / tp if tp else 0.0,
        "clean_words": clean_words, "clean_realword_per_1000": 1000 * clean_rw / max(clean_words, 1),
        "clean_nonword_per_1000": 1000 * clean_nw / max(clean_words, 1),
    }


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--model")
    ap.add_argument("--sentences", type=int, default=1500)
    ap.add_argument("--no-curve", action="store_true")
    args = ap.parse_args()
    t0 = time.time()
    model = load(args.model)
    corrupted, clean = make_cases(args.sentences)
    print(f"{len(corrupted)} corrupted sentences, {len(clean)} untouched sentences (held-out SQLite docs)")
    orders = (2, 3)
    print(f"shipped settings (alpha={model.params.alpha}, alpha_confusable={model.params.alpha_confusable}, "
          f"real-word hint={model.params.realword_hint}):")
    for order in orders:
        s = score(Checker(model, lm_order=order), corrupted, clean)
        name = "trigram" if order == 3 else "bigram "
        print(f"  {name}: detection precision {s['precision']:.3f}  recall {s['recall']:.3f}  (tp {s['tp']}, fp {s['fp']});"
              f" correction accuracy {s['correction']:.3f}")
        print(f"           untouched text: {s['clean_words']} words, real-word flags {s['clean_realword_per_1000']:.2f}"
              f" per 1,000 words, non-word flags {s['clean_nonword_per_1000']:.2f} per 1,000 words")
    if not args.no_curve:
        head = ("value      bigram: precision  recall  flags/1000 | trigram: precision  recall  flags/1000")

        def curve(attr: str, values) -> None:
            base = getattr(model.params, attr)
            for value in values:
                setattr(model.params, attr, value)
                cells = []
                for order in orders:
                    r = score(Checker(model, lm_order=order), corrupted, clean)
                    cells.append(f"{r['precision']:>9.3f} {r['recall']:>7.3f}  {r['clean_realword_per_1000']:>9.2f}")
                print(f"{value:<10}        {cells[0]} |          {cells[1]}", flush=True)
            setattr(model.params, attr, base)

        print("\nalpha_confusable (P(no error) for confusion-set members; other words keep alpha)")
        print(head)
        curve("alpha_confusable", (0.3, 0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 0.98, 0.99))
        print("\nalpha (P(no error) for every other listed word)")
        print(head)
        curve("alpha", (0.9, 0.95, 0.99, 0.995, 0.999, 0.9999))
    print(f"\n({time.time() - t0:.0f} s)")


if __name__ == "__main__":
    main()

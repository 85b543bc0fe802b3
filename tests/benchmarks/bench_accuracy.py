"""Isolated-word correction accuracy and candidate-generation speed.

    python tests/benchmarks/bench_accuracy.py [--model PATH] [--limit N]

For each misspelling set (dev split, see models/data/misspellings/README.md)
it prints top-1 / top-3 accuracy of calami and of a plain baseline on the
same pairs: the same word list, minimum OSA distance (full scan, no cut-off),
ties broken by word frequency.  Two rows per set: ALL pairs, and REACHABLE
pairs (the misspelling is not in the lexicon, the correction is), the ones a
word-list corrector can get; targets on reachable pairs (issue 10) are shown
beside them.  Both rank corrections *for a word known to
be wrong*, so the typed word itself is never a valid answer.  Then it times
candidate generation at distance 2 against a brute-force rapidfuzz scan of
the lexicon and checks that both return the same sets.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

from rapidfuzz import process
from rapidfuzz.distance import OSA

REPO = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(REPO / "server"))

from calami.checker import Checker  # noqa: E402
from calami.model import load  # noqa: E402
from calami.model.pairs import read_pairs, split  # noqa: E402

DATA = REPO / "models" / "data" / "misspellings"


def baseline_top(typed: str, keys: list[str], prior, k: int = 3) -> list[str]:
    found = process.extract(typed, keys, scorer=OSA.distance, limit=None, score_cutoff=max(3, len(typed)))
    ranked = sorted(((int(d), -prior[i], m) for m, d, i in found if m != typed))
    return [m for _, _, m in ranked[:k]]


def calami_top(checker: Checker, typed: str, k: int = 3) -> list[str]:
    out = [s.text.lower() for s in checker.suggest(typed, limit=k + 1) if s.text.lower() != typed]
    return out[:k]


# Top-1 targets on reachable pairs (issue 10).
TARGETS = {"wikipedia-mitton": 92.0, "toefl-spell": 90.0, "srcd-identifier-typos": 88.0}


def hits(checker: Checker, keys, prior, typed: str, correct: str) -> tuple[bool, bool, bool, bool]:
    base = baseline_top(typed, keys, prior)
    ours = calami_top(checker, typed)
    return base[:1] == [correct], correct in base, ours[:1] == [correct], correct in ours


def evaluate(model_path: str | None, limit: int | None) -> dict:
    model = load(model_path)
    checker = Checker(model)
    keys, prior = model.lexicon.keys, model.lm.prior
    ids = model.lexicon.ids
    print(f"{'set':<24}{'pairs':<10}{'n':>6}{'base@1':>8}{'base@3':>8}{'calami@1':>10}{'calami@3':>10}"
          f"{'gain@1':>8}{'target@1':>10}")
    results: dict = {}
    for path in sorted(DATA.glob("*.tsv")):
        dev = split(read_pairs(path))[1][:limit]
        pairs = [(t.lower(), c.lower()) for t, c in dev]
        scored = [(t not in ids and c in ids, hits(checker, keys, prior, t, c)) for t, c in pairs]
        results[path.stem] = {}
        for label in ("all", "reachable"):
            subset = [h for reachable, h in scored if reachable or label == "all"]
            n = len(subset)
            b1, b3, c1, c3 = (sum(h[k] for h in subset) for k in range(4))
            pct = lambda x: round(100.0 * x / n, 1) if n else 0.0  # noqa: E731
            target = TARGETS.get(path.stem) if label == "reachable" else None
            mark = "" if target is None else f"{target:>9.1f}{'' if pct(c1) >= target else '!'}"
            below = " BELOW BASELINE" if pct(c1) < pct(b1) else ""
            print(f"{path.stem if label == 'all' else '':<24}{label:<10}{n:>6}{pct(b1):>7.1f}%{pct(b3):>7.1f}%"
                  f"{pct(c1):>9.1f}%{pct(c3):>9.1f}%{pct(c1) - pct(b1):>+8.1f}{mark:>10}{below}", flush=True)
            results[path.stem][label] = {"n": n, "base1": pct(b1), "base3": pct(b3), "top1": pct(c1), "top3": pct(c3)}
    return results


def time_candidates(model_path: str | None, n: int) -> None:
    model = load(model_path)
    keys = model.lexicon.keys
    queries = []
    for path in sorted(DATA.glob("*.tsv")):
        queries += [t.lower() for t, _ in split(read_pairs(path))[1] if " " not in t]
    queries = queries[:n]
    ours_t, brute_t, mismatches = [], [], 0
    for q in queries:
        t0 = time.perf_counter()
        ours = model.candidates.within(q, 2)
        t1 = time.perf_counter()
        ref = process.extract(q, keys, scorer=OSA.distance, score_cutoff=2, limit=None)
        t2 = time.perf_counter()
        ours_t.append(t1 - t0)
        brute_t.append(t2 - t1)
        if {keys[k] for k in ours} != {m for m, _, _ in ref}:
            mismatches += 1
    med_o, med_b = statistics.median(ours_t), statistics.median(brute_t)
    p95 = sorted(ours_t)[int(0.95 * len(ours_t)) - 1]
    print(f"\ncandidate generation, distance 2, {len(queries)} real misspellings, lexicon of {len(keys)} keys")
    print(f"  calami index : median {med_o * 1e3:.3f} ms, p95 {p95 * 1e3:.3f} ms per word")
    print(f"  rapidfuzz scan: median {med_b * 1e3:.3f} ms per word")
    print(f"  speed-up (median ratio): {med_b / med_o:.1f}x; sets differing: {mismatches}")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--model")
    ap.add_argument("--limit", type=int, help="pairs per set (default: all dev pairs)")
    ap.add_argument("--queries", type=int, default=500)
    ap.add_argument("--json", type=Path, help="also write the accuracy figures here (input for accuracy-floors.json)")
    args = ap.parse_args()
    t0 = time.time()
    results = evaluate(args.model, args.limit)
    if args.json:
        import json

        args.json.write_text(json.dumps(results, indent=1, sort_keys=True) + "\n", encoding="utf-8")
    time_candidates(args.model, args.queries)
    print(f"\n({time.time() - t0:.0f} s)")


if __name__ == "__main__":
    main()

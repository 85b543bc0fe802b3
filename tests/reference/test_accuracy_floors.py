"""Accuracy floors on real misspellings (dev split; sources in models/data/misspellings/README.md).

The floors in tests/data/accuracy-floors.json are the top-1 / top-3 accuracy
that `tests/benchmarks/bench_accuracy.py` measured for the shipped model,
on all dev pairs and on the reachable ones (misspelling not in the lexicon,
correction in it); a change that loses more than two points on any set fails
here.  Pairs are
scored as in the benchmark: the typed word is known to be wrong, so it is
never an acceptable answer.
"""

import json
from pathlib import Path

import pytest

from calami.checker import Checker
from calami.model.pairs import read_pairs, split

REPO = Path(__file__).resolve().parents[2]
FLOORS = json.loads((REPO / "tests" / "data" / "accuracy-floors.json").read_text(encoding="utf-8"))
MARGIN = 2.0


def accuracy(checker: Checker, pairs) -> tuple[float, float]:
    top1 = top3 = 0
    for typed, correct in pairs:
        typed, correct = typed.lower(), correct.lower()
        ranked = [s.text.lower() for s in checker.suggest(typed, limit=4) if s.text.lower() != typed][:3]
        top1 += ranked[:1] == [correct]
        top3 += correct in ranked
    return 100.0 * top1 / len(pairs), 100.0 * top3 / len(pairs)


@pytest.mark.parametrize("name", sorted(FLOORS["sets"]))
def test_accuracy_does_not_drop(model, name):
    pairs = split(read_pairs(REPO / "models" / "data" / "misspellings" / f"{name}.tsv"))[1]
    checker = Checker(model)
    ids = model.lexicon.ids
    subsets = {"all": pairs, "reachable": [(t, c) for t, c in pairs if t.lower() not in ids and c.lower() in ids]}
    for label, floor in FLOORS["sets"][name].items():
        top1, top3 = accuracy(checker, subsets[label])
        assert top1 >= floor["top1"] - MARGIN, f"{name} ({label}): top-1 {top1:.1f}% < floor {floor['top1']}%"
        assert top3 >= floor["top3"] - MARGIN, f"{name} ({label}): top-3 {top3:.1f}% < floor {floor['top3']}%"

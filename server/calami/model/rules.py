"""Multi-character edits: the string-to-string error model of Brill & Moore (2000).

Single-letter edits cannot say that "ph" is typed "f", "ance" "ence" or a
final "e" dropped; people misspell by sound and by chunks.  Brill & Moore
learn rules alpha -> beta between short substrings from aligned pairs: every
span of alignment columns that overlaps a run of differing columns and
reaches at most CONTEXT columns beyond it is counted, so "colleague" ->
"collegue" yields "a" -> "", "ea" -> "e", "eag" -> "eg", "lea" -> "le", ...
and "physical" -> "fisical" yields "ph" -> "f" as well as "phy" -> "fi".  The word start
and end take part as "^" and "$" so rules can be positional ("e$" -> "$").

    rate(alpha -> beta) = max(count - discount, 0) / (occurrences of alpha + 1)

where occurrences are counted in running text scaled to the pairs' correct
side, as for the single-letter rates of the channel.  The channel's weighted
alignment may use a rule wherever its alpha and beta fit, as one edit.
"""

from __future__ import annotations

import math
from collections import Counter
from typing import Iterable

from calami.model.alignment import align_columns

BEGIN, END = "^", "$"
MAX_SIDE = 3  # longest alpha or beta
CONTEXT = 2  # neighbouring columns added on each side when counting


def rule_spans(typed: str, intended: str) -> Iterable[tuple[str, str]]:
    """Every (alpha, beta) a misspelling pair supports, with its context expansions."""
    cols = [(BEGIN, BEGIN)] + align_columns(typed, intended) + [(END, END)]
    k = 0
    while k < len(cols):
        if cols[k][0] == cols[k][1]:
            k += 1
            continue
        end = k
        while end + 1 < len(cols) and cols[end + 1][0] != cols[end + 1][1]:
            end += 1
        # Every span of columns that overlaps the run, reaching at most
        # CONTEXT columns beyond it: sub-runs ("ph" -> "f" inside
        # "phy" -> "fi") and context expansions alike.
        for a in range(max(0, k - CONTEXT), end + 1):
            for b in range(max(a, k), min(len(cols) - 1, end + CONTEXT) + 1):
                alpha = "".join(c for c, _ in cols[a : b + 1])
                beta = "".join(t for _, t in cols[a : b + 1])
                if 1 <= len(alpha) <= MAX_SIDE and len(beta) <= MAX_SIDE and alpha != beta and len(alpha) + len(beta) > 2:
                    yield alpha, beta
        k = end + 1


def count_rules(pairs: Iterable[tuple[str, str]]) -> Counter[tuple[str, str]]:
    """Rule counts over lower-cased single-word pairs."""
    counts: Counter[tuple[str, str]] = Counter()
    for typed, intended in pairs:
        counts.update(set(rule_spans(typed, intended)))
    return counts


def substring_counts(words: Iterable[tuple[str, float]], alphas: set[str]) -> dict[str, float]:
    """Weighted occurrences of each wanted alpha in "^word$" strings."""
    out: dict[str, float] = dict.fromkeys(alphas, 0.0)
    lengths = sorted({len(a) for a in alphas})
    for word, weight in words:
        s = BEGIN + word + END
        for n in lengths:
            for i in range(len(s) - n + 1):
                g = s[i : i + n]
                if g in out:
                    out[g] += weight
    return out


class RuleTable:
    """Rates of alpha -> beta rules, looked up by alpha then beta."""

    def __init__(self, counts: dict[str, dict[str, float]], occurrences: dict[str, float], discount: float) -> None:
        self.counts = counts
        self.occurrences = occurrences
        self.discount = discount
        self.rates: dict[str, dict[str, float]] = {}
        for alpha, betas in counts.items():
            den = occurrences.get(alpha, 0.0) + 1.0
            kept = {b: (n - discount) / den for b, n in betas.items() if n > discount}
            if kept:
                self.rates[alpha] = kept
        # -log rate, as the weighted alignment adds it.
        self.costs = {a: {b: -math.log(r) for b, r in bs.items()} for a, bs in self.rates.items()}

    def __len__(self) -> int:
        return sum(len(b) for b in self.rates.values())

    def to_dict(self) -> dict:
        return {"counts": self.counts, "occurrences": self.occurrences, "discount": self.discount}

    @classmethod
    def from_dict(cls, d: dict | None) -> "RuleTable":
        if not d:
            return cls({}, {}, 0.0)
        return cls(d["counts"], d["occurrences"], d["discount"])

    @classmethod
    def train(cls, pairs: Iterable[tuple[str, str]], words: Iterable[tuple[str, float]],
              scale: float, discount: float, min_count: int = 2) -> "RuleTable":
        """Count rules in ``pairs``; ``words`` (weighted) give alpha occurrences times ``scale``."""
        counted = count_rules(pairs)
        nested: dict[str, dict[str, float]] = {}
        for (alpha, beta), n in counted.items():
            if n >= min_count:
                nested.setdefault(alpha, {})[beta] = float(n)
        occ = substring_counts(words, set(nested))
        return cls(nested, {a: v * scale for a, v in occ.items()}, discount)

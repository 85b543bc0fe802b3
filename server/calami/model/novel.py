"""How likely a spelling is as a *new* word: a character trigram model.

An unknown token is either a typo of a listed word or a word the lists do
not have (jargon, a name).  The second hypothesis needs a probability for
the spelling itself; a flat constant would make every long typo look as
plausible as a short abbreviation.  Open-vocabulary language models use a
character n-gram model for this (common practice); ours is a trigram model
with Witten-Bell interpolation, trained on the lexicon's words
weighted by frequency, so "plausible English-looking" spellings score well
and the score falls with length.
"""

from __future__ import annotations

import math
from collections import Counter
from typing import Iterable

BOUNDARY = "^"
END = "$"


class NovelWordModel:
    def __init__(self, tri: dict[str, float], bi: dict[str, float], uni: dict[str, float]) -> None:
        self.tri = tri
        self.bi = bi
        self.uni = uni
        self.uni_total = sum(uni.values()) or 1.0
        self.alphabet_size = max(len(uni), 1)
        # Context totals and type counts for interpolation.
        self._ctx2: dict[str, list[float]] = {}
        for k, v in tri.items():
            entry = self._ctx2.setdefault(k[:2], [0.0, 0])
            entry[0] += v
            entry[1] += 1
        self._ctx1: dict[str, list[float]] = {}
        for k, v in bi.items():
            entry = self._ctx1.setdefault(k[:1], [0.0, 0])
            entry[0] += v
            entry[1] += 1

    @classmethod
    def train(cls, words: Iterable[tuple[str, float]], scale: float = 1e6) -> "NovelWordModel":
        """Train on (word, relative frequency) pairs; frequencies become pseudo-counts."""
        tri: Counter[str] = Counter()
        bi: Counter[str] = Counter()
        uni: Counter[str] = Counter()
        for word, weight in words:
            weight = weight * scale + 1.0  # every listed word counts at least once
            s = BOUNDARY + BOUNDARY + word + END
            for i in range(2, len(s)):
                tri[s[i - 2 : i + 1]] += weight
                bi[s[i - 1 : i + 1]] += weight
                uni[s[i]] += weight
        return cls(dict(tri), dict(bi), dict(uni))

    def _p_uni(self, ch: str) -> float:
        return (self.uni.get(ch, 0.0) + 1.0) / (self.uni_total + self.alphabet_size + 1)

    def _p_bi(self, prev: str, ch: str) -> float:
        # Witten-Bell interpolation (common practice): back off in proportion
        # to how many different characters follow the context.
        lower = self._p_uni(ch)
        entry = self._ctx1.get(prev)
        if not entry:
            return lower
        total, types = entry
        return (self.bi.get(prev + ch, 0.0) + types * lower) / (total + types)

    def _p_tri(self, ctx: str, ch: str) -> float:
        lower = self._p_bi(ctx[1], ch)
        entry = self._ctx2.get(ctx)
        if not entry:
            return lower
        total, types = entry
        return (self.tri.get(ctx + ch, 0.0) + types * lower) / (total + types)

    def logprob(self, word: str) -> float:
        """log P(spelling) for a lower-case word, end marker included."""
        s = BOUNDARY + BOUNDARY + word + END
        lp = 0.0
        for i in range(2, len(s)):
            lp += math.log(self._p_tri(s[i - 2 : i], s[i]))
        return lp

    def to_dict(self) -> dict:
        return {"tri": self.tri, "bi": self.bi, "uni": self.uni}

    @classmethod
    def from_dict(cls, d: dict) -> "NovelWordModel":
        return cls(d["tri"], d["bi"], d["uni"])

"""Word bigram language model with interpolated Kneser-Ney smoothing.

    P(w | v) = max(c(v, w) - D, 0) / c(v) + gamma(v) * P_uni(w)
    P_uni(w) = (1 - lam) * N1+(. w) / N1+(. .) + lam * prior(w)

The first line is interpolated Kneser-Ney at bigram order (Chen & Goodman
1998); with ``lam = 0`` and no pruning it equals ``nltk.lm.KneserNeyInterpolated``
(tested).  The ``prior`` term is our extension: the training corpus is
technical prose, so words it never saw after anything (continuation count 0)
still need mass; ``prior`` is a broad unigram distribution (word lists and
general frequencies).  Bigrams seen fewer than ``min_count`` times are not
stored; their discounted mass is folded into gamma(v), so every conditional
distribution still sums to one.

Storage is compact: per-context rows of sorted successor ids (CSR layout,
``array`` of machine integers), no dict of tuples.
"""

from __future__ import annotations

import bisect
from array import array
from collections import Counter
from dataclasses import dataclass
from typing import Iterable, Sequence


@dataclass
class LanguageModel:
    vocab_size: int
    discount: float
    lam: float
    ctx_count: array  # c(v .), 'd' or 'I'
    gamma: array  # backoff weight per context, 'd'
    cont: array  # N1+(. w), 'I'
    cont_total: int  # N1+(. .)
    prior: array  # 'd', sums to 1 over the vocabulary
    row_start: array  # 'I', vocab_size + 1
    col: array  # 'I', successor ids, sorted within a row
    cnt: array  # 'I', bigram counts

    def unigram(self, w: int) -> float:
        cont = self.cont[w] / self.cont_total if self.cont_total else 0.0
        return (1.0 - self.lam) * cont + self.lam * self.prior[w]

    def bigram_count(self, v: int, w: int) -> int:
        lo = self.row_start[v]
        hi = self.row_start[v + 1]
        if lo == hi:
            return 0
        i = bisect.bisect_left(self.col, w, lo, hi)
        if i < hi and self.col[i] == w:
            return self.cnt[i]
        return 0

    def prob(self, w: int, v: int | None) -> float:
        """P(w | v); ``v`` None means no context at all.

        Without context the right estimate is plain frequency (``prior``):
        Kneser-Ney's continuation probability answers a different question
        (how many contexts a word follows) and is meant only for backing off.
        """
        if v is None:
            return self.prior[w]
        p_uni = self.unigram(w)
        c_v = self.ctx_count[v]
        if c_v == 0:
            return p_uni
        c_vw = self.bigram_count(v, w)
        return max(c_vw - self.discount, 0.0) / c_v + self.gamma[v] * p_uni


    # The real-word check asks for one context against many words (and the
    # reverse) thousands of times per document: the same sums as ``prob``,
    # without three method calls per term.

    def probs_after(self, v: int | None, ws: Sequence[int]) -> list[float]:
        """[P(w | v) for w in ws], equal to ``prob`` term by term."""
        prior = self.prior
        if v is None:
            return [prior[w] for w in ws]
        lam, cont, cont_total = self.lam, self.cont, self.cont_total
        c_v = self.ctx_count[v]
        if c_v == 0:
            return [(1.0 - lam) * (cont[w] / cont_total if cont_total else 0.0) + lam * prior[w] for w in ws]
        lo, hi = self.row_start[v], self.row_start[v + 1]
        col, cnt, discount, g = self.col, self.cnt, self.discount, self.gamma[v]
        out = []
        for w in ws:
            c_vw = 0
            if lo != hi:
                i = bisect.bisect_left(col, w, lo, hi)
                if i < hi and col[i] == w:
                    c_vw = cnt[i]
            p_uni = (1.0 - lam) * (cont[w] / cont_total if cont_total else 0.0) + lam * prior[w]
            out.append(max(c_vw - discount, 0.0) / c_v + g * p_uni)
        return out

    def probs_before(self, w: int, vs: Sequence[int | None]) -> list[float]:
        """[P(w | v) for v in vs], equal to ``prob`` term by term."""
        p_uni = self.unigram(w)
        prior_w = self.prior[w]
        ctx_count, row_start, col, cnt, gamma, discount = (
            self.ctx_count, self.row_start, self.col, self.cnt, self.gamma, self.discount)
        out = []
        for v in vs:
            if v is None:
                out.append(prior_w)
                continue
            c_v = ctx_count[v]
            if c_v == 0:
                out.append(p_uni)
                continue
            lo, hi = row_start[v], row_start[v + 1]
            c_vw = 0
            if lo != hi:
                i = bisect.bisect_left(col, w, lo, hi)
                if i < hi and col[i] == w:
                    c_vw = cnt[i]
            out.append(max(c_vw - discount, 0.0) / c_v + gamma[v] * p_uni)
        return out


class BigramCounter:
    """Accumulates unigram and bigram counts over id sentences (build time only)."""

    def __init__(self, vocab_size: int, bos: int, eos: int) -> None:
        self.vocab_size = vocab_size
        self.bos = bos
        self.eos = eos
        self.bigrams: Counter[int] = Counter()
        self.unigrams: Counter[int] = Counter()
        self.tokens = 0

    def add_sentence(self, ids: Sequence[int]) -> None:
        V = self.vocab_size
        seq = [self.bos, *ids, self.eos]
        self.unigrams.update(ids)
        self.tokens += len(ids)
        self.bigrams.update(a * V + b for a, b in zip(seq, seq[1:]))

    def add_sentences(self, sentences: Iterable[Sequence[int]]) -> None:
        for s in sentences:
            self.add_sentence(s)


def estimate_discount(bigrams: Counter[int]) -> float:
    """D = n1 / (n1 + 2 n2) (Ney, Essen & Kneser 1994), common practice."""
    counts = Counter(bigrams.values())
    n1, n2 = counts.get(1, 0), counts.get(2, 0)
    if n1 == 0:
        return 0.5
    return n1 / (n1 + 2 * n2)


def build_language_model(
    counter: BigramCounter,
    prior: Sequence[float],
    *,
    discount: float | None = None,
    lam: float = 0.0,
    min_count: int = 1,
) -> LanguageModel:
    """Turn counts into the smoothed, compact model."""
    V = counter.vocab_size
    if len(prior) != V:
        raise ValueError("prior must cover the vocabulary")
    D = estimate_discount(counter.bigrams) if discount is None else discount
    ctx_count = array("d", bytes(8 * V))
    ctx_types = array("I", bytes(4 * V))
    cont = array("I", bytes(4 * V))
    pruned_mass = array("d", bytes(8 * V))
    rows: dict[int, list[tuple[int, int]]] = {}
    for key, c in counter.bigrams.items():
        v, w = divmod(key, V)
        ctx_count[v] += c
        ctx_types[v] += 1
        cont[w] += 1
        if c >= min_count:
            rows.setdefault(v, []).append((w, c))
        else:
            pruned_mass[v] += max(c - D, 0.0)
    gamma = array("d", bytes(8 * V))
    for v in range(V):
        if ctx_count[v] > 0:
            gamma[v] = (D * ctx_types[v] + pruned_mass[v]) / ctx_count[v]
    row_start = array("I", [0])
    col = array("I")
    cnt = array("I")
    for v in range(V):
        for w, c in sorted(rows.get(v, ())):
            col.append(w)
            cnt.append(c)
        row_start.append(len(col))
    total = sum(prior)
    prior_arr = array("d", (p / total for p in prior)) if total > 0 else array("d", bytes(8 * V))
    return LanguageModel(
        vocab_size=V,
        discount=D,
        lam=lam,
        ctx_count=ctx_count,
        gamma=gamma,
        cont=cont,
        cont_total=sum(ctx_types),
        prior=prior_arr,
        row_start=row_start,
        col=col,
        cnt=cnt,
    )

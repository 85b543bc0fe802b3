"""Word trigram language model with interpolated Kneser-Ney smoothing.

    P3(w | u v) = max(c(u v w) - D3, 0) / c(u v .)      + g3(u v) * P2(w | v)
    P2(w | v)   = max(N1+(. v w) - D2, 0) / N1+(. v .)  + g2(v)   * P1(w)
    P1(w)       = (1 - lam) * N1+(. w) / N1+(. .)       + lam     * prior(w)

Interpolated Kneser-Ney (Chen & Goodman 1998): the highest order uses raw
counts, the lower orders continuation counts (in how many distinct contexts
a word sequence occurs).  With ``lam = 0``, one discount for both orders and
no pruning it equals ``nltk.lm.KneserNeyInterpolated`` at order 3 (tested),
except that g2 counts only successors seen after some word, which keeps
every P2 distribution summing to one (nltk also counts the padding bigram
"<s> <s>", so its P2(. | <s>) sums to a little more than one).

``prior`` is our extension: the training corpus is technical prose, so
everyday words it never saw after anything still need mass; ``prior`` is a
broad unigram distribution (word lists and general frequencies).

Pruning: trigrams seen fewer than ``min_count3`` times and bigrams with a
continuation count below ``min_count2`` are not stored; their discounted
mass goes to the back-off weight, so every distribution still sums to one.
A context none of whose trigrams is stored needs no entry at all (its
back-off weight is exactly 1).

Storage is compact: sorted machine arrays (``array``), no dict of tuples.
Bigrams are per-context rows of sorted successor ids (CSR); trigram contexts
(u, v) are rows of sorted v per u, each with a row of sorted successor ids.  Sentences are padded ``<s> <s> w1 ... wn </s>``.
"""

from __future__ import annotations

import bisect
from array import array
from dataclasses import dataclass
from typing import Sequence


@dataclass
class LanguageModel:
    vocab_size: int
    d2: float  # discount, bigram level (continuation counts)
    d3: float  # discount, trigram level (raw counts)
    lam: float
    cont: array  # 'I', N1+(. w)
    cont_total: int  # N1+(. .)
    prior: array  # 'd', sums to 1 over the vocabulary
    bi_total: array  # 'I', N1+(. v .) per v
    bi_gamma: array  # 'd', g2(v)
    bi_start: array  # 'I', vocab_size + 1
    bi_col: array  # 'I', successor ids, sorted within a row
    bi_cnt: array  # 'I', N1+(. v w)
    tri_ctx_start: array  # 'I', vocab_size + 1: contexts (u, v) with stored trigrams, per u
    tri_ctx_v: array  # 'I', their v, sorted within a row
    tri_total: array  # 'I', c(u v .)
    tri_gamma: array  # 'd', g3(u v)
    tri_start: array  # 'I', len(tri_ctx_v) + 1
    tri_col: array  # 'I', successor ids, sorted within a row
    tri_cnt: array  # 'I', c(u v w)

    ARRAYS = ("cont", "prior", "bi_total", "bi_gamma", "bi_start", "bi_col", "bi_cnt",
              "tri_ctx_start", "tri_ctx_v", "tri_total", "tri_gamma", "tri_start", "tri_col", "tri_cnt")
    SCALARS = ("vocab_size", "d2", "d3", "lam", "cont_total")

    def unigram(self, w: int) -> float:
        cont = self.cont[w] / self.cont_total if self.cont_total else 0.0
        return (1.0 - self.lam) * cont + self.lam * self.prior[w]

    def prob(self, w: int, v: int | None) -> float:
        """P2(w | v); ``v`` None means no context at all.

        Without context the right estimate is plain frequency (``prior``):
        Kneser-Ney's continuation probability answers a different question
        (how many contexts a word follows) and is meant only for backing off.
        """
        if v is None:
            return self.prior[w]
        p_uni = self.unigram(w)
        total = self.bi_total[v]
        if total == 0:
            return p_uni
        lo, hi = self.bi_start[v], self.bi_start[v + 1]
        alpha = 0.0
        if lo < hi:
            col = self.bi_col
            i = bisect.bisect_left(col, w, lo, hi)
            if i < hi and col[i] == w:
                alpha = (self.bi_cnt[i] - self.d2) / total
        return alpha + self.bi_gamma[v] * p_uni

    def prob3(self, w: int, u: int | None, v: int | None) -> float:
        """P3(w | u v); ``u`` None backs off to P2(w | v), ``v`` None to the prior."""
        p2 = self.prob(w, v)
        if u is None or v is None:
            return p2
        lo, hi = self.tri_ctx_start[u], self.tri_ctx_start[u + 1]
        if lo == hi:
            return p2
        ctx = self.tri_ctx_v
        j = bisect.bisect_left(ctx, v, lo, hi)
        if j == hi or ctx[j] != v:
            return p2
        lo, hi = self.tri_start[j], self.tri_start[j + 1]
        col = self.tri_col
        i = bisect.bisect_left(col, w, lo, hi)
        alpha = 0.0
        if i < hi and col[i] == w:
            alpha = (self.tri_cnt[i] - self.d3) / self.tri_total[j]
        return alpha + self.tri_gamma[j] * p2

    def probs3_after(self, u: int | None, v: int | None, ws: Sequence[int]) -> list[float]:
        """[prob3(w, u, v) for w in ws], equal term by term, with the rows of u v and v found once.

        The real-word check asks this for all neighbours of a word at once.
        """
        if v is None:
            prior = self.prior
            return [prior[w] for w in ws]
        lam, cont, cont_total, prior = self.lam, self.cont, self.cont_total, self.prior
        total = self.bi_total[v]
        lo2, hi2 = self.bi_start[v], self.bi_start[v + 1]
        g2, d2, bi_col, bi_cnt = self.bi_gamma[v], self.d2, self.bi_col, self.bi_cnt
        lo3 = hi3 = j = -1
        if u is not None:
            clo, chi = self.tri_ctx_start[u], self.tri_ctx_start[u + 1]
            if clo < chi:
                k = bisect.bisect_left(self.tri_ctx_v, v, clo, chi)
                if k < chi and self.tri_ctx_v[k] == v:
                    j, lo3, hi3 = k, self.tri_start[k], self.tri_start[k + 1]
        tri_col, tri_cnt, d3 = self.tri_col, self.tri_cnt, self.d3
        out = []
        for w in ws:
            p_uni = (1.0 - lam) * (cont[w] / cont_total if cont_total else 0.0) + lam * prior[w]
            if total == 0:
                p2 = p_uni
            else:
                alpha = 0.0
                if lo2 < hi2:
                    i = bisect.bisect_left(bi_col, w, lo2, hi2)
                    if i < hi2 and bi_col[i] == w:
                        alpha = (bi_cnt[i] - d2) / total
                p2 = alpha + g2 * p_uni
            if j < 0:
                out.append(p2)
                continue
            i = bisect.bisect_left(tri_col, w, lo3, hi3)
            alpha = 0.0
            if i < hi3 and tri_col[i] == w:
                alpha = (tri_cnt[i] - d3) / self.tri_total[j]
            out.append(alpha + self.tri_gamma[j] * p2)
        return out

    def sizes(self) -> dict[str, int]:
        return {"bigrams_stored": len(self.bi_col), "trigram_contexts": len(self.tri_ctx_v),
                "trigrams_stored": len(self.tri_col)}


class NgramCounter:
    """Collects padded id sentences; ``counts()`` turns them into n-gram counts (build time only).

    Sentences are kept as one flat machine array with a separator id, and
    counted at the end with numpy (sorting 50 million keys beats a Python
    dict of that many tuples in time and memory).
    """

    def __init__(self, vocab_size: int, bos: int, eos: int) -> None:
        self.vocab_size = vocab_size
        self.bos = bos
        self.eos = eos
        self.sep = vocab_size  # never a word id
        self._buf = array("I")
        self.tokens = 0
        self.sentences = 0

    def add_sentence(self, ids: Sequence[int]) -> None:
        """One sentence of word ids, padded ``<s> <s> ids </s>``."""
        self.add_padded([self.bos, self.bos, *ids, self.eos])
        self.tokens += len(ids)

    def add_padded(self, seq: Sequence[int]) -> None:
        """A sequence already padded by the caller (every window of it is counted)."""
        self._buf.extend(seq)
        self._buf.append(self.sep)
        self.sentences += 1

    def counts(self) -> "NgramCounts":
        import numpy as np

        B = self.vocab_size + 1  # base of the keys (the separator is a digit too)
        seq = np.frombuffer(self._buf, dtype=np.uint32).astype(np.int64)
        a, b, c = seq[:-2], seq[1:-1], seq[2:]
        ok3 = (a != self.sep) & (b != self.sep) & (c != self.sep)
        tri, tri_n = np.unique(((a * B + b) * B + c)[ok3], return_counts=True)
        x, y = seq[:-1], seq[1:]
        ok2 = (x != self.sep) & (y != self.sep)
        bi_types = np.unique((x * B + y)[ok2])
        return NgramCounts(self.vocab_size, B, tri, tri_n, bi_types)


@dataclass
class NgramCounts:
    vocab_size: int
    base: int
    tri_keys: "object"  # numpy int64, sorted (u * B + v) * B + w
    tri_counts: "object"  # numpy int64
    bi_types: "object"  # numpy int64, sorted v * B + w of every bigram window

    @property
    def trigram_types(self) -> int:
        return int(len(self.tri_keys))

    @property
    def bigram_types(self) -> int:
        return int(len(self.bi_types))


def estimate_discount(counts: Sequence[int] | "object") -> float:
    """D = n1 / (n1 + 2 n2) (Ney, Essen & Kneser 1994), common practice."""
    import numpy as np

    arr = np.asarray(counts)
    n1, n2 = int((arr == 1).sum()), int((arr == 2).sum())
    if n1 == 0:
        return 0.5
    return n1 / (n1 + 2 * n2)


def _arr(typecode: str, values) -> array:
    out = array(typecode)
    out.frombytes(values.astype({"I": "<u4", "d": "<f8"}[typecode]).tobytes())
    return out


def build_language_model(
    counts: NgramCounts,
    prior: Sequence[float],
    *,
    discount: float | None = None,
    lam: float = 0.0,
    min_count2: int = 1,
    min_count3: int = 1,
) -> LanguageModel:
    """Turn counts into the smoothed, compact model (``discount`` fixes D2 = D3, for tests)."""
    import numpy as np

    V, B = counts.vocab_size, counts.base
    if len(prior) != V:
        raise ValueError("prior must cover the vocabulary")
    tri, tri_n = counts.tri_keys, counts.tri_counts

    # Unigram level: N1+(. w) over the bigram types.
    cont = np.bincount(counts.bi_types % B, minlength=B)[:V]
    cont_total = int(cont.sum())

    # Bigram level: N1+(. v w) = number of distinct u before "v w".
    bi_keys, bi_n = np.unique(tri % (B * B), return_counts=True)
    d2 = estimate_discount(bi_n) if discount is None else discount
    bv, bw = bi_keys // B, bi_keys % B
    bi_total = np.bincount(bv, weights=bi_n, minlength=V)[:V]
    keep2 = bi_n >= min_count2
    kept_mass = np.bincount(bv[keep2], weights=bi_n[keep2] - d2, minlength=V)[:V]
    with np.errstate(divide="ignore", invalid="ignore"):
        bi_gamma = np.where(bi_total > 0, 1.0 - kept_mass / np.where(bi_total > 0, bi_total, 1), 0.0)
    bi_start = np.zeros(V + 1, dtype=np.int64)
    np.cumsum(np.bincount(bv[keep2], minlength=V)[:V], out=bi_start[1:])

    # Trigram level: raw counts, contexts u * V + v.
    d3 = estimate_discount(tri_n) if discount is None else discount
    ctx_b = tri // B  # u * B + v
    ctx_keys, ctx_first, ctx_inv = np.unique(ctx_b, return_index=True, return_inverse=True)
    ctx_total = np.bincount(ctx_inv, weights=tri_n)
    keep3 = tri_n >= min_count3
    kept3 = np.bincount(ctx_inv[keep3], weights=tri_n[keep3] - d3, minlength=len(ctx_keys))
    stored_per_ctx = np.bincount(ctx_inv[keep3], minlength=len(ctx_keys))
    has = stored_per_ctx > 0
    tri_gamma = 1.0 - kept3[has] / ctx_total[has]
    u, v = ctx_keys[has] // B, ctx_keys[has] % B
    tri_ctx_start = np.zeros(V + 1, dtype=np.int64)
    np.cumsum(np.bincount(u, minlength=V)[:V], out=tri_ctx_start[1:])
    tri_start = np.zeros(int(has.sum()) + 1, dtype=np.int64)
    np.cumsum(stored_per_ctx[has], out=tri_start[1:])

    total = float(sum(prior))
    prior_arr = array("d", (p / total for p in prior)) if total > 0 else array("d", bytes(8 * V))
    return LanguageModel(
        vocab_size=V, d2=float(d2), d3=float(d3), lam=lam,
        cont=_arr("I", cont), cont_total=cont_total, prior=prior_arr,
        bi_total=_arr("I", bi_total.astype(np.int64)), bi_gamma=_arr("d", bi_gamma),
        bi_start=_arr("I", bi_start), bi_col=_arr("I", bw[keep2]), bi_cnt=_arr("I", bi_n[keep2]),
        tri_ctx_start=_arr("I", tri_ctx_start), tri_ctx_v=_arr("I", v), tri_total=_arr("I", ctx_total[has].astype(np.int64)),
        tri_gamma=_arr("d", tri_gamma), tri_start=_arr("I", tri_start),
        tri_col=_arr("I", tri[keep3] % B), tri_cnt=_arr("I", tri_n[keep3]),
    )

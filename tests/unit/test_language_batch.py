"""The batch lookups of the language model equal the single ones exactly, term by term."""

from __future__ import annotations

import random

from calami.context import Left, Right, log_left, log_lefts, log_right, log_rights
from calami.model.language import NgramCounter, build_language_model


def _model(lam: float, min_count: int):
    rng = random.Random(7)
    vocab = 60
    counter = NgramCounter(vocab, bos=0, eos=1)
    for _ in range(400):  # a skewed random corpus: some contexts rich, some never seen
        counter.add_sentence([2 + min(vocab - 3, int(rng.expovariate(0.15))) for _ in range(rng.randint(1, 12))])
    prior = [1.0 / vocab] * vocab
    return build_language_model(counter.counts(), prior, lam=lam, min_count2=min_count, min_count3=min_count), vocab


def test_probs3_after_equals_prob3_bit_for_bit():
    for lam, min_count in ((0.0, 1), (0.1, 2), (0.3, 3)):
        lm, vocab = _model(lam, min_count)
        words = list(range(vocab))
        for u in [None, 0, 2, 3, 7, 30]:
            for v in [None, *range(vocab)]:
                assert lm.probs3_after(u, v, words) == [lm.prob3(w, u, v) for w in words], (u, v)


def test_window_batches_equal_the_single_terms():
    lm, vocab = _model(0.3, 2)
    words = list(range(vocab))
    for left in (Left(0, 0), Left(0, 2), Left(None, 3), Left(None, None), Left(4, 2)):
        assert log_lefts(lm, left, words) == [log_left(lm, c, left) for c in words]
    for right in (Right(2, 3, 1), Right(0, 1, None), Right(None, 5, 6), Right(3, None, None)):
        assert log_rights(lm, right, words) == [log_right(lm, right, c) for c in words]

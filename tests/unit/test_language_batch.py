"""The batch lookups of the language model equal ``prob`` exactly, term by term."""

from __future__ import annotations

import random

from calami.model.language import BigramCounter, build_language_model


def _model(lam: float, min_count: int):
    rng = random.Random(7)
    vocab = 60
    counter = BigramCounter(vocab, bos=0, eos=1)
    for _ in range(400):  # a skewed random corpus: some contexts rich, some never seen
        counter.add_sentence([2 + min(vocab - 3, int(rng.expovariate(0.15))) for _ in range(rng.randint(1, 12))])
    prior = [1.0 / vocab] * vocab
    return build_language_model(counter, prior, lam=lam, min_count=min_count), vocab


def test_probs_after_and_before_equal_prob_bit_for_bit():
    for lam, min_count in ((0.0, 1), (0.1, 2), (0.3, 3)):
        lm, vocab = _model(lam, min_count)
        words = list(range(vocab))
        for v in [None, *range(vocab)]:
            assert lm.probs_after(v, words) == [lm.prob(w, v) for w in words]
        contexts = [None, *range(vocab)]
        for w in words:
            assert lm.probs_before(w, contexts) == [lm.prob(w, v) for v in contexts]

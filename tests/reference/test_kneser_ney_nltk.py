"""Kneser-Ney bigram probabilities against nltk.lm.KneserNeyInterpolated.

Corpus: the first 300 held-out SQLite documentation sentences
(tests/data/heldout-prose, public domain), tokenized with our tokenizer.
nltk is an independent implementation of interpolated Kneser-Ney; with the
same discount and without our prior/pruning extensions the two must agree.
"""

import math
from pathlib import Path

import pytest
from nltk.lm import KneserNeyInterpolated
from nltk.lm.preprocessing import padded_everygram_pipeline

from calami.model.language import BigramCounter, build_language_model
from calami.text.tokens import lm_units, sentences, tokenize

DATA = Path(__file__).resolve().parents[1] / "data" / "heldout-prose" / "sqlite-sentences.txt"


@pytest.fixture(scope="module")
def corpus():
    lines = DATA.read_text(encoding="utf-8").splitlines()[:300]
    sents = []
    for line in lines:
        for s in sentences(tokenize(line)):
            sents.append(lm_units(s))
    return sents


@pytest.fixture(scope="module")
def both(corpus):
    train, vocab = padded_everygram_pipeline(2, corpus)
    ref = KneserNeyInterpolated(2, discount=0.75)
    ref.fit(train, vocab)
    words = sorted(ref.vocab)
    ids = {w: i for i, w in enumerate(words)}
    counter = BigramCounter(len(words), ids["<s>"], ids["</s>"])
    for s in corpus:
        counter.add_sentence([ids[w] for w in s])
    ours = build_language_model(counter, [1.0] * len(words), discount=0.75, lam=0.0, min_count=1)
    return ref, ours, words, ids


def test_matches_nltk_to_1e9(both):
    ref, ours, words, ids = both
    contexts = ["<s>", "the", "a", "of", "is", "table", "<unk>", "zzz-not-seen"]
    for v in contexts:
        for w in words:
            expected = ref.score(w, [v])
            got = ours.prob(ids[w], ids.get(v, ids["<UNK>"]))
            assert abs(expected - got) < 1e-9, (v, w, expected, got)


def test_distributions_sum_to_one(both):
    _, ours, words, ids = both
    for v in ["<s>", "the", "of", "database"]:
        assert math.isclose(sum(ours.prob(ids[w], ids[v]) for w in words), 1.0, abs_tol=1e-9)


def test_pruning_and_prior_keep_distributions_normalised(corpus):
    words = sorted({w for s in corpus for w in s} | {"<s>", "</s>", "never-seen"})
    ids = {w: i for i, w in enumerate(words)}
    counter = BigramCounter(len(words), ids["<s>"], ids["</s>"])
    for s in corpus:
        counter.add_sentence([ids[w] for w in s])
    prior = [1.0 + (i % 7) for i in range(len(words))]
    lm = build_language_model(counter, prior, lam=0.3, min_count=3)
    assert len(lm.col) < len(counter.bigrams)
    for v in ["<s>", "the", "of", "never-seen"]:
        assert math.isclose(sum(lm.prob(ids[w], ids[v]) for w in words), 1.0, abs_tol=1e-9)
    assert lm.prob(ids["never-seen"], ids["the"]) > 0


def test_no_context_means_plain_frequency(corpus):
    words = sorted({w for s in corpus for w in s} | {"<s>", "</s>"})
    ids = {w: i for i, w in enumerate(words)}
    counter = BigramCounter(len(words), ids["<s>"], ids["</s>"])
    for s in corpus:
        counter.add_sentence([ids[w] for w in s])
    prior = [float(counter.unigrams.get(i, 0)) + 1.0 for i in range(len(words))]
    lm = build_language_model(counter, prior, lam=0.3)
    total = sum(prior)
    assert all(math.isclose(lm.prob(i, None), prior[i] / total) for i in range(len(words)))

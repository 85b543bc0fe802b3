"""Kneser-Ney trigram probabilities against nltk.lm.KneserNeyInterpolated (order 3).

Corpus: the first 120 held-out SQLite documentation sentences
(tests/data/heldout-prose, public domain), tokenized with our tokenizer.
nltk is an independent implementation of interpolated Kneser-Ney; with the
same discount at both orders and without our prior/pruning extensions the two
must agree.  We feed our counter nltk's own padding (``<s> <s> w.. </s> </s>``).

One known difference: nltk's bigram-level back-off weight counts the successors
of ``<s>`` in the raw bigram table, which includes the padding bigram
"<s> <s>" that no word precedes; ours counts only successors seen after some
word, so that P2(. | <s>) sums to one.  Contexts ending in <s> are therefore
compared only where the difference cannot reach (none), and checked to sum to
one instead.
"""

import math
from pathlib import Path

import pytest
from nltk.lm import KneserNeyInterpolated
from nltk.lm.preprocessing import pad_both_ends, padded_everygram_pipeline

from calami.model.language import NgramCounter, build_language_model
from calami.text.tokens import lm_units, sentences, tokenize

DATA = Path(__file__).resolve().parents[1] / "data" / "heldout-prose" / "sqlite-sentences.txt"


@pytest.fixture(scope="module")
def corpus():
    lines = DATA.read_text(encoding="utf-8").splitlines()[:120]
    sents = []
    for line in lines:
        for s in sentences(tokenize(line)):
            sents.append(lm_units(s))
    return sents


@pytest.fixture(scope="module")
def both(corpus):
    train, vocab = padded_everygram_pipeline(3, corpus)
    ref = KneserNeyInterpolated(3, discount=0.75)
    ref.fit(train, vocab)
    words = sorted(ref.vocab)
    ids = {w: i for i, w in enumerate(words)}
    counter = NgramCounter(len(words), ids["<s>"], ids["</s>"])
    for s in corpus:
        counter.add_padded([ids[w] for w in pad_both_ends(s, n=3)])
    ours = build_language_model(counter.counts(), [1.0] * len(words), discount=0.75, lam=0.0)
    return ref, ours, words, ids


CONTEXTS3 = [("<s>", "the"), ("of", "the"), ("the", "table"), ("is", "a"), ("in", "the"), ("<unk>", "is"),
             ("the", "zzz-not-seen"), ("zzz-not-seen", "the"), ("database", "</s>")]


def _id(ids, w):
    return ids.get(w, ids["<UNK>"])


def test_trigrams_match_nltk_to_1e9(both):
    ref, ours, words, ids = both
    for u, v in CONTEXTS3:
        for w in words:
            expected = ref.score(w, [u, v])
            got = ours.prob3(ids[w], _id(ids, u), _id(ids, v))
            assert abs(expected - got) < 1e-9, (u, v, w, expected, got)


def test_bigram_level_matches_nltk_to_1e9(both):
    ref, ours, words, ids = both
    for v in ["the", "a", "of", "is", "table", "<unk>", "zzz-not-seen"]:
        for w in words:
            assert abs(ref.score(w, [v]) - ours.prob(ids[w], _id(ids, v))) < 1e-9, (v, w)


def test_unigram_level_matches_nltk(both):
    ref, ours, words, ids = both
    for w in words:
        assert abs(ref.score(w) - ours.unigram(ids[w])) < 1e-12, w


def test_the_padding_context_differs_from_nltk_only_by_normalisation(both):
    ref, ours, words, ids = both
    nltk_sum = sum(ref.score(w, ["<s>"]) for w in words)
    assert nltk_sum > 1.0 + 1e-6  # nltk counts the "<s> <s>" padding bigram (see module docstring)
    assert math.isclose(sum(ours.prob(ids[w], ids["<s>"]) for w in words), 1.0, abs_tol=1e-9)


def test_distributions_sum_to_one(both):
    _, ours, words, ids = both
    for u, v in [*CONTEXTS3, ("<s>", "<s>")]:
        assert math.isclose(sum(ours.prob3(ids[w], _id(ids, u), _id(ids, v)) for w in words), 1.0, abs_tol=1e-9)


def _own_model(corpus, **kw):
    words = sorted({w for s in corpus for w in s} | {"<s>", "</s>", "never-seen"})
    ids = {w: i for i, w in enumerate(words)}
    counter = NgramCounter(len(words), ids["<s>"], ids["</s>"])
    for s in corpus:
        counter.add_sentence([ids[w] for w in s])
    counts = counter.counts()
    prior = [1.0 + (i % 7) for i in range(len(words))]
    return words, ids, counts, build_language_model(counts, prior, **kw)


def test_pruning_and_prior_keep_distributions_normalised(corpus):
    words, ids, counts, lm = _own_model(corpus, lam=0.3, min_count2=2, min_count3=2)
    assert len(lm.tri_col) < counts.trigram_types
    assert len(lm.bi_col) < len(set(int(k) % (counts.base ** 2) for k in counts.tri_keys))
    for u, v in [("<s>", "<s>"), ("<s>", "the"), ("of", "the"), ("the", "never-seen"), ("never-seen", "of")]:
        total = sum(lm.prob3(ids[w], ids[u], ids[v]) for w in words)
        assert math.isclose(total, 1.0, abs_tol=1e-9), (u, v, total)
    for v in ["<s>", "the", "of", "never-seen"]:
        assert math.isclose(sum(lm.prob(ids[w], ids[v]) for w in words), 1.0, abs_tol=1e-9)
    assert lm.prob3(ids["never-seen"], ids["of"], ids["the"]) > 0


def test_trigram_context_changes_the_estimate(corpus):
    # "the" after "of" vs after "<s>": the trigram level must see the first word.
    words, ids, _, lm = _own_model(corpus, lam=0.0)
    w = ids["table"]
    assert lm.prob3(w, ids["of"], ids["the"]) != lm.prob3(w, ids["<s>"], ids["the"])
    assert lm.prob3(w, None, ids["the"]) == lm.prob(w, ids["the"])


def test_no_context_means_plain_frequency(corpus):
    words, ids, counts, lm = _own_model(corpus, lam=0.3)
    prior = [1.0 + (i % 7) for i in range(len(words))]
    total = sum(prior)
    assert all(math.isclose(lm.prob(i, None), prior[i] / total) for i in range(len(words)))
    assert all(lm.prob3(i, ids["the"], None) == lm.prob(i, None) for i in range(len(words)))

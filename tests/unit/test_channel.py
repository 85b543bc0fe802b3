"""The error model: alignment, multi-character rules and the weighted alignment.

Outside reference: rapidfuzz's OSA distance (restricted Damerau-Levenshtein,
PyPI rapidfuzz).  Example pairs are real misspellings from the shipped sets
(models/data/misspellings, sources and licences in its README).
"""

import math
from collections import Counter

from hypothesis import given, settings, strategies as st
from rapidfuzz.distance import OSA

from calami.model.alignment import align, align_columns
from calami.model.channel import ChannelModel, text_char_counts, train_channel
from calami.model.rules import RuleTable, count_rules, rule_spans, substring_counts

words = st.text(alphabet="abcdeqrst", min_size=0, max_size=9)


@settings(max_examples=300, deadline=None)
@given(words, words)
def test_columns_spell_both_words_and_count_osa_edits(typed, intended):
    cols = align_columns(typed, intended)
    assert "".join(c for c, _ in cols) == intended
    assert "".join(t for _, t in cols) == typed
    assert sum(1 for c, t in cols if c != t) == OSA.distance(typed, intended)


@settings(max_examples=200, deadline=None)
@given(words, words)
def test_edits_number_the_osa_distance(typed, intended):
    edits = align(typed, intended)
    assert (len(edits) if edits else 0) == OSA.distance(typed, intended)


def test_doubled_letters_have_one_canonical_edit():
    assert align("adress", "address") == [("del", "d", "d")]
    assert align("untill", "until") == [("ins", "l", "l")]
    assert align("teh", "the") == [("trans", "h", "e")]
    assert align("recieve", "receive") == [("trans", "e", "i")]


def test_rules_carry_context_and_word_boundaries():
    spans = set(rule_spans("collegue", "colleague"))
    assert {("ea", "e"), ("lea", "le"), ("eag", "eg")} <= spans
    assert ("a", "") not in spans  # single-letter edits belong to the context model
    assert ("e$", "$") in set(rule_spans("tast", "taste"))
    assert ("^ps", "^s") in set(rule_spans("sychology", "psychology"))
    assert set(rule_spans("same", "same")) == set()


def test_rule_counts_and_rates():
    pairs = [("fisical", "physical"), ("fotograph", "photograph"), ("telefone", "telephone"), ("tast", "taste")]
    counts = count_rules(pairs)
    assert counts[("ph", "f")] == 3  # each pair counts a rule once
    occ = substring_counts([("photo", 2.0), ("graph", 1.0)], {"ph", "^p"})
    assert occ == {"ph": 3.0, "^p": 2.0}
    table = RuleTable.train(pairs, [("photo", 2.0), ("graph", 1.0)], scale=1.0, discount=0.5, min_count=2)
    assert math.isclose(table.rates["ph"]["f"], (3 - 0.5) / (3.0 + 1.0))
    assert "e$" not in table.rates  # seen once: below min_count
    again = RuleTable.from_dict(table.to_dict())
    assert again.rates == table.rates


class _Flat(ChannelModel):
    """Every single-letter edit at the same rate: the weighted alignment must reduce to OSA."""

    def sub_rate(self, t, c):
        return 1.0

    def del_rate(self, x, y):
        return 1.0

    def ins_rate(self, x, y):
        return 1.0

    def trans_rate(self, x, y):
        return 1.0


def _flat() -> ChannelModel:
    return _Flat({}, {}, {}, {}, {}, {}, [0.8, 0.15, 0.05], z_ref=1.0)


@settings(max_examples=300, deadline=None)
@given(words, words)
def test_flat_costs_reduce_to_osa_distance(typed, intended):
    ch = _flat()
    more = -math.log(0.15 / 0.8)
    d = OSA.distance(typed, intended)
    expected = 0.0 if d == 0 else math.log(0.8) - (d - 1) * more
    assert math.isclose(ch.log_q(typed, intended), expected, abs_tol=1e-9)


def _trained(with_rules: bool) -> ChannelModel:
    pairs = [("fisical", "physical"), ("fotograph", "photograph"), ("telefone", "telephone"),
             ("grafic", "graphic"), ("colegue", "colleague"), ("tast", "taste")] * 2
    text = [("physical", 5.0), ("photograph", 3.0), ("the", 50.0), ("graphic", 2.0), ("taste", 2.0)]
    chars, pairs2 = text_char_counts(text)
    return train_channel(pairs, chars, pairs2, reference_words=text, rule_words=text if with_rules else ())


def test_a_learned_rule_makes_its_misspelling_likelier():
    plain, ruled = _trained(False), _trained(True)
    assert len(ruled.rules) > 0 and len(plain.rules) == 0
    assert ruled.log_q("foto", "photo") > plain.log_q("foto", "photo") + 1.0


@settings(max_examples=150, deadline=None)
@given(words, words)
def test_rules_only_add_paths(typed, intended):
    plain, ruled = _trained(False), _trained(True)
    assert ruled.log_q(typed, intended) >= plain.log_q(typed, intended) - 1e-9


def test_channel_round_trips_with_its_rules():
    ruled = _trained(True)
    again = ChannelModel.from_dict(ruled.to_dict())
    assert again.rules.rates == ruled.rules.rates
    assert again.log_q("fisical", "physical") == ruled.log_q("fisical", "physical")


def test_text_counts_feed_rule_denominators():
    chars, _ = text_char_counts([("ab", 2.0)])
    assert chars == Counter({"a": 2.0, "b": 2.0, "^": 2.0})


def test_single_letter_scoring_ignores_rules():
    plain, ruled = _trained(False), _trained(True)
    assert ruled.log_q("foto", "photo", rules=False) == plain.log_q("foto", "photo")

"""Variant pairs: one word in British and American spelling.

The pairs and non-pairs are from general knowledge of English spelling
(from memory), not from any word list.
"""

from __future__ import annotations

import pytest

from calami.model.lexicon import GB, LOWER, US, Lexicon, variant_neutral

PAIRS = [
    ("normalised", "normalized"), ("optimisation", "optimization"), ("specialise", "specialize"),
    ("analysed", "analyzed"), ("colour", "color"), ("coloured", "colored"), ("behaviours", "behaviors"),
    ("licence", "license"), ("defence", "defense"), ("catalogue", "catalog"), ("centre", "center"),
    ("metres", "meters"), ("travelled", "traveled"), ("modelling", "modeling"), ("programme", "program"),
    ("judgement", "judgment"), ("anaemia", "anemia"), ("manoeuvre", "maneuver"),
]
NOT_PAIRS = [("from", "form"), ("their", "there"), ("then", "than"), ("advise", "advice"),
             ("loose", "lose"), ("acre", "acer"), ("cause", "case")]


@pytest.mark.parametrize("gb, us", PAIRS)
def test_spellings_of_one_word_meet(gb, us):
    assert variant_neutral(gb) == variant_neutral(us)


@pytest.mark.parametrize("a, b", NOT_PAIRS)
def test_different_words_stay_apart(a, b):
    assert variant_neutral(a) != variant_neutral(b)


def test_variant_pair_needs_different_variant_flags():
    both = US | GB | LOWER
    lexicon = Lexicon(["normalised", "normalized", "four", "for"], bytes([GB | LOWER, both, both, both]), [])
    ids = lexicon.ids
    assert lexicon.variant_pair(ids["normalised"], ids["normalized"])
    assert lexicon.variant_pair(ids["normalized"], ids["normalised"])
    # "four"/"for" meet after -our/-or, but both are right everywhere: no pair.
    assert variant_neutral("four") == variant_neutral("for")
    assert not lexicon.variant_pair(ids["four"], ids["for"])
    assert not lexicon.variant_pair(ids["normalised"], ids["normalised"])

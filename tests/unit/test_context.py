"""The trigram window around a word, and that the checker uses both of its sides."""

import math

import pytest

from calami.checker import Checker
from calami.context import Left, Right, log_left, log_right, window
from calami.text.formats import extract
from calami.text.formats.scoring_tokens import scoring_tokens
from calami.text.tokens import lm_units, sentences
from tiny_model import build_tiny_model


@pytest.fixture(scope="module")
def tiny(tmp_path_factory):
    return build_tiny_model(tmp_path_factory.mktemp("ctx") / "tiny.msgpack")


def test_window_pads_like_training():
    # Training pads sentences "<s> <s> w1 ... wn </s>".
    bos, eos = 100, 101
    ids = [1, 2, 3]
    assert window(ids, 0, bos, eos) == (Left(bos, bos), Right(bos, 2, 3))
    assert window(ids, 1, bos, eos) == (Left(bos, 1), Right(1, 3, eos))
    assert window(ids, 2, bos, eos) == (Left(1, 2), Right(2, eos, None))
    assert window(ids, 1, bos, eos, order=2) == (Left(None, 1), Right(1, 3, None))


def test_window_scores_are_the_sentence_factors(tiny):
    lm, ids = tiny.lm, tiny.lexicon.ids
    the, file, is_ = ids["the"], ids["file"], ids["is"]
    left, right = Left(tiny.bos, the), Right(the, is_, ids["missing"])
    expected = (math.log(lm.prob3(file, tiny.bos, the)) + math.log(lm.prob3(is_, the, file))
                + math.log(lm.prob3(ids["missing"], file, is_)))
    assert math.isclose(log_left(lm, file, left) + log_right(lm, right, file), expected)
    assert log_right(lm, Right(the, None, None), file) == 0.0


def test_checker_sees_the_second_word_on_each_side(tiny):
    # With order 3 the score of a word depends on l2 and r2; with order 2 it does not.
    sent = "There is no cache for the result when the file is missing."
    toks = next(iter(sentences(scoring_tokens(sent))))
    tri, bi = Checker(tiny), Checker(tiny, lm_order=2)
    units = lm_units(toks)
    ids = [tiny.lm_id(u) for u in units]
    i = units.index("result")
    l3, r3 = window(ids, i, tiny.bos, tiny.eos, 3)
    l2, r2 = window(ids, i, tiny.bos, tiny.eos, 2)
    kid = tiny.lexicon.ids["result"]
    assert tri._lp(kid, l3) + tri._lp(r3, kid) != bi._lp(kid, l2) + bi._lp(r2, kid)
    other = Left(tiny.lexicon.ids["cache"], l3.l1)
    assert tri._lp(kid, other) != tri._lp(kid, l3)


def test_inline_code_is_the_code_unit_in_the_window(tiny):
    text = "Read `a` and the file.\n"
    toks = next(iter(sentences(scoring_tokens(text, extract(text, "markdown")))))
    ids = [tiny.lm_id(u) for u in lm_units(toks)]
    assert ids[1] == tiny.code != tiny.unk
    left, _ = window(ids, 2, tiny.bos, tiny.eos)
    assert left == Left(ids[0], tiny.code) and ids[0] == tiny.lm_id("read")


def test_text_window_for_suggest(tiny):
    c = Checker(tiny)
    ids = tiny.lexicon.ids
    assert c._text_window("", "") == (Left(None, None), Right(None, None, None))
    assert c._text_window("read the", "is missing") == (
        Left(ids["read"] if "read" in ids else tiny.unk, ids["the"]), Right(ids["the"], ids["is"], ids["missing"]))
    assert Checker(tiny, lm_order=2)._text_window("read the", "is missing") == (
        Left(None, ids["the"]), Right(ids["the"], ids["is"], None))

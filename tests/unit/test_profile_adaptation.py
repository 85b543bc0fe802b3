"""The profile changes the real checker's rankings (needs the shipped model)."""

from __future__ import annotations

import pytest

from calami.model import default_model_path
from calami.vocab.profile import Profile

pytestmark = pytest.mark.skipif(not default_model_path().exists(), reason="shipped model not built yet")


def _finding(checker, text, word):
    return next(f for f in checker.check(text) if f.word == word)


def test_accepted_fixes_rise_and_user_words_and_ignores_apply(tmp_path, model):
    from calami.checker import Checker

    text = "Please recieve the parcel from the valve wich opened before noon."
    plain = Checker(model)
    before = _finding(plain, text, "wich")
    assert len(before.suggestions) >= 2
    second = before.suggestions[1].text
    profile = Profile(tmp_path)
    learnt = Checker(model, adaptations=[profile])
    probabilities = []
    for _ in range(4):
        profile.record_replacement("wich", second, "valve", "opened")
        learnt = Checker(model, adaptations=[profile])
        probabilities.append(_finding(learnt, text, "wich").suggestions[0])
    assert probabilities[-1].text == second  # the user's choice now ranks first
    profile.add_word("recieve")
    assert all(f.word != "recieve" for f in Checker(model, adaptations=[profile]).check(text))
    # Compare with the confidence just before ignoring (the accepted fixes raised it).
    confidence = _finding(Checker(model, adaptations=[profile]), text, "wich").confidence
    for _ in range(3):
        profile.ignore("wich")
    after = [f for f in Checker(model, adaptations=[profile]).check(text) if f.word == "wich"]
    assert not after or after[0].confidence < confidence

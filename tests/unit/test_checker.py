"""The checker's decisions on the shipped model.

The sentences are our own; they exercise behaviour (case, context, identifiers,
adaptation), not accuracy, which the reference tests measure on real data.
"""

from __future__ import annotations

import dataclasses
import math
from collections import Counter

import pytest

from calami.checker import CONFUSABLE_Q, Checker
from calami.findings import NONWORD, REALWORD, Thresholds


def words(findings):
    return [(f.word, f.kind, f.best) for f in findings]


def test_nonword_with_ranked_fix(checker):
    found = checker.check("The parser will recieve the data.")
    assert words(found) == [("recieve", NONWORD, "receive")]
    probs = [s.probability for s in found[0].suggestions]
    assert probs == sorted(probs, reverse=True) and 0 < sum(probs) <= 1.0 + 1e-9


def test_case_is_restored_in_suggestions(checker):
    assert checker.suggest("Teh")[0].text == "The"
    assert checker.suggest("RECIEVE")[0].text == "RECEIVE"
    assert checker.check("Teh parser stops.")[0].best == "The"


def test_real_word_errors_in_context(checker):
    assert words(checker.check("The file was loaded form disk.")) == [("form", REALWORD, "from")]
    assert words(checker.check("Their is no cache for this table.")) == [("Their", REALWORD, "There")]


def test_correct_prose_is_left_alone(checker):
    text = ("The parser loads the file from disk and writes the result to the cache. "
            "There is no cache for this table, so the query is slower than before.")
    assert checker.check(text) == []


def test_identifiers_urls_and_acronyms_are_never_flagged(checker):
    text = "Call getUserNmae or parse_recieve_data, see https://exmaple.org/teh and the HTTPX API."
    assert checker.check(text) == []


def test_capitalised_unknown_name_inside_a_sentence_is_left_alone(checker):
    assert checker.check("The data comes from Quillfern and is stored nightly.") == []


def test_shouting_sentence_is_checked(checker):
    found = checker.check("PLEASE DO NOT RECIEVE THE FILES.")
    assert words(found) == [("RECIEVE", NONWORD, "RECEIVE")]


def test_lone_acronym_is_not_checked(checker):
    assert checker.check("Set RECIEVE in the file.") == []


def test_suggest_keeps_a_correct_word_first_in_context(checker):
    ranked = checker.suggest("from", "we loaded it", "disk")
    assert ranked[0].text == "from"
    ranked = checker.suggest("form", "the file was loaded", "disk")
    assert ranked[0].text == "from"


def test_missing_space_is_suggested(checker):
    # Alone, "allot" (same sound) competes; in a sentence the words around decide.
    assert "a lot" in [s.text for s in checker.suggest("alot", limit=2)]
    assert checker.check("There are alot of files here.")[0].best == "a lot"
    assert checker.suggest("alot", "there are", "of files")[0].text == "a lot"


def test_variant_policy(model):
    # en-GB includes the Oxford -ize spellings (SCOWL's british_z lists).
    us = Checker(model, variant="en-US")
    gb = Checker(model, variant="en-GB")
    assert [(f.word, f.best) for f in us.check("The colour of the logo.")] == [("colour", "color")]
    assert [(f.word, f.best) for f in gb.check("The color of the logo.")] == [("color", "colour")]
    assert gb.check("The organization of the logo.") == []
    assert Checker(model).check("The colour and the color of the logo.") == []


# British and American spellings of the same words (pairs from general
# knowledge of English spelling, from memory), in sentences of our own.
VARIANT_SENTENCES = {
    "en-GB": [
        "The values are normalised before the optimisation step.",
        "We specialise the parser and analyse the colour of each catalogue entry.",
        "The organisation changed the licence of the centre last year.",
        "The data is normalised, the behaviour is modelled and the job is cancelled.",
    ],
    "en-US": [
        "The values are normalized before the optimization step.",
        "We specialize the parser and analyze the color of each catalog entry.",
        "The organization changed the license of the center last year.",
        "The data is normalized, the behavior is modeled and the job is canceled.",
    ],
}


@pytest.mark.parametrize("written", ["en-GB", "en-US"])
@pytest.mark.parametrize("setting", ["any", "en-GB", "en-US"])
def test_a_variant_spelling_is_never_flagged_towards_the_other_variant(model, written, setting):
    checker = Checker(model, variant=setting)
    for sentence in VARIANT_SENTENCES[written]:
        found = checker.check(sentence)
        if setting in ("any", written):
            assert found == [], (sentence, [(f.word, f.kind, f.best) for f in found])
        else:
            # The project asked for the other variant: a non-word with that variant's form as the fix.
            assert all(f.kind == NONWORD for f in found), sentence
        for finding in found:
            typed = model.lexicon.ids.get(finding.word.lower())
            for suggestion in finding.suggestions:
                fixed = model.lexicon.ids.get(suggestion.text.lower())
                assert fixed is None or model.lexicon.is_variant(fixed, setting), (finding.word, suggestion.text)
                if setting in ("any", written):
                    assert typed is None or fixed is None or not model.lexicon.variant_pair(typed, fixed)


def test_en_us_setting_still_fixes_british_forms(model):
    us = Checker(model, variant="en-US")
    found = us.check("The values are normalised before the optimisation step.")
    assert [(f.word, f.kind, f.best) for f in found] == [
        ("normalised", NONWORD, "normalized"), ("optimisation", NONWORD, "optimization")]


def test_real_word_slips_remain_found_next_to_variant_spellings(model):
    gb = Checker(model, variant="en-GB")
    assert words(gb.check("The colour was loaded form disk.")) == [("form", REALWORD, "from")]


class Memory:
    """A minimal adaptation: accepted words, accepted fixes, ignores."""

    def __init__(self, words=(), fixes=None, ignores=None):
        self.words = set(words)
        self.fixes = fixes or {}
        self.ignores = Counter(ignores or {})

    def accepts(self, word):
        return word in self.words

    def corrections(self, typed):
        return self.fixes.get(typed, {})

    def ignored(self, word):
        return self.ignores[word]


def test_accepted_words_are_never_flagged(model):
    text = "The planner will recieve the readings."
    assert [f.word for f in Checker(model).check(text)] == ["recieve"]
    assert Checker(model, adaptations=[Memory(words={"recieve"})]).check(text) == []


TYPO = "The valve wich opened at noon."


def test_accepted_fixes_rise_and_become_confident(model):
    def ranked(checker):
        return {s.text: (i, s.probability) for i, s in enumerate(checker.check(TYPO)[0].suggestions)}

    plain = ranked(Checker(model))
    # "which" and "with" are the model's two best fixes here (in either order);
    # the user keeps choosing the one the model ranks second.
    first, second = sorted(("which", "with"), key=lambda s: plain[s][0])
    assert plain[first][0] == 0 and plain[second][0] >= 1
    once = ranked(Checker(model, adaptations=[Memory(fixes={"wich": {second: 1}})]))
    assert once[second][0] <= plain[second][0] and once[second][1] > 1.5 * plain[second][1]
    thrice = Checker(model, adaptations=[Memory(fixes={"wich": {second: 3}})]).check(TYPO)
    assert thrice[0].best == second
    many = Checker(model, adaptations=[Memory(fixes={"wich": {"which": 4}})]).check(TYPO)
    assert many[0].best == "which" and many[0].confident


def test_ignoring_lowers_the_flag_probability(model):
    base = Checker(model).check(TYPO)
    ignored = Checker(model, adaptations=[Memory(ignores={"wich": 3})]).check(TYPO)
    assert not ignored or ignored[0].confidence < base[0].confidence


def test_thresholds_gate_hints(model):
    confidence = Checker(model).check(TYPO)[0].confidence
    above = confidence + (1.0 - confidence) / 2
    assert Checker(model, thresholds=Thresholds(above, above)).check(TYPO) == []
    found = Checker(model, thresholds=Thresholds(confidence / 2, confidence / 2)).check(TYPO)
    assert found and found[0].confident


def test_check_sentence_is_a_pure_function_of_tokens(checker):
    from calami.text.tokens import sentences, tokenize

    a = list(sentences(tokenize("It was loaded form disk.")))[0]
    b = list(sentences(tokenize("Note. It was loaded form disk.")))[1]
    assert [f.shifted(6) for f in checker.check_sentence(a)] == checker.check_sentence(b)
    first = checker.check_sentence(a)
    again = checker.check_sentence(a)
    assert first == again


@pytest.mark.parametrize("text", ["", "   ", "\x00\x01\x02", "😀" * 100, "a" * 10000, "--- *** ___"])
def test_odd_input_does_not_raise(checker, text):
    checker.check(text)


def test_regular_word_formation_and_compounds_are_not_flagged(checker):
    assert checker.check("The codebases and prereleases were deserialized.") == []
    assert checker.check("The xarray package is a timeframe helper.") == []


def test_contractions_and_possessives_keep_their_own_identity(checker):
    # "it's" is a word of its own (not "it" + possessive), so it never takes "it"'s neighbours.
    assert checker.check("The result, it's said, is fine.") == []
    assert checker.check("The parser's cache and the users' files are kept.") == []


def test_short_abbreviations_are_never_offered_as_fixes(checker):
    assert all(s.text != "Th" for s in checker.suggest("teh", limit=10))
    assert all(len(s.text.split()[-1]) > 2 or s.text.split()[-1] in ("in", "is", "it", "of", "on", "to", "a")
               for s in checker.suggest("occured", limit=10))


def _with_params(model, **changes):
    return dataclasses.replace(model, params=dataclasses.replace(model.params, **changes))


def test_a_name_for_a_lower_case_typo_pays_a_second_slip(model):
    from calami.checker import NAME_LOG_PENALTY
    from calami.model.lexicon import LOWER

    lexicon = model.lexicon
    checker = Checker(_with_params(model, sound_log_bonus=0.0))
    scored = dict(checker._channel_candidates("harras", every_candidate=True))
    names = [c for c in scored if not lexicon.flags[c] & LOWER]
    words = [c for c in scored if lexicon.flags[c] & LOWER]
    assert names and words
    for c in names:
        assert scored[c] == model.channel.log_q("harras", lexicon.keys[c]) + NAME_LOG_PENALTY
    for c in words:
        assert scored[c] == model.channel.log_q("harras", lexicon.keys[c])


def test_a_possessive_without_its_apostrophe_is_offered(checker):
    # Possessives are not lexicon keys, so only the checker's own hypothesis can offer them.
    found = checker.check("The childrens books were on the shelf.")
    assert [f.word for f in found] == ["childrens"]
    assert "children's" in [s.text for s in found[0].suggestions[:3]]
    assert "Women's" in [s.text for s in checker.suggest("Womens", limit=3)]
    # A plain plural of a listed word is never turned into a possessive.
    assert checker.check("The books were on the shelves.") == []


def test_words_spelled_far_off_still_get_a_fix(checker):
    # OSA distance 3 from the intended word: reached by the distance-3 fallback.
    assert checker.suggest("nessecary")[0].text == "necessary"
    assert checker.check("It is not nessecary to restart.")[0].best == "necessary"


def test_a_shared_sound_raises_exactly_the_candidates_that_sound_alike(model):
    from calami.model.phonetic import sound_key

    plain = dict(Checker(_with_params(model, sound_log_bonus=0.0))._channel_candidates("fisical", True))
    sounded = dict(Checker(_with_params(model, sound_log_bonus=2.0))._channel_candidates("fisical", True))
    # The sound index covers the most frequent keys, which is where fixes come from.
    alike = set(model.sound_index.get(sound_key("fisical"), ())) & set(plain)
    assert model.lexicon.ids["physical"] in alike
    for c in plain:
        assert sounded[c] == pytest.approx(plain[c] + (2.0 if c in alike else 0.0))


def test_real_word_slips_are_scored_by_single_letter_edits(checker, model):
    # Rules learned from non-word misspellings (a dropped initial "t") must not
    # make real-word slips such as "ask" for "task" look likely.
    ids = model.lexicon.ids
    typed, intended = ids["ask"], ids["task"]
    assert intended in model.realword_neighbours(typed)
    plain = model.channel.log_q("ask", "task", rules=False)
    assert model.channel.log_q("ask", "task") > plain + 1.0  # the rule table does apply here
    expected = max(plain, math.log(CONFUSABLE_Q)) if (typed, intended) in checker._confusable else plain
    assert checker._q(typed, intended) == pytest.approx(checker.channel_weight * expected)


def test_document_check_rescores_only_the_likeliest_candidates_with_rules(model):
    from calami.checker import NAME_LOG_PENALTY, RULE_RESCORED
    from calami.model.lexicon import LOWER

    checker = Checker(_with_params(model, sound_log_bonus=0.0))
    keys, flags, prior = model.lexicon.keys, model.lexicon.flags, model.lm.prior
    scored = dict(checker._channel_candidates("fisical", every_candidate=False))
    assert len(scored) > RULE_RESCORED

    def name(c):
        return 0.0 if flags[c] & LOWER else NAME_LOG_PENALTY

    plain = {c: model.channel.log_q("fisical", keys[c], rules=False) for c in scored}
    top = sorted(scored, key=lambda c: -(plain[c] + math.log(prior[c])))[:RULE_RESCORED]
    for c in scored:
        want = model.channel.log_q("fisical", keys[c]) if c in top else plain[c]
        assert scored[c] == pytest.approx(want + name(c))
    everything = dict(checker._channel_candidates("fisical", every_candidate=True))
    for c in everything:
        assert everything[c] == pytest.approx(model.channel.log_q("fisical", keys[c]) + name(c))


SHARED_CACHE_TEXT = ("The parser will recieve teh data form disk. Their is no cache for the wrold of "
                     "menubar settings, and it runs ofen. Acessing the filesystem is fast.")


class _Accepts:
    """A project word list that accepts one word."""

    def __init__(self, word):
        self.word = word

    def accepts(self, word):
        return word.lower() == self.word

    def corrections(self, typed):
        return {"received": 3} if typed.lower() == "recieve" else {}

    def ignored(self, word):
        return 0


def test_checkers_sharing_word_caches_decide_as_fresh_ones(model):
    """Checkers on one model share word-level caches; adaptations and params still act per checker."""
    fresh_model = _with_params(model)  # same statistics, no caches yet
    warm = Checker(model)
    warm.check(SHARED_CACHE_TEXT)  # fills the shared caches
    adapted = Checker(model, adaptations=[_Accepts("teh")])
    expected = Checker(fresh_model, adaptations=[_Accepts("teh")]).check(SHARED_CACHE_TEXT)
    assert adapted.check(SHARED_CACHE_TEXT) == expected
    assert "teh" not in [f.word for f in expected]
    assert warm.check(SHARED_CACHE_TEXT) == Checker(_with_params(model)).check(SHARED_CACHE_TEXT)
    assert "teh" in [f.word for f in warm.check(SHARED_CACHE_TEXT)]


def test_changed_params_on_a_loaded_model_are_not_served_from_old_caches(model):
    """Tuning sets params on a loaded model between checkers (models/recipe/tune_params.py)."""
    own = _with_params(model)
    Checker(own).check(SHARED_CACHE_TEXT)
    own.params.alpha = 0.5  # makes every listed word a likely slip
    own.params.sound_log_bonus = 0.0
    after = Checker(own).check(SHARED_CACHE_TEXT)
    assert after == Checker(_with_params(model, alpha=0.5, sound_log_bonus=0.0)).check(SHARED_CACHE_TEXT)
    assert after != Checker(model).check(SHARED_CACHE_TEXT)

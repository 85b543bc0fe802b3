"""The decision: which words to flag, and the ranked fixes for each.

Every checkable word is a hypothesis test (noisy channel, Kernighan, Church
& Gale 1990; real-word form after Mays, Damerau & Mercer 1991):

    H0:  the word is meant as typed     alpha * P(w | left) * P(right | w)
    Hc:  the writer meant candidate c   (1 - alpha) * Q(w | c) * P(c | left) * P(right | c)

with trigram context: P(c | left) = P(c | l2 l1) and P(right | c) =
P(r1 | l1 c) * P(r2 | c r1) (``calami.context``).

For a word outside the lexicon, H0 uses the language model's unknown-word
probability times the probability of the spelling as a new word (a character
trigram model, ``model/novel.py``, shifted by the tuned ``oov_log_prior``).  The posterior that the word is wrong is
sum(Hc) / (H0 + sum(Hc)); a hint needs it above the hint threshold, and a
fix is "confident" when its own posterior passes the confident threshold.

Adaptations (project words, the user's profile) say which words are fine
and which fixes the user accepted before; they shift H0 and Hc.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from typing import Callable, Mapping, Protocol, Sequence

from calami.findings import NONWORD, REALWORD, Finding, Suggestion, Thresholds
from calami.model import Model
from calami.model.confusables import confusion_pairs
from calami.model.lexicon import LOWER, restore_case
from calami.model.phonetic import sound_key
from calami.prose_context import FUNCTION_WORDS, is_function_swap, name_positions
from calami.text.spans import Span
from calami.context import Left, Right, log_left, log_lefts, log_right, log_rights, window
from calami.text.tokens import BOS, CAPS, EOS, SKIP, Token, lm_units, sentences, tokenize
from calami.precision import (
    COMPOUND_MIN_PART, COMPOUND_SPLIT_LOG_PENALTY, NAME_CONTEXT_LOG_BONUS, NONASCII_LOG_BONUS,
    QUESTION_STARTS, TECHNICAL_REALWORD_HINT, PrecisionRules, known_context,
)
from calami.vocab.usage import WorkspaceVocabulary

MIN_NONWORD_LENGTH = 3  # shorter unknown tokens are abbreviations far more often than typos
CONFUSABLE_Q = 0.02  # floor for Q(w | c) between members of a confusion set
COMPOUND_LOG_RATE = math.log(0.2)  # a new word made of two listed words (tuned on development documents)
PREFIX_LOG_RATE = math.log(0.001)
# Words with fewer candidates than this within distance 2 are also searched at distance 3.
FAR_SEARCH_BELOW = 3
FAR_KEPT = 8  # the most frequent of those distance-3 keys are kept
# Candidates re-scored with multi-character rules when checking a document.
RULE_RESCORED = 3
NAME_LOG_PENALTY = math.log(0.1)
LP_CACHE_SIZE = 100_000  # memoised language-model terms (~13 MB at most)
# Share of a noun's uses that are possessive (our estimate, not fitted).
POSSESSIVE_LOG_SHARE = math.log(0.01)
FORMATION_LOG_RATE = math.log(0.05)  # a new word formed regularly from a listed one (tuned on development documents)
INFLECTIONS = ("s", "es", "ed", "d", "ing", "er", "ers", "ly", "ness")
# English plurals not formed with -s take no further ending ("childrens" is
# a possessive missing its apostrophe, not a new word); common knowledge.
IRREGULAR_PLURALS = frozenset("children women men people feet teeth mice geese oxen brethren".split())
PREFIXES = ("re", "un", "pre", "de", "non", "sub", "multi", "auto", "inter", "over", "under", "co")
# Words of one or two letters that a run-together pair may contain ("alot" ->
# "a lot", "inthe" -> "in the"); other short keys ("ed", "th") are abbreviations.
SHORT_WORDS = frozenset("a i an as at be by do go he if in is it me my no of on or so to up us we".split())  # a new word made of one letter and a listed word (ditto)


class Adaptation(Protocol):
    """What a project word list or a user profile tells the checker."""

    def accepts(self, word: str) -> bool:
        """True if the word (as typed, case included) is right for this user/project."""

    def corrections(self, typed: str) -> Mapping[str, int]:
        """Accepted fixes for ``typed``: chosen word -> times accepted."""

    def ignored(self, word: str) -> int:
        """How many times the user chose to ignore this word."""


def _logsumexp(values: Sequence[float]) -> float:
    top = max(values)
    return top + math.log(sum(math.exp(v - top) for v in values))


def _irregular_plural(word: str) -> bool:
    return word in IRREGULAR_PLURALS or word.endswith(("children", "women"))


class _LRU(OrderedDict):
    def __init__(self, size: int) -> None:
        super().__init__()
        self.size = size

    def put(self, key, value):
        self[key] = value
        if len(self) > self.size:
            self.popitem(last=False)
        return value


def _shared_caches(model: Model, variant: str) -> dict:
    """Word-level results that depend on the model and the variant only, for every checker built on them.

    ``calami check`` builds a checker per project (each tree of a monorepo,
    each unpacked package) and the server one after every word-list change;
    each started cold, so small files in many projects ran at a third of the
    speed of large ones.  Adaptations and thresholds are applied after these
    lookups, never stored in them.  The tuned parameters are part of the key:
    tuning changes them on a loaded model between checkers.
    """
    per_model = model.__dict__.setdefault("_checker_caches", {})
    key = (variant, repr(vars(model.params)))
    caches = per_model.get(key)
    if caches is None:
        ids = model.lexicon.ids
        confusable = {(ids[a], ids[b]) for a, b in confusion_pairs() if a in ids and b in ids}
        caches = per_model[key] = {
            "confusable": confusable, "confusable_words": {a for a, _ in confusable},
            "q": {}, "realword_options": {},
            "channel": _LRU(20000), "novel": _LRU(20000), "lp": {},
        }
    return caches


class Checker(PrecisionRules):
    """Scores tokens with the model and the user's/project's adaptations.

    ``check_sentence`` is a pure function of the sentence's token texts and
    kinds (offsets aside), so front ends may cache its results per sentence.
    """

    def __init__(
        self,
        model: Model,
        *,
        adaptations: Sequence[Adaptation] = (),
        variant: str = "any",
        thresholds: Thresholds | None = None,
        max_suggestions: int = 5,
        usage: WorkspaceVocabulary | None = None,
        names: bool = False,
        lm_order: int = 3,
    ) -> None:
        self.model = model
        self.lm_order = lm_order  # 2: the same model as a bigram model (benchmarks compare the two)
        self.adaptations = list(adaptations)
        # The workspace's own vocabulary (None: no workspace, e.g. one buffer).
        self.usage = usage
        # Every sentence stands where names stand (a credits file).
        self.names = names
        # Called as observer(offset, word, rule, detail) when a rule changed a decision
        # ("workspace", "name", "compound", "function word"): --explain and the benchmarks.
        self.observer: Callable[[int, str, str, str], None] | None = None
        self._at = 0  # offset of the word being decided (for the observer)
        self._technical = False  # the sentence holds code or identifiers
        self.variant = variant
        p = model.params
        self.thresholds = thresholds or Thresholds(p.nonword_hint, p.confident)
        self.realword_hint = max(self.thresholds.hint, p.realword_hint) if thresholds is None else self.thresholds.hint
        self.max_suggestions = max(1, max_suggestions)
        self.channel_weight = p.channel_weight
        self.log_alpha = math.log(p.alpha)
        self.log_error = math.log(1.0 - p.alpha)
        self.log_alpha_conf = math.log(p.alpha_confusable)
        self.log_error_conf = math.log(1.0 - p.alpha_confusable)
        shared = _shared_caches(model, variant)
        self._confusable: set[tuple[int, int]] = shared["confusable"]
        self._confusable_words: set[int] = shared["confusable_words"]
        self._q_cache: dict[tuple[int, int], float] = shared["q"]
        # Per listed word: its usable real-word neighbours with log P(error) + log Q.
        self._realword_options: dict[int, list[tuple[int, float]]] = shared["realword_options"]
        self._channel_cache: _LRU = shared["channel"]
        self._novel_cache: _LRU = shared["novel"]
        self._lp_cache: dict[tuple, float] = shared["lp"]  # (w, v) -> log P(w | v), v a Left or w a Right window

    # ------------------------------------------------------------ front doors

    def check(self, text: str, spans: Sequence[Span] | None = None) -> list[Finding]:
        findings: list[Finding] = []
        for sent in sentences(tokenize(text, spans)):
            findings.extend(self.check_sentence(sent))
        return findings

    def check_sentence(self, tokens: Sequence[Token]) -> list[Finding]:
        units = lm_units(tokens)
        shouting = sum(1 for t in tokens if t.kind == CAPS) >= 3 and not any(
            t.kind != SKIP and t.kind != CAPS for t in tokens)
        ids = [self.model.lm_id(u) for u in units]
        names = name_positions(tokens, self.names)
        # Code, URLs or identifiers in the sentence: a fragment of technical
        # text, where the language model's real-word evidence is weaker.
        self._technical = any(t.kind == SKIP for t in tokens)
        out: list[Finding] = []
        for i, tok in enumerate(tokens):
            if tok.kind == SKIP or (tok.kind == CAPS and not shouting):
                continue
            left, right = window(ids, i, self.model.bos, self.model.eos, self.lm_order)
            left_text = units[i - 1] if i > 0 else BOS
            right_text = units[i + 1] if i + 1 < len(units) else EOS
            self._at = tok.start
            finding = self._check_word(tok, left, right, sentence_start=(i == 0), name=i in names)
            if finding is not None:
                out.append(Finding(tok.start, tok.end, tok.text, finding[0], finding[1], finding[2], finding[3],
                                   left_text, right_text))
        return out

    def with_names(self) -> "Checker":
        """This checker for a document where every sentence stands among names (a credits file)."""
        import copy

        twin = copy.copy(self)  # shares the caches, which do not depend on the flag
        twin.names = True
        return twin

    def suggest(self, word: str, left: str = "", right: str = "", limit: int = 5) -> list[Suggestion]:
        """Ranked intended words for ``word`` in context; the word itself may come first."""
        # No context given: compare candidates by their unigram probability,
        # not by how often they start and end sentences.
        left_id, right_id = self._text_window(left, right)
        w = word.replace("’", "'").lower()
        look = self.model.lexicon.lookup(word, self.variant)
        hyps = self._candidate_hypotheses(w, left_id, right_id, word, every_candidate=True)
        h0 = self._h0_known(look.key_id, left_id, right_id) if look.accepted else self._h0_unknown(
            w, left_id, right_id, word, capitalised_inside=False)
        total = _logsumexp([h0] + [h for _, h in hyps])
        return self._ranked(word, hyps, total, limit, self_score=h0 if look.accepted else None)

    # ---------------------------------------------------------------- words

    def _accepted_by_adaptation(self, word: str) -> bool:
        return any(a.accepts(word) for a in self.adaptations)

    def _check_word(self, tok: Token, left: Left, right: Right, sentence_start: bool, name: bool = False):
        word = tok.norm
        core = word[:-2] if word.endswith("'s") else word.rstrip("'")
        if not core or self._accepted_by_adaptation(word) or self._accepted_by_adaptation(core):
            return None
        lexicon = self.model.lexicon
        look = lexicon.lookup(word, self.variant)
        w = core.lower()
        if look.accepted:
            if lexicon.keys[look.key_id] != word.lower():
                return None  # right as a possessive of a listed word; its stem's neighbours do not apply
            if name and word[:1].isupper():
                return None  # "Calum Lind", "Victor": a name, not a slip for "Lint", "vector"
            if not sentence_start and word[:1].isupper():
                return None  # "the Sane interface": capitalised inside a sentence, a proper name
            return self._check_realword(word, look.key_id, left, right)
        if look.key_id is not None and not look.other_variant:
            return None  # a listed word in an unusual case (e.g. "english"): not a spelling matter
        if not look.other_variant and len(core) < MIN_NONWORD_LENGTH:
            return None
        if self._regular_unlisted_form(w):
            return None
        capitalised_inside = (not sentence_start) and core[:1].isupper() and not core.isupper()
        hyps = self._candidate_hypotheses(w, left, right, core, every_candidate=False)
        if look.other_variant and look.key_id is not None:
            # The project asked for the other spelling variant: keeping this form is a policy breach.
            # Its twin in the asked-for variant is the same word, so H0 takes the twin's
            # context terms: which spelling the corpus used more often must not decide.
            twins = [c for c, _ in hyps if isinstance(c, int) and lexicon.variant_pair(look.key_id, c)]
            h0 = self._h0_known(twins[0] if twins else look.key_id, left, right) + math.log(1e-6)
        else:
            h0 = self._h0_unknown(w, left, right, core, capitalised_inside)
        h0 += math.log1p(4.0 * self._ignored(word))
        if not hyps:
            return None
        hint = self.thresholds.hint
        hs = [h for _, h in hyps]
        # Rules that raise H0, each recorded when it alone keeps the word unflagged.
        raised = []
        if name and not core.isupper():
            raised.append(("name", NAME_CONTEXT_LOG_BONUS, "it stands where names stand"))
        if not core.isascii():
            raised.append(("name", NONASCII_LOG_BONUS, "letters beyond ASCII: a name or a foreign word"))
        if self.usage is not None and not look.other_variant:
            cached = self._workspace_h0_gain(w)
            if cached is not None:
                raised.append(cached)
        for rule, gain, detail in raised:
            before = 1.0 - math.exp(h0 - _logsumexp([h0] + hs))
            h0 += gain
            after = 1.0 - math.exp(h0 - _logsumexp([h0] + hs))
            if before >= hint > after and self.observer is not None:
                self.observer(self._at, word, rule, detail)
        total = _logsumexp([h0] + hs)
        p_wrong = 1.0 - math.exp(h0 - total)
        if p_wrong < hint:
            return None
        suggestions = self._ranked(word, hyps, total, self.max_suggestions)
        confident = bool(suggestions) and suggestions[0].probability >= self.thresholds.confident
        if confident:
            doubt = self._nonword_doubt(w, core, max(hyps, key=lambda x: x[1])[0])
            if doubt is not None:
                confident = False
                if self.observer is not None:
                    self.observer(self._at, word, doubt[0], doubt[1])
        return NONWORD, p_wrong, tuple(suggestions), confident

    def _check_realword(self, word: str, kid: int, left: Left, right: Right):
        model = self.model
        nbrs = model.realword_neighbours(kid)
        if not nbrs or (left.l1 == model.bos and right.r1 == model.eos):
            return None
        lexicon = model.lexicon
        # Members of known confusion sets are mixed up far more often than other words.
        if kid in self._confusable_words:
            log_alpha, log_error = self.log_alpha_conf, self.log_error_conf
        else:
            log_alpha, log_error = self.log_alpha, self.log_error
        h0 = self._h0_known(kid, left, right, log_alpha) + math.log1p(4.0 * self._ignored(word))
        boosts = self._correction_boosts(word)
        options = self._realword_options.get(kid)
        if options is None:
            options = self._realword_options[kid] = [
                (c, log_error + self._q(kid, c)) for c in nbrs
                if lexicon.flags[c] & LOWER and lexicon.is_variant(c, self.variant)
                and not lexicon.variant_pair(kid, c)]  # the variant setting decides those, not context
        keys = lexicon.keys
        # The hottest loop of a prose check: one call per side for all options.
        cs = [c for c, _ in options]
        lefts = log_lefts(model.lm, left, cs)
        rights = log_rights(model.lm, right, cs)
        hyps = [(c, base + a + b) for (c, base), a, b in zip(options, lefts, rights)]
        if boosts:
            hyps = [(c, h + boosts.get(keys[c], 0.0)) for c, h in hyps]
        verdict = self._realword_verdict(word, h0, hyps)
        if verdict is None or (self._technical and verdict[1] < TECHNICAL_REALWORD_HINT):
            return None
        lower = keys[kid]
        best = verdict[2][0]
        if lower in FUNCTION_WORDS and is_function_swap(lower, keys[best]):
            # Two function words: the model prefers one to the other on thin
            # evidence beside code or an unknown word, and a sentence that
            # starts "Is"/"Do"... is a question.  Such a swap needs two known
            # neighbours (a stronger posterior on top cost about 3 points of
            # real-word recall per 0.1 on development data, for little
            # precision); the other candidates are still weighed.
            known = known_context(left.l1, lexicon) and known_context(right.r1, lexicon)
            question = left.l1 == self.model.bos and lower in QUESTION_STARTS
            if not known or question:
                rest = [(c, h) for c, h in hyps if not is_function_swap(lower, keys[c])]
                verdict = self._realword_verdict(word, h0, rest)
                if verdict is None:
                    if self.observer is not None:
                        why = "a neighbour is not a known word" if not known else "it starts a question"
                        self.observer(self._at, word, "function word", f"a swap with '{keys[best]}': {why}")
                    return None
        found = verdict[0]
        if found[3] and lower in FUNCTION_WORDS and is_function_swap(lower, keys[verdict[2][0]]):
            found = (found[0], found[1], found[2], False)  # a hint to read, never a fix to apply unread
        return found

    def _realword_verdict(self, word: str, h0: float, hyps):
        """((kind, p_wrong, suggestions, confident), p_wrong, best hypothesis) or None below the hint."""
        if not hyps:
            return None
        total = _logsumexp([h0] + [h for _, h in hyps])
        p_wrong = 1.0 - math.exp(h0 - total)
        if p_wrong < self.realword_hint:
            return None
        suggestions = self._ranked(word, hyps, total, self.max_suggestions)
        confident = bool(suggestions) and suggestions[0].probability >= self.thresholds.confident
        best = max(hyps, key=lambda x: x[1])
        return (REALWORD, p_wrong, tuple(suggestions), confident), p_wrong, best

    # ------------------------------------------------------------ hypotheses

    def _h0_known(self, kid: int | None, left: Left, right: Right, log_alpha: float | None = None) -> float:
        if kid is None:
            return -1e9
        return (self.log_alpha if log_alpha is None else log_alpha) + self._lp(kid, left) + self._lp(right, kid)

    def _h0_unknown(self, w: str, left: Left, right: Right, typed: str, capitalised_inside: bool) -> float:
        model = self.model
        spelling = self._novel_cache.get(w)
        if spelling is None:
            spelling = self._novel_cache.put(w, self._novel_logprob(w))
        h0 = (self.log_alpha + model.params.oov_log_prior + spelling
              + self._lp(model.unk, left) + self._lp(right, model.unk))
        if capitalised_inside:
            h0 += 4.0  # probably a name: leave it alone unless clearly a typo
        return h0

    def _novel_logprob(self, w: str) -> float:
        """log P(spelling | new word): character model, or a closed compound.

        Technical writing coins words by joining listed ones ("menubar",
        "timeframe") or by a one-letter prefix ("xarray"); such a spelling is
        far likelier as a new word than its letters alone suggest.
        """
        model = self.model
        best = model.novel.logprob(w)
        lexicon, lm = model.lexicon, model.lm
        for i in range(1, len(w)):
            a, b = w[:i], w[i:]
            kb = lexicon.ids.get(b)
            if kb is None or not lexicon.flags[kb] & LOWER or len(b) < 3:
                continue
            ka = lexicon.ids.get(a)
            if ka is not None and lexicon.flags[ka] & LOWER and len(a) >= 3:
                score = math.log(lm.unigram(ka)) + math.log(lm.unigram(kb)) + COMPOUND_LOG_RATE
            elif len(a) == 1:
                score = math.log(lm.unigram(kb)) + PREFIX_LOG_RATE
            else:
                continue
            best = max(best, score)
        # Regular word formation: a listed word with an inflection or a prefix
        # ("codebases", "prereleases", "deserializes").
        for ending in INFLECTIONS:
            if w.endswith(ending) and len(w) - len(ending) >= 3:
                for stem in (w[: -len(ending)], w[: -len(ending)] + "e"):
                    ks = lexicon.ids.get(stem)
                    if ks is not None and lexicon.flags[ks] & LOWER and not _irregular_plural(stem):
                        best = max(best, math.log(lm.unigram(ks)) + FORMATION_LOG_RATE)
        for prefix in PREFIXES:
            if w.startswith(prefix) and len(w) - len(prefix) >= 3:
                ks = lexicon.ids.get(w[len(prefix):])
                if ks is not None and lexicon.flags[ks] & LOWER:
                    best = max(best, math.log(lm.unigram(ks)) + FORMATION_LOG_RATE)
        return best

    def _candidate_hypotheses(self, w: str, left: Left, right: Right, typed: str, every_candidate: bool):
        boosts = self._correction_boosts(typed)
        hyps = []
        for c, lq in self._channel_candidates(w, every_candidate):
            h = self.log_error + self.channel_weight * lq + self._lp(c, left) + self._lp(right, c)
            h += boosts.get(self.model.lexicon.keys[c], 0.0)
            hyps.append((c, h))
        hyps.extend(self._split_hypotheses(w, left, right))
        hyps.extend(self._possessive_hypotheses(w, left, right))
        # Fixes the user accepted before that the index does not reach.
        lexicon = self.model.lexicon
        for chosen, bonus in boosts.items():
            kid = lexicon.ids.get(chosen.lower())
            if kid is not None and all(kid != c for c, _ in hyps) and " " not in chosen:
                lq = self.channel_weight * self.model.channel.log_q(w, chosen.lower())
                hyps.append((kid, self.log_error + lq + self._lp(kid, left) + self._lp(right, kid) + bonus))
        return hyps

    def _split_hypotheses(self, w: str, left: Left, right: Right) -> list[tuple[str, float]]:
        """Two words run together ("alot" -> "a lot"): every split into two listed words."""
        lexicon = self.model.lexicon
        out = []
        log_q = self.channel_weight * math.log(self.model.channel.split_share)
        for i in range(1, len(w)):
            a, b = w[:i], w[i:]
            ka, kb = lexicon.ids.get(a), lexicon.ids.get(b)
            if ka is None or kb is None or not (lexicon.flags[ka] & LOWER and lexicon.flags[kb] & LOWER):
                continue
            if (len(a) < 3 and a not in SHORT_WORDS) or (len(b) < 3 and b not in SHORT_WORDS):
                continue
            h = (self.log_error + log_q + self._lp(ka, left) + self._lp(kb, Left(left.l1, ka))
                 + self._lp(right._replace(l1=ka), kb))
            if len(a) >= COMPOUND_MIN_PART and len(b) >= COMPOUND_MIN_PART:
                # Two content words run together ("contextmanager", "eventloop") are
                # jargon in technical prose far more often than a missed space.
                h += COMPOUND_SPLIT_LOG_PENALTY
            out.append((a + " " + b, h))
        return out

    def _possessive_hypotheses(self, w: str, left: Left, right: Right) -> list[tuple[str, float]]:
        """A possessive typed without its apostrophe ("childrens" -> "children's").

        Possessives are not keys of the lexicon (they are derived when a
        word is looked up), so the index cannot offer them.
        """
        lexicon = self.model.lexicon
        if len(w) < 4 or not w.endswith("s") or w.endswith("'s"):
            return []
        out = []
        # "childrens" -> "children's"; "dogss" -> "dog's" (the apostrophe typed as "s").
        for stem in (w[:-1], w[:-2] if w.endswith("ss") else None):
            kid = lexicon.ids.get(stem) if stem else None
            if kid is None or not lexicon.flags[kid] & LOWER or stem.endswith("s"):
                continue
            lq = self.channel_weight * self.model.channel.log_q(w, stem + "'s")
            h = self.log_error + lq + POSSESSIVE_LOG_SHARE + self._lp(kid, left) + self._lp(right, kid)
            out.append((stem + "'s", h))
        return out

    def _channel_candidates(self, w: str, every_candidate: bool) -> list[tuple[int, float]]:
        """Candidate key ids with log Q(w | c); cached per typed word."""
        key = (w, every_candidate)
        cached = self._channel_cache.get(key)
        if cached is not None:
            return cached
        model = self.model
        lexicon, channel, prior = model.lexicon, model.channel, model.lm.prior
        found = model.candidates.within(w, 2)
        found.pop(lexicon.ids.get(w, -1), None)
        same_sound = set(model.sound_index.get(sound_key(w), ()))
        for c in same_sound:
            if c not in found and abs(len(lexicon.keys[c]) - len(w)) <= 3:
                found[c] = 3
        if sum(1 for d in found.values() if d <= 2) < FAR_SEARCH_BELOW:
            far = sorted(model.candidates.at_three(w), key=lambda c: -prior[c])
            for c in far[:FAR_KEPT]:
                found.setdefault(c, 3)
        # Short cased-only keys are abbreviations ("Th", "Tu"): never a fix for a typed word.
        wanted = [c for c in found if lexicon.is_variant(c, self.variant)
                  and (lexicon.flags[c] & LOWER or len(lexicon.keys[c]) > 3)]
        limit = model.params.max_nonword_candidates
        if not every_candidate and len(wanted) > limit:
            close = [c for c in wanted if found[c] <= 1]
            far = sorted((c for c in wanted if found[c] > 1), key=lambda c: -prior[c])
            wanted = close + far[: max(0, limit - len(close))]
        # A lower-case word typed for a name would also have lost its capital:
        # a second, independent slip (0.1 is our estimate, not fitted).
        keys, flags = lexicon.keys, lexicon.flags
        if every_candidate or len(wanted) <= RULE_RESCORED:
            scored = {c: channel.log_q(w, keys[c]) for c in wanted}
        else:
            # Checking a document: single-letter edits score every candidate;
            # the multi-character rules (which only ever raise a score) then
            # re-score the likeliest few.  The rest keep a lower bound.
            scored = {c: channel.log_q(w, keys[c], rules=False) for c in wanted}
            top = sorted(wanted, key=lambda c: -(scored[c] + math.log(prior[c])))[:RULE_RESCORED]
            for c in top:
                scored[c] = channel.log_q(w, keys[c])
        # Spelled by ear: letters and sound are two views of one slip (after
        # Toutanova & Moore 2002); a shared sound key adds a tuned log factor.
        # Missing spaces and apostrophes are other slips with rates of their
        # own: the factor is for candidates of the letter channel only.
        # The sound index holds the 80,000 most frequent keys, enough for fixes.
        bonus = model.params.sound_log_bonus
        if bonus:
            for c in same_sound.intersection(scored):
                scored[c] += bonus
        out = [(c, scored[c] + (0.0 if flags[c] & LOWER else NAME_LOG_PENALTY)) for c in wanted]
        return self._channel_cache.put(key, out)

    def _q(self, typed_id: int, intended_id: int) -> float:
        """log P(typed | intended, error) between two lexicon words (cached)."""
        key = (typed_id, intended_id)
        q = self._q_cache.get(key)
        if q is None:
            keys = self.model.lexicon.keys
            q = self.model.channel.log_q(keys[typed_id], keys[intended_id], rules=False)
            if key in self._confusable:
                q = max(q, math.log(CONFUSABLE_Q))
            q *= self.channel_weight
            self._q_cache[key] = q
        return q

    def _lp(self, w: "int | Right | None", v: "int | Left | None") -> float:
        """log P(w | v) in the trigram window (``calami.context``).

        ``v`` a Left: P(w | l2 l1); ``w`` a Right: the factors of the words
        after candidate ``v``; plain ids: P(w | v), ``v`` None no context;
        ``w`` None a missing right neighbour (log 1).
        """
        if w is None:
            return 0.0
        key = (w, v)  # Left/Right windows are tuples: the key says what is scored in which context
        lp = self._lp_cache.get(key)
        if lp is None:
            if type(w) is Right:
                lp = log_right(self.model.lm, w, v)
            elif type(v) is Left:
                lp = log_left(self.model.lm, w, v)
            else:
                p = self.model.lm.prob(w, v)
                lp = math.log(p) if p > 0 else -50.0
            if len(self._lp_cache) >= LP_CACHE_SIZE:
                self._lp_cache.clear()  # cheaper than an LRU, and a fresh start refills fast
            self._lp_cache[key] = lp
        return lp

    def _text_window(self, left: str, right: str) -> tuple[Left, Right]:
        """The context ids of text given around a word; no text, no context (not <s>/</s>)."""
        model = self.model
        before = [model.lm_id(u) for u in lm_units(tokenize(left))][-2:] if left.strip() else []
        after = [model.lm_id(u) for u in lm_units(tokenize(right))][:2] if right.strip() else []
        before = [None] * (2 - len(before)) + before
        after = after + [None] * (2 - len(after))
        if self.lm_order < 3:
            before[0] = after[1] = None
        return Left(before[0], before[1]), Right(before[1], after[0], after[1])

    # ------------------------------------------------------------ adaptation

    def _correction_boosts(self, typed: str) -> dict[str, float]:
        boosts: dict[str, float] = {}
        for a in self.adaptations:
            for chosen, count in a.corrections(typed).items():
                if count > 0:
                    boosts[chosen.lower()] = boosts.get(chosen.lower(), 0.0) + math.log1p(3.0 * count) * 2.0
        return boosts

    def _ignored(self, word: str) -> int:
        return sum(a.ignored(word) for a in self.adaptations)

    # --------------------------------------------------------------- ranking

    def _display(self, typed: str, candidate: int | str) -> str:
        """A candidate (key id, or a two-word string) written in the typed word's case."""
        if isinstance(candidate, str):
            if len(typed) > 1 and typed.isupper():
                return candidate.upper()
            return candidate[:1].upper() + candidate[1:] if typed[:1].isupper() else candidate
        return restore_case(typed, self.model.lexicon.keys[candidate], self.model.lexicon)

    def _ranked(self, typed: str, hyps, total: float, limit: int, self_score: float | None = None) -> list[Suggestion]:
        """The best ``limit`` hypotheses as suggestions, written in the typed word's case.

        ``self_score`` adds the word as typed (for ``suggest`` on a listed word).
        """
        scored = list(hyps)
        if self_score is not None:
            scored.append((None, self_score))
        scored.sort(key=lambda x: -x[1])
        out: list[Suggestion] = []
        seen: set[str] = set()
        for c, h in scored:
            text = typed if c is None else self._display(typed, c)
            if text in seen:
                continue
            seen.add(text)
            out.append(Suggestion(text, math.exp(h - total)))
            if len(out) >= limit:
                break
        return out

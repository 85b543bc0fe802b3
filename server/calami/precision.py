"""The precision rules: what keeps calami quiet on sound text in real projects.

Each rule was added for a kind of false alarm measured on others'
documentation (``tests/benchmarks/bench_false_alarms.py``) and kept only
where it cost little recall on planted real misspellings and on the
real-word benchmark; the figures are in the model card.  The checker
(``checker.Checker``) inherits the rules from ``PrecisionRules`` and calls
them at its decision points; they read its model, its workspace vocabulary
(``usage``), its variant and its novel-word cache.
"""

from __future__ import annotations

import math

from calami.model.lexicon import LOWER, US as US_FLAG
from calami.vocab.usage import CODE, HANDLE, LINK, META

# Workspace vocabulary (a cache model, Kuhn & De Mori 1990): weight of the
# workspace's own distribution of unknown words against the spelling model.
CACHE_LOG_WEIGHT = math.log(0.3)
# A URL, an e-mail address, an @handle or a package manifest is copied, not
# typed: worth this many extra uses as a witness that a word is a name.
COPIED_WITNESS = 2.0
# An unknown word one edit from a listed word at least this frequent could
# be a habitual or copy-pasted typo of it, however often it is typed in
# prose: the workspace makes it right only if it is used at least
# REPEATED_TYPO_USES times and also named where people do not type freely
# (code identifiers, URLs, handles, manifests).
FREQUENT_PRIOR = 1e-6
REPEATED_TYPO_USES = 3
NAMED_SOURCES = CODE | LINK | HANDLE | META
# log factor for an unknown capitalised word where names stand (contributor
# lists, beside @handles): our estimate, tuned on development documents.
NAME_CONTEXT_LOG_BONUS = 7.0
COMPOUND_MIN_PART = 3
PARTICLES = frozenset({"up", "in", "on", "by"})
COMPOUND_SPLIT_LOG_PENALTY = math.log(0.1)  # tuned on development documents
# Words with letters beyond ASCII in English technical prose are names or
# foreign words far more often than typos (a slip seldom adds a diacritic).
NONASCII_LOG_BONUS = 8.0
# Endings after an apostrophe that make a listed word a regular form.
APOSTROPHE_ENDINGS = frozenset({"re", "d", "ve", "ll", "m", "ing", "ed", "s", "es"})

# Posterior a real-word slip needs in a sentence that holds code, a URL or an
# identifier (tuned on development documents: 0.41 -> 0.19 false real-word
# findings per 1,000 words, real-word benchmark recall 0.670 -> 0.669).
TECHNICAL_REALWORD_HINT = 0.95
# A sentence that starts with these is a yes/no question ("Is this related?").
QUESTION_STARTS = frozenset({"is", "are", "do", "does", "did", "can", "will", "should", "was", "were"})


def known_context(word_id: int, lexicon) -> bool:
    """A listed word or the sentence's start or end; not code, a URL or an unknown word."""
    return word_id <= len(lexicon) + 1  # ids past the lexicon: <s>, </s>, then <unk>, <code>



class PrecisionRules:
    """Rules shared by the checker's non-word and real-word decisions (a mixin of ``Checker``)."""

    def _nonword_doubt(self, w: str, core: str, best: int | str):
        """(rule, reason) when a likely fix still should not be applied unread, else None."""
        if self._compound_parts(w) is not None:
            # "contextmanager", "linewidth": in technical prose far more often
            # an identifier or jargon than a slip.
            return "compound", "a closed compound of two listed words is never a confident fix"
        if not core.isascii():
            return "name", "a word with letters beyond ASCII is a name or a foreign word more often than a slip"
        if isinstance(best, int) and core[:1].isupper() and not self.model.lexicon.flags[best] & LOWER:
            return "name", "one name is not a confident fix for another ('Matthieu', 'Mathieu')"
        if self.usage is not None:
            use = self.usage.use(w)
            if use is not None and use.sources & NAMED_SOURCES:
                return "workspace", f"the workspace names it: {use.describe()}"
        return None

    def _workspace_h0_gain(self, w: str):
        """("workspace", log gain, description) from the cache model, or None.

        P(spelling | unknown) becomes (1 - l) P_novel + l P_cache, where
        P_cache is the word's share of the workspace's uses of unknown
        words, this use left out.  A word one edit from a frequent listed
        word that the workspace uses only once or twice stays as it was: a
        copy-pasted typo repeats too.
        """
        use = self.usage.use(w)
        if use is None:
            return None
        copied = bool(use.sources & (LINK | HANDLE | META))
        witness = (use.count - 1) + (COPIED_WITNESS if copied else 0.0)
        if witness <= 0:
            return None
        if self._near_frequent(w) and (use.raw < REPEATED_TYPO_USES or not use.sources & NAMED_SOURCES):
            return None
        spelling = self._novel_cache.get(w)
        if spelling is None:
            spelling = self._novel_cache.put(w, self._novel_logprob(w))
        static = self.model.params.oov_log_prior + spelling
        cache = CACHE_LOG_WEIGHT + math.log(witness / max(1.0, float(self.usage.total)))
        mixed = max(static, cache) + math.log1p(math.exp(-abs(static - cache)))
        gain = mixed - static
        return ("workspace", gain, use.describe()) if gain > 0 else None

    def workspace_note(self, word: str) -> str | None:
        """Why an unlisted word is not flagged, when the workspace's use is the reason (for the hover)."""
        if self.usage is None or self.model.lexicon.lookup(word, self.variant).accepted:
            return None
        w = word.replace("’", "'").lower()
        gain = self._workspace_h0_gain(w)
        return None if gain is None else f"not in the word lists; accepted because the workspace uses it: {gain[2]}"

    def _near_frequent(self, w: str) -> bool:
        """True if a frequent lower-case listed word is one edit from ``w``."""
        lexicon, prior = self.model.lexicon, self.model.lm.prior
        return any(lexicon.flags[c] & LOWER and prior[c] >= FREQUENT_PRIOR
                   for c in self.model.candidates.within(w, 1))

    def _compound_parts(self, w: str) -> tuple[str, str] | None:
        """Two listed lower-case words that ``w`` is made of, if any ("followup", "linewidth").

        Parts have 3+ letters, except a closing particle ("setup", "followup").
        """
        ids, flags = self.model.lexicon.ids, self.model.lexicon.flags
        for i in range(COMPOUND_MIN_PART, len(w) - 1):
            a, b = w[:i], w[i:]
            if len(b) < COMPOUND_MIN_PART and b not in PARTICLES:
                continue
            ka, kb = ids.get(a), ids.get(b)
            if ka is not None and kb is not None and flags[ka] & LOWER and flags[kb] & LOWER:
                return a, b
        return None

    def _regular_unlisted_form(self, w: str) -> bool:
        """True for forms the word lists leave out but English makes regularly.

        British spellings of listed American words ("customisable",
        "canonicalisation": -is- for -iz-), right under "any" and "en-GB";
        and contractions or quoted-verb endings on a listed word ("that're",
        "there'd", "install'ing").
        """
        lexicon = self.model.lexicon
        if "'" in w:
            head, _, tail = w.rpartition("'")
            if tail in APOSTROPHE_ENDINGS and head in lexicon.ids and lexicon.flags[lexicon.ids[head]] & LOWER:
                return True
        if self.variant != "en-US" and "is" in w:
            for i in range(len(w) - 3):
                if w.startswith("is", i) and w[i + 2] in "aei":
                    us = w[:i] + "iz" + w[i + 2:]
                    kid = lexicon.ids.get(us)
                    if kid is not None and lexicon.flags[kid] & LOWER and lexicon.flags[kid] & US_FLAG:
                        return True
        return False

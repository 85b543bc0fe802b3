"""The lexicon: which words exist, in which case forms and spelling variants.

Words are identified by their lower-case form (a *key*); the key's id is the
word id shared by the language model and the candidate index.  Case is a
property of the accepted surface forms: "python" may be written "Python" at
the start of a sentence, but "PostgreSQL" only as listed (or in ALLCAPS).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Iterable, Sequence

US = 1  # accepted in en-US
GB = 2  # accepted in en-GB
LOWER = 4  # the all-lower-case form itself is a word (not only a cased name)
CORPUS = 8  # admitted from the training corpus, not from the word lists
OTHER = 16  # a less common variant spelling: right only when no variant is asked for

VARIANT_BITS = {"any": US | GB | OTHER, "en-US": US, "en-GB": GB}
_VARIANT_MASK = US | GB | OTHER

# The regular differences between British and American spelling, each
# rewritten to one neutral form so that two spellings of the same word meet
# (from general knowledge of English orthography, not from any word list):
# -ise/-ize, -yse/-yze (and their -isation, -ised... forms), -our/-or,
# -re/-er, doubled l before a suffix, -ogue/-og, -ence/-ense, -mme/-m,
# -ement/-ment after a soft g, ae/oe digraphs.
_NEUTRAL = (
    (re.compile(r"([iy])s(?=e|es|ed|er|ers|ing|ation|ations|able)$"), r"\1z"),
    (re.compile(r"([iy])s(?=ation|ations|ational|ed|ing|er|ers|es|e)"), r"\1z"),
    (re.compile(r"our(?=s?$|ed$|ing$|ite|ful|less|able|er|ism|ist|ation)"), "or"),
    (re.compile(r"(?<=[a-z]{2})([bcdfgkmnptv])re(?=s?$|d$)"), r"\1er"),
    (re.compile(r"ll(?=ed$|ing$|er$|ers$|ation|ous)"), "l"),
    (re.compile(r"ogue(?=s?$)"), "og"),
    (re.compile(r"ence(?=s?$)"), "ense"),
    (re.compile(r"mme(?=s?$)"), "m"),
    (re.compile(r"gement(?=s?$)"), "gment"),
    (re.compile(r"(?<=[a-z])[ao]e(?=[a-z])"), "e"),
)


@lru_cache(maxsize=8192)
def variant_neutral(key: str) -> str:
    """``key`` with the British/American differences rewritten to one form."""
    for pattern, replacement in _NEUTRAL:
        key = pattern.sub(replacement, key)
    return key


@dataclass(frozen=True, slots=True)
class Lookup:
    """The outcome of looking up a surface form."""

    key_id: int | None  # id of the lower-case key, if the key exists at all
    accepted: bool  # the form as typed (case included) is right
    other_variant: bool = False  # right, but only in the other spelling variant


class Lexicon:
    """Lower-case keys with flags, plus the cased forms that are allowed."""

    def __init__(self, keys: Sequence[str], flags: bytes | bytearray, cased: Iterable[str]) -> None:
        if len(keys) != len(flags):
            raise ValueError("lexicon keys and flags differ in length")
        self.keys = list(keys)
        self.flags = bytes(flags)
        self.ids: dict[str, int] = {k: i for i, k in enumerate(self.keys)}
        forms: dict[str, list[str]] = {}
        for form in cased:
            forms.setdefault(form.lower(), []).append(form)
        self.cased: dict[str, tuple[str, ...]] = {k: tuple(v) for k, v in forms.items()}

    def __len__(self) -> int:
        return len(self.keys)

    def lookup(self, word: str, variant: str = "any") -> Lookup:
        """Is ``word`` (as typed) right?  Handles case, possessives and variants."""
        word = word.replace("’", "'")
        result = self._lookup_form(word, variant)
        if result.accepted or result.key_id is not None:
            return result
        # Possessives are not listed separately: "parser's", "users'".
        if word.endswith(("'s", "'S")):
            stem = self._lookup_form(word[:-2], variant)
            if stem.accepted:
                return stem
        elif word.endswith("'") and len(word) > 2:
            stem = self._lookup_form(word[:-1], variant)
            if stem.accepted:
                return stem
        return result

    def _lookup_form(self, word: str, variant: str) -> Lookup:
        key = word.lower()
        kid = self.ids.get(key)
        if kid is None:
            return Lookup(None, False)
        flags = self.flags[kid]
        case_ok = self._case_ok(word, key, flags)
        if not case_ok:
            return Lookup(kid, False)
        wanted = VARIANT_BITS.get(variant, US | GB | OTHER)
        if flags & wanted:
            return Lookup(kid, True)
        return Lookup(kid, False, other_variant=True)

    def _case_ok(self, word: str, key: str, flags: int) -> bool:
        if word == key:
            return bool(flags & LOWER)
        forms = self.cased.get(key, ())
        if word in forms:
            return True
        if word.isupper():
            return True  # ALLCAPS of any known form
        if word[0].isupper() and word[1:] == key[1:]:
            # Sentence-initial or title case of a lower-case word, or of a name
            # whose listed form is itself capitalised this way.
            return bool(flags & LOWER)
        return False

    def display_forms(self, key: str) -> tuple[str, ...]:
        """How a key is normally written: its cased forms, or the key itself."""
        kid = self.ids.get(key)
        if kid is not None and self.flags[kid] & LOWER:
            return (key,)
        return self.cased.get(key, (key,))

    def is_variant(self, key_id: int, variant: str) -> bool:
        return bool(self.flags[key_id] & VARIANT_BITS.get(variant, US | GB | OTHER))

    def variant_pair(self, a: int, b: int) -> bool:
        """True if keys ``a`` and ``b`` are one word in two spelling variants ("normalised", "normalized").

        Such a pair is never a slip for one another: the variant setting
        decides between them, so neither may be offered as the other's fix.
        """
        if a == b or (self.flags[a] & _VARIANT_MASK) == (self.flags[b] & _VARIANT_MASK):
            return False
        return variant_neutral(self.keys[a]) == variant_neutral(self.keys[b])


def restore_case(typed: str, candidate_key: str, lexicon: Lexicon) -> str:
    """Write a suggested key in the case pattern of the typed word.

    "Teh" -> "The", "RECIEVE" -> "RECEIVE"; a name keeps its own form
    ("pyhton" -> "Python" only if "python" is not itself a word).
    """
    forms = lexicon.display_forms(candidate_key)
    form = forms[0]
    if len(typed) > 1 and typed.isupper():
        return form.upper()
    if typed[:1].isupper():
        if form == candidate_key:
            return form[:1].upper() + form[1:]
        return form
    return form

"""What a sentence's shape says about its words, beyond the language model.

Two questions the checker asks of a sentence before it scores a word:

* Is this a place where people's names stand?  Contributor lists, change
  log credits and author sections are runs of capitalised words, often
  beside an @handle or an e-mail address.  There an unknown capitalised
  word is far more often a surname than a typo.
* Is a suspected slip a swap between two short function words ("or" for
  "of", "then" for "the")?  Such words are frequent everywhere, so the
  language model prefers one to the other on thin evidence; a swap is only
  worth a hint when both neighbours are ordinary words the model knows.

Both answers depend on the sentence's tokens only, which keeps
``Checker.check_sentence`` a pure function of them.
"""

from __future__ import annotations

from typing import Sequence

from calami.model.confusables import PUBLISHED_SETS
from calami.text.tokens import CAPS, SKIP, WORD, Token

# Closed-class English words that one keystroke turns into each other
# (common knowledge of English grammar; our own selection).
FUNCTION_WORDS = frozenset(
    "a an and as at be by do for from he if in is it its me my no not of on one or so the then "
    "to too two up us we were where".split()
)
# Homophone sets writers really confuse keep the ordinary rule even between
# function words ("their"/"there", "than"/"then", "its"/"it's").
_PUBLISHED = {(a, b) for group in PUBLISHED_SETS for a in group for b in group if a != b}

# Words after which a contributor's name or handle follows ("patch by ...").
_CREDIT_WORDS = frozenset({"by", "thanks", "thank", "credit", "credits", "cc"})
# A run of capitalised words this short reads as a name, not a sentence.
MAX_NAME_RUN = 5


def is_function_swap(typed: str, intended: str) -> bool:
    """True for a slip between two function words that is not a published confusion."""
    return typed in FUNCTION_WORDS and intended in FUNCTION_WORDS and (typed, intended) not in _PUBLISHED


def _is_handle_or_address(tok: Token) -> bool:
    return tok.kind == SKIP and (tok.text.startswith("@") or ("@" in tok.text and "." in tok.text))


def _capitalised(tok: Token) -> bool:
    return tok.kind == WORD and tok.text[:1].isupper()


def name_positions(tokens: Sequence[Token], whole: bool = False) -> frozenset[int]:
    """Indices of the capitalised words that stand where names stand.

    The whole sentence counts when ``whole`` is set (a credits file), when
    it holds an @handle or an e-mail address, or when every word in it is
    capitalised and there are at most ``MAX_NAME_RUN`` of them ("Kadir Can
    Ozden").  Elsewhere, a capitalised word beside another one inside a
    sentence ("... and Joanna Ejzel") is in a run of names.
    """
    words = [i for i, t in enumerate(tokens) if t.kind == WORD or t.kind == CAPS]
    capitalised = [i for i in words if _capitalised(tokens[i])]
    if not capitalised:
        return frozenset()
    if whole or any(_is_handle_or_address(t) for t in tokens) or (
            2 <= len(words) <= MAX_NAME_RUN and len(capitalised) == len(words)):
        return frozenset(capitalised)
    out = set()
    for i, tok in enumerate(tokens):
        # "patch by aristocratos", "thanks to struktured", "julienp <julien@example.org>"
        if tok.kind != WORD:
            continue
        before = tokens[i - 1].text.lower() if i > 0 else ""
        if before in _CREDIT_WORDS or (before == "to" and i > 1 and tokens[i - 2].text.lower() in _CREDIT_WORDS):
            out.add(i)
        elif i + 1 < len(tokens) and _is_handle_or_address(tokens[i + 1]):
            out.add(i)
    for i in capitalised:
        if i == 0:
            continue
        before = tokens[i - 1] if i > 0 else None
        after = tokens[i + 1] if i + 1 < len(tokens) else None
        if (before is not None and _capitalised(before) and i - 1 > 0) or (after is not None and _capitalised(after)):
            out.add(i)
    return frozenset(out)

"""The language-model window around one word: two words on each side.

A candidate c at position i is scored by the factors of the sentence
probability that contain it (trigram model):

    P(c | l2 l1) * P(r1 | l1 c) * P(r2 | c r1)

``Left`` holds (l2, l1); ``Right`` holds (l1, r1, r2), because the right-hand
factors need the word before c too.  ``None`` means "not known" (text given
without context): the factor falls back to a lower order or is left out.
Order 2 drops l2 and r2: the same model used as a bigram model, for comparison.
"""

from __future__ import annotations

import math
from typing import NamedTuple, Sequence

from calami.model.language import LanguageModel

LOG_ZERO = -50.0


class Left(NamedTuple):
    l2: int | None
    l1: int | None


class Right(NamedTuple):
    l1: int | None
    r1: int | None
    r2: int | None


def window(ids: Sequence[int], i: int, bos: int, eos: int, order: int = 3) -> tuple[Left, Right]:
    """The context of position ``i`` of a sentence of language-model ids (padded <s> <s> ... </s>)."""
    n = len(ids)
    l1 = ids[i - 1] if i > 0 else bos
    l2 = (ids[i - 2] if i > 1 else bos) if order >= 3 else None
    r1 = ids[i + 1] if i + 1 < n else eos
    r2 = (ids[i + 2] if i + 2 < n else (eos if i + 2 == n else None)) if order >= 3 else None
    return Left(l2, l1), Right(l1, r1, r2)


def _log(p: float) -> float:
    return math.log(p) if p > 0 else LOG_ZERO


def log_left(lm: LanguageModel, c: int, left: Left) -> float:
    """log P(c | l2 l1)."""
    return _log(lm.prob3(c, left.l2, left.l1))


def log_right(lm: LanguageModel, right: Right, c: int) -> float:
    """log P(r1 | l1 c) + log P(r2 | c r1): how well c fits the words after it."""
    if right.r1 is None:
        return 0.0
    out = _log(lm.prob3(right.r1, right.l1, c))
    if right.r2 is not None:
        out += _log(lm.prob3(right.r2, c, right.r1))
    return out


def log_lefts(lm: LanguageModel, left: Left, cs: Sequence[int]) -> list[float]:
    """[log_left(lm, c, left) for c in cs], with the context looked up once."""
    return [_log(p) for p in lm.probs3_after(left.l2, left.l1, cs)]


def log_rights(lm: LanguageModel, right: Right, cs: Sequence[int]) -> list[float]:
    """[log_right(lm, right, c) for c in cs]."""
    return [log_right(lm, right, c) for c in cs]

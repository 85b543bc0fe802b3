"""The decision: which words to flag, and the ranked fixes for each.

(Engine implementation in progress; the public surface below is the contract
used by the language server and ``calami check``.)
"""

from __future__ import annotations

from typing import Protocol, Sequence, Mapping

from calami.findings import Finding, Suggestion, Thresholds
from calami.text.spans import Span
from calami.text.tokens import Token


class Adaptation(Protocol):
    """What a project word list or a user profile tells the checker."""

    def accepts(self, word: str) -> bool:
        """True if the word (as typed, case included) is right for this user/project."""

    def corrections(self, typed: str) -> Mapping[str, int]:
        """Accepted fixes for ``typed``: chosen word -> times accepted."""

    def ignored(self, word: str) -> int:
        """How many times the user chose to ignore this word."""


class Checker:
    """Scores tokens with the model and the user's/project's adaptations.

    ``check_sentence`` is a pure function of the sentence's token texts and
    kinds (offsets aside), so front ends may cache its results per sentence.
    """

    def __init__(
        self,
        model: "object",
        *,
        adaptations: Sequence[Adaptation] = (),
        variant: str = "any",
        thresholds: Thresholds = Thresholds(),
        max_suggestions: int = 5,
    ) -> None:
        raise NotImplementedError

    def check(self, text: str, spans: Sequence[Span] | None = None) -> list[Finding]:
        raise NotImplementedError

    def check_sentence(self, tokens: Sequence[Token]) -> list[Finding]:
        raise NotImplementedError

    def suggest(self, word: str, left: str = "", right: str = "", limit: int = 5) -> list[Suggestion]:
        raise NotImplementedError

"""What the checker reports: findings with ranked suggestions.

These plain records are the contract between the engine and its two front
ends (the language server and ``calami check``).  Offsets are code-point
offsets into the checked document, end exclusive.
"""

from __future__ import annotations

from dataclasses import dataclass

NONWORD = "nonword"
REALWORD = "realword"
DIRECTIVE = "directive"  # an in-file directive that could not be read (calami.text.directives)

# What people read for each kind (text report, summary, SARIF rule names):
# the literature's non-word / real-word error distinction (Kukich 1992).
KIND_LABELS = {NONWORD: "non-word", REALWORD: "real-word slip"}


@dataclass(frozen=True, slots=True)
class Suggestion:
    text: str
    probability: float


@dataclass(frozen=True, slots=True)
class Finding:
    start: int
    end: int
    word: str
    kind: str  # NONWORD or REALWORD
    confidence: float  # posterior probability that the word is wrong
    suggestions: tuple[Suggestion, ...] = ()
    confident: bool = False  # the best fix is safe to apply without reading
    left: str = ""  # context words the decision used (for hover text)
    right: str = ""
    note: str = ""  # what is wrong, for DIRECTIVE findings

    @property
    def best(self) -> str | None:
        return self.suggestions[0].text if self.suggestions else None

    def shifted(self, delta: int) -> "Finding":
        """The same finding moved by ``delta`` code points (cache reuse)."""
        return Finding(
            self.start + delta, self.end + delta, self.word, self.kind, self.confidence,
            self.suggestions, self.confident, self.left, self.right, self.note,
        )


@dataclass(frozen=True, slots=True)
class Thresholds:
    """Posterior probability needed to show a hint, and to call a fix confident."""

    hint: float = 0.5
    confident: float = 0.95

    def __post_init__(self) -> None:
        if not (0.0 < self.hint <= self.confident <= 1.0):
            raise ValueError("thresholds must satisfy 0 < hint <= confident <= 1")

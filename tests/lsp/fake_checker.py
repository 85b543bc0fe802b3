"""A small stand-in with the Checker's surface, for protocol tests.

It knows a handful of invented misspellings and one context rule, honours
the adaptations exactly as the contract describes (accepted words are never
flagged, accepted fixes rise in the ranking, ignores lower the confidence)
and is, like the real checker, a pure function of a sentence's tokens.
"""

from __future__ import annotations

import os
import time
from typing import Any, Sequence

from calami.findings import NONWORD, REALWORD, Finding, Suggestion, Thresholds
from calami.text.spans import Span
from calami.text.tokens import WORD, Token, sentences, tokenize

# typed -> ranked candidates with base probabilities (invented for tests)
TYPOS: dict[str, list[tuple[str, float]]] = {
    "teh": [("the", 0.80), ("ten", 0.12), ("tea", 0.08)],
    "recieve": [("receive", 0.97), ("relieve", 0.03)],
    "wrold": [("world", 0.9), ("would", 0.1)],
    "speling": [("spelling", 0.85), ("spieling", 0.15)],
    "ofen": [("often", 0.55), ("oven", 0.45)],
}
# "form" after one of these words is probably "from" (a real-word slip).
REALWORD_LEFT = {"away", "came", "far", "apart"}

# A sentence holding this word makes the fake wait while the file named by
# $CALAMI_FAKE_GATE exists: a test can hold the checker busy for as long as
# it needs, so what it asserts about a busy server never depends on speed.
STALL_WORD = "stallword"
GATE_ENV = "CALAMI_FAKE_GATE"
GATE_LIMIT_S = 600.0  # a forgotten gate must not hang a test run forever


def _wait_at_gate() -> None:
    gate = os.environ.get(GATE_ENV)
    deadline = time.monotonic() + GATE_LIMIT_S
    while gate and os.path.exists(gate) and time.monotonic() < deadline:
        time.sleep(0.01)


class FakeChecker:
    def __init__(
        self,
        model: Any = None,
        *,
        adaptations: Sequence[Any] = (),
        variant: str = "any",
        thresholds: Thresholds = Thresholds(),
        max_suggestions: int = 5,
    ) -> None:
        self.adaptations = list(adaptations)
        self.variant = variant
        self.thresholds = thresholds
        self.max_suggestions = max_suggestions
        self.calls = 0  # sentences scored (lets tests see the cache at work)

    def _accepted(self, word: str) -> bool:
        return any(a.accepts(word) for a in self.adaptations)

    def _ignored(self, word: str) -> int:
        return sum(a.ignored(word) for a in self.adaptations)

    def suggest(self, word: str, left: str = "", right: str = "", limit: int = 5) -> list[Suggestion]:
        base = dict(TYPOS.get(word.lower(), []))
        for a in self.adaptations:
            for chosen, count in a.corrections(word).items():
                base[chosen] = base.get(chosen, 0.0) + 0.5 * count
        total = sum(base.values()) or 1.0
        ranked = sorted(base.items(), key=lambda kv: (-kv[1], kv[0]))
        return [Suggestion(w, p / total) for w, p in ranked[:limit]]

    def check_sentence(self, tokens: Sequence[Token]) -> list[Finding]:
        self.calls += 1
        if any(t.text == STALL_WORD for t in tokens):
            _wait_at_gate()
        out: list[Finding] = []
        for i, tok in enumerate(tokens):
            if tok.kind != WORD or self._accepted(tok.text):
                continue
            low = tok.text.lower()
            left = tokens[i - 1].text if i > 0 else ""
            right = tokens[i + 1].text if i + 1 < len(tokens) else ""
            if low in TYPOS:
                kind, confidence = NONWORD, 0.9
            elif low == "form" and left.lower() in REALWORD_LEFT:
                kind, confidence = REALWORD, 0.7
            else:
                continue
            confidence -= 0.2 * self._ignored(tok.text)
            if confidence < self.thresholds.hint:
                continue
            if kind == REALWORD:
                suggestions = [Suggestion("from", 0.8), Suggestion("form", 0.2)]
            else:
                suggestions = self.suggest(tok.text, left, right, self.max_suggestions)
            confident = bool(suggestions) and confidence * suggestions[0].probability >= self.thresholds.confident * 0.7
            out.append(Finding(tok.start, tok.end, tok.text, kind, confidence, tuple(suggestions[: self.max_suggestions]),
                               confident, left, right))
        return out

    def check(self, text: str, spans: Sequence[Span] | None = None) -> list[Finding]:
        out: list[Finding] = []
        for sentence in sentences(tokenize(text, spans)):
            out.extend(self.check_sentence(sentence))
        return out


def make_fake(adaptations: Sequence[Any], settings: Any) -> FakeChecker:
    """The server's checker factory, built on the fake."""
    return FakeChecker(
        adaptations=adaptations, variant=settings.variant, thresholds=settings.thresholds,
        max_suggestions=settings.max_suggestions,
    )

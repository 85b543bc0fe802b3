"""Findings of one document, recomputed only where an edit changed something.

Why this is safe: tokens depend only on the text inside their span, sentences
never cross a span that ``breaks_before``, and ``Checker.check_sentence`` is a
pure function of its tokens' texts and kinds.  So the findings of a *block*
(a span that breaks, plus the spans that continue it) are a function of the
block's text and span layout, and the findings of a sentence are a function
of its tokens.  Both are cached with offsets relative to the block/sentence
start and shifted into place; an edit re-tokenizes only the blocks whose
text changed and re-scores only the sentences whose tokens changed (which
covers the neighbours whose trigram context changed: they are in the same
sentence, hence in a changed key).

Blocks not used by the latest complete pass are dropped.  Sentence entries
are pruned once they outnumber twice the live document's sentences (copying
every live sentence key on each keystroke cost more than the checking), so
memory still follows the document, not its history.
"""

from __future__ import annotations

from typing import Callable, Protocol, Sequence

from calami.findings import Finding
from calami.text.spans import Span
from calami.text.formats.scoring_tokens import scoring_tokens
from calami.text.tokens import Token, sentences


class SentenceChecker(Protocol):
    def check_sentence(self, tokens: Sequence[Token]) -> list[Finding]: ...


class Cancelled(Exception):
    """A newer edit made this pass pointless."""


BlockKey = tuple[str, tuple[tuple[int, int, str, bool], ...]]
SentenceKey = tuple[tuple[int, int, str, str], ...]


def blocks(spans: Sequence[Span]) -> list[list[Span]]:
    """Group spans into blocks: a span that breaks, then the spans continuing it."""
    out: list[list[Span]] = []
    for span in spans:
        if span.breaks_before or not out:
            out.append([span])
        else:
            out[-1].append(span)
    return out


class FindingsCache:
    """Per-document cache of block and sentence findings."""

    def __init__(self) -> None:
        self._checker: object | None = None
        self._blocks: dict[BlockKey, _Block] = {}
        self._sentences: dict[SentenceKey, list[Finding]] = {}
        self.scored_sentences = 0  # sentences sent to the checker by the last pass
        self.tokenized_blocks = 0

    def clear(self) -> None:
        self._blocks.clear()
        self._sentences.clear()

    def findings(
        self,
        text: str,
        spans: Sequence[Span],
        checker: SentenceChecker,
        cancelled: Callable[[], bool] = lambda: False,
    ) -> list[Finding]:
        """All findings of ``text``; equal to a full check, reusing what it can."""
        if checker is not self._checker:
            self.clear()
            self._checker = checker
        new_blocks: dict[BlockKey, _Block] = {}
        new_sentences: dict[SentenceKey, list[Finding]] = {}
        self.scored_sentences = 0
        self.tokenized_blocks = 0
        old_blocks = self._blocks
        live_sentences = 0
        out: list[Finding] = []
        for group in blocks(spans):
            if cancelled():
                # Keep what this pass learnt; the next pass will reuse it.
                self._blocks.update(new_blocks)
                self._sentences.update(new_sentences)
                raise Cancelled()
            origin = group[0].start
            if len(group) == 1:
                key: BlockKey = (text[origin : group[0].end], ())
            else:
                key = (
                    text[origin : group[-1].end],
                    tuple((s.start - origin, s.end - origin, s.kind, s.breaks_before) for s in group[1:]),
                )
            block = new_blocks.get(key) or old_blocks.get(key)
            if block is None:
                block = self._score_block(text, group, new_sentences, checker)
            new_blocks[key] = block
            live_sentences += len(block.sentences)
            if block.findings:
                out.extend([f.shifted(origin) for f in block.findings] if origin else block.findings)
        self._blocks = new_blocks
        self._sentences.update(new_sentences)
        if len(self._sentences) > 2 * live_sentences + 64:
            # Keep only the sentences of live blocks, so that the next edit
            # inside any block re-scores only the sentence it touches.
            self._sentences = {k: v for b in new_blocks.values() for k, v in b.sentences}
        return out

    def _score_block(
        self,
        text: str,
        group: list[Span],
        new_sentences: dict[SentenceKey, list[Finding]],
        checker: SentenceChecker,
    ) -> "_Block":
        self.tokenized_blocks += 1
        origin = group[0].start
        # The first span starts a sentence whatever the extractor said.
        first = group[0]
        layout = [Span(first.start, first.end, first.kind, True), *group[1:]]
        relative: list[Finding] = []
        scored: list[tuple[SentenceKey, list[Finding]]] = []
        for sentence in sentences(scoring_tokens(text, layout)):
            start = sentence[0].start
            skey: SentenceKey = tuple((t.start - start, t.end - start, t.text, t.kind) for t in sentence)
            found = new_sentences.get(skey)
            if found is None:
                found = self._sentences.get(skey)
            if found is None:
                self.scored_sentences += 1
                found = [f.shifted(-start) for f in checker.check_sentence(sentence)]
            new_sentences[skey] = found
            scored.append((skey, found))
            relative.extend(f.shifted(start - origin) for f in found)
        return _Block(relative, scored)


class _Block:
    """Findings of a block (relative to its start) and of its sentences."""

    __slots__ = ("findings", "sentences")

    def __init__(self, findings: list[Finding], sentences: list[tuple[SentenceKey, list[Finding]]]) -> None:
        self.findings = findings
        self.sentences = sentences

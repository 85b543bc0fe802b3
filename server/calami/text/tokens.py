"""Word tokenizer shared by model training and checking.

Training and checking must cut text into the same units, otherwise the
language model scores words it never saw as such.  One regular expression
(``regex`` module, Unicode-aware) finds candidate units; a small classifier
decides which are checkable words and which are technical material that is
never flagged (URLs, paths, options, identifiers, numbers, hashes).

A token's ``sentence`` number groups tokens for n-gram context: context never
crosses a sentence end or a span that starts a new block.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable, Iterator, Sequence

import regex

from calami.text.spans import Span

WORD = "word"  # a checkable word
CAPS = "caps"  # ALLCAPS word: an acronym unless its neighbours shout too
SKIP = "skip"  # technical material: breaks context, never checked

# Abbreviations whose trailing dot does not end a sentence (common practice).
_ABBREVIATIONS = frozenset(
    "e.g i.e etc vs cf al approx dept est fig figs mr mrs ms dr prof sr jr st no nos vol vols ed eds p pp ch sec".split()
)

_PATTERN = regex.compile(
    r"""
    (?P<url>(?:[A-Za-z][A-Za-z0-9+.\-]*://|www\.)[^\s<>"'`]*[^\s<>"'`)\]}.,;:!?])
  | (?P<email>[\w.+\-]+@[\w\-]+(?:\.[\w\-]+)+)
  | (?P<path>(?:~|\.\.?)?/[\w.\-~/@+]+|[A-Za-z]:\\[^\s]+|[\w.\-]+(?:/[\w.\-]+){2,}/?|[\w\-]+/[\w\-]*\.[\w]+)
  | (?P<option>(?<![\w\-])--?[A-Za-z][\w\-]*)
  | (?P<sigil>[$%@#&][\w{][\w{}.]*)
  | (?P<dotted>[\p{L}\p{N}_]+(?:(?:\.|::|->)[\p{L}\p{N}_]+)+)
  | (?P<run>[\p{L}\p{M}\p{N}_]+(?:['’][\p{L}\p{M}]+)*(?:(?<=[sS])['’](?![\p{L}\p{N}]))?)
  | (?P<end>[.!?]+(?=[\s"'’”)\]*_]|$))
    """,
    regex.VERBOSE,
)

_HAS_DIGIT = regex.compile(r"\p{N}")
_CAMEL = regex.compile(r"\p{Ll}\p{Lu}|\p{Lu}{2}\p{Ll}")


@dataclass(frozen=True, slots=True)
class Token:
    """A unit of text with its offsets in the document."""

    start: int
    end: int
    text: str
    kind: str
    sentence: int

    @property
    def norm(self) -> str:
        """The word as looked up: typographic apostrophes made plain."""
        return self.text.replace("’", "'")


def classify(run: str) -> str:
    """Decide whether a letter/digit run is a word, an acronym or technical."""
    if "_" in run or _HAS_DIGIT.search(run):
        return SKIP
    core = run.rstrip("'’")
    if core.endswith(("'s", "’s")):
        core = core[:-2]
    if len(core) >= 2 and core.isupper():
        return CAPS
    if _CAMEL.search(core):
        return SKIP
    return WORD


def tokenize(text: str, spans: Sequence[Span] | None = None) -> list[Token]:
    """Tokens of the prose spans of ``text`` (the whole text if no spans)."""
    if spans is None:
        spans = [Span(0, len(text))]
    tokens: list[Token] = []
    sentence = -1
    for span in spans:
        if span.breaks_before or sentence < 0:
            sentence += 1
        sentence = _tokenize_span(text, span.start, span.end, sentence, tokens)
    return tokens


def _tokenize_span(text: str, start: int, end: int, sentence: int, out: list[Token]) -> int:
    prev_word: str | None = None
    for m in _PATTERN.finditer(text, start, end):
        group = m.lastgroup
        s, e = m.span()
        if group == "end":
            if m.group() == "." and prev_word is not None and prev_word.lower() in _ABBREVIATIONS:
                continue
            sentence += 1
            prev_word = None
            continue
        if group == "run":
            run = m.group()
            kind = classify(run)
            # A name called like a function, or glued to code punctuation.
            if kind != SKIP and (text.startswith("(", e) and e < end or _glued(text, s, e, start, end)):
                kind = SKIP
            out.append(Token(s, e, run, kind, sentence))
            prev_word = run
        else:
            dotted = m.group()
            if group == "dotted" and dotted.lower() in _ABBREVIATIONS:
                prev_word = dotted
            else:
                prev_word = None
            out.append(Token(s, e, dotted, SKIP, sentence))
    return sentence


def _glued(text: str, s: int, e: int, lo: int, hi: int) -> bool:
    """True when a run touches '=', '<', '>', '{', '}', '\\' or '|' (code, not prose)."""
    before = text[s - 1] if s > lo else ""
    after = text[e] if e < hi else ""
    return before in "=<{\\|" and before != "" or after in "=>}\\|" and after != ""


def sentences(tokens: Iterable[Token]) -> Iterator[list[Token]]:
    """Group consecutive tokens by sentence number."""
    current: list[Token] = []
    number = None
    for tok in tokens:
        if tok.sentence != number and current:
            yield current
            current = []
        number = tok.sentence
        current.append(tok)
    if current:
        yield current


BOS = "<s>"
EOS = "</s>"
UNK = "<unk>"
CODE = "<code>"  # the language-model unit for inline code
# What stands for inline code in text: the corpus recipe writes it where a page
# had inline code, and the checker's placeholder tokens carry it as their text.
CODE_MARK = "_code_"


def lm_units(sentence: Sequence[Token]) -> list[str]:
    """The language-model view of one sentence: lower-cased words, <code> for inline code,
    <unk> for other technical material."""
    return [t.norm.lower() if t.kind != SKIP else CODE if t.text == CODE_MARK else UNK for t in sentence]

"""Tokens to score: the prose tokens, plus a placeholder where inline code stood.

The training corpus replaces inline code with ``_code_``
(``models/recipe/html_prose.py``), a unit of its own in the language model,
so it learnt "set <code> and" rather than "set and".  Extractors cut inline code out of a
paragraph's spans, and without a placeholder the words on either side became
each other's bigram context ("for and" -> "an"): a real-word false alarm.
Here a SKIP token whose text is ``CODE_MARK`` goes back into such a gap when
the words around it belong to one sentence (its offsets cover the code); a
visible URL's gap gets a SKIP token with the URL's text, the ``<unk>`` the
corpus has for URLs.  Gaps left by plain markup (emphasis, link destinations,
escapes) get nothing: the rendered text the model learnt from has none.
"""

from __future__ import annotations

from typing import Sequence

import regex

from calami.text.spans import Span
from calami.text.tokens import CODE_MARK, SKIP, Token, tokenize

# What marks a gap as code: text between a pair of backticks (a Markdown code
# span, a reST literal or code role; a lone backtick is the edge of a reST link
# or text role), an inline code element, or a URL the reader sees (not a link
# destination "(url)" or a reST target "<url>").
_CODE_GAP = regex.compile(r"`[^`\s][^`]*`|<(?:code|kbd|samp|tt|var)\b|(?<![(<])(?:\b[A-Za-z][A-Za-z0-9+.\-]*://|\bwww\.)",
                          regex.IGNORECASE)
# Code proper (not a URL): the placeholder is the language model's <code> unit;
# a URL gap keeps its own text, which the tokenizer makes <unk> as in training.
_CODE_ONLY = regex.compile(r"`[^`\s][^`]*`|<(?:code|kbd|samp|tt|var)\b", regex.IGNORECASE)


def scoring_tokens(text: str, spans: Sequence[Span] | None = None) -> list[Token]:
    """``tokenize(text, spans)`` with a code placeholder in each inline-code gap inside a sentence."""
    tokens = tokenize(text, spans)
    if not spans or len(spans) < 2 or not tokens:
        return tokens
    search = _CODE_GAP.search
    gaps = [
        (a.end, b.start, CODE_MARK if _CODE_ONLY.search(text, a.end, b.start) else text[a.end:b.start])
        for a, b in zip(spans, spans[1:])
        if not b.breaks_before and b.start > a.end and search(text, a.end, b.start)
    ]
    if not gaps:
        return tokens
    out: list[Token] = []
    g = 0
    n = len(gaps)
    for tok in tokens:
        while g < n and gaps[g][1] <= tok.start:
            start, end, mark = gaps[g]
            if out and out[-1].sentence == tok.sentence and out[-1].end <= start:
                out.append(Token(start, end, mark, SKIP, tok.sentence))
            g += 1
        out.append(tok)
    return out

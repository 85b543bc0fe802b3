"""Sound keys: candidates for words spelled by ear, beyond two edits.

Many real misspellings ("vaccuum", "rythm", "sychology") are further than two
edits from the intended word but sound the same.  A sound key folds English
spellings that usually sound alike (ph/f, ck/k, soft c/s, x/ks, silent
initial k/w/p ...), keeps the first letter class and the consonant skeleton,
and collapses doubled letters.  It is deliberately coarse: it only proposes
candidates; the error model and the language model rank them.
"""

from __future__ import annotations

import regex

_RULES: list[tuple[regex.Pattern[str], str]] = [
    (regex.compile(p), r)
    for p, r in [
        (r"^kn", "n"), (r"^gn", "n"), (r"^pn", "n"), (r"^wr", "r"), (r"^ps", "s"), (r"^x", "s"),
        (r"^wh", "w"), (r"^rh", "r"), (r"tch", "ch"), (r"sch", "sk"), (r"ph", "f"), (r"gh(?=[^aeiouy]|$)", ""),
        (r"ck", "k"), (r"qu", "kw"), (r"q", "k"), (r"x", "ks"), (r"dg(?=[eiy])", "j"),
        (r"sh", "x"), (r"ch", "x"), (r"c(?=[eiy])", "s"), (r"c", "k"), (r"z", "s"), (r"th", "0"),
        (r"(?<=[aeiou])y", ""), (r"mb$", "m"), (r"v", "f"), (r"'", ""),
    ]
]
_VOWELS = set("aeiouy")


def sound_key(word: str) -> str:
    """A coarse pronunciation key (lower-case ASCII words; others pass through folded)."""
    w = word.lower()
    for pattern, repl in _RULES:
        w = pattern.sub(repl, w)
    if not w:
        return ""
    out = ["A" if w[0] in _VOWELS else w[0]]
    prev = w[0]
    for ch in w[1:]:
        if ch in _VOWELS:
            prev = ch
            continue
        if ch != prev:
            out.append(ch)
        prev = ch
    return "".join(out)

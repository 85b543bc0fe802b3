"""Words that writers confuse although both are spelled right.

Two sources, kept apart so benchmarks can report them separately:

* ``PUBLISHED_SETS``: the confusion sets used by Golding & Roth (1999,
  "A Winnow-based approach to context-sensitive spelling correction",
  Machine Learning 34), which took them from Golding (1995).  Listed from
  memory; the sets about grammar or word choice rather than spelling
  (among/between, amount/number, fewer/less, I/me, maybe/may be) are left
  out because a spelling tool should not rule on them.
* ``SLIPS``: frequent one- or two-keystroke slips between common words
  (common practice in real-word error work; our own selection).
"""

from __future__ import annotations

PUBLISHED_SETS: list[tuple[str, ...]] = [
    ("accept", "except"),
    ("affect", "effect"),
    ("begin", "being"),
    ("cite", "sight", "site"),
    ("country", "county"),
    ("its", "it's"),
    ("lead", "led"),
    ("passed", "past"),
    ("peace", "piece"),
    ("principal", "principle"),
    ("quiet", "quite"),
    ("raise", "rise"),
    ("than", "then"),
    ("their", "there", "they're"),
    ("weather", "whether"),
    ("your", "you're"),
]

SLIPS: list[tuple[str, ...]] = [
    ("form", "from"),
    ("of", "or"),
    ("on", "one"),
    ("were", "where"),
    ("lose", "loose"),
    ("to", "too"),
    ("now", "know"),
    ("an", "and"),
    ("the", "then"),
    ("though", "through", "thorough"),
    ("advice", "advise"),
    ("breath", "breathe"),
    ("desert", "dessert"),
    ("discreet", "discrete"),
    ("complement", "compliment"),
    ("stationary", "stationery"),
    ("personal", "personnel"),
    ("dose", "does"),
    ("wether", "whether"),
    ("whole", "hole"),
    ("which", "witch"),
    ("week", "weak"),
    ("hear", "here"),
    ("write", "right"),
    ("whose", "who's"),
    ("by", "buy"),
    ("no", "not"),
    ("it", "is"),
    ("in", "is"),
    ("at", "as"),
    ("if", "of"),
]


def confusion_pairs() -> set[tuple[str, str]]:
    """Every ordered pair (typed, intended) from both lists."""
    pairs = set()
    for group in PUBLISHED_SETS + SLIPS:
        for a in group:
            for b in group:
                if a != b:
                    pairs.add((a, b))
    return pairs

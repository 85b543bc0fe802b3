"""``calami suggest``: ranked corrections for words read from stdin.

Input, one item per line: ``WORD`` or ``LEFT<TAB>WORD<TAB>RIGHT`` (the text
around the word on its line).  Output: one JSON object per line,
``{"word": ..., "known": ..., "suggestions": [{"text": ..., "probability": ...}, ...]}``
best first.  ``known`` says whether the word as typed is a word of the
vocabulary in the chosen variant (so a ranked list is not read as "this is
wrong").  Probabilities are rounded to six places; an alternative that
rounds to 0 says nothing and is left out.
"""

from __future__ import annotations

import argparse
import json
import sys

PLACES = 6  # decimal places of the probabilities written


def register(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("suggest", help="rank corrections for words read from standard input")
    p.add_argument("--limit", type=int, default=5, help="suggestions per word (default 5)")
    p.add_argument("--variant", choices=["any", "en-US", "en-GB"], default="any")
    p.add_argument("--model", help="model file (default: the shipped model)")
    p.set_defaults(run=run)


def parse_item(line: str) -> tuple[str, str, str] | None:
    """(left, word, right) from one input line, or None for a blank/malformed line."""
    line = line.rstrip("\r\n")
    parts = line.split("\t")
    if len(parts) == 1:
        word = parts[0].strip()
        return ("", word, "") if word else None
    if len(parts) == 3 and parts[1].strip():
        return parts[0], parts[1].strip(), parts[2]
    return None


def _variant_of(lexicon, key_id: int | None, text: str) -> bool:
    other = lexicon.ids.get(text.lower())
    return key_id is not None and other is not None and lexicon.variant_pair(key_id, other)


def run(args: argparse.Namespace) -> int:
    from calami.checker import Checker
    from calami.errors import CalamiError
    from calami.model import load

    if args.limit < 1:
        raise CalamiError("--limit must be at least 1")
    checker = Checker(load(args.model), variant=args.variant, max_suggestions=args.limit)
    lexicon = checker.model.lexicon
    out = sys.stdout
    status = 0
    for number, line in enumerate(sys.stdin, 1):
        item = parse_item(line)
        if item is None:
            if line.strip():
                print(f"calami: line {number}: expected WORD or LEFT<TAB>WORD<TAB>RIGHT", file=sys.stderr)
                status = 2
            continue
        left, word, right = item
        ranked = checker.suggest(word, left, right, limit=args.limit)
        look = lexicon.lookup(word, args.variant)
        if look.accepted:  # the other variant's spelling is not a fix for a right word
            ranked = [s for s in ranked if not _variant_of(lexicon, look.key_id, s.text)]
        shown = [{"text": s.text, "probability": p} for s in ranked if (p := round(s.probability, PLACES)) > 0]
        record = {"word": word, "known": look.accepted, "suggestions": shown}
        out.write(json.dumps(record, ensure_ascii=False) + "\n")
    out.flush()
    return status

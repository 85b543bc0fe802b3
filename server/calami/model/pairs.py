"""Misspelling/correction pairs: reading them and the train/dev split.

The split is by *correction* word (a stable hash), so the dev set never
contains a word the error model saw being misspelled; that is the same
way the upstream sets were divided.
"""

from __future__ import annotations

import zlib
from pathlib import Path

DEV_SHARE = 5  # one correction word in five goes to the dev set


def read_pairs(path: Path) -> list[tuple[str, str]]:
    """``misspelling<TAB>correction`` lines; malformed lines are skipped."""
    pairs = []
    with open(path, encoding="utf-8") as fh:
        for line in fh:
            parts = line.rstrip("\n").split("\t")
            if len(parts) == 2 and parts[0] and parts[1] and parts[0] != parts[1]:
                pairs.append((parts[0], parts[1]))
    return pairs


def is_dev(correction: str) -> bool:
    return zlib.crc32(correction.lower().encode("utf-8")) % DEV_SHARE == 0


def split(pairs: list[tuple[str, str]]) -> tuple[list[tuple[str, str]], list[tuple[str, str]]]:
    """(train, dev)."""
    train = [p for p in pairs if not is_dev(p[1])]
    dev = [p for p in pairs if is_dev(p[1])]
    return train, dev

#!/usr/bin/env python3
"""Merge corpus folders built by separate extraction runs into one, as one run would have.

    python models/recipe/merge_corpus.py --out build/corpus-all build/corpus build/corpus-new ...

Extraction can run as several processes at once (``extract_corpus.py --only``
into different folders) to use a shared machine's cores.  This merge walks
the sources in the order of ``sources.py``, takes each from the last folder
that has it (a later run redoes a source), drops paragraphs already seen in
an earlier source (the cross-run deduplication one run does), unites the dev
files (a paragraph's split is a hash of its text, so every run agrees on it)
and writes one stats.json.
"""

from __future__ import annotations

import argparse
import json
import os
import sys

_HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, _HERE)
sys.path.insert(1, os.path.join(_HERE, "..", "..", "server"))

from extract_corpus import _write_stats, digest  # noqa: E402
from prose_filter import word_count  # noqa: E402
from sources import SOURCES  # noqa: E402


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--out", required=True)
    ap.add_argument("folders", nargs="+")
    args = ap.parse_args(argv)
    stats_by_folder = []
    for folder in args.folders:
        with open(os.path.join(folder, "stats.json"), encoding="utf-8") as fh:
            stats_by_folder.append((folder, json.load(fh)["sources"]))
    os.makedirs(args.out, exist_ok=True)
    seen: set[bytes] = set()
    dev_lines: list[str] = []
    for folder, _ in stats_by_folder:
        with open(os.path.join(folder, "dev-heldout.txt"), encoding="utf-8") as fh:
            for line in fh:
                key = digest(line.rstrip("\n"))
                if key not in seen:
                    seen.add(key)
                    dev_lines.append(line)
    stats: dict = {"sources": {}, "merged_from": args.folders}
    for source in SOURCES:
        found = [(folder, rows[source.name]) for folder, rows in stats_by_folder if source.name in rows]
        if not found:
            continue
        folder, row = found[-1]
        row = dict(row)
        dropped = dropped_words = 0
        with open(os.path.join(folder, f"{source.name}.txt"), encoding="utf-8") as src, \
                open(os.path.join(args.out, f"{source.name}.txt"), "w", encoding="utf-8") as dst:
            for line in src:
                key = digest(line.rstrip("\n"))
                if key in seen:
                    dropped += 1
                    dropped_words += word_count(line)
                    continue
                seen.add(key)
                dst.write(line)
        row["paragraphs"] -= dropped
        row["word_tokens"] -= dropped_words
        row["duplicates_dropped"] += dropped
        row["folder"] = folder
        stats["sources"][source.name] = row
        print(f"{source.name:16} from {folder}: {row['word_tokens']:>10} words ({dropped} duplicates dropped)")
    with open(os.path.join(args.out, "dev-heldout.txt"), "w", encoding="utf-8") as fh:
        fh.writelines(dev_lines)
    stats["dev_paragraphs"] = len(dev_lines)
    stats["dev_word_tokens"] = sum(word_count(line) for line in dev_lines)
    stats["word_tokens"] = sum(r["word_tokens"] for r in stats["sources"].values())
    stats["paragraphs"] = sum(r["paragraphs"] for r in stats["sources"].values())
    _write_stats(args.out, stats)
    print(f"total: {stats['paragraphs']} paragraphs, {stats['word_tokens']} word tokens; "
          f"dev {stats['dev_paragraphs']} paragraphs, {stats['dev_word_tokens']} word tokens")
    return 0


if __name__ == "__main__":
    sys.exit(main())

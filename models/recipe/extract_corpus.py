#!/usr/bin/env python3
"""Build the English training corpus from installed Debian documentation.

Writes <out>/<source>.txt (one prose paragraph a line, UTF-8),
<out>/dev-heldout.txt (about 2% of the paragraphs, chosen by a hash of their
text, for tuning; they are left out of the source files) and <out>/stats.json.

Paragraphs are deduplicated across all files and sources (first occurrence in
the fixed source/file order wins), so the output is the same on every run.

Usage: python models/recipe/extract_corpus.py [--out build/corpus] [--jobs 2] [--only NAME ...] [--resume]
Run models/recipe/install-sources.sh first.  ``--resume`` keeps the sources an
earlier run finished (stats.json is rewritten after every source) and goes on
with the rest; the output is the same as that of one uninterrupted run.
"""

from __future__ import annotations

import argparse
import gzip
import hashlib
import json
import multiprocessing
import os
import re
import subprocess
import sys
import time

_HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, _HERE)
# The tokenizer must be the checkout's own (training and checking cut text alike).
sys.path.insert(1, os.path.join(_HERE, "..", "..", "server"))

from data_prose import json_doc_paragraphs, wordnet_paragraphs  # noqa: E402
from html_prose import CODE, clean, paragraphs  # noqa: E402
from py_comments import source_paragraphs  # noqa: E402
from slash_comments import comment_paragraphs  # noqa: E402
from prose_filter import keep  # noqa: E402
from sources import SOURCES, Source  # noqa: E402

DEV_PER_MILLE = 20  # 2% of paragraphs go to dev-heldout.txt


def read_page(path: str) -> str:
    """Page text; undecodable bytes become U+FFFD rather than stopping the build."""
    opener = gzip.open if path.endswith(".gz") else open
    with opener(path, "rb") as fh:
        raw = fh.read()
    return raw.decode("utf-8", errors="replace")


def page_prose(job: tuple[str, str]) -> list[tuple[str, int]]:
    """Kept paragraphs of one page or source file with their word counts (runs in a worker)."""
    kind, path = job
    text = read_page(path)
    if kind == "html":
        found = paragraphs(text)
    elif kind == "wordnet":
        found = wordnet_paragraphs(text)
    elif kind == "json-doc":
        found = json_doc_paragraphs(text)
    elif kind == "py":
        found = [clean(markup_to_prose(p)) for p in source_paragraphs(text)]
    else:
        found = [clean(markup_to_prose(p)) for p in comment_paragraphs(text, generated=kind == "go-generated")]
    out = []
    for para in found:
        if "\ufffd" in para:
            continue
        kept = keep(para)
        if kept:
            out.append(kept)
    return out


_BACKTICKED = re.compile(r"``[^`]+``|`[^`]+`")
_EMPHASIS = re.compile(r"\*\*(?=\S)|(?<=\S)\*\*")


def markup_to_prose(text: str) -> str:
    """Comment and docstring markup: `code` (Markdown, reST) becomes CODE, **bold** plain."""
    return _EMPHASIS.sub("", _BACKTICKED.sub(CODE, text))


def digest(text: str) -> bytes:
    return hashlib.blake2b(text.encode("utf-8"), digest_size=16).digest()


def is_dev(key: bytes) -> bool:
    """Deterministic 2% split by paragraph text (independent of order and machine)."""
    return int.from_bytes(key[:8], "big") % 1000 < DEV_PER_MILLE


def package_version(package: str) -> str:
    try:
        return subprocess.run(
            ["dpkg-query", "-W", "-f=${Version}", package], capture_output=True, text=True, check=True
        ).stdout.strip()
    except (OSError, subprocess.CalledProcessError):
        return "not installed"


def _resume_state(out: str, sources: list[Source]) -> tuple[dict, set[bytes]]:
    """Stats of the sources an earlier run finished, in order, and the digests of their paragraphs.

    The dev file is cut back to its size after the last finished source, so a
    source interrupted half-way is redone from its start.
    """
    path = os.path.join(out, "stats.json")
    with open(path, encoding="utf-8") as fh:
        old = json.load(fh)
    stats: dict = {"sources": {}, "dev_paragraphs": 0, "dev_word_tokens": 0, "dev_bytes": 0}
    for source in sources:
        row = old.get("sources", {}).get(source.name)
        if row is None or "dev_bytes_after" not in row:
            break
        stats["sources"][source.name] = row
    done = list(stats["sources"].values())
    if done:
        stats["dev_bytes"] = done[-1]["dev_bytes_after"]
        stats["dev_paragraphs"] = sum(r["dev_paragraphs"] for r in done)
        stats["dev_word_tokens"] = sum(r.get("dev_word_tokens", 0) for r in done)
    dev_path = os.path.join(out, "dev-heldout.txt")
    with open(dev_path, "r+b") as fh:
        fh.truncate(stats["dev_bytes"])
    seen: set[bytes] = set()
    for name in [*stats["sources"], "dev-heldout"]:
        with open(os.path.join(out, f"{name}.txt"), encoding="utf-8") as fh:
            for line in fh:
                seen.add(digest(line.rstrip("\n")))
    return stats, seen


def build(sources: list[Source], out: str, jobs: int, resume: bool = False) -> dict:
    os.makedirs(out, exist_ok=True)
    seen: set[bytes] = set()
    stats: dict = {"sources": {}, "dev_paragraphs": 0, "dev_word_tokens": 0, "dev_bytes": 0}
    if resume and os.path.exists(os.path.join(out, "stats.json")):
        stats, seen = _resume_state(out, sources)
        print(f"resuming after {len(stats['sources'])} finished sources", flush=True)
    started = time.monotonic()
    mode = "a" if stats["sources"] else "w"
    with multiprocessing.Pool(jobs) as pool, open(os.path.join(out, "dev-heldout.txt"), mode, encoding="utf-8") as dev:
        for source in sources:
            if source.name in stats["sources"]:
                continue
            t0 = time.monotonic()
            files = list(source.files())
            if not files:
                raise SystemExit(f"error: no pages for {source.name} ({source.package} not installed?)")
            row = {
                "package": source.package,
                "version": package_version(source.package),
                "licence": source.licence,
                "files": len(files),
                "paragraphs": 0,
                "word_tokens": 0,
                "duplicates_dropped": 0,
                "dev_paragraphs": 0,
                "dev_word_tokens": 0,
            }
            with open(os.path.join(out, f"{source.name}.txt"), "w", encoding="utf-8") as fh:
                for kept in pool.imap(page_prose, [(source.kind, f) for f in files], chunksize=4):
                    for text, words in kept:
                        key = digest(text)
                        if key in seen:
                            row["duplicates_dropped"] += 1
                            continue
                        seen.add(key)
                        if is_dev(key):
                            dev.write(text + "\n")
                            row["dev_paragraphs"] += 1
                            stats["dev_paragraphs"] += 1
                            stats["dev_word_tokens"] += words
                            row["dev_word_tokens"] += words
                            continue
                        fh.write(text + "\n")
                        row["paragraphs"] += 1
                        row["word_tokens"] += words
            row["seconds"] = round(time.monotonic() - t0, 1)
            dev.flush()
            row["dev_bytes_after"] = dev.tell()
            stats["sources"][source.name] = row
            _write_stats(out, stats)
            print(f"{source.name:14} {row['files']:6} files {row['paragraphs']:8} paragraphs "
                  f"{row['word_tokens']:10} words  {row['seconds']:6.1f}s", flush=True)
    stats["word_tokens"] = sum(r["word_tokens"] for r in stats["sources"].values())
    stats["paragraphs"] = sum(r["paragraphs"] for r in stats["sources"].values())
    stats["seconds"] = round(time.monotonic() - started, 1)
    stats["jobs"] = jobs
    return stats


def _write_stats(out: str, stats: dict) -> None:
    tmp = os.path.join(out, "stats.json.tmp")
    with open(tmp, "w", encoding="utf-8") as fh:
        json.dump(stats, fh, indent=1, sort_keys=True)
        fh.write("\n")
    os.replace(tmp, os.path.join(out, "stats.json"))


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    here = os.path.dirname(os.path.abspath(__file__))
    parser.add_argument("--out", default=os.path.join(here, "..", "..", "build", "corpus"))
    parser.add_argument("--jobs", type=int, default=os.cpu_count() or 1)
    parser.add_argument("--only", nargs="*", help="build only these sources (for debugging)")
    parser.add_argument("--resume", action="store_true", help="keep the sources a previous run finished")
    args = parser.parse_args(argv)
    sources = [s for s in SOURCES if not args.only or s.name in args.only]
    if args.only and len(sources) != len(args.only):
        known = ", ".join(s.name for s in SOURCES)
        raise SystemExit(f"error: unknown source in {args.only}; known: {known}")
    out = os.path.normpath(args.out)
    stats = build(sources, out, max(1, args.jobs), resume=args.resume)
    _write_stats(out, stats)
    print(f"total: {stats['paragraphs']} paragraphs, {stats['word_tokens']} word tokens, "
          f"dev {stats['dev_paragraphs']} paragraphs; {stats['seconds']}s with {stats['jobs']} jobs")
    return 0


if __name__ == "__main__":
    sys.exit(main())

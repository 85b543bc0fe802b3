"""Throughput of ``calami check`` on a ~50,000-word Markdown corpus.

    /work/venv/bin/python tests/benchmarks/bench_check.py [--words 50000] [--model FILE]

The corpus is real, varied Markdown already on the machine: the ``*.md``
files under /usr/share/doc (Debian packages' READMEs and notes), then the
Markdown long descriptions in installed Python packages' METADATA, copied
into build/bench-corpus/ until the prose holds the requested number of
words.  Distinct documents matter: the checker caches per sentence, so a
repeated text would measure the cache, not the checker.

Printed figures:
* in-process, one core: words/second for read + extract + check of every
  document, the model already loaded (what the target speaks about);
* the command itself with ``--jobs 1`` and ``--jobs 2``: wall time minus
  the time of the same command on an empty file (start-up and model load),
  and the jobs-2 speed-up.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import time
from email.parser import Parser
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
CORPUS = REPO / "build" / "bench-corpus"


def _prose_words(text: str, kind: str = "markdown") -> int:
    from calami.text.formats import extract
    from calami.text.tokens import SKIP, tokenize

    return sum(1 for t in tokenize(text, extract(text, kind)) if t.kind != SKIP)


def _sources():
    for path in sorted(Path("/usr/share/doc").rglob("*.md")):
        try:
            if path.is_file() and path.stat().st_size < 400_000:
                yield path.as_posix().replace("/", "_").strip("_"), path.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError):
            continue
    import importlib.metadata as md

    for dist in sorted(md.distributions(), key=lambda d: d.metadata["Name"] or ""):
        meta = dist.read_text("METADATA") or ""
        message = Parser().parsestr(meta)
        if "markdown" in (message.get("Description-Content-Type") or ""):
            yield f"pypi_{message['Name']}.md", message.get_payload()


def build_corpus(target_words: int) -> tuple[list[Path], int]:
    """Write distinct documents into build/bench-corpus until they hold ``target_words`` prose words."""
    CORPUS.mkdir(parents=True, exist_ok=True)
    for old in CORPUS.glob("*.md"):
        old.unlink()
    files, total, seen = [], 0, set()
    for name, text in _sources():
        if total >= target_words:
            break
        digest = hash(text)
        if digest in seen or not text.strip():
            continue
        seen.add(digest)
        words = _prose_words(text)
        if words < 50:
            continue
        path = CORPUS / (name if name.endswith(".md") else name + ".md")
        path.write_text(text, encoding="utf-8")
        files.append(path)
        total += words
    return files, total


def in_process(files: list[Path], model_path: str | None) -> tuple[float, float, int]:
    from calami.commands.check import Task, Worker, default_checker_factory

    started = time.perf_counter()
    factory = default_checker_factory(model_path)
    load_time = time.perf_counter() - started
    worker = Worker(factory, None, None)
    started = time.perf_counter()
    findings = 0
    for path in files:
        result = worker.run(Task(path.name, str(path), str(CORPUS), "markdown").pack())
        findings += len(result["findings"])
    return load_time, time.perf_counter() - started, findings


def command(paths: list[str], jobs: int, model_path: str | None) -> float:
    argv = [sys.executable, "-m", "calami", "check", "--format", "json", "--jobs", str(jobs), *paths]
    if model_path:
        argv[4:4] = ["--model", model_path]
    started = time.perf_counter()
    done = subprocess.run(argv, cwd=CORPUS, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    elapsed = time.perf_counter() - started
    if done.returncode not in (0, 1):
        raise SystemExit(f"calami check failed ({done.returncode}): {done.stderr.strip()}")
    return elapsed


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--words", type=int, default=50_000)
    parser.add_argument("--model")
    args = parser.parse_args()

    files, words = build_corpus(args.words)
    print(f"corpus: {len(files)} Markdown files, {words:,} prose words, {sum(p.stat().st_size for p in files):,} bytes")
    load_time, check_time, findings = in_process(files, args.model)
    print(f"model load: {load_time:.2f} s")
    print(f"in-process, 1 core: {check_time:.2f} s -> {words / check_time:,.0f} words/s ({findings} findings)")

    empty = CORPUS / "empty.txt"
    empty.write_text("")
    base = min(command(["empty.txt"], 1, args.model) for _ in range(2))
    names = [p.name for p in files]
    one = command(names, 1, args.model) - base
    two = command(names, 2, args.model) - base
    empty.unlink()
    print(f"command start-up + model load: {base:.2f} s (subtracted below)")
    print(f"calami check --jobs 1: {one:.2f} s -> {words / one:,.0f} words/s")
    print(f"calami check --jobs 2: {two:.2f} s -> {words / two:,.0f} words/s (speed-up {one / two:.2f}x on {os.cpu_count()} cores)")


if __name__ == "__main__":
    main()

"""Throughput of ``calami check``: per document kind on real trees, and on a Markdown corpus.

    .venv/bin/python tests/benchmarks/bench_check.py [--per-kind 20000] [--baseline REV] [--words 50000] [--model FILE]

Real trees of mixed kinds (what a new user points the command at): the
source distributions the false-alarm benchmark caches in
build/false-alarm-sdists/ (Markdown, reStructuredText, Python, C, HTML,
YAML, TOML, shell... as their authors wrote them; fetched with pip by
bench_false_alarms.py), unpacked into build/bench-trees/, and the Python
standard library's sources on this machine (comments and docstrings).
Files are found as the command finds them (``commands.check.plan``);
tests and fixtures are left out; per kind, files are taken in path order
until they hold ``--per-kind`` prose words.  Printed: words per
CPU-second per kind (in-process, one core, model loaded; CPU time, so
other work on the machine counts little), overall, and the command itself with
``--jobs 1`` and ``--jobs 2`` on the same files.  ``--baseline REV`` runs
another commit (a ``git worktree`` under build/) in the same run, taking
turns with this one, and prints the ratios.

Then the Markdown corpus:

The corpus is real, varied Markdown already on the machine: the ``*.md``
files under /usr/share/doc (Debian packages' READMEs and notes), then the
Markdown long descriptions in installed Python packages' METADATA, copied
into build/bench-corpus/ until the prose holds the requested number of
words.  Distinct documents matter: the checker caches per sentence, so a
repeated text would measure the cache, not the checker.

Printed figures for it:
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

HERE = Path(__file__).resolve().parent
REPO = HERE.parents[1]
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


# ------------------------------------------------------------ real trees

SDISTS = REPO / "build" / "false-alarm-sdists"
TREES = REPO / "build" / "bench-trees"
_SKIP_PARTS = {"test", "tests", "testing", "fixtures", "fixture", "idlelib", "site-packages"}


def unpack_trees() -> list[Path]:
    """The cached sdists and a copy of the stdlib sources, each made a tree of its own once.

    Both land under build/ (ignored by our .gitignore, as the stdlib may be by
    the tree it is installed in), so each gets a ``.git`` marker: the command
    then treats it as the root of a project, as in a checkout of it.
    """
    import shutil
    import sysconfig
    import tarfile
    import zipfile

    roots = []
    if not SDISTS.is_dir() or not any(SDISTS.iterdir()):
        print(f"note: no sdists in {SDISTS.relative_to(REPO)} (bench_false_alarms.py downloads them): the stdlib only")
    for archive in sorted(SDISTS.glob("*")) if SDISTS.is_dir() else []:
        stem = archive.name.removesuffix(".tar.gz").removesuffix(".zip")
        target = TREES / stem
        if not (target / ".git").is_dir():
            shutil.rmtree(target, ignore_errors=True)
            target.mkdir(parents=True)
            if archive.name.endswith(".zip"):
                with zipfile.ZipFile(archive) as z:
                    z.extractall(target)
            else:
                with tarfile.open(archive) as t:
                    t.extractall(target, filter="data")
            (target / ".git").mkdir()
        roots.append(target)
    stdlib = TREES / "python-stdlib"
    if not (stdlib / ".git").is_dir():
        shutil.rmtree(stdlib, ignore_errors=True)
        shutil.copytree(sysconfig.get_paths()["stdlib"], stdlib, symlinks=True,
                        ignore=shutil.ignore_patterns("__pycache__", "site-packages", "test", "tests", "idlelib", "*.pyc"))
        (stdlib / ".git").mkdir()
    roots.append(stdlib)
    return roots


def real_files(per_kind: int) -> dict[str, list[tuple[str, str, int]]]:
    """kind -> [(file, project root, prose words)] in path order, ``per_kind`` words each at most."""
    from calami.commands.check import plan

    work = plan([str(r) for r in unpack_trees()], None, lambda: "")
    chosen: dict[str, list[tuple[str, str, int]]] = {}
    totals: dict[str, int] = {}
    for task in sorted(work.tasks, key=lambda t: t.file or ""):
        if task.file is None or _SKIP_PARTS & set(Path(task.file).parts) or totals.get(task.kind or "", 0) >= per_kind:
            continue
        try:
            text = Path(task.file).read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError):
            continue
        if len(text) > 2 * 1024 * 1024:
            continue
        words = _prose_words(text, task.kind or "plain")
        if words < 20:
            continue
        chosen.setdefault(task.kind or "plain", []).append((task.file, task.root, words))
        totals[task.kind or "plain"] = totals.get(task.kind or "plain", 0) + words
    return chosen


def measure(listing: Path, model_path: str | None) -> None:
    """(child) Check the listed files in-process, one core; print seconds per kind as JSON."""
    import json

    from calami.commands.check import Task, Worker, default_checker_factory

    files = json.loads(listing.read_text())
    worker = Worker(default_checker_factory(model_path), None, None)
    seconds: dict[str, float] = {}
    for kind, entries in files.items():
        started = time.process_time()  # CPU time: other work on a shared machine does not count
        for file, root, _ in entries:
            worker.run(Task(file, file, root, kind).pack())
        seconds[kind] = time.process_time() - started
    print(json.dumps(seconds))


def _env(tree: Path) -> dict[str, str]:
    return dict(os.environ, PYTHONPATH=str(tree / "server"))


def baseline_tree(rev: str) -> Path:
    commit = subprocess.run(["git", "rev-parse", "--short", rev], cwd=REPO, capture_output=True, text=True, check=True).stdout.strip()
    tree = REPO / "build" / f"bench-baseline-{commit}"
    if not (tree / "server" / "calami").is_dir():
        subprocess.run(["git", "worktree", "add", "--detach", str(tree), commit], cwd=REPO, check=True, stdout=subprocess.DEVNULL)
    return tree


def bench_real_trees(per_kind: int, model_path: str | None, baseline: str | None, rounds: int) -> None:
    import json

    files = real_files(per_kind)
    listing = REPO / "build" / "bench-trees-files.json"
    listing.write_text(json.dumps(files))
    words = {kind: sum(w for _, _, w in entries) for kind, entries in files.items()}
    total = sum(words.values())
    print(f"real trees: {len(files)} kinds, {sum(len(e) for e in files.values())} files, {total:,} prose words "
          f"(sdists in {SDISTS.relative_to(REPO)} and the stdlib; tests left out)")
    builds = [("this", REPO)] + ([(baseline, baseline_tree(baseline))] if baseline else [])
    best: dict[str, dict[str, float]] = {label: {} for label, _ in builds}
    for _ in range(rounds):
        for label, tree in builds:  # take turns, so load from elsewhere falls on both alike
            argv = [sys.executable, str(HERE / "bench_check.py"), "--measure", str(listing)]
            if model_path:
                argv += ["--model", model_path]
            done = subprocess.run(argv, env=_env(tree), capture_output=True, text=True, check=True)
            for kind, secs in json.loads(done.stdout.strip().splitlines()[-1]).items():
                best[label][kind] = min(secs, best[label].get(kind, float("inf")))
    head = f"{'kind':12s} {'files':>5s} {'words':>7s}" + "".join(f" {label + ' w/s':>12s}" for label, _ in builds)
    print(f"in-process, words per CPU-second (one core), model loaded (best of {rounds}):")
    print("  " + head + ("   ratio" if baseline else ""))
    for kind in sorted(files, key=lambda k: words[k] / best["this"][k]):
        rates = [words[kind] / best[label][kind] for label, _ in builds]
        row = f"{kind:12s} {len(files[kind]):5d} {words[kind]:7,d}" + "".join(f" {r:12,.0f}" for r in rates)
        print("  " + row + (f"   {rates[0] / rates[1]:5.2f}" if baseline else ""))
    rates = [total / sum(best[label].values()) for label, _ in builds]
    print("  " + f"{'all':12s} {sum(len(e) for e in files.values()):5d} {total:7,d}" + "".join(f" {r:12,.0f}" for r in rates)
          + (f"   {rates[0] / rates[1]:5.2f}" if baseline else ""))

    paths = [file for entries in files.values() for file, _, _ in entries]
    empty = REPO / "build" / "empty.txt"
    empty.write_text("")
    for label, tree in builds:
        env = _env(tree)
        base = min(_command([str(empty)], 1, model_path, env) for _ in range(2))
        one = _command(paths, 1, model_path, env) - base
        two = _command(paths, 2, model_path, env) - base
        print(f"{label}: calami check --jobs 1: {total / one:,.0f} words/s; --jobs 2: {total / two:,.0f} words/s "
              f"(speed-up {one / two:.2f}x on {os.cpu_count()} cores; start-up {base:.2f} s subtracted)")


def _command(paths: list[str], jobs: int, model_path: str | None, env: dict[str, str]) -> float:
    argv = [sys.executable, "-m", "calami", "check", "--format", "json", "--jobs", str(jobs), *paths]
    if model_path:
        argv[4:4] = ["--model", model_path]
    started = time.perf_counter()
    done = subprocess.run(argv, cwd=REPO / "build", env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    elapsed = time.perf_counter() - started
    if done.returncode not in (0, 1):
        raise SystemExit(f"calami check failed ({done.returncode}): {done.stderr.strip()[-500:]}")
    return elapsed


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--words", type=int, default=50_000, help="Markdown corpus size (0: skip it)")
    parser.add_argument("--per-kind", type=int, default=20_000, help="prose words per kind from the real trees (0: skip them)")
    parser.add_argument("--baseline", metavar="REV", help="also measure this commit, taking turns with this one")
    parser.add_argument("--rounds", type=int, default=2, help="in-process rounds per build (the best counts)")
    parser.add_argument("--model")
    parser.add_argument("--measure", type=Path, help=argparse.SUPPRESS)  # child process: time one file list
    args = parser.parse_args()
    if args.measure:
        measure(args.measure, args.model)
        return
    if args.per_kind:
        bench_real_trees(args.per_kind, args.model, args.baseline, args.rounds)
    if args.words:
        markdown_corpus(args.words, args.model)


def markdown_corpus(target_words: int, model_path: str | None) -> None:
    files, words = build_corpus(target_words)
    print(f"corpus: {len(files)} Markdown files, {words:,} prose words, {sum(p.stat().st_size for p in files):,} bytes")
    load_time, check_time, findings = in_process(files, model_path)
    print(f"model load: {load_time:.2f} s")
    print(f"in-process, 1 core: {check_time:.2f} s -> {words / check_time:,.0f} words/s ({findings} findings)")

    empty = CORPUS / "empty.txt"
    empty.write_text("")
    base = min(command(["empty.txt"], 1, model_path) for _ in range(2))
    names = [p.name for p in files]
    one = command(names, 1, model_path) - base
    two = command(names, 2, model_path) - base
    empty.unlink()
    print(f"command start-up + model load: {base:.2f} s (subtracted below)")
    print(f"calami check --jobs 1: {one:.2f} s -> {words / one:,.0f} words/s")
    print(f"calami check --jobs 2: {two:.2f} s -> {words / two:,.0f} words/s (speed-up {one / two:.2f}x on {os.cpu_count()} cores)")


if __name__ == "__main__":
    main()

"""``calami check --changed`` on a large generated repository: does it answer quickly for a small change?

    python tests/benchmarks/bench_changed.py [--commits 1000] [--files 5000] [--full]

Builds a throw-away repository with ``git fast-import`` (FILES Markdown
files, COMMITS commits, each later commit editing five files), branches off,
changes three lines in two files, and prints, side by side:

* the git part alone (``calami.gitdiff.changed_lines``),
* the whole command ``calami check --changed`` (a subprocess: start-up,
  model load, git, the workspace vocabulary learnt from every tracked file,
  checking the two files), median of five runs; and with ``--no-workspace``
  (nothing learnt),
* with ``--full``: ``calami check .`` over every file, for the ratio.

Target (issue 11): under 2 s for the whole command.  Prints figures only.
"""

from __future__ import annotations

import argparse
import os
import random
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(REPO / "server"))

from calami.gitdiff import changed_lines  # noqa: E402

WORDS = ("the planner reads each file and writes a schedule for every bed so that valves open "
         "in the cool part of the day when the soil is dry enough to need water").split()
ENV = {**os.environ, "GIT_AUTHOR_NAME": "bench", "GIT_AUTHOR_EMAIL": "bench@example.org",
       "GIT_COMMITTER_NAME": "bench", "GIT_COMMITTER_EMAIL": "bench@example.org"}


def paragraph(rng: random.Random, lines: int = 8) -> str:
    return "".join(" ".join(rng.choice(WORDS) for _ in range(10)).capitalize() + ".\n" for _ in range(lines))


def fast_import_stream(files: int, commits: int, rng: random.Random) -> bytes:
    """One commit adding every file, then commits each changing five of them."""
    out: list[bytes] = []
    stamp = 1_700_000_000

    def blob_line(path: str, content: str) -> None:
        data = content.encode("utf-8")
        out.append(f"M 644 inline {path}\ndata {len(data)}\n".encode() + data + b"\n")

    for number in range(commits):
        message = f"change {number}\n".encode()
        out.append(f"commit refs/heads/main\ncommitter bench <bench@example.org> {stamp + number} +0000\n"
                   f"data {len(message)}\n".encode() + message)
        if number:  # fast-import continues the branch from its last commit
            targets = rng.sample(range(files), 5)
        else:
            targets = range(files)
        for index in targets:
            blob_line(f"docs/part{index % 50:02d}/page{index:05d}.md", f"# Page {index}\n\n" + paragraph(rng))
    return b"".join(out)


def git(cwd: Path, *args: str, data: bytes | None = None) -> None:
    subprocess.run(["git", *args], cwd=cwd, input=data, check=True, capture_output=True, env=ENV)


def timed(argv: list[str], cwd: Path) -> tuple[float, int]:
    started = time.perf_counter()
    done = subprocess.run(argv, cwd=cwd, capture_output=True, env=ENV)
    return time.perf_counter() - started, done.returncode


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--commits", type=int, default=1000)
    parser.add_argument("--files", type=int, default=5000)
    parser.add_argument("--full", action="store_true", help="also time a check of every file")
    args = parser.parse_args()
    calami = str(Path(sys.executable).with_name("calami"))
    rng = random.Random(11)
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        started = time.perf_counter()
        git(root, "init", "-q", "-b", "main")
        git(root, "fast-import", "--quiet", data=fast_import_stream(args.files, args.commits, rng))
        git(root, "reset", "-q", "--hard", "main")
        built = time.perf_counter() - started
        count = subprocess.run(["git", "rev-list", "--count", "HEAD"], cwd=root, capture_output=True, text=True).stdout.strip()
        print(f"repository: {count} commits, {args.files} files, built in {built:.1f} s (git fast-import)")

        git(root, "checkout", "-q", "-b", "topic")
        for index, line in ((7, "A new line with a plain misteak in it.\n"), (4242, "Two more lines.\nAnd another.\n")):
            path = root / f"docs/part{index % 50:02d}/page{index:05d}.md"
            path.write_text(path.read_text(encoding="utf-8") + line, encoding="utf-8")
        git(root, "commit", "-q", "-am", "small change")

        runs = []
        for _ in range(5):
            t0 = time.perf_counter()
            changes = changed_lines(root, None, staged=False)
            runs.append(time.perf_counter() - t0)
        lines = sum(len(v or ()) for v in changes.lines.values())
        git_part = statistics.median(runs)
        print(f"git part (merge base + diff -U0 + untracked): {git_part * 1000:.0f} ms median; "
              f"{len(changes.lines)} files, {lines} changed lines")

        median = 0.0
        for label, extra in (("", []), (" --no-workspace", ["--no-workspace"])):
            whole = []
            for _ in range(5):
                seconds, code = timed([calami, "check", "--changed", *extra], root)
                whole.append(seconds)
            median = median or statistics.median(whole)
            print(f"calami check --changed{label} (whole command, model load included): {statistics.median(whole):.2f} s "
                  f"median of 5 (min {min(whole):.2f}, max {max(whole):.2f}; exit {code}); target < 2 s")
        if args.full:
            seconds, code = timed([calami, "check", "--jobs", "2", "."], root)
            print(f"calami check --jobs 2 . (every file): {seconds:.1f} s; --changed is {seconds / median:.0f}x faster")


if __name__ == "__main__":
    main()

"""How long learning a workspace's vocabulary takes, and what it holds.

    /work/venv/bin/python tests/benchmarks/bench_workspace_scan.py [--files 5000]

Builds (once) a repository of ``--files`` files under build/scan-bench/repo
from real text: Python modules of this interpreter's standard library and
the Markdown/reStructuredText docs of the false-alarm benchmark's sdists
(if unpacked in build/false-alarm-trees/), about nine source files to one
document.  Then, in a fresh process each time (so memory is the scan's
own), scans it as the language server does (``vocab.workspace_scan``) and
prints: files read, words of its own learnt, seconds, and the resident
memory before and after.  Three runs; the median time is the figure.
The server waits for its folder's scan at most ``lsp.vocabulary.FIRST_WAIT``
seconds before the first diagnostics, whatever the scan takes.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import sysconfig
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
WORK = REPO / "build" / "scan-bench"


def build_repo(files: int) -> Path:
    target = WORK / f"repo-{files}"
    if (target / ".done").exists():
        return target
    stdlib = Path(sysconfig.get_paths()["stdlib"])
    sources = sorted(p for p in stdlib.rglob("*.py") if "site-packages" not in p.parts and p.stat().st_size < 200_000)
    trees = REPO / "build" / "false-alarm-trees"
    docs = sorted(p for p in trees.rglob("*") if p.suffix in (".md", ".rst")) if trees.is_dir() else []
    want_docs = min(len(docs), files // 10)
    picked = [(p, "docs") for p in docs[:want_docs]] + [(p, "src") for p in sources[: files - want_docs]]
    i = 0
    while len(picked) < files:  # a larger --files than the sources: copies in further folders
        picked.append((sources[i % len(sources)], f"src{i // len(sources) + 2}"))
        i += 1
    (target / ".git").mkdir(parents=True, exist_ok=True)
    for n, (path, folder) in enumerate(picked):
        out = target / folder / f"{n // 200:03d}" / f"{n}_{path.name}"
        out.parent.mkdir(parents=True, exist_ok=True)
        out.write_bytes(path.read_bytes())
    (target / "pyproject.toml").write_text('[project]\nname = "scanbench"\ndependencies = ["zestful"]\n')
    (target / ".done").write_text("")
    return target


CHILD = """
import json, resource, sys, time
from calami.model import load
from calami.vocab.usage import WorkspaceVocabulary
from calami.vocab.workspace_scan import scan_tree
model = load()
model.candidates.wait()
before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
vocabulary = WorkspaceVocabulary(model.lexicon.ids.__contains__)
start = time.perf_counter()
report = scan_tree(vocabulary, [sys.argv[1]], deadline=time.monotonic() + 600)
seconds = time.perf_counter() - start
after = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
print(json.dumps({"files": report.files, "words": len(vocabulary), "seconds": seconds,
                  "rss_before_mb": before / 1024, "rss_after_mb": after / 1024}))
"""


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--files", type=int, default=5000)
    parser.add_argument("--runs", type=int, default=3)
    args = parser.parse_args()
    repo = build_repo(args.files)
    size = sum(p.stat().st_size for p in repo.rglob("*") if p.is_file())
    print(f"repository: {repo.relative_to(REPO)}: {args.files} files, {size / 1e6:.1f} MB")
    runs = []
    for _ in range(args.runs):
        out = subprocess.run([sys.executable, "-c", CHILD, str(repo)], check=True, capture_output=True, text=True,
                             env=dict(os.environ, PYTHONPATH=str(REPO / "server")))
        runs.append(json.loads(out.stdout.strip().splitlines()[-1]))
        r = runs[-1]
        print(f"  scanned {r['files']} files, learnt {r['words']:,} words of its own in {r['seconds']:.2f} s; "
              f"RSS {r['rss_before_mb']:.0f} MB with the model -> {r['rss_after_mb']:.0f} MB after the scan")
    times = sorted(r["seconds"] for r in runs)
    print(f"median {times[len(times) // 2]:.2f} s ({1000 * times[len(times) // 2] / max(1, runs[0]['files']):.2f} ms a file); "
          f"peak RSS {max(r['rss_after_mb'] for r in runs):.0f} MB")


if __name__ == "__main__":
    main()

"""False alarms on real technical documentation written by others.

    /work/venv/bin/python tests/benchmarks/bench_false_alarms.py [--model FILE] [--sample 40]

Only when run explicitly, this downloads (``pip download --no-deps
--no-binary :all:``) the source distributions of the packages in PACKAGES
into build/false-alarm-sdists/ (kept as a cache), reads every ``.md`` and
``.rst`` file they ship (tests and fixtures excepted), runs the checker on
their prose with default settings and no project lexicon, and prints:

* per package and overall: documents, prose words, findings, findings per
  1,000 prose words; also the rate without change logs (release notes are
  mostly names, issue numbers and terse fragments);
* a fixed-seed random sample of flagged words with their context line, for
  a person to judge which are true errors and which are false alarms.

The full list goes to build/false-alarms.json.  These documents are never
used for training: the model's build recipe does not read build/.
"""

from __future__ import annotations

import argparse
import json
import random
import re
import subprocess
import sys
import tarfile
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
CACHE = REPO / "build" / "false-alarm-sdists"
OUTPUT = REPO / "build" / "false-alarms.json"

# Popular packages whose sdists ship Markdown or reStructuredText docs
# (versions pinned so the figures can be reproduced).  None of them is among
# the model's training sources (models/recipe/sources.py); main() checks.
PACKAGES = [
    ("black", "26.10.1"),
    ("coverage", "7.17.3"),
    ("httpx", "0.28.1"),
    ("marshmallow", "4.4.0"),
    ("more-itertools", "11.2.1"),
    ("packaging", "26.3"),
    ("pluggy", "1.7.0"),
    ("rich", "15.0.0"),
    ("structlog", "26.1.0"),
    ("tox", "4.67.13"),
    ("trio", "0.35.0"),
    ("urllib3", "2.8.0"),
]
_CHANGELOG = re.compile(r"(change|history|news|release|changelog)", re.IGNORECASE)
_SKIP_DIRS = re.compile(r"/(tests?|testing|fixtures?)/")


def _cached(name: str, version: str) -> Path | None:
    wanted = f"{name}-{version}".replace("-", "_").lower()
    for path in CACHE.iterdir():
        stem = re.sub(r"\.(tar\.gz|zip)$", "", path.name).replace("-", "_").lower()
        if stem == wanted:
            return path
    return None


def _sdist(name: str, version: str) -> Path:
    """The cached sdist, downloaded with pip on first use."""
    CACHE.mkdir(parents=True, exist_ok=True)
    found = _cached(name, version)
    if found is None:
        subprocess.run(
            [sys.executable, "-m", "pip", "download", "--quiet", "--no-deps", "--no-binary", ":all:",
             "-d", str(CACHE), f"{name}=={version}"],
            check=True,
        )
        found = _cached(name, version)
    if found is None:
        raise SystemExit(f"pip did not leave an sdist of {name} {version} in {CACHE}")
    return found


def _documents(archive: Path):
    """(member name, kind, text) of the prose documents inside an sdist."""
    if archive.suffix == ".zip":
        raise SystemExit(f"{archive}: zip sdists are not handled")
    with tarfile.open(archive) as tar:
        for member in sorted(tar.getmembers(), key=lambda m: m.name):
            name = member.name
            if not member.isfile() or _SKIP_DIRS.search("/" + name):
                continue
            kind = "markdown" if name.endswith(".md") else "rst" if name.endswith(".rst") else None
            if kind is None:
                continue
            data = tar.extractfile(member).read()
            try:
                yield name, kind, data.decode("utf-8-sig")
            except UnicodeDecodeError:
                continue


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--model")
    parser.add_argument("--sample", type=int, default=40)
    args = parser.parse_args()

    trained = set(re.findall(r'Source\("([^"]+)"', (REPO / "models" / "recipe" / "sources.py").read_text()))
    overlap = trained & {name for name, _ in PACKAGES}
    if overlap:
        raise SystemExit(f"these packages' docs are training sources, not a fair test: {sorted(overlap)}")

    from calami.commands.check import check_document, default_checker_factory
    from calami.report import locate
    from calami.text.formats import extract
    from calami.text.tokens import SKIP, tokenize
    from calami.vocab.project import Project

    make_checker = default_checker_factory(args.model)
    neutral = REPO / "build" / "false-alarm-root"  # no config, no word list
    neutral.mkdir(parents=True, exist_ok=True)
    project = Project(neutral)
    checker = make_checker(project, None)

    flagged: list[dict] = []
    totals = {"docs": 0, "words": 0, "findings": 0, "words_nochangelog": 0, "findings_nochangelog": 0}
    print(f"{'package':<22} {'docs':>5} {'words':>8} {'found':>6} {'per 1k':>7}")
    for name, version in PACKAGES:
        archive = _sdist(name, version)
        docs = words = found = 0
        for member, kind, text in _documents(archive):
            spans = extract(text, kind)
            count = sum(1 for t in tokenize(text, spans) if t.kind != SKIP)
            findings, _ = check_document(text, kind, project, checker)
            changelog = bool(_CHANGELOG.search(Path(member).name))
            docs += 1
            words += count
            found += len(findings)
            if not changelog:
                totals["words_nochangelog"] += count
                totals["findings_nochangelog"] += len(findings)
            for item in locate(member, text, findings):
                flagged.append({
                    "package": f"{name}-{version}", "path": member, "line": item.line, "word": item.finding.word,
                    "kind": item.finding.kind, "confidence": round(item.finding.confidence, 3),
                    "best": item.finding.best, "context": item.context.strip()[:160], "changelog": changelog,
                })
        totals["docs"] += docs
        totals["words"] += words
        totals["findings"] += found
        rate = 1000 * found / words if words else 0.0
        print(f"{name + '-' + version:<22} {docs:>5} {words:>8,} {found:>6} {rate:>7.2f}")

    rate = 1000 * totals["findings"] / max(1, totals["words"])
    rate_nc = 1000 * totals["findings_nochangelog"] / max(1, totals["words_nochangelog"])
    print(f"{'ALL':<22} {totals['docs']:>5} {totals['words']:>8,} {totals['findings']:>6} {rate:>7.2f}")
    print(f"without change logs: {totals['findings_nochangelog']} findings in {totals['words_nochangelog']:,} words "
          f"= {rate_nc:.2f} per 1,000")
    kinds = {k: sum(1 for f in flagged if f["kind"] == k) for k in ("nonword", "realword")}
    print(f"by kind: {kinds}")

    OUTPUT.write_text(json.dumps(flagged, indent=1, ensure_ascii=False), encoding="utf-8")
    print(f"\nsample of {min(args.sample, len(flagged))} flagged words (all {len(flagged)} in {OUTPUT.relative_to(REPO)}):")
    for item in sorted(random.Random(1990).sample(flagged, min(args.sample, len(flagged))),
                       key=lambda f: (f["package"], f["path"], f["line"])):
        print(f"  {item['package']}/{item['path']}:{item['line']}: {item['word']!r} -> {item['best']!r} "
              f"[{item['kind']} {item['confidence']}]  | {item['context'][:100]}")


if __name__ == "__main__":
    main()

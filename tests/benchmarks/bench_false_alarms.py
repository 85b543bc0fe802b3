"""False alarms on others' documentation, and recall on misspellings planted in it, side by side.

    /work/venv/bin/python tests/benchmarks/bench_false_alarms.py [--compare REV] [--model FILE] [--sample 40]

Documents: every ``.md`` and ``.rst`` file (tests and fixtures excepted) in
the source distributions of the packages in PACKAGES, downloaded once with
``pip download --no-deps --no-binary :all:`` into build/false-alarm-sdists/
and unpacked into build/false-alarm-trees/.  None of them is a training
source (checked below).  Each package is checked as ``calami check`` checks
a repository: default settings, no project lexicon, and the workspace
vocabulary learnt from the whole unpacked tree (code, manifests, docs).

The packages fall into two development splits by a hash of their name
(``dev-a``, ``dev-b``), so a change tuned on one can be seen on the other.

Printed, per split and overall:

* findings per 1,000 prose words on the untouched docs: all, non-word,
  real-word, and those marked as a confident fix;
* by cause, per 1,000 words: the decisions each precision rule changed
  (workspace-accepted, name, compound, function word);
* recall on planted misspellings: real misspellings from the development
  split of the misspelling sets (Wikipedia/Mitton and TOEFL-Spell pairs,
  models/data/misspellings/, whose correction words are never training
  pairs) written into the same docs at about one per 300 words, in place
  of their correction.  Non-words and real words are counted apart; "fixed"
  means the best suggestion is the intended word; for confident fixes the
  share that are right.

``--compare REV`` runs the same measurement with the calami of git revision
REV (checked out as a worktree under build/) and prints both columns in one
table.  Flagged words with context go to build/false-alarms.json, and a
fixed-seed sample is printed for a person to judge.
"""

from __future__ import annotations

import argparse
import json
import os
import random
import re
import subprocess
import sys
import tarfile
import zlib
from collections import Counter
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
CACHE = REPO / "build" / "false-alarm-sdists"
TREES = REPO / "build" / "false-alarm-trees"
OUTPUT = REPO / "build" / "false-alarms.json"
MISSPELLINGS = REPO / "models" / "data" / "misspellings"

# Packages whose sdists ship Markdown or reStructuredText docs (versions
# pinned so the figures can be reproduced).  None is a training source.
PACKAGES = [
    ("aiohttp", "3.14.5"), ("alembic", "1.20.1"), ("anyio", "4.16.0"), ("arrow", "1.4.0"),
    ("bandit", "1.9.4"), ("black", "26.10.1"), ("build", "1.6.1"), ("cattrs", "26.2.1"),
    ("celery", "5.7.0"), ("coverage", "7.17.3"), ("fabric", "3.2.3"), ("flake8", "7.5.0"),
    ("gunicorn", "27.0.1"), ("h11", "0.16.0"), ("httpx", "0.28.1"), ("humanize", "4.17.0"),
    ("invoke", "3.0.3"), ("kombu", "5.7.0"), ("marshmallow", "4.4.0"), ("mkdocs", "1.6.1"),
    ("more-itertools", "11.2.1"), ("multidict", "7.2.1"), ("networkx", "3.6.1"), ("nox", "2026.10.20"),
    ("outcome", "1.3.0.post0"), ("packaging", "26.3"), ("paramiko", "5.1.0"), ("pexpect", "4.9.0"),
    ("pillow", "13.0.0"), ("pip", "26.3"), ("pluggy", "1.7.0"), ("psutil", "7.2.2"),
    ("pylint", "4.1.4"), ("pyproject-hooks", "1.3.3"), ("python-dateutil", "4.0.0"), ("rich", "15.0.0"),
    ("sphinx-rtd-theme", "3.1.0"), ("structlog", "26.1.0"), ("tabulate", "0.10.0"), ("tenacity", "9.2.1"),
    ("toolz", "1.2.0"), ("tox", "4.67.13"), ("trio", "0.35.0"), ("trustme", "1.2.1"),
    ("twine", "7.0.0"), ("urllib3", "2.8.0"), ("watchdog", "7.1.0"), ("wheel", "0.48.0"),
]
_SKIP_DIRS = re.compile(r"/(tests?|testing|fixtures?)/")
PLANT_EVERY = 300  # prose words per planted misspelling
CAUSES = ("workspace", "name", "compound", "function word")


def split_of(name: str) -> str:
    return "dev-a" if zlib.crc32(name.encode()) % 2 == 0 else "dev-b"


def _stem(text: str) -> str:
    return re.sub(r"\.(tar\.gz|zip)$", "", text).replace("-", "_").lower()


def _sdist(name: str, version: str) -> Path:
    """The cached sdist, downloaded with pip on first use."""
    CACHE.mkdir(parents=True, exist_ok=True)
    wanted = _stem(f"{name}-{version}")
    for attempt in range(2):
        for path in CACHE.iterdir():
            if _stem(path.name) == wanted:
                return path
        if attempt == 0:
            subprocess.run([sys.executable, "-m", "pip", "download", "--quiet", "--no-deps", "--no-binary", ":all:",
                            "-d", str(CACHE), f"{name}=={version}"], check=True)
    raise SystemExit(f"pip did not leave an sdist of {name} {version} in {CACHE}")


def _tree(name: str, version: str) -> Path:
    """The sdist unpacked (once) under build/false-alarm-trees/."""
    archive = _sdist(name, version)
    target = TREES / _stem(archive.name)
    if not target.is_dir():
        if archive.suffix == ".zip":
            raise SystemExit(f"{archive}: zip sdists are not handled")
        tmp = target.with_suffix(".partial")
        tmp.mkdir(parents=True, exist_ok=True)
        with tarfile.open(archive) as tar:
            tar.extractall(tmp, filter="data")
        tmp.rename(target)
    # Its own work tree (as a checkout would be), so the repository's
    # .gitignore, which ignores build/, does not hide it from the scan.
    (target / ".git").mkdir(exist_ok=True)
    return target


def _documents(tree: Path):
    """(path, kind, text) of the prose documents of a tree."""
    for path in sorted(tree.rglob("*")):
        rel = "/" + path.relative_to(tree).as_posix()
        if not path.is_file() or _SKIP_DIRS.search(rel):
            continue
        kind = "markdown" if path.suffix == ".md" else "rst" if path.suffix == ".rst" else None
        if kind is None:
            continue
        try:
            yield path, kind, path.read_bytes().decode("utf-8-sig")
        except UnicodeDecodeError:
            continue


_ENDINGS = ("ing", "es", "ed", "s", "d", "e")


def same_lemma(a: str, b: str) -> bool:
    """True if two words differ only by a regular ending ("looking"/"look", "examples"/"example").

    Learners' misspelling sets often pair a misspelling with the word form
    the writer meant ("lookig" -> "look" in "I am lookig"), while the
    spelling's nearest word is another form of it; this row shows how many
    "wrong" confident fixes are such pairs (strict scoring is the row above).
    """
    def stem(word: str) -> str:
        for ending in _ENDINGS:
            if word.endswith(ending) and len(word) - len(ending) >= 3:
                return word[: -len(ending)]
        return word
    return bool(a) and stem(a) == stem(b)


def _plant_pairs(lexicon) -> dict[str, dict[str, list[str]]]:
    """correction -> {"nonword": [...], "realword": [...]} from the dev split of two misspelling sets."""
    from calami.model.pairs import read_pairs, split

    table: dict[str, dict[str, list[str]]] = {}
    for name in ("wikipedia-mitton.tsv", "toefl-spell.tsv"):
        _, dev = split(read_pairs(MISSPELLINGS / name))
        for wrong, right in dev:
            if not (wrong.isalpha() and right.isalpha() and wrong.islower() and right.islower()) or len(right) < 3:
                continue
            if not lexicon.lookup(right).accepted:
                continue
            kind = "realword" if lexicon.lookup(wrong).accepted else "nonword"
            table.setdefault(right, {"nonword": [], "realword": []})[kind].append(wrong)
    return table


def _plant(text: str, kind: str, table, rng: random.Random):
    """The text with misspellings written in; and [(start, end, typed, intended, kind)] in the new text."""
    from calami.text.formats import extract
    from calami.text.tokens import WORD, tokenize

    tokens = [t for t in tokenize(text, extract(text, kind)) if t.kind == WORD and t.text.lower() in table]
    words = sum(1 for _ in tokens)
    if not tokens:
        return text, []
    chosen = sorted(rng.sample(tokens, min(len(tokens), max(1, round(len(text.split()) / PLANT_EVERY)))),
                    key=lambda t: t.start)
    out, planted, pos, shift = [], [], 0, 0
    for tok in chosen:
        options = table[tok.text.lower()]
        kinds = [k for k in ("nonword", "realword") if options[k]]
        plant_kind = rng.choice(kinds)
        wrong = rng.choice(sorted(options[plant_kind]))
        if tok.text[:1].isupper():
            wrong = wrong[:1].upper() + wrong[1:]
        out.append(text[pos:tok.start])
        start = tok.start + shift
        out.append(wrong)
        planted.append((start, start + len(wrong), wrong, tok.text.lower(), plant_kind))
        shift += len(wrong) - len(tok.text)
        pos = tok.end
    out.append(text[pos:])
    del words
    return "".join(out), planted


def measure(args) -> dict:
    """All figures for the calami importable here, as plain data."""
    from calami.commands.check import check_document, default_checker_factory
    from calami.model import load
    from calami.text.formats import extract
    from calami.text.tokens import SKIP, tokenize
    from calami.vocab.project import Project
    try:
        from calami.commands.check import is_credits_file
        from calami.vocab.usage import WorkspaceVocabulary
        from calami.vocab.workspace_scan import scan_tree
    except ImportError:  # a revision before the workspace vocabulary
        WorkspaceVocabulary = None
        is_credits_file = lambda name: False  # noqa: E731

    model = load(args.model)
    make_checker = default_checker_factory(args.model)
    neutral = REPO / "build" / "false-alarm-root"  # no config, no lexicon
    neutral.mkdir(parents=True, exist_ok=True)
    project = Project(neutral)
    table = _plant_pairs(model.lexicon)
    known = lambda key: key in model.lexicon.ids  # noqa: E731

    stats: dict[str, Counter] = {}
    flagged: list[dict] = []
    missed: list[dict] = []
    for name, version in PACKAGES:
        if args.split and split_of(name) != args.split:
            continue
        tree = _tree(name, version)
        docs = list(_documents(tree))
        base = make_checker(project, None)
        vocabulary = None
        if WorkspaceVocabulary is not None and not args.no_workspace:
            vocabulary = WorkspaceVocabulary(known)
            scan_tree(vocabulary, [tree])
            base.usage = vocabulary
        events: list = []
        if hasattr(base, "observer"):
            base.observer = lambda at, word, rule, detail: events.append(rule)
        s = stats.setdefault(split_of(name), Counter())
        s["packages"] += 1
        planted_docs = []
        for path, kind, text in docs:
            checker = base.with_names() if is_credits_file(path.name) and hasattr(base, "with_names") else base
            words = sum(1 for t in tokenize(text, extract(text, kind)) if t.kind != SKIP)
            events.clear()
            findings, _ = check_document(text, kind, project, checker)
            s["docs"] += 1
            s["words"] += words
            s["findings"] += len(findings)
            s["nonword"] += sum(1 for f in findings if f.kind == "nonword")
            s["realword"] += sum(1 for f in findings if f.kind == "realword")
            s["confident"] += sum(1 for f in findings if f.confident)
            for rule in events:
                s["cause " + rule] += 1
            rel = path.relative_to(tree).as_posix()
            for f in findings:
                line = text.count("\n", 0, f.start) + 1
                start = text.rfind("\n", 0, f.start) + 1
                end = text.find("\n", f.start)
                flagged.append({"package": f"{name}-{version}", "path": rel, "line": line, "word": f.word,
                                "kind": f.kind, "confidence": round(f.confidence, 3), "confident": f.confident,
                                "best": f.best, "context": text[start:end if end >= 0 else None].strip()[:160]})
            rng = random.Random(f"{name}/{rel}")
            planted_text, planted = _plant(text, kind, table, rng)
            if planted:
                planted_docs.append((path, kind, checker, planted_text, planted))
        # The planted run: the workspace sees the planted docs, as it would a real typo.
        if vocabulary is not None:
            for path, kind, _, planted_text, _ in planted_docs:
                vocabulary.add_text(str(path), planted_text, kind)
        for path, kind, checker, planted_text, planted in planted_docs:
            findings, _ = check_document(planted_text, kind, project, checker)
            by_start = {f.start: f for f in findings}
            for start, end, wrong, intended, plant_kind in planted:
                s[f"planted {plant_kind}"] += 1
                f = by_start.get(start)
                if f is None:
                    missed.append({"package": f"{name}-{version}", "typed": wrong, "intended": intended,
                                   "kind": plant_kind, "context": planted_text[max(0, start - 60):end + 60]})
                    continue
                s[f"found {plant_kind}"] += 1
                right = (f.best or "").lower() == intended
                s[f"fixed {plant_kind}"] += right
                if f.confident:
                    s[f"confident {plant_kind}"] += 1
                    s[f"confident right {plant_kind}"] += right
                    s[f"confident same word {plant_kind}"] += right or same_lemma((f.best or "").lower(), intended)
    return {"stats": {k: dict(v) for k, v in stats.items()}, "flagged": flagged, "missed": missed}


def _rows(stats: dict) -> list[tuple[str, str]]:
    """(label, figure) rows for one split's counters."""
    words = max(1, stats.get("words", 0))
    per_k = lambda n: f"{1000 * n / words:.2f}"  # noqa: E731
    rows = [("packages / docs", f"{stats.get('packages', 0)} / {stats.get('docs', 0)}"),
            ("prose words", f"{stats.get('words', 0):,}"),
            ("findings per 1k", per_k(stats.get("findings", 0))),
            ("  non-word per 1k", per_k(stats.get("nonword", 0))),
            ("  real-word per 1k", per_k(stats.get("realword", 0))),
            ("  confident per 1k", per_k(stats.get("confident", 0)))]
    for cause in CAUSES:
        rows.append((f"  kept quiet: {cause} per 1k", per_k(stats.get("cause " + cause, 0))))
    for kind in ("nonword", "realword"):
        planted = stats.get(f"planted {kind}", 0)
        found = stats.get(f"found {kind}", 0)
        conf = stats.get(f"confident {kind}", 0)
        rows.append((f"planted {kind}: found", f"{found}/{planted} = {found / max(1, planted):.1%}"))
        rows.append((f"planted {kind}: best fix right", f"{stats.get(f'fixed {kind}', 0) / max(1, planted):.1%}"))
        rows.append((f"planted {kind}: confident right",
                     f"{stats.get(f'confident right {kind}', 0)}/{conf} = {stats.get(f'confident right {kind}', 0) / max(1, conf):.1%}"))
        same = stats.get(f"confident same word {kind}", 0)
        rows.append((f"  ... or another form of it", f"{same}/{conf} = {same / max(1, conf):.1%}"))
    return rows


def _merge(stats: dict) -> dict:
    total: Counter = Counter()
    for v in stats.values():
        total.update(v)
    return dict(total)


def _compare(rev: str, args) -> dict:
    """Run this benchmark with the calami of ``rev`` (a worktree under build/)."""
    sha = subprocess.run(["git", "-C", str(REPO), "rev-parse", "--short", rev], check=True,
                         capture_output=True, text=True).stdout.strip()
    tree = REPO / "build" / f"bench-rev-{sha}"
    if not tree.is_dir():
        subprocess.run(["git", "-C", str(REPO), "worktree", "add", "--detach", str(tree), sha], check=True,
                       capture_output=True)
    out = REPO / "build" / f"false-alarms-{sha}{'-' + args.split if args.split else ''}.json"
    if out.exists() and not args.recompare:
        return json.loads(out.read_text(encoding="utf-8"))
    env = dict(os.environ, PYTHONPATH=str(tree / "server"))
    env.pop("CALAMI_MODEL", None)
    command = [sys.executable, __file__, "--json", str(out), "--sample", "0"] + (["--split", args.split] if args.split else [])
    if args.model:
        command += ["--model", args.model]
    subprocess.run(command, check=True, env=env)
    return json.loads(out.read_text(encoding="utf-8"))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--model")
    parser.add_argument("--sample", type=int, default=40)
    parser.add_argument("--compare", metavar="REV", help="also measure the calami of this git revision")
    parser.add_argument("--no-workspace", action="store_true", help="do not learn the workspace vocabulary")
    parser.add_argument("--recompare", action="store_true", help="measure REV again, not from the cached result")
    parser.add_argument("--split", choices=("dev-a", "dev-b"), help="measure one development split only")
    parser.add_argument("--json", help=argparse.SUPPRESS)  # used by --compare's child run
    args = parser.parse_args()

    trained = set(re.findall(r'Source\("([^"]+)"', (REPO / "models" / "recipe" / "sources.py").read_text()))
    overlap = trained & {name for name, _ in PACKAGES}
    if overlap:
        raise SystemExit(f"these packages' docs are training sources, not a fair test: {sorted(overlap)}")

    result = measure(args)
    if args.json:
        Path(args.json).write_text(json.dumps(result), encoding="utf-8")
        return
    columns = [("now", result)]
    if args.compare:
        columns.insert(0, (args.compare, _compare(args.compare, args)))
    for split in ("dev-a", "dev-b", "all"):
        print(f"\n== {split} ==")
        print(f"{'':<36}" + "".join(f"{label:>24}" for label, _ in columns))
        tables = [_rows(_merge(r["stats"]) if split == "all" else r["stats"].get(split, {})) for _, r in columns]
        for i, (label, _) in enumerate(tables[0]):
            print(f"{label:<36}" + "".join(f"{t[i][1]:>24}" for t in tables))

    flagged = result["flagged"]
    OUTPUT.parent.mkdir(parents=True, exist_ok=True)
    OUTPUT.write_text(json.dumps(flagged, indent=1, ensure_ascii=False), encoding="utf-8")
    OUTPUT.with_name("missed-plants.json").write_text(json.dumps(result["missed"], indent=1, ensure_ascii=False),
                                                       encoding="utf-8")
    words = Counter((f["package"], f["word"].lower()) for f in flagged)
    repeated = sum(n for n in words.values() if n > 1)
    print(f"\nfindings of a word flagged again in the same package: {repeated} of {len(flagged)}")
    n = min(args.sample, len(flagged))
    print(f"sample of {n} flagged words (all {len(flagged)} in {OUTPUT.relative_to(REPO)}):")
    for item in sorted(random.Random(1990).sample(flagged, n), key=lambda f: (f["package"], f["path"], f["line"])):
        mark = " confident" if item["confident"] else ""
        print(f"  {item['package']}/{item['path']}:{item['line']}: {item['word']!r} -> {item['best']!r} "
              f"[{item['kind']} {item['confidence']}{mark}]  | {item['context'][:100]}")


if __name__ == "__main__":
    main()

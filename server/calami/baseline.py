"""A baseline of old findings: ``--write-baseline FILE`` records them, ``--baseline FILE`` hides them.

Turning calami on in an old repository should not mean fixing everything at
once.  A finding is recorded by its file (relative to the project root),
its word and the text of its line (whitespace squeezed), never by line
number, so it stays recognised when lines above it are added or removed.
The same word on the same line text may occur several times: entries carry
a count, and only that many occurrences are hidden.

The file is our own JSON format, sorted so that it diffs well in review::

    {"calami-baseline": 1, "findings": [{"file": "docs/a.md", "word": "teh",
      "line": "We saw teh cat.", "count": 1}, ...]}
"""

from __future__ import annotations

import json
from collections import Counter
from pathlib import Path
from typing import Callable, Iterable, Sequence, TypeVar

T = TypeVar("T")

from calami.errors import CalamiError

FORMAT_KEY = "calami-baseline"
VERSION = 1

Key = tuple[str, str, str]


def key(file: str, word: str, line_text: str) -> Key:
    return file, word, " ".join(line_text.split())


class Baseline:
    """Recorded findings, as a multiset of (file, word, line text)."""

    def __init__(self, counts: Counter[Key] | None = None) -> None:
        self.counts: Counter[Key] = counts or Counter()

    def add(self, file: str, word: str, line_text: str) -> None:
        self.counts[key(file, word, line_text)] += 1

    def __len__(self) -> int:
        return sum(self.counts.values())

    def new_only(self, file: str, items: Sequence[T], word_of: Callable[[T], str], line_of: Callable[[T], str]) -> list[T]:
        """The items not in the baseline; each recorded entry hides as many items as its count."""
        left: Counter[Key] = Counter()
        out = []
        for item in items:
            k = key(file, word_of(item), line_of(item))
            if left[k] < self.counts.get(k, 0):
                left[k] += 1
                continue
            out.append(item)
        return out

    def render(self) -> bytes:
        entries = [
            {"file": f, "word": w, "line": line, "count": n}
            for (f, w, line), n in sorted(self.counts.items())
        ]
        return (json.dumps({FORMAT_KEY: VERSION, "findings": entries}, ensure_ascii=False, indent=1) + "\n").encode("utf-8")


def read(path: Path) -> Baseline:
    """Load a baseline; anything unreadable or malformed is a clear error (exit 2), never ignored."""
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise CalamiError(f"{path}: cannot read the baseline: {exc.strerror or exc}") from None
    try:
        data = json.loads(raw.decode("utf-8"))
    except (UnicodeDecodeError, ValueError) as exc:
        raise CalamiError(f"{path}: not a calami baseline (not JSON: {exc})") from None
    if not isinstance(data, dict) or data.get(FORMAT_KEY) != VERSION or not isinstance(data.get("findings"), list):
        raise CalamiError(f"{path}: not a calami baseline (expected an object with \"{FORMAT_KEY}\": {VERSION} "
                          "and a \"findings\" list; write one with --write-baseline)")
    counts: Counter[Key] = Counter()
    for number, entry in enumerate(data["findings"], start=1):
        if not (isinstance(entry, dict) and all(isinstance(entry.get(k), str) for k in ("file", "word", "line"))
                and isinstance(entry.get("count", 1), int) and not isinstance(entry.get("count", 1), bool)
                and entry.get("count", 1) >= 1):
            raise CalamiError(f"{path}: baseline entry {number} is malformed (needs file, word, line strings and a count >= 1)")
        counts[key(entry["file"], entry["word"], entry["line"])] += entry.get("count", 1)
    return Baseline(counts)


def write(path: Path, baseline: Baseline) -> None:
    from calami.vocab.atomic import atomic_write_bytes

    try:
        atomic_write_bytes(path, baseline.render())
    except OSError as exc:
        raise CalamiError(f"{path}: cannot write the baseline: {exc.strerror or exc}") from None


def relative_file(file: str | None, root: str, display: str) -> str:
    """The file as the baseline names it: relative to the project root, '/'-separated."""
    if file is None:
        return display
    try:
        return Path(file).relative_to(root).as_posix()
    except ValueError:
        return Path(file).as_posix()


def from_items(entries: Iterable[tuple[str, str, str]]) -> Baseline:
    baseline = Baseline()
    for file, word, line_text in entries:
        baseline.add(file, word, line_text)
    return baseline

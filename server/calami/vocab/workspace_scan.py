"""Learn a workspace's vocabulary from its files, within a time and size budget.

Used by the language server when a workspace opens (on a background thread)
and by ``calami check`` for the tree it checks.  Every text file that git
would not ignore is read once, up to ``MAX_FILE_BYTES``; binary files are
skipped.  The scan stops at ``deadline`` or ``max_files``: a partial
vocabulary is still a sound one, it only accepts fewer words.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterable

from calami.vocab.package_names import MANIFESTS, manifest_names
from calami.vocab.usage import SOURCE_KINDS, WorkspaceVocabulary

MAX_FILE_BYTES = 256 * 1024
MAX_FILES = 20000
# Extensions that never hold words of the project (data, media, archives).
_SKIPPED_SUFFIXES = frozenset(
    ".png .jpg .jpeg .gif .ico .svg .pdf .zip .gz .tgz .bz2 .xz .whl .so .dylib .dll .exe .o .a .pyc .class "
    ".jar .woff .woff2 .ttf .otf .eot .mp3 .mp4 .wav .ogg .bin .dat .db .sqlite .lock .min.js .map .msgpack".split())


@dataclass
class ScanReport:
    files: int = 0
    skipped: int = 0
    seconds: float = 0.0
    complete: bool = True


def file_kind(path: Path) -> str | None:
    from calami.text.formats import detect_kind

    return detect_kind(str(path), "")


def learn_file(vocabulary: WorkspaceVocabulary, path: Path, text: str | None = None) -> bool:
    """Learn one file (read from disk unless ``text`` is given); False if skipped."""
    if text is None:
        try:
            with open(path, "rb") as handle:
                data = handle.read(MAX_FILE_BYTES)
        except OSError:
            return False
        if b"\0" in data[:8192]:
            return False
        text = data.decode("utf-8", "replace")
    name = str(path)
    if path.name in MANIFESTS:
        vocabulary.add_names(name + "#manifest", manifest_names(path, text))
    vocabulary.add_text(name, text, file_kind(path))
    return True


def wanted(path: Path) -> bool:
    name = path.name.lower()
    return not any(name.endswith(s) for s in _SKIPPED_SUFFIXES)


def scan_tree(
    vocabulary: WorkspaceVocabulary,
    roots: Iterable[Path],
    *,
    deadline: float | None = None,
    max_files: int = MAX_FILES,
    cancelled: Callable[[], bool] = lambda: False,
) -> ScanReport:
    """Learn every file under ``roots`` (files or folders) until the budget runs out.

    Manifests at each root come first, so even a cut-short scan knows the
    project's own name.
    """
    from calami.walk import walk

    report = ScanReport()
    start = time.monotonic()
    for root in roots:
        root = Path(root)
        if root.is_file():
            report.files += learn_file(vocabulary, root)
            continue
        for manifest in MANIFESTS:
            if (root / manifest).is_file():
                learn_file(vocabulary, root / manifest)
        # Documents before code: a scan cut short (or still running when the
        # first diagnostics are due) has the prose vocabulary first.
        paths = [p for p in walk(root, wanted) if not (p.name in MANIFESTS and p.parent == root)]
        paths.sort(key=lambda p: file_kind(p) in SOURCE_KINDS)
        for path in paths:
            if report.files >= max_files or cancelled() or (deadline is not None and time.monotonic() > deadline):
                report.complete = False
                report.seconds = time.monotonic() - start
                return report
            if learn_file(vocabulary, path):
                report.files += 1
            else:
                report.skipped += 1
    report.seconds = time.monotonic() - start
    return report


def project_manifests(root: Path) -> list[Path]:
    """The manifests at a project's root (their names feed the vocabulary first)."""
    return [root / m for m in MANIFESTS if (root / m).is_file()]



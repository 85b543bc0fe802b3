"""Which files ``calami check DIR`` looks at, and how they are read.

``.gitignore`` rules are applied by our own matcher (``calami.vocab.globs``)
rather than by asking ``git ls-files``:

* it works where there is no git work tree or no git program (an unpacked
  source archive, a CI cache, the sdists of the false-alarm benchmark);
* it costs no subprocess and reads only the ``.gitignore`` files on the way;
* the tests compare it with ``git`` itself on a tree of tricky patterns, so
  git remains the reference for the rules.

Honoured: every ``.gitignore`` from the enclosing work tree's top down to the
walked folder and below it, and ``.git/info/exclude``.  Not honoured: the
user's global ``core.excludesFile`` (it is personal, CI does not have it).
Unlike git, a file that matches an ignore pattern is skipped even if it
is tracked (git keeps tracking it; knowing that would need git itself).  Folders named ``.git`` are never
entered, and symbolic links to folders are not followed (no cycles).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterator

from calami.vocab.globs import Glob, parse_ignore_file

# Larger files are skipped with a note: they are data or generated, not prose.
DEFAULT_MAX_BYTES = 2 * 1024 * 1024
_SNIFF_BYTES = 8192


# Why a file was not checked: the short names the summary counts.
IGNORED = "git-ignored"
EXCLUDED = "excluded by config"
LINKED_FOLDER = "linked folder"
NOT_READ = "not a kind calami reads"
NOT_PROSE = "not prose"
BINARY = "binary"
TOO_LARGE = "too large"
NOT_UTF8 = "not UTF-8"


@dataclass(frozen=True)
class Skipped:
    """A file we chose not to check, and why (shown as a note)."""

    path: Path
    reason: str
    category: str = ""  # one of the names above


# Called with each path the walk leaves out, its category and the reason.
OnSkip = Callable[[Path, str, str], None]


def _ignore_skip(path: Path, category: str, reason: str) -> None:
    return None


class IgnoreRules:
    """The ``.gitignore`` patterns in force, each with the folder it is relative to."""

    def __init__(self, rules: list[tuple[str, Glob]] | None = None) -> None:
        self.rules = rules or []

    def with_file(self, base: str, ignore_file: Path) -> "IgnoreRules":
        try:
            text = ignore_file.read_text(encoding="utf-8", errors="replace")
        except OSError:
            return self
        added = [(base, g) for g in parse_ignore_file(text)]
        return IgnoreRules(self.rules + added) if added else self

    def ignored(self, relpath: str, is_dir: bool) -> bool:
        """Last matching pattern wins; deeper files come later, so they win."""
        verdict = False
        for base, glob in self.rules:
            if base:
                if not relpath.startswith(base + "/"):
                    continue
                sub = relpath[len(base) + 1 :]
            else:
                sub = relpath
            if glob.matches(sub, is_dir):
                verdict = not glob.negated
        return verdict


def _work_tree_top(folder: Path) -> Path | None:
    for candidate in (folder, *folder.parents):
        if (candidate / ".git").exists():
            return candidate
    return None


def _rules_down_to(top: Path, folder: Path) -> IgnoreRules:
    """Rules from the work tree's top down to (and including) ``folder``."""
    rules = IgnoreRules()
    info = top / ".git" / "info" / "exclude"
    if info.is_file():
        rules = rules.with_file("", info)
    rel_parts = folder.relative_to(top).parts
    for depth in range(len(rel_parts) + 1):
        here = top.joinpath(*rel_parts[:depth])
        base = "/".join(rel_parts[:depth])
        rules = rules.with_file(base, here / ".gitignore")
    return rules


def _ignored_on_the_way(top: Path, folder: Path) -> bool:
    """True if ``folder`` itself sits inside an ignored folder of its work tree."""
    rel_parts = folder.relative_to(top).parts
    rules = IgnoreRules()
    info = top / ".git" / "info" / "exclude"
    if info.is_file():
        rules = rules.with_file("", info)
    for depth in range(len(rel_parts)):
        rules = rules.with_file("/".join(rel_parts[:depth]), top.joinpath(*rel_parts[:depth]) / ".gitignore")
        if rules.ignored("/".join(rel_parts[: depth + 1]), True):
            return True
    return False


def walk(folder: Path, selects: Callable[[Path], bool] = lambda p: True, on_skip: OnSkip = _ignore_skip) -> Iterator[Path]:
    """Files under ``folder`` (sorted, depth first) that git would not ignore and ``selects`` keeps.

    Every path left out (an ignored folder counts once) goes to ``on_skip``.
    """
    folder = folder.resolve()
    top = _work_tree_top(folder)
    if top is not None:
        if _ignored_on_the_way(top, folder):
            on_skip(folder, IGNORED, "inside a folder ignored by .gitignore")
            return
        rules = _rules_down_to(top, folder)
        base = folder.relative_to(top).as_posix()
        base = "" if base == "." else base
    else:
        top = folder
        rules = IgnoreRules().with_file("", folder / ".gitignore")
        base = ""
    yield from _walk(folder, top, base, rules, selects, on_skip)


def _walk(
    folder: Path, top: Path, rel: str, rules: IgnoreRules, selects: Callable[[Path], bool], on_skip: OnSkip
) -> Iterator[Path]:
    try:
        entries = sorted(os.scandir(folder), key=lambda e: e.name)
    except OSError:
        return
    for entry in entries:
        if entry.name == ".git":
            continue
        child_rel = f"{rel}/{entry.name}" if rel else entry.name
        try:
            is_dir = entry.is_dir(follow_symlinks=False)
            is_file = entry.is_file()
        except OSError:
            continue
        path = Path(entry.path)
        if rules.ignored(child_rel, is_dir):
            on_skip(path, IGNORED, "folder ignored by .gitignore" if is_dir else "ignored by .gitignore")
            continue
        if is_dir:
            yield from _walk(path, top, child_rel, rules.with_file(child_rel, path / ".gitignore"), selects, on_skip)
        elif is_file:
            if selects(path):
                yield path
            else:
                on_skip(path, EXCLUDED, "left out by the project's include/exclude")
        elif entry.is_symlink():
            on_skip(path, LINKED_FOLDER, "symbolic link to a folder (not followed)")


def read_document(path: Path, max_bytes: int = DEFAULT_MAX_BYTES) -> str | Skipped:
    """The file's text, or why it is not checked (binary, not UTF-8, too large, unreadable).

    Raises OSError only for a file that cannot be opened at all, which the
    caller reports as an I/O error.
    """
    size = path.stat().st_size
    if size > max_bytes:
        return Skipped(path, f"larger than {_human(max_bytes)} ({_human(size)})", TOO_LARGE)
    with open(path, "rb") as handle:
        data = handle.read(max_bytes + 1)
    return decode_document(path, data)


def decode_document(path: Path, data: bytes) -> str | Skipped:
    if b"\0" in data[:_SNIFF_BYTES]:
        return Skipped(path, "binary file", BINARY)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        return Skipped(path, f"not UTF-8 text (line {line})", NOT_UTF8)


def _human(size: int) -> str:
    if size >= 1024 * 1024:
        return f"{size / (1024 * 1024):.1f} MiB"
    if size >= 1024:
        return f"{size / 1024:.0f} KiB"
    return f"{size} bytes"

"""Lines added or changed since a git revision, for ``calami check --changed`` / ``--staged``.

CI on an old repository should report what a change introduced, not every
old finding.  We ask ``git`` itself (a subprocess, no library) for a
zero-context diff and keep the line numbers of the new side: the working
tree against REF, or with ``--staged`` the index against REF (default
``HEAD``).  Untracked files that git does not ignore count as wholly new.
"""

from __future__ import annotations

import os
import subprocess
from dataclasses import dataclass, field
from pathlib import Path

import regex

from calami.errors import CalamiError

_HUNK = regex.compile(r"^@@ -\d+(?:,\d+)? \+(?P<start>\d+)(?:,(?P<count>\d+))? @@")
# Options that make the output independent of the user's git configuration.
_DIFF = ["-c", "core.quotePath=false", "diff", "--no-color", "--no-ext-diff", "--no-textconv", "-U0", "-M",
         "--src-prefix=a/", "--dst-prefix=b/"]


class GitError(CalamiError):
    """git is missing, this is not a repository, or a revision is unknown."""


@dataclass
class Changes:
    """Changed lines per file (absolute path): a set of 1-based numbers, or None for a new untracked file."""

    root: Path
    lines: dict[Path, set[int] | None] = field(default_factory=dict)
    staged: bool = False

    def covers(self, path: Path, line: int) -> bool:
        numbers = self.lines.get(path, set())
        return numbers is None or line in numbers


def git(args: list[str], cwd: Path, what: str) -> str:
    try:
        done = subprocess.run(["git", *args], cwd=cwd, capture_output=True, check=False)
    except FileNotFoundError:
        raise GitError(f"{what}: git is not installed (or not on PATH)") from None
    if done.returncode != 0:
        message = done.stderr.decode("utf-8", "replace").strip().splitlines()
        raise GitError(f"{what}: {message[-1] if message else f'git {args[0]} failed'}")
    return done.stdout.decode("utf-8", "surrogateescape")


def repository_root(cwd: Path) -> Path:
    """The work tree's top folder; a clear error outside a repository."""
    try:
        done = subprocess.run(["git", "rev-parse", "--show-toplevel"], cwd=cwd, capture_output=True, check=False)
    except FileNotFoundError:
        raise GitError("--changed needs git, which is not installed (or not on PATH)") from None
    if done.returncode != 0:
        raise GitError(f"--changed works inside a git repository; {cwd} is not in one")
    return Path(done.stdout.decode("utf-8", "surrogateescape").strip()).resolve()


def default_base(root: Path) -> str:
    """The merge base of HEAD with the default branch (origin's HEAD, else main, master or init.defaultBranch)."""
    candidates: list[str] = []
    try:
        remote_head = git(["symbolic-ref", "-q", "--short", "refs/remotes/origin/HEAD"], root, "--changed").strip()
        if remote_head:
            candidates.append(remote_head)
    except GitError:
        pass
    try:
        configured = git(["config", "init.defaultBranch"], root, "--changed").strip()
        if configured:
            candidates.append(configured)
    except GitError:
        pass
    candidates += ["main", "master", "origin/main", "origin/master"]
    for branch in candidates:
        try:
            git(["rev-parse", "--verify", "-q", f"{branch}^{{commit}}"], root, "--changed")
        except GitError:
            continue
        return git(["merge-base", "HEAD", branch], root, f"--changed (merge base of HEAD and {branch})").strip()
    raise GitError("--changed: cannot tell the default branch (no origin/HEAD, main or master); "
                   "name the revision, e.g. --changed HEAD~1")


def changed_lines(cwd: Path, ref: str | None, staged: bool) -> Changes:
    """What changed since ``ref`` (None: the merge base with the default branch; with --staged: HEAD)."""
    root = repository_root(cwd)
    if ref is None and staged:
        ref = "HEAD"
        try:
            git(["rev-parse", "--verify", "-q", "HEAD^{commit}"], root, "--staged")
        except GitError:  # the first commit: everything staged is new
            ref = git(["hash-object", "-t", "tree", "/dev/null"], root, "--staged").strip()
    elif ref is None:
        ref = default_base(root)
    else:
        if ref.startswith("-"):
            raise GitError(f"--changed: {ref!r} is not a revision")
        git(["rev-parse", "--verify", "-q", f"{ref}^{{commit}}"], root, f"--changed: unknown revision {ref!r}")
    args = [*_DIFF, *(["--cached"] if staged else []), ref, "--"]
    changes = Changes(root, staged=staged)
    _parse(git(args, root, "--changed"), root, changes.lines)
    if not staged:
        listed = git(["ls-files", "--others", "--exclude-standard", "-z"], root, "--changed")
        for name in listed.split("\0"):
            if name:
                changes.lines[(root / name).resolve()] = None
    return changes


def staged_text(root: Path, path: Path) -> str:
    """The file's content in the index (what the commit will hold)."""
    rel = path.relative_to(root).as_posix()
    done = subprocess.run(["git", "show", f":{rel}"], cwd=root, capture_output=True, check=False)
    if done.returncode != 0:
        raise GitError(f"{rel}: not in the index")
    return done.stdout.decode("utf-8-sig", "replace")


def _parse(diff: str, root: Path, out: dict[Path, set[int] | None]) -> None:
    current: set[int] | None = None
    for line in diff.split("\n"):
        if line.startswith("+++ "):
            name = line[4:]
            if name == "/dev/null":
                current = None
                continue
            name = unquote(name)
            if name.startswith("b/"):
                name = name[2:]
            current = set()
            out[(root / name).resolve()] = current
        elif line.startswith("@@") and current is not None:
            match = _HUNK.match(line)
            if match:
                start = int(match.group("start"))
                count = int(match.group("count")) if match.group("count") is not None else 1
                current.update(range(start, start + count))


_ESCAPES = {"a": 7, "b": 8, "t": 9, "n": 10, "v": 11, "f": 12, "r": 13, '"': 34, "\\": 92}


def unquote(name: str) -> str:
    """git's C-style quoting of unusual path names ("a\\tb", octal bytes) undone."""
    if not (len(name) >= 2 and name[0] == '"' and name[-1] == '"'):
        return name
    body = name[1:-1]
    raw = bytearray()
    i = 0
    encoded = body.encode("utf-8", "surrogateescape")
    while i < len(encoded):
        c = encoded[i]
        if c == 92 and i + 1 < len(encoded):  # backslash
            nxt = chr(encoded[i + 1])
            if nxt in "01234567" and i + 3 < len(encoded) + 0:
                raw.append(int(encoded[i + 1:i + 4].decode("ascii"), 8))
                i += 4
                continue
            raw.append(_ESCAPES.get(nxt, ord(nxt)))
            i += 2
            continue
        raw.append(c)
        i += 1
    return os.fsdecode(bytes(raw))

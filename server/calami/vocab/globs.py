"""Path globs with the rules of ``.gitignore`` files.

One dialect serves both ``.gitignore`` and the config's include/exclude
lists, so users learn one set of rules (git's ``gitignore(5)`` manual page
documents them):

* ``*`` matches anything but ``/``; ``?`` one character but ``/``;
  ``[abc]``, ``[a-z]``, ``[!x]`` / ``[^x]`` character classes; ``\\`` escapes;
* a pattern with a slash at the start or in the middle is anchored to its
  base folder; otherwise it matches the name at any depth;
* a trailing ``/`` matches folders only;
* ``**/`` at the start matches in all folders, ``/**`` at the end matches
  everything inside, ``/**/`` matches zero or more folders.
"""

from __future__ import annotations

import re
from dataclasses import dataclass


@dataclass(frozen=True)
class Glob:
    """One compiled pattern: matches a '/'-separated path relative to its base."""

    pattern: str
    regex: re.Pattern[str]
    anchored: bool
    dir_only: bool
    negated: bool = False

    def matches(self, relpath: str, is_dir: bool) -> bool:
        if self.dir_only and not is_dir:
            return False
        subject = relpath if self.anchored else relpath.rsplit("/", 1)[-1]
        return self.regex.fullmatch(subject) is not None


def compile_glob(pattern: str, *, allow_negation: bool = False) -> Glob:
    """Compile one pattern (already stripped of comments and trailing blanks)."""
    negated = False
    body = pattern
    if allow_negation and body.startswith("!"):
        negated = True
        body = body[1:]
    dir_only = body.endswith("/") and not body.endswith("\\/")
    if dir_only:
        body = body.rstrip("/")
    anchored = "/" in body
    if body.startswith("/"):
        body = body[1:]
    return Glob(pattern, re.compile(_translate(body)), anchored, dir_only, negated)


def _translate(body: str) -> str:
    out: list[str] = []
    i, n = 0, len(body)
    while i < n:
        c = body[i]
        if c == "*":
            j = i
            while j < n and body[j] == "*":
                j += 1
            stars = j - i
            at_start = i == 0 or body[i - 1] == "/"
            at_end = j == n or body[j] == "/"
            if stars >= 2 and at_start and at_end:
                if j == n:
                    out.append(".*")  # "/**" at the end: everything inside
                    i = j
                else:
                    out.append("(?:.*/)?")  # "**/": zero or more folders
                    i = j + 1
                continue
            out.append("[^/]*")
            i = j
        elif c == "?":
            out.append("[^/]")
            i += 1
        elif c == "[":
            end, cls = _char_class(body, i)
            if cls is None:
                out.append(re.escape(c))
                i += 1
            else:
                out.append(cls)
                i = end
        elif c == "\\" and i + 1 < n:
            out.append(re.escape(body[i + 1]))
            i += 2
        else:
            out.append(re.escape(c))
            i += 1
    return "".join(out)


def _char_class(body: str, start: int) -> tuple[int, str | None]:
    """Translate ``[...]`` at ``start``; (end index, regex) or (start, None) if unclosed."""
    i = start + 1
    negate = False
    if i < len(body) and body[i] in "!^":
        negate = True
        i += 1
    items: list[str] = []
    first = True
    while i < len(body):
        c = body[i]
        if c == "]" and not first:
            inner = "".join(items)
            return i + 1, f"(?!/)[^{inner}]" if negate else f"[{inner}]"
        if c == "\\" and i + 1 < len(body):
            items.append(re.escape(body[i + 1]))
            i += 2
        elif c == "-" and items and i + 1 < len(body) and body[i + 1] != "]":
            items.append("-")
            i += 1
        else:
            items.append(re.escape(c) if c in "\\^[]" else c)
            i += 1
        first = False
    return start, None


def parse_ignore_file(text: str) -> list[Glob]:
    """Patterns of one ``.gitignore`` file, in order (the last match wins)."""
    globs: list[Glob] = []
    for raw in text.splitlines():
        line = raw
        # Trailing spaces are ignored unless escaped with a backslash.
        stripped = line.rstrip(" ")
        if stripped.endswith("\\") and len(stripped) < len(line):
            stripped += " "
        line = stripped
        if not line or line.startswith("#"):
            continue
        # "\#" and "\!" at the start are literal; _translate unescapes them.
        globs.append(compile_glob(line, allow_negation=True))
    return globs

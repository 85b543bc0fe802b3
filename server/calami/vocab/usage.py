"""The workspace's own vocabulary: how often, and where, a project uses a word.

A cache language model (Kuhn & De Mori 1990): words a document's neighbours
have just used are far likelier than a static model says.  For a spelling
checker the static model is the novel-word spelling model, which gives a
project's own names ("structlog", "hookwrapper", a maintainer's surname)
almost no probability; the workspace gives them back theirs.

What counts as a use of a word (lower-cased key, letters only, 3+ letters,
not in the lexicon):

* PROSE: a plain word in a document of the workspace;
* CODE: an identifier, or a camelCase/snake_case part of one, or the
  identifier written as one word ("HookWrapper" -> "hookwrapper"), in
  source files and anywhere an identifier is written;
* LINK: a host label or path segment of a URL, or an e-mail's local part:
  copied, not typed, so an independent witness of a name;
* HANDLE: an @handle;
* META: a package name or dependency in pyproject.toml, package.json,
  Cargo.toml or setup.cfg.

Uses are counted per file and capped per file (``PER_FILE_CAP``), because
repeating a word inside one file says less than using it across files.  The
checker (``Checker``, via ``evidence``) turns the counts into a prior; the
rules that keep a repeated typo flagged live there too.
"""

from __future__ import annotations

import re
import threading
from collections import Counter
from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Iterable

PROSE, CODE, LINK, HANDLE, META = 1, 2, 4, 8, 16
SOURCE_NAMES = {PROSE: "prose", CODE: "code", LINK: "link", HANDLE: "handle", META: "package metadata"}
PER_FILE_CAP = 3

# The standard library's `re` (C loops, no per-match Python work) is enough here.
_URL = re.compile(r"\b[A-Za-z][A-Za-z0-9+.\-]*://[^\s<>\"'`)\]]+|\bwww\.[^\s<>\"'`)\]]+")
_EMAIL = re.compile(r"\b([\w.+\-]+)@[\w\-]+(?:\.[\w\-]+)+")
_HANDLE = re.compile(r"(?<![\w.@/])@([A-Za-z0-9][A-Za-z0-9_\-]*)")
_RUN = re.compile(r"[^\W\d_][^\W_]*(?:_+[^\W_]+)*")
_CAMEL_SPLIT = re.compile(r"[A-Z]+(?![a-z])|[A-Z]?[a-z]+|[^\W\d_]+")
_LETTERS = re.compile(r"[^\W\d_]{3,}")
_URL_PART = re.compile(r"[A-Za-z]+")
_CAMEL = re.compile(r"[a-z][A-Z]|[A-Z]{2}[a-z]")
# Host labels that say nothing about a project.
_HOST_NOISE = frozenset("www com org net io dev html htm php aspx readthedocs github gitlab http https".split())

SOURCE_KINDS = frozenset({"python", "javascript", "typescript", "rust", "go", "c", "cpp", "java", "shell", "yaml", "toml",
                          "ruby", "css"})


@dataclass(frozen=True, slots=True)
class Use:
    """What the workspace says about one word."""

    files: int  # distinct files using it
    count: int  # uses, at most PER_FILE_CAP per file
    raw: int  # uses, uncapped
    sources: int  # bit set of PROSE | CODE | LINK | HANDLE | META

    def describe(self) -> str:
        kinds = ", ".join(name for bit, name in SOURCE_NAMES.items() if self.sources & bit)
        files = "1 file" if self.files == 1 else f"{self.files} files"
        uses = "1 use" if self.raw == 1 else f"{self.raw} uses"
        return f"{uses} in {files} of the workspace ({kinds})"


def identifier_parts(run: str) -> list[str]:
    """The words an identifier is made of, and the identifier written as one word."""
    pieces = [p for chunk in run.split("_") if chunk for p in _CAMEL_SPLIT.findall(chunk)]
    if len(pieces) > 1:
        pieces.append("".join(pieces))
    return pieces


def _url_words(url: str) -> Iterable[str]:
    body = url.split("://", 1)[-1]
    host, _, path = body.partition("/")
    for label in host.split(".")[:-1]:  # the last label is the TLD
        for part in _URL_PART.findall(label):
            if part.lower() not in _HOST_NOISE:
                yield part
    for segment in re.split(r"[/?#=&]", path):
        if segment:
            # "mindojo-victor", "README.pt-br.md", "HookWrapper"
            for chunk in re.split(r"[-.+%~]", segment):
                yield from identifier_parts(chunk)


def uses_in_text(text: str, kind: str | None, known: Callable[[str], bool] | None = None) -> dict[str, int]:
    """Word key -> uses in ``text``, packed as ``count << 5 | source bits``.

    One int per word keeps a file's record small.  Words ``known`` accepts
    (the lexicon's) are left out early: most of a file's words are English.
    """
    found: dict[str, list[int]] = {}
    skip = known or (lambda key: False)

    def add(word: str, source: int, times: int = 1) -> None:
        key = word.lower()
        if skip(key):
            return
        entry = found.get(key)
        if entry is None:
            found[key] = [times, source]
        else:
            entry[0] += times
            entry[1] |= source

    rest = text
    chunks = _special_chunks(text)
    if chunks:
        special = " ".join(text[a:b] for a, b in chunks)
        pieces, pos = [], 0
        for a, b in chunks:
            pieces.append(text[pos:a])
            pos = b
        pieces.append(text[pos:])
        rest = " ".join(pieces)
        for url in _URL.findall(special):
            for part in _url_words(url):
                add(part, LINK)
        special = _URL.sub(" ", special)
        for local in _EMAIL.findall(special):
            for part in re.split(r"[.+_\-]", local):
                for piece in _CAMEL_SPLIT.findall(part):
                    add(piece, LINK)
        special = _EMAIL.sub(" ", special)
        for handle in _HANDLE.findall(special):
            for part in re.split(r"[_\-]", handle):
                add(part, HANDLE)
            add(handle.replace("-", "").replace("_", ""), HANDLE)
        rest += " " + _HANDLE.sub(" ", special)
    if kind in SOURCE_KINDS:
        # Comments and docstrings are typed prose (where typos live); the rest is code.
        prose, code = _split_source(rest, kind)
        _add_runs(add, prose, PROSE)
        _add_runs(add, code, CODE)
    else:
        _add_runs(add, rest, PROSE)
    return {k: (v[0] << 5) | v[1] for k, v in found.items() if len(k) >= 3 and _LETTERS.fullmatch(k)}


_MARKERS = ("://", "www.", "@")


def _special_chunks(text: str) -> list[tuple[int, int]]:
    """Spans of the whitespace-delimited chunks holding a URL, an address or a handle.

    Found from the markers with ``str.find`` (C loops): a regular expression
    that must try every position of a long file is what made this slow.
    """
    spans = []
    for marker in _MARKERS:
        pos = text.find(marker)
        while pos != -1:
            start = max(text.rfind(" ", 0, pos), text.rfind("\n", 0, pos), text.rfind("\t", 0, pos)) + 1
            ends = [e for e in (text.find(" ", pos), text.find("\n", pos), text.find("\t", pos)) if e != -1]
            end = min(ends) if ends else len(text)
            spans.append((start, end))
            pos = text.find(marker, end)
    if len(spans) < 2:
        return spans
    spans.sort()
    merged = [spans[0]]
    for a, b in spans[1:]:
        if a <= merged[-1][1]:
            merged[-1] = (merged[-1][0], max(b, merged[-1][1]))
        else:
            merged.append((a, b))
    return merged


def _add_runs(add: Callable[[str, int, int], None], text: str, plain_source: int) -> None:
    for run, times in Counter(_RUN.findall(text)).items():
        if "_" in run or _CAMEL.search(run):
            for part in _identifier_parts_cached(run):
                add(part, CODE, times)
        elif len(run) >= 3:
            add(run, plain_source, times)


@lru_cache(maxsize=65536)
def _identifier_parts_cached(run: str) -> tuple[str, ...]:
    return tuple(p for p in identifier_parts(run) if len(p) >= 3)


# Comments and docstrings, found by a regular expression per family of
# languages: cheaper than the extractors by far, and exact enough to tell
# typed prose from identifiers (a "#" inside a string is the rare miss).
_HASH_COMMENTS = re.compile(r'"""[\s\S]*?"""|\'\'\'[\s\S]*?\'\'\'|#[^\n]*')
_SLASH_COMMENTS = re.compile(r"//[^\n]*|/\*[\s\S]*?\*/")
_COMMENTS = {"python": _HASH_COMMENTS, "shell": _HASH_COMMENTS, "yaml": _HASH_COMMENTS, "toml": _HASH_COMMENTS,
             "ruby": _HASH_COMMENTS}


def _split_source(text: str, kind: str) -> tuple[str, str]:
    """(comment and docstring text, everything else) of a source file."""
    pattern = _COMMENTS.get(kind, _SLASH_COMMENTS)
    return " ".join(pattern.findall(text)), pattern.sub(" ", text)


class WorkspaceVocabulary:
    """Per-file uses of the words a workspace uses, and their totals.

    ``known(key)`` filters out words the lexicon lists (they need no help),
    which keeps memory to the workspace's own words.  Files can be added
    again (a save) or removed; totals follow.  Thread-safe: a scan thread
    writes while the server reads.
    """

    def __init__(self, known: Callable[[str], bool] | None = None) -> None:
        self._known = known or (lambda key: False)
        self._files: dict[str, dict[str, int]] = {}
        self._totals: dict[str, list[int]] = {}  # key -> [files, capped count, raw count, per-source file counts...]
        self._lock = threading.Lock()
        self.total = 0  # capped uses of all tracked words: the cache's size
        self.version = 0

    def __len__(self) -> int:
        return len(self._totals)

    @property
    def files(self) -> int:
        return len(self._files)

    def add_text(self, name: str, text: str, kind: str | None) -> None:
        """Learn (or re-learn) one file's uses."""
        self._replace(name, uses_in_text(text, kind, self._known))

    def add_names(self, name: str, words: Iterable[str]) -> None:
        """Package names and dependencies from a metadata file (``name`` is its path)."""
        uses: dict[str, int] = {}
        for raw in words:
            for chunk in re.split(r"[-_.\s]", raw):
                for part in identifier_parts(chunk) if chunk else ():
                    key = part.lower()
                    if len(key) >= 3 and _LETTERS.fullmatch(key) and not self._known(key):
                        uses[key] = ((uses.get(key, 0) >> 5) + 1) << 5 | META
            joined = re.sub(r"[-_.\s]", "", raw).lower()
            if len(joined) >= 3 and _LETTERS.fullmatch(joined) and not self._known(joined):
                uses[joined] = ((uses.get(joined, 0) >> 5) + 1) << 5 | META
        self._replace(name, uses)

    def uses_of(self, name: str) -> dict[str, int] | None:
        """The packed uses learnt from one file (None if none)."""
        uses = self._files.get(name)
        return dict(uses) if uses is not None else None

    def remove(self, name: str) -> None:
        self._replace(name, {})

    def _replace(self, name: str, uses: dict[str, int]) -> None:
        with self._lock:
            old = self._files.pop(name, None)
            if old:
                self._apply(old, -1)
            if uses:
                self._files[name] = uses
                self._apply(uses, +1)
            self.version += 1

    def _apply(self, uses: dict[str, int], sign: int) -> None:
        totals = self._totals
        for key, packed in uses.items():
            raw, sources = packed >> 5, packed & 31
            capped = min(raw, PER_FILE_CAP)
            entry = totals.get(key)
            if entry is None:
                entry = totals[key] = [0, 0, 0, 0, 0, 0, 0, 0]
            entry[0] += sign
            entry[1] += sign * capped
            entry[2] += sign * raw
            for i, bit in enumerate((PROSE, CODE, LINK, HANDLE, META)):
                if sources & bit:
                    entry[3 + i] += sign
            self.total += sign * capped
            if entry[0] <= 0:
                del totals[key]

    def use(self, key: str) -> Use | None:
        """What the workspace says about ``key`` (lower case), or None."""
        entry = self._totals.get(key)
        if entry is None:
            return None
        sources = 0
        for i, bit in enumerate((PROSE, CODE, LINK, HANDLE, META)):
            if entry[3 + i] > 0:
                sources |= bit
        return Use(entry[0], entry[1], entry[2], sources)

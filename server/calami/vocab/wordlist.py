"""The plain-text project word list: parse it, edit it, write it back.

Format (documented for users in the README):

* one entry per line; surrounding whitespace is ignored; an entry is a single
  word (no spaces) and may contain ``#`` after its first character (``C#``);
* a line whose first non-blank character is ``#`` is a comment;
* comments before the first entry are the file's *header* and stay at the top;
  a comment between entries belongs to the entry below it and moves with it
  when the list is sorted; comments after the last entry stay at the end;
* entries are kept sorted case-insensitively (a stable sort, so entries that
  differ only in case keep their relative order) and exact duplicates are
  merged (their comments are kept); blank lines between entries are dropped
  because a sorted list has no groups to separate;
* case rule: an entry in lower case accepts the word in any capitalisation;
  an entry with a capital letter accepts only that exact form.

Editing happens under a file lock and with an atomic write (see
``calami.vocab.atomic``) so concurrent edits lose nothing and an error never
truncates the file.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterable

from calami.errors import CalamiError
from calami.vocab.atomic import atomic_write_bytes, locked


@dataclass
class Entry:
    word: str
    comments: list[str] = field(default_factory=list)


@dataclass
class WordList:
    """A parsed word list that can be written back without losing a comment."""

    header: list[str] = field(default_factory=list)
    entries: list[Entry] = field(default_factory=list)
    trailer: list[str] = field(default_factory=list)
    newline: str = "\n"

    @property
    def words(self) -> list[str]:
        return [e.word for e in self.entries]

    def normalise(self) -> None:
        """Sort entries case-insensitively (stable) and merge exact duplicates."""
        merged: dict[str, Entry] = {}
        for entry in self.entries:
            kept = merged.get(entry.word)
            if kept is None:
                merged[entry.word] = Entry(entry.word, list(entry.comments))
            else:
                kept.comments.extend(c for c in entry.comments if c not in kept.comments)
        self.entries = sorted(merged.values(), key=lambda e: e.word.casefold())

    def render(self) -> str:
        lines = list(self.header)
        for entry in self.entries:
            lines.extend(entry.comments)
            lines.append(entry.word)
        lines.extend(self.trailer)
        return "".join(line + self.newline for line in lines)


def parse(text: str) -> WordList:
    """Parse word-list text; never drops a line that carries content."""
    newline = "\r\n" if "\r\n" in text else "\n"
    result = WordList(newline=newline)
    pending: list[str] = []  # comments waiting for the entry below them
    seen_entry = False
    for raw in text.splitlines():
        line = raw.rstrip()
        stripped = line.strip()
        if not stripped:
            if not seen_entry:
                result.header.extend(pending)
                pending = []
                result.header.append("")
            continue
        if stripped.startswith("#"):
            pending.append(line)
            continue
        if not seen_entry:
            # Header comments stay on top; only those directly above the
            # first entry with no blank line in between would be ambiguous,
            # and we keep them on top too (see the module docstring).
            result.header.extend(pending)
            pending = []
            seen_entry = True
        result.entries.append(Entry(stripped, pending))
        pending = []
    if seen_entry:
        result.trailer = pending
    else:
        result.header.extend(pending)
    return result


def problems(words: WordList) -> list[str]:
    """Entries that cannot match any token (they contain whitespace)."""
    return [e.word for e in words.entries if any(ch.isspace() for ch in e.word)]


def validate_new_word(word: str) -> str:
    """Check one word given on the command line; returns it stripped."""
    cleaned = word.strip()
    if not cleaned:
        raise CalamiError("cannot add an empty word")
    if any(ch.isspace() for ch in cleaned):
        raise CalamiError(f"{cleaned!r} contains whitespace; add one word per argument")
    if cleaned.startswith("#"):
        raise CalamiError(f"{cleaned!r} starts with '#', which marks a comment in the word list")
    return cleaned


def read(path: Path) -> WordList:
    """Read a word list; a missing file is an empty list."""
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        return WordList()
    except OSError as exc:
        raise CalamiError(f"{path}: cannot read word list: {exc.strerror or exc}") from exc
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise CalamiError(f"{path}: word list is not UTF-8 text (byte {exc.start})") from exc
    return parse(text)


def add_words(path: str | os.PathLike[str], words: Iterable[str]) -> list[str]:
    """Add words to the list at ``path`` (created if missing); returns those newly added."""
    target = Path(path)
    wanted = [validate_new_word(w) for w in words]
    with locked(target):
        current = read(target)
        present = set(current.words)
        added: list[str] = []
        for word in wanted:
            if word not in present:
                present.add(word)
                added.append(word)
                current.entries.append(Entry(word))
        current.normalise()
        if added:  # an add that changes nothing leaves the file as the user wrote it
            _write(target, current)
    return added


def remove_words(path: str | os.PathLike[str], words: Iterable[str]) -> list[str]:
    """Remove words (exact match) with their attached comments; returns those removed."""
    target = Path(path)
    unwanted = {w.strip() for w in words}
    with locked(target):
        if not target.exists():
            return []
        current = read(target)
        removed = [e.word for e in current.entries if e.word in unwanted]
        if not removed:
            return []
        current.entries = [e for e in current.entries if e.word not in unwanted]
        current.normalise()
        _write(target, current)
    return sorted(set(removed), key=str.casefold)


def _write(target: Path, words: WordList) -> None:
    try:
        atomic_write_bytes(target, words.render().encode("utf-8"))
    except OSError as exc:
        raise CalamiError(f"{target}: cannot write word list: {exc.strerror or exc}") from exc

"""``calami check --fix`` / ``--diff``: apply the confident fixes, or show them.

Only a finding marked confident (its best fix passed the confident
threshold) is applied, and only its own characters change: findings come
from prose spans, so code is never touched, and the rest of the file (line
endings, a UTF-8 byte-order mark, every other byte) is written back as read.

A file is fixed only if its bytes on disk are still the ones that were
checked (same SHA-256): if an editor saved it meanwhile, the file is refused
and left alone.  The write is atomic (``vocab.atomic``), so a reader or a
crash never sees half a file.
"""

from __future__ import annotations

import difflib
import hashlib
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Iterable, Sequence

from calami.findings import DIRECTIVE, Finding

if TYPE_CHECKING:
    from calami.walk import Skipped

BOM = b"\xef\xbb\xbf"


class Refused(Exception):
    """The file cannot be fixed safely (changed on disk, unreadable); it was left as it is."""


@dataclass(frozen=True, slots=True)
class Edit:
    start: int
    end: int
    replacement: str


def digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def edits_for(text: str, findings: Iterable[Finding]) -> list[Edit]:
    """The confident fixes, in order, none overlapping another, each still over its word."""
    out: list[Edit] = []
    last_end = -1
    for f in sorted(findings, key=lambda f: (f.start, f.end)):
        if not f.confident or f.kind == DIRECTIVE or not f.suggestions:
            continue
        best = f.suggestions[0].text
        if f.start < last_end or text[f.start:f.end] != f.word or best == f.word:
            continue
        out.append(Edit(f.start, f.end, best))
        last_end = f.end
    return out


def apply(text: str, edits: Sequence[Edit]) -> str:
    """``text`` with the (sorted, disjoint) edits made."""
    pieces = []
    pos = 0
    for edit in edits:
        pieces.append(text[pos:edit.start])
        pieces.append(edit.replacement)
        pos = edit.end
    pieces.append(text[pos:])
    return "".join(pieces)


def read_with_digest(path: Path, max_bytes: int) -> "tuple[str | Skipped, str]":
    """Like ``walk.read_document``, plus the SHA-256 of exactly the bytes that were decoded."""
    from calami.walk import decode_document, read_document

    with open(path, "rb") as handle:
        data = handle.read(max_bytes + 1)
    if len(data) > max_bytes:
        return read_document(path, max_bytes), ""  # the "too large" note
    return decode_document(path, data), digest(data)


def read_checked(path: Path, expected_digest: str) -> tuple[bytes, str]:
    """The file's bytes and text, if they are still what was checked; else ``Refused``."""
    try:
        data = path.read_bytes()
    except OSError as exc:
        raise Refused(f"cannot read it again: {exc.strerror or exc}") from None
    if digest(data) != expected_digest:
        raise Refused("changed on disk since it was checked; not fixed (run calami check again)")
    try:
        return data, data.decode("utf-8-sig")
    except UnicodeDecodeError:  # cannot happen for a file that was checked, unless it changed
        raise Refused("no longer UTF-8 text; not fixed") from None


def write_fixed(path: Path, expected_digest: str, edits: Sequence[Edit]) -> str:
    """Apply ``edits`` to the file atomically; returns the old text (for reports)."""
    from calami.vocab.atomic import atomic_write_bytes

    data, text = read_checked(path, expected_digest)
    fixed = apply(text, edits)
    out = (BOM if data.startswith(BOM) else b"") + fixed.encode("utf-8")
    # Last look right before the rename: an editor may have saved meanwhile.
    try:
        if digest(path.read_bytes()) != expected_digest:
            raise Refused("changed on disk while being fixed; not fixed (run calami check again)")
    except OSError as exc:
        raise Refused(f"cannot read it again: {exc.strerror or exc}") from None
    atomic_write_bytes(path, out)
    return text


def unified_diff(display: str, old: str, new: str) -> str:
    """A unified diff that ``git apply`` / ``patch -p1`` accept; line endings kept as they are."""
    if old == new:
        return ""
    a = _lines(old)
    b = _lines(new)
    lines = []
    for line in difflib.unified_diff(a, b, f"a/{display}", f"b/{display}", n=3):
        if not line.endswith(("\n", "\r")):
            line += "\n\\ No newline at end of file\n"
        lines.append(line)
    return "".join(lines)


def _lines(text: str) -> list[str]:
    """Lines split at "\\n" only (as git and patch do), each with its own ending."""
    parts = text.split("\n")
    lines = [part + "\n" for part in parts[:-1]]
    if parts[-1]:
        lines.append(parts[-1])
    return lines

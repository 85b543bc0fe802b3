"""Output of ``calami check``: findings placed at line/column, in three formats.

* ``text``: for people at a terminal (``calami.report.text``);
* ``json``: one array of findings for scripts (``calami.report.json_array``);
* ``sarif``: SARIF 2.1.0 for code-scanning services (``calami.report.sarif``).

All three share ``Located``: 1-based lines and columns counted in Unicode
code points, end exclusive, so a finding means the same in every format.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Iterable, Sequence

from calami.findings import Finding
from calami.text.spans import LineIndex


@dataclass(frozen=True)
class Located:
    """A finding with its file and its 1-based, code-point, end-exclusive position."""

    path: str
    line: int
    column: int
    end_line: int
    end_column: int
    finding: Finding
    context: str  # the source line holding the start of the word, no line ending


def locate(path: str, text: str, findings: Iterable[Finding], index: LineIndex | None = None) -> list[Located]:
    """Place findings of one document; ``index`` may be passed if already built."""
    index = index or LineIndex(text)
    placed: list[Located] = []
    for finding in sorted(findings, key=lambda f: (f.start, f.end)):
        line, column = index.position(finding.start)
        end_line, end_column = index.position(finding.end)
        placed.append(
            Located(path, line + 1, column + 1, end_line + 1, end_column + 1, finding, _line_text(text, index, line))
        )
    return placed


def _line_text(text: str, index: LineIndex, line: int) -> str:
    start = index.line_starts[line]
    end = index.line_starts[line + 1] if line + 1 < len(index.line_starts) else len(text)
    return text[start:end].rstrip("\r\n")


# Skip categories that mean "could not be read", not "chose not to read".
UNREADABLE = ("not UTF-8",)


@dataclass
class Summary:
    """Counts for the closing line of the text report and for SARIF's invocation."""

    files_checked: int = 0
    files_with_findings: int = 0
    files_skipped: int = 0
    nonword: int = 0
    realword: int = 0
    notes: list[str] | None = None
    failed: bool = False  # an I/O or config problem happened (exit code 2)
    words: int = 0  # prose words checked
    skipped: dict[str, int] = field(default_factory=dict)  # why -> files (or folders) left out

    @property
    def findings(self) -> int:
        return self.nonword + self.realword

    def skip(self, category: str | None) -> None:
        self.files_skipped += 1
        key = category or "other"
        self.skipped[key] = self.skipped.get(key, 0) + 1

    def nothing_checked_for_an_error(self) -> bool:
        """True when not one file was checked and an error (or an unreadable file) is why."""
        if self.files_checked:
            return False
        return self.failed or any(self.skipped.get(c) for c in UNREADABLE)

    def count(self, located: Sequence[Located], words: int = 0) -> None:
        self.files_checked += 1
        self.words += words
        if located:
            self.files_with_findings += 1
        for item in located:
            if item.finding.kind == "realword":
                self.realword += 1
            else:
                self.nonword += 1

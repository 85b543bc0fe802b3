"""The config's skip patterns (``skip-patterns``): text they match is never checked.

Patterns are user-written regular expressions, so one of them may backtrack
catastrophically on some document.  Each search runs with the ``regex``
module's ``timeout`` argument; a pattern that runs out of time is skipped for
that document and reported, and checking goes on.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import regex

# Seconds one pattern may spend on one document (generous: a sane pattern
# scans a megabyte in milliseconds).
DEFAULT_TIMEOUT = 1.0


@dataclass(frozen=True)
class IgnorePattern:
    source: str
    compiled: "regex.Pattern[str]"
    origin: str  # "file:line", for messages


def compile_pattern(source: str, origin: str) -> IgnorePattern:
    """Compile one pattern (MULTILINE: ``^``/``$`` match at line ends); raises regex.error."""
    return IgnorePattern(source, regex.compile(source, regex.MULTILINE | regex.VERSION0), origin)


def holes(
    text: str, patterns: Sequence[IgnorePattern], timeout: float = DEFAULT_TIMEOUT
) -> tuple[list[tuple[int, int]], list[str]]:
    """Ranges of ``text`` matched by the patterns, and warnings for patterns that timed out."""
    found: list[tuple[int, int]] = []
    warnings: list[str] = []
    for pattern in patterns:
        mine: list[tuple[int, int]] = []
        try:
            for match in pattern.compiled.finditer(text, timeout=timeout):
                if match.end() > match.start():
                    mine.append(match.span())
        except TimeoutError:
            warnings.append(
                f"{pattern.origin}: skip pattern {pattern.source!r} took longer than "
                f"{timeout:g}s on this document and was skipped"
            )
            continue
        found.extend(mine)
    return found, warnings

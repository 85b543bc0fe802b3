"""In-file directives: comments that tell calami to leave a passage alone.

A team adopting calami needs to mark, inside the file, a line or a block that
is not prose (a word list, a quotation, sample output) and words that are
right in this one file.  The syntax is our own and looks like a call::

    calami(hush-next)          the next line is not checked
    calami(hush-here)          the line holding the directive is not checked
    calami(hush-begin)         lines up to calami(hush-end) are not checked
    calami(hush-end)
    calami(known WORD ...)     these words are right in this file

It counts only inside the document kind's comment: an HTML comment
(``<!-- calami(hush-next) -->``) in Markdown and HTML, a comment in rST
(``.. calami(hush-next)``), a line comment in source files (``#``, ``//``,
``%`` in LaTeX), and a line of its own (optionally after ``#``) in plain text
and commit messages.  Markdown fenced code blocks are never read for
directives, so documentation can show them.

Why spans and a filter, not a checker setting: ``Checker.check_sentence``
must stay a pure function of its tokens (the language server caches per
sentence).  Hushed lines are holes cut out of the prose spans, exactly like
the project's skip patterns; known words filter the findings after scoring.
A directive with a typo is a ``Problem``, never silently ignored.
"""

from __future__ import annotations

import bisect
import re
from dataclasses import dataclass, field
from typing import Iterable, Sequence, TypeVar

import regex

from calami.text.spans import Span

NAME = "calami"
HUSH_NEXT = "hush-next"
HUSH_HERE = "hush-here"
HUSH_BEGIN = "hush-begin"
HUSH_END = "hush-end"
KNOWN = "known"
VERBS = (HUSH_NEXT, HUSH_HERE, HUSH_BEGIN, HUSH_END, KNOWN)

# Comment bodies per document kind: group "body" holds the comment's text.
_HASH = regex.compile(r"#(?P<body>[^\r\n]*)")
_SLASH = regex.compile(r"//(?P<body>[^\r\n]*)")
_PERCENT = regex.compile(r"(?<!\\)%(?P<body>[^\r\n]*)")
_HTML = regex.compile(r"<!--(?P<body>[^\r\n]*?)-->")
_RST = regex.compile(r"(?m)^[ \t]*\.\.[ \t]+(?P<body>[^\r\n]*)")
_LINE = regex.compile(r"(?m)^[ \t]*(?:#[ \t]*)?(?P<body>[A-Za-z]{4,8}[ \t]*[(:][^\r\n]*)")

COMMENTS: dict[str, regex.Pattern[str]] = {
    "markdown": _HTML, "html": _HTML, "rst": _RST, "latex": _PERCENT,
    "plain": _LINE, "commit": _LINE,
    "python": _HASH, "shell": _HASH, "yaml": _HASH, "toml": _HASH,
    "javascript": _SLASH, "typescript": _SLASH, "rust": _SLASH, "go": _SLASH,
    "c": _SLASH, "cpp": _SLASH, "java": _SLASH,
}

# Inside a comment body: something that looks like a call to us, and the bare
# name followed by a verb (a directive without its parentheses).
_CALL = regex.compile(r"\b(?P<name>[A-Za-z]{4,8})[ \t]*\((?P<args>[^()\r\n]*)(?P<close>\))?")
_BARE = regex.compile(r"(?i)\bcalami\b[ \t]*[:=]?[ \t]*(?P<verb>[A-Za-z][\w-]*)")
_WORD_SEP = regex.compile(r"[\s,]+")
# A line worth parsing: our name (any case), or a call whose verb is ours.
_NEEDLES = ("calami", "(hush", "(known")
_TRIGGER = re.compile(r"(?i)calami|\((?:hush|known)")


@dataclass(frozen=True, slots=True)
class Problem:
    """A directive calami could not read: where it is and what is wrong."""

    start: int
    end: int
    message: str
    fix: str | None = None  # the directive as it was probably meant


@dataclass
class Directives:
    """What a document's directives ask for."""

    holes: list[tuple[int, int]] = field(default_factory=list)  # ranges not to check
    known: frozenset[str] = frozenset()  # words accepted in this file, as written
    known_at: list[tuple[int, int]] = field(default_factory=list)  # where the known directives are
    problems: list[Problem] = field(default_factory=list)

    def narrow(self, spans: "Sequence[Span]") -> "list[Span]":
        """The spans with the hushed lines and the directives cut out."""
        if not self.holes:
            return list(spans)
        from calami.text.spans import subtract

        return subtract(spans, self.holes)

    def __bool__(self) -> bool:
        return bool(self.holes or self.known or self.problems)

    def accepts(self, word: str) -> bool:
        """As the project lexicon does: an entry in lower case accepts any capitalisation."""
        return word in self.known or word.lower() in self.known


NONE = Directives()

F = TypeVar("F")


def drop_known(findings: Iterable[F], directives: Directives) -> list[F]:
    """Findings whose word the file does not accept (``known``)."""
    if not directives.known:
        return list(findings)
    return [f for f in findings if not directives.accepts(f.word)]  # type: ignore[attr-defined]


def problem_notes(text: str, directives: Directives) -> list[str]:
    """The problems as notes for the command line: ``line L, column C: message``."""
    if not directives.problems:
        return []
    from calami.text.spans import LineIndex

    index = LineIndex(text)
    notes = []
    for problem in directives.problems:
        line, column = index.position(problem.start)
        fix = f" (write {problem.fix})" if problem.fix and problem.fix not in problem.message else ""
        notes.append(f"line {line + 1}, column {column + 1}: {problem.message}{fix}")
    return notes


def directive_text(verb: str, words: Sequence[str] = ()) -> str:
    """The directive itself, e.g. ``calami(known foo bar)``."""
    return f"{NAME}({' '.join([verb, *words])})"


def comment_line(kind: str, directive: str) -> str:
    """The directive wrapped as a comment of ``kind``, without indentation or line break."""
    comment = COMMENTS.get(kind, _LINE)
    if comment is _HTML:
        return f"<!-- {directive} -->"
    if comment is _RST:
        return f".. {directive}"
    if comment is _PERCENT:
        return f"% {directive}"
    if comment is _SLASH:
        return f"// {directive}"
    if comment is _HASH:
        return f"# {directive}"
    return directive


def read(text: str, kind: str) -> Directives:
    """The directives of ``text`` read as ``kind`` (unknown kinds: lines of their own).

    Only lines holding a trigger (our name, or a call-like ``(hush`` or
    ``(known``) are parsed, so a file without directives costs one scan at
    C speed, whatever its size: the server does this on every edit.
    """
    comment = COMMENTS.get(kind, _LINE)
    fences: list[tuple[int, int]] | None = None
    found: list[tuple[int, int, str, list[str]]] = []  # (start, end, verb, words)
    problems: list[Problem] = []
    anchored = comment is _LINE
    done_until = -1
    for at in _triggers(text):
        if at < done_until:
            continue
        line_start = _line_start(text, at)
        line_end = _line_end(text, at)
        done_until = line_end
        if kind == "markdown":
            if fences is None:
                fences = _fenced_ranges(text)
            if _inside(fences, line_start):
                continue
        line = text[line_start:line_end]
        for match in comment.finditer(line):
            body_start = line_start + match.start("body")
            body = match.group("body")
            before = len(found) + len(problems)
            for call in _CALL.finditer(body):
                if anchored and call.start() != 0:
                    break
                _read_call(call, body_start, found, problems)
                if anchored:
                    break
            if len(found) + len(problems) == before:
                bare = _BARE.search(body)
                if bare and (not anchored or bare.start() == 0):
                    near = _nearest(bare.group("verb").lower(), VERBS, 2)
                    if near:
                        start, end = body_start + bare.start(), body_start + bare.end()
                        problems.append(Problem(start, end, f"calami directive without parentheses: write {directive_text(near)}",
                                                directive_text(near)))
    if not found and not problems:
        return NONE
    return _resolve(text, found, problems)


def _triggers(text: str) -> list[int]:
    """Offsets of our name (any case) and of "(hush" / "(known", in order."""
    lowered = text.lower()
    if len(lowered) != len(text):  # a character lower-cased to two: offsets would drift
        return [m.start() for m in _TRIGGER.finditer(text)]
    found = []
    for needle in _NEEDLES:
        at = lowered.find(needle)
        while at >= 0:
            found.append(at)
            at = lowered.find(needle, at + 1)
    return sorted(found)


def _line_end(text: str, start: int) -> int:
    n = text.find("\n", start)
    r = text.find("\r", start, n if n >= 0 else len(text))
    if r >= 0:
        return r
    return n if n >= 0 else len(text)


def _read_call(call: "regex.Match[str]", offset: int, found: list, problems: list[Problem]) -> None:
    name = call.group("name")
    start, end = offset + call.start(), offset + call.end()
    if name != NAME:
        if _distance(name.lower(), NAME) > 1:
            return  # some other call in a comment, not ours
        args = call.group("args").strip()
        verb = args.split()[0] if args.split() else ""
        fix = directive_text(verb, args.split()[1:]) if verb in VERBS else None
        problems.append(Problem(start, end, f"'{name}(' looks like a misspelt calami directive; directives start with '{NAME}('", fix))
        return
    if call.group("close") is None:
        problems.append(Problem(start, end, f"calami directive without its closing ')'"))
        return
    parts = [p for p in _WORD_SEP.split(call.group("args").strip()) if p]
    if not parts:
        problems.append(Problem(start, end, f"empty calami directive; expected one of {', '.join(VERBS)}"))
        return
    verb, words = parts[0], parts[1:]
    if verb not in VERBS:
        near = _nearest(verb.lower(), VERBS, 2)
        hint = f"; did you mean '{near}'?" if near else f"; expected one of {', '.join(VERBS)}"
        problems.append(Problem(start, end, f"unknown calami directive '{verb}'{hint}",
                                directive_text(near, words) if near else None))
        return
    if verb == KNOWN and not words:
        problems.append(Problem(start, end, f"{directive_text(KNOWN)} needs at least one word"))
        return
    if verb != KNOWN and words:
        problems.append(Problem(start, end, f"{directive_text(verb)} takes no words (got '{' '.join(words)}')",
                                directive_text(verb)))
        return
    found.append((start, end, verb, words))


def _resolve(text: str, found: list[tuple[int, int, str, list[str]]], problems: list[Problem]) -> Directives:
    holes: list[tuple[int, int]] = []
    known: set[str] = set()
    known_at: list[tuple[int, int]] = []
    block: tuple[int, int] | None = None  # (directive offset, its line's start) of an open hush-begin
    for start, end, verb, words in sorted(found):
        holes.append((start, end))  # the directive itself is never prose
        if verb == KNOWN:
            known_at.append((start, end))
            known.update(words)
        elif verb == HUSH_NEXT:
            after = _next_line(text, start)
            holes.append((after, _next_line(text, after)))
        elif verb == HUSH_HERE:
            holes.append((_line_start(text, start), _next_line(text, start)))
        elif verb == HUSH_BEGIN:
            if block is not None:
                problems.append(Problem(start, end, f"{directive_text(HUSH_BEGIN)} inside the hushed block begun on "
                                        f"line {_line_number(text, block[0])}"))
                continue
            block = (start, _line_start(text, start))
        elif verb == HUSH_END:
            if block is None:
                problems.append(Problem(start, end, f"{directive_text(HUSH_END)} without a {directive_text(HUSH_BEGIN)} before it"))
                continue
            holes.append((block[1], _next_line(text, start)))
            block = None
    if block is not None:
        begin = block[0]
        problems.append(Problem(begin, begin + len(directive_text(HUSH_BEGIN)),
                                f"{directive_text(HUSH_BEGIN)} has no {directive_text(HUSH_END)}; hushed to the end of the file"))
        holes.append((block[1], len(text)))
    problems.sort(key=lambda p: p.start)
    return Directives(holes, frozenset(known), known_at, problems)


def _line_start(text: str, at: int) -> int:
    n = text.rfind("\n", 0, at)
    r = text.rfind("\r", n + 1, at)  # bounded: never scans back past the last "\n"
    return max(n, r) + 1


def _next_line(text: str, at: int) -> int:
    """Start of the line after the one holding ``at`` (``len(text)`` on the last line)."""
    end = _line_end(text, at)
    if end >= len(text):
        return len(text)
    return end + 2 if text.startswith("\r\n", end) else end + 1


def _line_number(text: str, at: int) -> int:
    return text.count("\n", 0, at) + 1  # only for a message about a rare mistake


def _fenced_ranges(text: str) -> list[tuple[int, int]]:
    """Offsets of Markdown fenced code blocks (opening fence to closing fence)."""
    fences = []
    for mark in ("```", "~~~"):
        at = text.find(mark)
        while at >= 0:
            start = at
            while start > 0 and at - start < 3 and text[start - 1] == " ":
                start -= 1
            run_end = at
            while run_end < len(text) and text[run_end] == mark[0]:
                run_end += 1
            if start == 0 or text[start - 1] in "\r\n":  # a fence opens a line (up to three spaces before)
                fences.append((start, text[at:run_end]))
            at = text.find(mark, run_end)
    fences.sort()
    ranges: list[tuple[int, int]] = []
    opened: tuple[int, str] | None = None
    for start, fence in fences:
        if opened is None:
            opened = (start, fence)
        elif fence[0] == opened[1][0] and len(fence) >= len(opened[1]):
            ranges.append((opened[0], _next_line(text, start)))
            opened = None
    if opened is not None:
        ranges.append((opened[0], len(text)))
    return ranges


def _inside(ranges: list[tuple[int, int]], offset: int) -> bool:
    i = bisect.bisect_right(ranges, (offset, len(ranges) and 1 << 62)) - 1
    return i >= 0 and ranges[i][0] <= offset < ranges[i][1]


def _nearest(word: str, choices: Sequence[str], limit: int) -> str | None:
    best = min(choices, key=lambda c: _distance(word, c))
    return best if _distance(word, best) <= limit else None


def _distance(a: str, b: str) -> int:
    """Restricted Damerau-Levenshtein distance (small strings only)."""
    prev2: list[int] = []
    prev = list(range(len(b) + 1))
    for i in range(1, len(a) + 1):
        row = [i] + [0] * len(b)
        for j in range(1, len(b) + 1):
            cost = 0 if a[i - 1] == b[j - 1] else 1
            row[j] = min(prev[j] + 1, row[j - 1] + 1, prev[j - 1] + cost)
            if i > 1 and j > 1 and a[i - 1] == b[j - 2] and a[i - 2] == b[j - 1]:
                row[j] = min(row[j], prev2[j - 2] + 1)
        prev2, prev = prev, row
    return prev[len(b)]

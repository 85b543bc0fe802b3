"""Git commit messages, as an editor shows them for ``git commit``.

Skipped: comment lines (``#`` or the configured comment character), all
below the scissors line, the diff that ``git commit -v`` appends, trailer
lines (``Signed-off-by: ...``), indented blocks (pasted logs and code) and
inline code in backticks.  The first line is the subject.
"""

from __future__ import annotations

import regex

from calami.text.formats.markdown_inline import inline_holes
from calami.text.formats.textscan import ExtractOptions, SpanList, cut, indent_of, is_blank, iter_lines
from calami.text.spans import Span

# Trailer keys git users write (common practice; git itself accepts any token).
_KNOWN_TRAILER = regex.compile(
    r"(?i)(?:signed-off-by|co-authored-by|reviewed-by|acked-by|tested-by|reported-by|suggested-by|"
    r"helped-by|cc|change-id|fixes|closes|resolves|refs?|see-also|bug|link|issue)\s*:\s"
)
_ANY_TRAILER = regex.compile(r"[A-Za-z][A-Za-z0-9-]*\s*:\s+\S")
_SCISSORS = regex.compile(r"[ \t]*-+ >8 -+[ \t]*$")


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    comment = (options.comment_char if options else "#") or "#"
    rows = _message_lines(text, comment)
    # The last paragraph is a trailer block when every line in it looks like one.
    trailer_rows: set[int] = set()
    last_para = _last_paragraph(text, rows)
    first_row = next((i for i, r in enumerate(rows) if not is_blank(text, *r)), -1)
    if last_para and first_row not in last_para and all(
        _ANY_TRAILER.match(text, s, e) for s, e in (rows[i] for i in last_para)
    ):
        trailer_rows.update(last_para)
    out = SpanList(text)
    subject_done = False
    for i, (start, end) in enumerate(rows):
        if is_blank(text, start, end):
            out.brk()
            continue
        if i in trailer_rows or _KNOWN_TRAILER.match(text, start, end):
            out.brk()
            continue
        col, _ = indent_of(text, start, end)
        if col >= 4 and subject_done:
            out.brk()  # pasted output or code
            continue
        kind = "text" if subject_done else "subject"
        out.add(start, end, kind, not subject_done)
        if not subject_done:
            out.brk()
        subject_done = True
    holes = []
    for start, end, _kind, _breaks in out.rows:
        holes.extend(inline_holes(text, start, end))
    return cut(text, out.rows, holes)


def _message_lines(text: str, comment: str) -> list[tuple[int, int]]:
    rows: list[tuple[int, int]] = []
    for start, end, _next in iter_lines(text):
        if text.startswith(comment, start):
            if _SCISSORS.match(text, start + len(comment), end):
                break
            continue
        if text.startswith("diff --git ", start):
            break
        rows.append((start, end))
    return rows


def _last_paragraph(text: str, rows: list[tuple[int, int]]) -> list[int]:
    i = len(rows) - 1
    while i >= 0 and is_blank(text, *rows[i]):
        i -= 1
    para = []
    while i >= 0 and not is_blank(text, *rows[i]):
        para.append(i)
        i -= 1
    return para

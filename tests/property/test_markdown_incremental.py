"""Invariant: incremental Markdown extraction equals a full extraction after any edits."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from calami.text.formats import extract
from calami.text.formats.markdown_incremental import common_prefix, common_suffix, extract_state, update

# Block starters and closers that change how the lines after them parse:
# fences, front matter, lists, quotes, setext underlines, HTML blocks, tables,
# reference definitions, indented code, $$ math, CRLF and lone CR.
PIECES = [
    "word", "teh", "Some prose here", " ", "\n", "\n\n", "\r\n", "\r", "\t", "    ",
    "```", "```\n", "~~~\n", "---\n", "+++\n", "===\n", "- ", "1. ", "> ", "# ", "* * *\n",
    "<div>\n", "</div>\n", "<!-- ", " -->\n", "<pre>\n", "</pre>\n", "| a | b |\n|---|---|\n",
    "[ref]: http://x.org \"t\"\n", "$$\n", "`code`", "**bold**", "😀", "漢字",
]
fragments = st.lists(st.sampled_from(PIECES), max_size=10).map("".join)
documents = st.lists(st.sampled_from(PIECES), min_size=0, max_size=60).map("".join)


@st.composite
def edit(draw):
    a, b = sorted((draw(st.floats(0, 1)), draw(st.floats(0, 1))))
    kind = draw(st.sampled_from(["insert", "delete", "replace"]))
    return a, (a if kind == "insert" else b), ("" if kind == "delete" else draw(fragments))


def _apply(text: str, change: tuple[float, float, str]) -> str:
    a, b, new = change
    start, end = int(a * len(text)), int(b * len(text))
    return text[:start] + new + text[end:]


@settings(max_examples=400, deadline=None)
@given(documents, st.lists(edit(), min_size=1, max_size=6))
def test_incremental_equals_full(text, changes):
    state = extract_state(text)
    for change in changes:
        text = _apply(text, change)
        state = update(state, text)
        full = extract_state(text)
        assert state.spans == extract(text, "markdown")
        assert state.checkpoints == full.checkpoints


def test_incremental_on_a_large_document_reuses_the_tail():
    # Many paragraphs, a fence far away: an edit in the middle must not change
    # the spans before or after it, and the result must equal a full parse.
    text = "".join(f"Paragraph {i} has some words.\n\n" for i in range(3000)) + "```\ncode teh\n```\n"
    state = extract_state(text)
    cut = text.index("Paragraph 1500 ")
    edited = text[:cut] + "x" + text[cut:]
    after = update(state, edited)
    assert after.spans == extract(edited, "markdown")
    # Opening a fence in the middle turns the rest into code: still exact.
    fenced = text[:cut] + "```\n" + text[cut:]
    assert update(state, fenced).spans == extract(fenced, "markdown")


@given(st.text(alphabet="ab\n", max_size=30), st.text(alphabet="ab\n", max_size=30))
def test_common_prefix_and_suffix(a, b):
    p = common_prefix(a, b)
    assert a[:p] == b[:p] and (p == min(len(a), len(b)) or a[p] != b[p])
    limit = min(len(a), len(b)) - p
    s = common_suffix(a, b, limit)
    assert s <= limit and a[len(a) - s:] == b[len(b) - s:]
    assert s == limit or a[len(a) - s - 1] != b[len(b) - s - 1]


def test_common_prefix_long_strings():
    a = "x" * 10000 + "a" + "y" * 9000
    b = "x" * 10000 + "b" + "y" * 9000
    assert common_prefix(a, b) == 10000
    assert common_suffix(a, b, 9000 + 9999) == 9000


def test_closing_front_matter_later_reparses_from_the_top():
    # An unclosed "---" block is a thematic break, not front matter; closing it
    # further down turns everything above into front matter.
    text = "---\ntitle: teh\n\nSome prose.\n\nMore prose here.\n"
    state = extract_state(text)
    edited = text.replace("More", "---\nMore")
    assert update(state, edited).spans == extract(edited, "markdown")

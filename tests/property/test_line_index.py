"""The fast line index of the server agrees with the reference LineIndex on every text."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from calami.lsp.positions import _Lines
from calami.text.spans import LineIndex

# LSP's breaks plus every other character str.splitlines breaks at (Python docs,
# "str.splitlines"), which must not start a line for LSP.
ALPHABET = ["a", "é", "😀", " ", "\n", "\r", "\r\n", "\x0b", "\x0c", "\x1c", "\x1d", "\x1e", "\x85", "\u2028", "\u2029"]


@settings(max_examples=400, deadline=None)
@given(st.lists(st.sampled_from(ALPHABET), max_size=30).map("".join))
def test_fast_line_starts_equal_the_reference(text: str) -> None:
    assert _Lines(text).line_starts == LineIndex(text).line_starts
    assert _Lines(text).length == len(text)

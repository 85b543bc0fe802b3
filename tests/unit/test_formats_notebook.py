"""Jupyter notebooks: the Markdown cells, mapped back into the JSON.

The oracle is nbformat (the Jupyter project's reference reader and writer
of .ipynb files; test-only here): it writes the notebooks in the layout
Jupyter saves, and its reading of each Markdown cell, run through our
Markdown extractor, must give exactly the words our spans hold in the JSON.
"""

from __future__ import annotations

import json
from collections import Counter

import pytest
import regex

from calami.text.formats import detect_kind, extract

nbformat = pytest.importorskip("nbformat")
v4 = pytest.importorskip("nbformat.v4")

_WORD = regex.compile(r"[\p{L}\p{M}\p{N}'’]+")

CELLS = [
    ("markdown", '# The "planner" notebook\n\nIt reads the *beds* and writes a `plan`.\n\n'
                 "```python\nx = 1  # code in a fence\n```\n\nA café — naïve\ttab, and a \\ backslash."),
    ("code", '# a code comment, not prose\nprint("teh")'),
    ("markdown", "Second cell with a [link](http://example.org) here.\n\n> A quoted line.\n\n- one item\n- two items"),
    ("raw", "raw cells are not prose either"),
    ("markdown", "日本語 and emoji 🙂 words."),
]


def _notebook():
    makers = {"markdown": v4.new_markdown_cell, "code": v4.new_code_cell, "raw": v4.new_raw_cell}
    nb = v4.new_notebook(cells=[makers[kind](source) for kind, source in CELLS])
    nb.cells[1].outputs = [v4.new_output("stream", name="stdout", text="output text is not prose\n")]
    return nb


def _words_by_oracle(src: str) -> Counter:
    words: Counter = Counter()
    for cell in nbformat.reads(src, as_version=4).cells:
        if cell.cell_type == "markdown":
            for s in extract(cell.source, "markdown"):
                words.update(_WORD.findall(cell.source[s.start : s.end]))
    return words


def _words_ours(src: str) -> Counter:
    words: Counter = Counter()
    for s in extract(src, "notebook"):
        words.update(_WORD.findall(src[s.start : s.end]))
    return words


@pytest.mark.parametrize("layout", ["jupyter", "compact", "one-string-sources"])
def test_markdown_cell_words_agree_with_nbformat(layout):
    nb = _notebook()
    if layout == "jupyter":
        src = nbformat.writes(nb)  # indented, each source line its own string, UTF-8 as is
    else:
        data = json.loads(nbformat.writes(nb))
        if layout == "one-string-sources":
            for cell in data["cells"]:
                cell["source"] = "".join(cell["source"])
        src = json.dumps(data, ensure_ascii=False, separators=(",", ":"))
    ours = _words_ours(src)
    assert ours == _words_by_oracle(src)
    assert ours["planner"] == 1 and ours["café"] == 1 and ours["🙂"] == 0
    assert not ours & Counter(["teh", "output", "raw", "fence", "code"])


def test_spans_never_hold_a_json_escape_and_keep_the_cell_breaks():
    src = nbformat.writes(_notebook())
    spans = extract(src, "notebook")
    assert spans and all("\\" not in src[s.start : s.end] for s in spans)
    firsts = [src[s.start : s.end] for s in spans if s.breaks_before]
    assert firsts[0] == "The " and "Second cell with a [link]" in firsts and "日本語 and emoji 🙂 words." in firsts


def test_a_word_with_an_escaped_letter_is_left_out_whole():
    # ensure_ascii: every non-ASCII letter becomes \\uXXXX in the JSON.
    src = json.dumps(json.loads(nbformat.writes(_notebook())), ensure_ascii=True)
    ours = _words_ours(src)
    assert ours["café"] == 0 and ours["caf"] == 0 and ours["na"] == 0 and ours["ve"] == 0
    assert ours["planner"] == 1 and ours["backslash"] == 1


@pytest.mark.parametrize(
    "src",
    ["", "not json at all", "[" * 50_000, "{" * 50_000, '{"cells": [' * 10_000, '"' * 50_001, "\\" * 50_000,
     '{"cells": [{"cell_type": "markdown", "source": "' + "\\u00e9" * 20_000 + '"}]}',
     '{"cells": [{"cell_type": "markdown", "source": ["unterminated'],
)
def test_broken_or_hostile_input_gives_valid_spans(src):
    for s in extract(src, "notebook"):
        assert 0 <= s.start < s.end <= len(src)


def test_ipynb_files_are_notebooks():
    assert detect_kind("analysis/Report.ipynb") == "notebook"

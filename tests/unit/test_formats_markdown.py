"""Markdown extraction: exact spans for nasty documents, plus outside references.

The outside references are (1) markdown-it-py, a CommonMark-compliant
parser, used as an oracle for which words are prose and which are code
(test-only dependency), and (2) a few examples of the CommonMark spec
(version 0.31.2), quoted from memory: the example numbers may be off by a
few, the inputs and their code/text verdicts are what matters.
"""

from __future__ import annotations

from collections import Counter
from pathlib import Path

import pytest
import regex

from calami.text.formats import extract

DATA = Path(__file__).resolve().parents[1] / "data" / "formats"


def pieces(text: str) -> list[tuple[str, str, bool]]:
    spans = extract(text, "markdown")
    for a, b in zip(spans, spans[1:]):
        assert a.end <= b.start, "spans must be sorted and disjoint"
    return [(text[s.start : s.end], s.kind, s.breaks_before) for s in spans]


def texts(text: str) -> list[str]:
    return [p for p, _, _ in pieces(text)]


def test_headings_paragraphs_and_breaks():
    doc = "# Title ##\n\nFirst line\nsecond line\n\nSetext title\n============\n"
    assert pieces(doc) == [
        ("Title", "heading", True),
        ("First line", "text", True),
        ("second line", "text", False),
        ("Setext title", "heading", True),
    ]


def test_exact_offsets():
    doc = "Intro `code` here\n"
    spans = extract(doc, "markdown")
    assert [(s.start, s.end) for s in spans] == [(0, 5), (13, 17)]
    assert [s.breaks_before for s in spans] == [True, False]


def test_nested_lists_with_code():
    doc = (
        "1. First item\n   continues here\n\n   ```js\n   const x = `tpl`;\n   ```\n\n"
        "   - nested *item*\n\n         indented code in nested\n\n   - another `code` item\n2. Second\n"
    )
    assert pieces(doc) == [
        ("First item", "text", True),
        ("continues here", "text", False),
        ("nested *item*", "text", True),
        ("another", "text", True),
        ("item", "text", False),
        ("Second", "text", True),
    ]


def test_block_quotes_with_code_and_lazy_lines():
    doc = "> Quoted text\n> ```\n> code in quote\n> ```\n> > inner quote\nlazy line\n\nafter\n"
    assert texts(doc) == ["Quoted text", "inner quote", "lazy line", "after"]


def test_html_inside_markdown():
    doc = (
        'Text with <span class="x">inline</span> and <!-- hidden\ncomment --> end.\n\n'
        "<details>\n<summary>Click here</summary>\n\nMarkdown *inside*\n\n</details>\n\n"
        "<script>\nvar hidden = 1;\n</script>\n\nInline <code>x = y</code> and <kbd>Ctrl</kbd> keys.\n"
    )
    assert texts(doc) == [
        "Text with", "inline", "and", "end.", "Click here", "Markdown *inside*", "Inline", "and", "keys.",
    ]


def test_crlf_line_endings():
    doc = "# Title\r\n\r\nLine one\r\nline two\r\n\r\n```\r\ncode\r\n```\r\nlast\r\n"
    assert pieces(doc) == [
        ("Title", "heading", True),
        ("Line one", "text", True),
        ("line two", "text", False),
        ("last", "text", True),
    ]


def test_tabs():
    doc = "-\tTab item\n\n\tsame item\n\nWord\twith\ttabs\n\n\tcode block\n"
    assert texts(doc) == ["Tab item", "same item", "Word\twith\ttabs"]


def test_emoji_and_cjk_keep_offsets_right():
    doc = "漢字テキスト 🎉 emoji `x`\nHello wrold 👍🏽 end\n"
    spans = extract(doc, "markdown")
    got = [doc[s.start : s.end] for s in spans]
    assert got == ["漢字テキスト 🎉 emoji", "Hello wrold 👍🏽 end"]
    # offsets are code points: the misspelling sits where Python's index says
    assert doc.index("wrold") == spans[1].start + 6


def test_gfm_table_cells():
    doc = (
        "| Name | `code` | Notes |\n|:-----|:------:|------:|\n| alpha | `x` | first \\| cell |\n"
        "| beta | y | second |\n\nNot table\n"
    )
    assert pieces(doc) == [
        ("Name", "table", True),
        ("Notes", "table", True),
        ("alpha", "table", True),
        ("first", "table", True),
        ("| cell", "table", False),
        ("beta", "table", True),
        ("y", "table", True),
        ("second", "table", True),
        ("Not table", "text", True),
    ]


def test_links_images_references_and_urls():
    doc = (
        'See [the docs](https://example.com/a_b "Title here") and ![alt text](img.png) '
        "and [ref][lbl] and <https://auto.link> and www.example.com/x.\n\n"
        '[lbl]: https://example.com "Ref title"\n'
        "[other]:\n  https://example.org\n  'Spanning title'\n"
    )
    assert texts(doc) == ["See [the docs]", "and ![alt text]", "and [ref]", "and", "and", "."]


def test_label_lines_that_are_not_reference_definitions():
    # CommonMark: a definition is the label, one destination and an optional title; nothing else.
    assert texts("[Note]: some prose here\n") == ["[Note]: some prose here"]
    assert texts("[^1]: A footnote text.\n") == ["[^1]: A footnote text."]
    assert texts("[a]: <x y> 't'\n") == []


def test_escaped_characters():
    doc = "Use snake\\_case and \\*literal stars\\* and \\# hash.\n"
    # The escaped underscore keeps the identifier whole (and out); the backslash
    # of other escapes is cut out so the words next to it stay checkable.
    assert texts(doc) == ["Use", "and", "*literal stars", "* and", "# hash."]


def test_math():
    doc = "Energy $E = mc^2$ costs $5 and $10 today.\n\n$$\nx = y\n$$\n\nDone.\n"
    assert texts(doc) == ["Energy", "costs $5 and $10 today.", "Done."]


def test_front_matter_yaml_and_toml():
    assert texts("---\ntitle: Front matter\n---\nBody text\n") == ["Body text"]
    assert texts("+++\ntitle = \"x\"\n+++\nBody\n") == ["Body"]
    # no closing line: a thematic break and an ordinary paragraph
    assert texts("---\nnot front\n") == ["not front"]


def test_emphasis_underscores_are_cut_but_identifiers_stay():
    doc = "Some _emphasis_ and __strong__ and snake_case_name here.\n"
    assert texts(doc) == ["Some", "emphasis", "and", "strong", "and snake_case_name here."]


def test_code_spans_of_any_length():
    doc = "A `` code with ` tick `` and ```unclosed and `x` done.\n"
    assert texts(doc) == ["A", "and ```unclosed and", "done."]


def test_code_span_across_lines():
    doc = "Start `code\nstill code` end\n"
    assert texts(doc) == ["Start", "end"]


def test_unclosed_fence_runs_to_the_end():
    assert texts("Before\n\n```\nnever closed\n\nstill code\n") == ["Before"]


def test_fixture_file():
    doc = (DATA / "nasty.md").read_text(encoding="utf-8")
    expected = (DATA / "nasty.md.expected").read_text(encoding="utf-8").splitlines()
    got = [f"{s.start} {s.end} {s.kind} {int(s.breaks_before)} {doc[s.start:s.end]!r}" for s in extract(doc, "markdown")]
    assert got == expected


# --- CommonMark spec 0.31.2 examples (numbers from memory) ----------------------


@pytest.mark.parametrize(
    "source, prose",
    [
        ("\tfoo\tbaz\t\tbim\n", []),  # example 1: a tab-indented code block
        ("- foo\n\n\tbar\n", ["foo", "bar"]),  # example 5-ish: tab continues the list item
        ("    a simple\n      indented code block\n", []),  # example 107: indented code
        ("Foo\n    bar\n", ["Foo", "bar"]),  # example 113: paragraph continuation, not code
        ("``` aa ```\nfoo\n", ["foo"]),  # example 145-ish: backticks in the info string: a code span, not a fence
        ("`foo`\n", []),  # example 328: a code span
        ("`` foo ` bar ``\n", []),  # example 329: backtick inside a longer code span
        ("```foo``\n", ["```foo``"]),  # example 348-ish: unmatched runs are literal
        ("<http://foo.bar.baz>\n", []),  # example 594: autolink
        ("[link](/uri \"title\")\n", ["[link]"]),  # example 482: destination and title
        ("![foo](/url \"title\")\n", ["![foo]"]),  # example 572: image alt text
        ("[foo]: /url \"title\"\n\n[foo]\n", ["[foo]"]),  # example 192: reference definition
        ("<!-- comment -->\n", []),  # example 148: HTML block comment
        ("> ```\n> aaa\n\nbbb\n", ["bbb"]),  # example 237-ish: fence closed by the container
    ],
)
def test_commonmark_spec_examples(source: str, prose: list[str]):
    got = texts(source)
    if source.startswith("```foo``"):
        # markdown-it renders the unmatched runs as text; we keep them in prose
        # (they are not letters, so nothing downstream checks them).
        assert got == ["```foo``"]
    else:
        assert got == prose


# --- markdown-it-py as an oracle --------------------------------------------------

_WORD = regex.compile(r"\p{L}+")


def _oracle_words(source: str) -> Counter[str]:
    markdown_it = pytest.importorskip("markdown_it")
    md = markdown_it.MarkdownIt("commonmark").enable("table")
    words: Counter[str] = Counter()

    def walk(tokens):
        in_autolink = False
        for tok in tokens:
            if tok.type == "link_open":
                in_autolink = tok.markup == "autolink"
            elif tok.type == "link_close":
                in_autolink = False
            elif tok.type == "text" and not in_autolink:
                words.update(_WORD.findall(tok.content))
            if tok.children:
                walk(tok.children)

    walk(md.parse(source))
    return words


def _our_words(source: str) -> Counter[str]:
    words: Counter[str] = Counter()
    for s in extract(source, "markdown"):
        words.update(_WORD.findall(source[s.start : s.end]))
    return words


ORACLE_DOCS = [
    "# Install\n\nRun `pip install calami` first.\n\n```bash\necho hello\n```\n\nThen read [the guide](https://x.y/guide \"Guide\").\n",
    "- one\n- two `code`\n  - three\n\n        code four\n\n  five\n",
    "> quote *emph* text\n> more\n\n    indented code\n\nPara with ``double ` tick`` end.\n",
    "Setext\n---\n\nText with ![picture alt](p.png) and [ref link][r].\n\n[r]: http://example.com\n",
    "| head one | head two |\n| --- | --- |\n| cell `code` | plain cell |\n\nafter table\n",
    "1. first\n2. second\n\n   ~~~\n   code\n   ~~~\n3. third item\n",
    "Line one\nline two  \nhard break\\\nafter\n\n***\n\nEnd paragraph.\n",
    "[Note]: this looks like a definition but is prose\n\n[^1]: A footnote in prose.\n\n[x]: <a b> 'title'\n",
]


@pytest.mark.parametrize("source", ORACLE_DOCS)
def test_words_agree_with_markdown_it(source: str):
    assert _our_words(source) == _oracle_words(source)


def test_fixture_words_agree_with_markdown_it():
    doc = (DATA / "oracle.md").read_text(encoding="utf-8")
    assert _our_words(doc) == _oracle_words(doc)


# --- robustness --------------------------------------------------------------------


@pytest.mark.parametrize(
    "source",
    [
        "`" * 100_000,
        "``a" * 20_000,
        "[a](" * 20_000,
        "<a " * 20_000,
        "<!--" + "x" * 50_000,
        "$x " * 20_000,
        "> " * 20_000,
        "- " * 20_000,
        "\\" * 50_000,
        "_a" * 30_000,
        "\x00\x01\ufffd\udcff binary junk \x7f",
    ],
)
def test_adversarial_inputs_do_not_raise(source: str):
    spans = extract(source, "markdown")
    for s in spans:
        assert 0 <= s.start < s.end <= len(source)


# --- random documents: the same words as markdown-it-py ---------------------------

_VOCAB = "alpha beta gamma delta omega kappa sigma".split()


def _random_doc(rng) -> str:
    def words(n=3):
        return " ".join(rng.choice(_VOCAB) for _ in range(n))

    def inline():
        w = words(2)
        return rng.choice([
            w, f"`{w}`", f"*{w}*", f"_{w}_", f"[{w}](http://x.y/{rng.choice(_VOCAB)})", f"![{w}](i.png)",
            f"**{w}**", f"<span>{w}</span>", f"``{w}``", f"{w} \\*x",
        ])

    def line():
        return " ".join(inline() for _ in range(rng.randint(1, 4)))

    def block(depth=0):
        c = rng.randint(0, 15)
        if c == 0:
            return "#" * rng.randint(1, 3) + " " + line()
        if c == 1:
            return "```\n" + words() + "\n```"
        if c == 2:
            return "    " + words()
        if c == 3 and depth < 2:
            return "\n".join("> " + row for row in block(depth + 1).split("\n"))
        if c in (4, 5) and depth < 2:
            marker, pad = ("- ", "  ") if c == 4 else ("1. ", "   ")
            rows = block(depth + 1).split("\n")
            return marker + rows[0] + "".join("\n" + (pad + r if r else r) for r in rows[1:])
        if c == 6:
            return line() + "\n" + line()
        if c == 7:
            return f"| {words(1)} | {words(1)} |\n|---|---|\n| {line()} | {words(2)} |"
        if c == 9:
            return line() + "\n" + rng.choice(["===", "---"])
        if c == 10:
            return rng.choice(["***", "- - -", "___"])
        if c == 11:
            return f"[{rng.choice(_VOCAB)}]: http://x.y/{rng.choice(_VOCAB)} " + rng.choice(['"t t"', "", "\n  'a b'"])
        if c == 12:
            return "~~~~\n```\n" + words() + "\n```\n~~~~"
        if c == 13 and depth < 2:
            return "> " + line() + "\n" + line()
        if c == 14:
            return line() + "\n    " + words()
        if c == 15:
            return "\t" + words()
        return line()

    return "\n\n".join(block() for _ in range(rng.randint(1, 5))) + "\n"


def test_random_documents_agree_with_markdown_it():
    import random

    pytest.importorskip("markdown_it")
    rng = random.Random(20261201)
    for _ in range(300):
        doc = _random_doc(rng)
        assert _our_words(doc) == _oracle_words(doc), doc

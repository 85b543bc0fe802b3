"""Plain text, git commit messages and HTML: exact spans.

HTML is also checked against Python's own ``html.parser`` (the standard
library's HTML tokenizer) as an outside oracle for which text is data.
"""

from __future__ import annotations

from collections import Counter
from html.parser import HTMLParser

import pytest
import regex

from calami.text.formats import ExtractOptions, extract


def pieces(text: str, kind: str, options: ExtractOptions | None = None) -> list[tuple[str, str, bool]]:
    spans = extract(text, kind, options)
    for a, b in zip(spans, spans[1:]):
        assert a.end <= b.start
    return [(text[s.start : s.end], s.kind, s.breaks_before) for s in spans]


# --- plain ---------------------------------------------------------------------------


def test_plain_paragraphs():
    doc = "  First para\nstill first  \n\n\t\nSecond 🎉 漢字\r\n\r\nThird"
    assert pieces(doc, "plain") == [
        ("First para\nstill first", "text", True),
        ("Second 🎉 漢字", "text", True),
        ("Third", "text", True),
    ]


def test_plain_empty_and_blank():
    assert extract("", "plain") == []
    assert extract(" \n\t\r\n ", "plain") == []


# --- commit --------------------------------------------------------------------------


COMMIT = (
    "Fix the parser for `nested` lists\n\n"
    "The old code lost track of indentation.\n"
    "    $ calami check docs/\n"
    "    docs/a.md:3:1 wrold\n\n"
    "Closes: #12\n"
    "Signed-off-by: A Person <a@example.com>\n"
    "Co-authored-by: B Person <b@example.com>\n"
    "# Please enter the commit message for your changes.\n"
    "#\n"
    "# ------------------------ >8 ------------------------\n"
    "# Do not modify or remove the line above.\n"
    "diff --git a/x b/x\n"
    "+added line with wrold\n"
)


def test_commit_message():
    assert pieces(COMMIT, "commit") == [
        ("Fix the parser for", "subject", True),
        ("lists", "subject", False),
        ("The old code lost track of indentation.", "text", True),
    ]


def test_commit_verbose_diff_without_scissors_and_custom_comment_char():
    msg = "Subject line\n\nBody line.\n; a comment\ndiff --git a/f b/f\n--- a/f\n+++ b/f\n"
    assert [p for p, _, _ in pieces(msg, "commit", ExtractOptions(comment_char=";"))] == ["Subject line", "Body line."]


def test_commit_trailer_block_only_at_the_end():
    msg = "Subject\n\nNote: this line is prose.\nMore prose.\n\nReviewed-on: https://x\nChange-Id: I123\n"
    assert [p for p, _, _ in pieces(msg, "commit")] == ["Subject", "Note: this line is prose.", "More prose."]


def test_commit_subject_with_colon_is_not_a_trailer():
    assert [p for p, _, _ in pieces("docs: fix typo\n", "commit")] == ["docs: fix typo"]


def test_commit_crlf_emoji():
    msg = "🎉 Subject 漢字\r\n\r\nBody wrold\r\n# comment\r\n"
    spans = extract(msg, "commit")
    assert [msg[s.start : s.end] for s in spans] == ["🎉 Subject 漢字", "Body wrold"]
    assert spans[1].start + 5 == msg.index("wrold")


# --- html ----------------------------------------------------------------------------


HTML = (
    "<!DOCTYPE html>\n<html><head><title>Page title</title>\n"
    "<style>p { color: red; }</style><script>var x = '<p>not</p>';</script></head>\n"
    "<body><!-- a comment --><h1>Heading</h1>\n"
    '<p class="intro">Hello <b>bold</b> world &amp; more&nbsp;text.</p>\n'
    "<pre>preformatted code</pre><p>Use <code>x = 1</code> here.<br>New line</p>\n"
    '<img alt="alt text is an attribute" src="x.png"><textarea>typed</textarea>\n'
    "</body></html>\n"
)


def test_html_text_nodes():
    assert pieces(HTML, "html") == [
        ("Page title", "text", True),
        ("Heading", "text", True),
        ("Hello", "text", True),
        ("bold", "text", False),
        ("world", "text", False),
        ("more", "text", False),
        ("text.", "text", False),
        ("Use", "text", True),
        ("here.", "text", False),
        ("New line", "text", True),
    ]


class _DataWords(HTMLParser):
    """Words of data outside script/style/pre/code/textarea, per the standard library."""

    SKIP = {"script", "style", "pre", "code", "textarea"}

    def __init__(self) -> None:
        super().__init__(convert_charrefs=False)
        self.words: Counter[str] = Counter()
        self.depth = 0

    def handle_starttag(self, tag, attrs):
        if tag in self.SKIP:
            self.depth += 1

    def handle_endtag(self, tag):
        if tag in self.SKIP and self.depth:
            self.depth -= 1

    def handle_data(self, data):
        if not self.depth:
            self.words.update(regex.findall(r"\p{L}+", data))


def test_html_words_agree_with_stdlib_parser():
    oracle = _DataWords()
    oracle.feed(HTML)
    oracle.close()
    ours: Counter[str] = Counter()
    for s in extract(HTML, "html"):
        ours.update(regex.findall(r"\p{L}+", HTML[s.start : s.end]))
    assert ours == oracle.words


@pytest.mark.parametrize("kind", ["plain", "commit", "html"])
@pytest.mark.parametrize(
    "src", ['<a "' * 20_000, "<script>" * 10_000, "<!--" * 20_000, "&" * 50_000, "#\n" * 20_000, "\x00\udcff\ufffd", "`" * 100_000]
)
def test_adversarial_inputs_do_not_raise(kind: str, src: str):
    for s in extract(src, kind):
        assert 0 <= s.start < s.end <= len(src)

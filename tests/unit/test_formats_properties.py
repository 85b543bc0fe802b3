"""Properties every extractor must keep, on random text (hypothesis).

For every kind: extract never raises; spans are sorted, non-overlapping,
non-empty and inside the text; they never start or end with blanks; and a
text made of the characters that drive the scanners (markers, quotes,
brackets, line breaks, emoji, CJK) does not break these rules either.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from calami.text.formats import KINDS, ExtractOptions, extract

_SYNTAX = list(
    "`*_#<>[]()!{}$%\\/'\"|:-=+.~&;@\n\r\t "
) + ["\r\n", "```", "~~~", "---", "+++", "<!--", "-->", "/*", "*/", "//", "///", "\"\"\"", "'''", "::", ".. ",
     "\\begin{verbatim}", "\\end{verbatim}", "\\section{", "$$", "<script>", "</script>", "<<EOF\n", "EOF\n",
     "r#\"", "\"#", "R\"x(", ")x\"", "- ", "1. ", "> ", "    ", "🎉", "漢字", "word", "wrold", "\x00", "\ufeff"]

syntaxy = st.lists(st.sampled_from(_SYNTAX), max_size=80).map("".join)
anything = st.text(max_size=300)


def _check(text: str, kind: str, strings: bool) -> None:
    spans = extract(text, kind, ExtractOptions(strings=strings))
    previous_end = 0
    for s in spans:
        assert 0 <= s.start < s.end <= len(text), (kind, s)
        assert s.start >= previous_end, (kind, spans)
        assert not text[s.start].isspace() and not text[s.end - 1].isspace(), (kind, s, text[s.start : s.end])
        previous_end = s.end


@settings(max_examples=60, deadline=None)
@given(text=st.one_of(syntaxy, anything), strings=st.booleans())
def test_all_kinds_keep_span_invariants(text: str, strings: bool):
    for kind in KINDS:
        _check(text, kind, strings)


_CRLF_SAMPLES = {
    "markdown": "# T\n\n- a `b`\n  c\n\n```\nx\n```\n\n> q\n\n| a | b |\n|---|---|\n| c | d |\n",
    "rst": "Title\n=====\n\nPara::\n\n    code\n\n.. note:: Text\n   more\n",
    "latex": "\\section{A}\nText % c\n\n\\begin{verbatim}\nx\n\\end{verbatim}\nEnd\n",
    "commit": "Subject\n\nBody\n# c\nSigned-off-by: x\n",
    "python": '"""Doc\n\nmore"""\n# one\n# two\nx = 1  # three\n',
    "c": "/* a\n * b\n */\n// c\n// d\nint x; // e\n",
    "shell": "# a\n# b\ncat <<EOF\n# not\nEOF\n",
    "yaml": "# a\nk: |\n  # not\n  v\nj: 1 # b\n",
}


@given(sample=st.sampled_from(sorted(_CRLF_SAMPLES)), emoji_prefix=st.sampled_from(["", "🎉", "漢字", "👍🏽"]))
@settings(max_examples=40, deadline=None)
def test_crlf_gives_the_same_prose_as_lf(sample: str, emoji_prefix: str):
    lf = _CRLF_SAMPLES[sample].replace("\n", "\n" + emoji_prefix, 1)
    crlf = lf.replace("\n", "\r\n")
    assert [crlf[s.start : s.end].replace("\r\n", "\n") for s in extract(crlf, sample)] == [
        lf[s.start : s.end] for s in extract(lf, sample)
    ]

"""The shared tokenizer: what is a checkable word, what is technical material."""

from calami.text.spans import Span
from calami.text.tokens import CAPS, SKIP, WORD, lm_units, sentences, tokenize


def kinds(text):
    return [(t.text, t.kind) for t in tokenize(text)]


def test_words_with_apostrophes_are_one_token():
    got = kinds("don't it's users' parser’s")
    assert got == [("don't", WORD), ("it's", WORD), ("users'", WORD), ("parser’s", WORD)]


def test_hyphenated_compounds_are_checked_in_parts():
    assert [t.text for t in tokenize("state-of-the-art")] == ["state", "of", "the", "art"]


def test_technical_material_is_skipped():
    text = "see https://example.org/a?b=1, mail ops@example.org, run --dry-run in /usr/lib/x or src/a/b.py"
    skipped = [t.text for t in tokenize(text) if t.kind == SKIP]
    assert skipped == ["https://example.org/a?b=1", "ops@example.org", "--dry-run", "/usr/lib/x", "src/a/b.py"]


def test_identifiers_numbers_and_hashes_are_never_words():
    for token in ["getValue", "my_var", "abc123", "3rd", "9f8e7d6c", "os.path.join", "XMLHttp"]:
        assert all(t.kind == SKIP for t in tokenize(token)), token


def test_allcaps_is_its_own_kind():
    assert kinds("HTTP") == [("HTTP", CAPS)]


def test_function_calls_and_code_glue_are_skipped():
    assert kinds("call parse() and x=y") == [("call", WORD), ("parse", SKIP), ("and", WORD), ("x", SKIP), ("y", SKIP)]


def test_sentence_boundaries_and_abbreviations():
    toks = tokenize("Use it, e.g. here. Then stop! Next one? Done")
    groups = [[t.text for t in s] for s in sentences(toks)]
    assert groups == [["Use", "it", "e.g", "here"], ["Then", "stop"], ["Next", "one"], ["Done"]]


def test_url_does_not_swallow_sentence_end():
    groups = [[t.text for t in s] for s in sentences(tokenize("See https://a.org/x. Next"))]
    assert groups == [["See", "https://a.org/x"], ["Next"]]


def test_spans_restrict_and_break_context():
    text = "alpha beta `code` gamma\n\ndelta"
    spans = [Span(0, 10), Span(18, 23, breaks_before=False), Span(25, 30)]
    toks = tokenize(text, spans)
    assert [(t.text, t.sentence) for t in toks] == [("alpha", 0), ("beta", 0), ("gamma", 0), ("delta", 1)]
    assert all(text[t.start : t.end] == t.text for t in toks)


def test_offsets_survive_emoji_and_cjk():
    text = "😀 漢字 naïve café"
    toks = tokenize(text)
    assert [t.text for t in toks if t.kind == WORD][-2:] == ["naïve", "café"]
    assert all(text[t.start : t.end] == t.text for t in toks)


def test_lm_units_lowercase_and_unknown():
    toks = tokenize("The getValue call")
    assert lm_units(toks) == ["the", "<unk>", "call"]


def test_line_index_handles_every_line_ending():
    from hypothesis import given, settings
    from hypothesis import strategies as st

    from calami.text.spans import LineIndex

    @settings(max_examples=300, deadline=None)
    @given(st.text(alphabet="ab\r\n😀", max_size=40))
    def check(text):
        index = LineIndex(text)
        # Reference: split the way LSP defines lines.
        starts, i = [0], 0
        while i < len(text):
            if text.startswith("\r\n", i):
                i += 2
                starts.append(i)
            elif text[i] in "\r\n":
                i += 1
                starts.append(i)
            else:
                i += 1
        assert index.line_starts == starts
        for offset in range(len(text) + 1):
            line, col = index.position(offset)
            assert index.offset(line, col) == offset

    check()


def test_corpus_code_mark_is_the_code_unit_and_other_technical_tokens_unknown():
    # The corpus recipe writes CODE_MARK where a page had inline code.
    from calami.text.tokens import CODE, CODE_MARK, UNK, lm_units, tokenize

    assert lm_units(tokenize(f"Set {CODE_MARK} and /usr/lib now")) == ["set", CODE, "and", UNK, "now"]

"""Invariant: after any sequence of edits, the cached findings equal a full check."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from lsprotocol import types

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "lsp"))

from fake_checker import FakeChecker  # noqa: E402

from calami.lsp.documents import Document, prose_spans  # noqa: E402
from calami.lsp.positions import UTF8, UTF16, PositionMap  # noqa: E402
from calami.text.formats.scoring_tokens import scoring_tokens  # noqa: E402
from calami.text.tokens import sentences  # noqa: E402

# Pieces that exercise the fake's rules, sentence ends, block breaks, CRLF,
# astral characters (two UTF-16 units), CJK and combining marks.
PIECES = [
    "teh", "the", "came", "form", "far", "away", "wrold", "recieve", "word", "ofen",
    " ", " ", " ", ". ", "! ", "\n", "\n\n", "\r\n", "\r\n\r\n", "# ", "`code`", "😀", "漢字", "e\u0301",
    "```\nteh\n```\n", "- ", "> ",
]
piece_text = st.lists(st.sampled_from(PIECES), max_size=12).map("".join)


@st.composite
def edits(draw, length_hint: int = 40):
    """(start fraction, end fraction, inserted text): inserts, deletes, replacements, pastes."""
    a = draw(st.floats(0, 1))
    b = draw(st.floats(0, 1))
    kind = draw(st.sampled_from(["insert", "delete", "replace"]))
    text = "" if kind == "delete" else draw(piece_text)
    if kind == "insert":
        b = a
    return min(a, b), max(a, b), text


def full_check(text: str, kind: str, checker=None) -> list:
    """A from-scratch check of the whole text, scored as the server scores it."""
    checker = checker or FakeChecker()
    tokens = scoring_tokens(text, prose_spans(text, kind))
    return [f for sentence in sentences(tokens) for f in checker.check_sentence(sentence)]


@settings(max_examples=150, deadline=None)
@given(
    initial=piece_text,
    steps=st.lists(edits(), min_size=1, max_size=15),
    kind=st.sampled_from(["markdown", "plain"]),
    encoding=st.sampled_from([UTF16, UTF8]),
)
def test_cached_findings_equal_a_full_recheck(initial, steps, kind, encoding):
    checker = FakeChecker()
    doc = Document("file:///t.md", kind, 1, initial, encoding, kind)
    doc.cache.findings(doc.text, prose_spans(doc.text, kind), checker)
    expected_text = initial
    for n, (a, b, new) in enumerate(steps, start=2):
        s, e = int(a * len(expected_text)), int(b * len(expected_text))
        # A range that would split a CRLF or a surrogate pair is still a valid
        # position; compute the expected text from the offsets the map returns.
        positions = PositionMap(expected_text, encoding)
        rng = types.Range(positions.position(s), positions.position(e))
        s2, e2 = positions.offset(rng.start), positions.offset(rng.end)
        expected_text = expected_text[:s2] + new + expected_text[e2:]
        doc.apply([types.TextDocumentContentChangePartial(range=rng, text=new)], n)
        assert doc.text == expected_text
        cached = doc.cache.findings(doc.text, prose_spans(doc.text, kind), checker)
        assert cached == full_check(doc.text, kind)


def test_one_character_edit_rescores_one_sentence():
    paragraphs = [f"Paragraph {i} has a few words. It came form far away. Then teh end." for i in range(200)]
    text = "\n\n".join(paragraphs)
    checker = FakeChecker()
    doc = Document("file:///t.md", "markdown", 1, text, UTF16, "markdown")
    first = doc.cache.findings(text, prose_spans(text, "markdown"), checker)
    assert len(first) == 400
    # Change "few" to "fex" in paragraph 100: one block re-tokenized, one sentence re-scored.
    offset = text.index("Paragraph 100 has a few") + len("Paragraph 100 has a fe")
    positions = PositionMap(text, UTF16)
    doc.apply([types.TextDocumentContentChangePartial(
        range=types.Range(positions.position(offset), positions.position(offset + 1)), text="x")], 2)
    second = doc.cache.findings(doc.text, prose_spans(doc.text, "markdown"), checker)
    assert doc.cache.tokenized_blocks == 1
    assert doc.cache.scored_sentences == 1
    assert second == full_check(doc.text, "markdown")


_REAL: list = []


def _real_checker():
    """The real Checker on a tiny model built by the real pipeline (once)."""
    if not _REAL:
        from calami.checker import Checker
        from calami.model.build import BuildConfig, build
        from calami.model.lexicon import GB, US

        words = ("the parser reads file from disk and writes result to cache came far away word often world "
                 "receive we end form farm").split()
        corpus = ["The parser reads the file from disk.", "We came from far away.", "The world is far."] * 5
        cfg = BuildConfig(extra_words=[(w, US | GB) for w in words], corpus_lines=corpus,
                          pairs=[("teh", "the"), ("recieve", "receive"), ("form", "from")], admit_min_count=1000)
        model, _ = build(cfg)
        _REAL.append(Checker(model))
    return _REAL[0]


_WITH_VOCABULARY: list = []


def _checker_with_vocabulary():
    """The real checker, with a workspace that uses some of the pieces' non-words."""
    if not _WITH_VOCABULARY:
        from calami.checker import Checker
        from calami.vocab.usage import WorkspaceVocabulary

        base = _real_checker()
        vocabulary = WorkspaceVocabulary(lambda key: key in base.model.lexicon.ids)
        vocabulary.add_text("a.py", "def ofen(wrold): return wrold\n", "python")
        vocabulary.add_text("b.md", "See [ofen](https://example.org/ofen) and teh wrold.", "markdown")
        _WITH_VOCABULARY.append(Checker(base.model, usage=vocabulary))
    return _WITH_VOCABULARY[0]


@pytest.mark.parametrize("make_checker", [_real_checker, _checker_with_vocabulary], ids=["alone", "workspace"])
@settings(max_examples=40, deadline=None)
@given(initial=piece_text, steps=st.lists(edits(), min_size=1, max_size=8), kind=st.sampled_from(["markdown", "plain"]))
def test_cached_findings_equal_a_full_check_with_the_real_checker(make_checker, initial, steps, kind):
    """The real checker, alone and with a workspace vocabulary in play."""
    checker = make_checker()
    doc = Document("file:///t.md", kind, 1, initial, UTF16, kind)
    for n, (a, b, new) in enumerate(steps, start=2):
        positions = PositionMap(doc.text, UTF16)
        rng = types.Range(positions.position(int(a * len(doc.text))), positions.position(int(b * len(doc.text))))
        doc.apply([types.TextDocumentContentChangePartial(range=rng, text=new)], n)
        cached = doc.cache.findings(doc.text, prose_spans(doc.text, kind), checker)
        assert cached == full_check(doc.text, kind, checker)


def test_the_vocabulary_changes_what_the_real_checker_flags():
    """The property above is not vacuous: the workspace's words are flagged without it."""
    text = "We came far away. The ofen wrold came."
    plain = {f.word for f in full_check(text, "plain", _real_checker())}
    learnt = {f.word for f in full_check(text, "plain", _checker_with_vocabulary())}
    assert {"ofen", "wrold"} <= plain and not {"ofen", "wrold"} & learnt


@settings(max_examples=150, deadline=None)
@given(
    initial=piece_text,
    steps=st.lists(edits(), min_size=1, max_size=10),
    encoding=st.sampled_from([UTF16, UTF8]),
)
def test_reused_wire_diagnostics_equal_fresh_ones(initial, steps, encoding):
    # The published JSON reuses items from the previous publish; after any
    # edits it must equal the JSON built from scratch for the same findings.
    from calami.lsp.diagnostics import compute, to_wire, wire_diagnostics
    from calami.lsp.settings import Settings

    checker, settings = FakeChecker(), Settings()
    doc = Document("file:///t.md", "markdown", 1, initial, encoding, "markdown")
    wire_diagnostics(doc, compute(doc, doc.text, 1, checker, settings), settings)
    for n, (a, b, new) in enumerate(steps, start=2):
        positions = PositionMap(doc.text, encoding)
        rng = types.Range(positions.position(int(a * len(doc.text))), positions.position(int(b * len(doc.text))))
        doc.apply([types.TextDocumentContentChangePartial(range=rng, text=new)], n)
        if n % 3 == 0:
            continue  # sometimes two edits between publishes
        findings = compute(doc, doc.text, n, checker, settings)
        assert wire_diagnostics(doc, findings, settings) == [to_wire(f, doc, settings) for f in findings]


# In-file directives (calami.text.directives): hushed lines are holes in the
# spans and known words a filter after scoring, so the cache stays exact.
DIRECTIVE_PIECES = PIECES + [
    "<!-- calami(hush-next) -->", "<!-- calami(hush-here) -->", "<!-- calami(known teh) -->",
    "<!-- calami(hush-begin) -->", "<!-- calami(hush-end) -->", "<!-- calami(hush-nxet) -->",
    "calami(known wrold)", "calami(hush-next)", "# calami(hush-next)",
]
directive_text = st.lists(st.sampled_from(DIRECTIVE_PIECES), max_size=12).map("".join)


@st.composite
def directive_edits(draw):
    a, b = draw(st.floats(0, 1)), draw(st.floats(0, 1))
    kind = draw(st.sampled_from(["insert", "delete", "replace"]))
    text = "" if kind == "delete" else draw(directive_text)
    if kind == "insert":
        b = a
    return min(a, b), max(a, b), text


def full_check_with_directives(text: str, kind: str, checker) -> list:
    """From scratch: read the directives, cut their holes, score everything, filter."""
    from calami.lsp.diagnostics import directive_findings
    from calami.text import directives

    marks = directives.read(text, kind)
    spans = marks.narrow(prose_spans(text, kind))
    found = [f for sentence in sentences(scoring_tokens(text, spans)) for f in checker.check_sentence(sentence)]
    found = [f for f in found if not marks.accepts(f.word)]
    return sorted(found + directive_findings(text, marks), key=lambda f: (f.start, f.end))


@settings(max_examples=150, deadline=None)
@given(initial=directive_text, steps=st.lists(directive_edits(), min_size=1, max_size=12),
       kind=st.sampled_from(["markdown", "plain"]))
def test_findings_with_directives_equal_a_full_recheck(initial, steps, kind):
    from calami.lsp.diagnostics import compute
    from calami.lsp.settings import Settings

    checker, config = FakeChecker(), Settings()
    doc = Document("file:///t.md", kind, 1, initial, UTF16, kind)
    compute(doc, doc.text, 1, checker, config)
    for n, (a, b, new) in enumerate(steps, start=2):
        positions = PositionMap(doc.text, UTF16)
        rng = types.Range(positions.position(int(a * len(doc.text))), positions.position(int(b * len(doc.text))))
        doc.apply([types.TextDocumentContentChangePartial(range=rng, text=new)], n)
        assert compute(doc, doc.text, n, checker, config) == full_check_with_directives(doc.text, kind, checker)


def test_directives_hush_and_accept_in_the_server_path():
    from calami.lsp.diagnostics import compute
    from calami.lsp.settings import Settings

    text = "We came teh way.\n<!-- calami(hush-next) -->\nA wrold here.\nAnd recieve it.\n<!-- calami(known recieve) -->\n"
    doc = Document("file:///t.md", "markdown", 1, text, UTF16, "markdown")
    words = [f.word for f in compute(doc, text, 1, FakeChecker(), Settings())]
    assert words == ["teh"]


def test_sentence_cache_follows_the_document_not_its_history():
    """Many edits that each make a new sentence leave at most ~2x the live sentences cached."""
    paragraphs = [f"Paragraph {i} has a few words. It came form far away." for i in range(50)]
    text = "\n\n".join(paragraphs)
    checker = FakeChecker()
    doc = Document("file:///t.md", "markdown", 1, text, UTF16, "markdown")
    doc.cache.findings(text, prose_spans(text, "markdown"), checker)
    live = 2 * len(paragraphs)
    start, number = len("Paragraph "), "0"
    for n in range(400):
        positions = PositionMap(doc.text, UTF16)
        new = str(1000 + n)  # every edit makes a sentence never seen before
        doc.apply([types.TextDocumentContentChangePartial(
            range=types.Range(positions.position(start), positions.position(start + len(number))), text=new)], n + 2)
        number = new
        found = doc.cache.findings(doc.text, prose_spans(doc.text, "markdown"), checker)
        assert len(doc.cache._sentences) <= 2 * live + 64
    assert doc.text.startswith("Paragraph 1399 has")
    assert found == full_check(doc.text, "markdown")

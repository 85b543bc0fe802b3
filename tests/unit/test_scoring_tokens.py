"""Placeholders for inline code between the words of a sentence."""

from __future__ import annotations

from pathlib import Path

from calami.commands.check import check_document
from calami.text.formats import extract
from calami.text.formats.scoring_tokens import scoring_tokens
from calami.text.tokens import SKIP, lm_units, sentences, tokenize
from calami.vocab.project import Project


def units(text: str, kind: str) -> list[list[str]]:
    return [lm_units(s) for s in sentences(scoring_tokens(text, extract(text, kind)))]


def test_markdown_code_span_becomes_the_code_unit():
    text = "Add support for `SSL_CERT_FILE` and `SSL_CERT_DIR` variables.\n"
    assert units(text, "markdown") == [["add", "support", "for", "<code>", "and", "<code>", "variables"]]
    placeholder = [t for t in scoring_tokens(text, extract(text, "markdown")) if t.kind == SKIP]
    assert [text[t.start:t.end].strip() for t in placeholder] == ["`SSL_CERT_FILE`", "`SSL_CERT_DIR`"]


def test_rst_literal_and_code_role():
    text = "Use ``literal`` or :func:`os.path.join` here.\n"
    assert units(text, "rst") == [["use", "<code>", "or", "<code>", "here"]]


def test_visible_url_stays_unknown_as_in_training():
    # The corpus has URLs as text, which the tokenizer makes <unk>; only code is <code>.
    text = "See https://example.org/x for the details and `opt` too.\n"
    assert units(text, "markdown") == [["see", "<unk>", "for", "the", "details", "and", "<code>", "too"]]


def test_plain_markup_gaps_get_no_placeholder():
    # Emphasis, link destinations and escapes are not text the reader sees as code.
    text = "Read **the** [guide](https://x.y/g) now \\*please\\*.\n"
    spans = extract(text, "markdown")
    assert scoring_tokens(text, spans) == tokenize(text, spans)


def test_no_placeholder_across_a_sentence_end_or_a_block():
    text = "Call `run`. Then stop.\n\n`code` starts this one.\n"
    assert units(text, "markdown") == [["call"], ["then", "stop"], ["starts", "this", "one"]]


class _ContextRecorder:
    """Records each word's left neighbour as the checker sees it."""

    def __init__(self) -> None:
        self.left: dict[str, str] = {}

    def check_sentence(self, tokens):
        us = lm_units(tokens)
        for i, tok in enumerate(tokens):
            self.left[tok.text] = us[i - 1] if i else "<s>"
        return []


def test_check_document_scores_with_the_placeholder(tmp_path: Path):
    checker = _ContextRecorder()
    check_document("Set `a` and `b` now.\n", "markdown", Project(tmp_path), checker)
    assert checker.left["and"] == "<code>" and checker.left["now"] == "<code>"


def test_rst_links_and_text_roles_are_not_code():
    text = "See `the guide <https://x.y>`_ and :ref:`the index <idx>` today.\n"
    assert units(text, "rst") == [["see", "the", "guide", "and", "the", "index", "today"]]


def test_bare_url_is_unknown_context():
    text = "Open https://example.org/x in a browser.\n"
    assert units(text, "markdown") == [["open", "<unk>", "in", "a", "browser"]]

"""reStructuredText extraction: exact spans, and docutils as an outside oracle.

docutils (the reference implementation of reStructuredText, test-only
dependency) parses a document; the words in its prose text nodes must be
exactly the words in our spans.
"""

from __future__ import annotations

from collections import Counter
from pathlib import Path

import pytest
import regex

from calami.text.formats import extract

DATA = Path(__file__).resolve().parents[1] / "data" / "formats"


def pieces(text: str) -> list[tuple[str, str, bool]]:
    return [(text[s.start : s.end], s.kind, s.breaks_before) for s in extract(text, "rst")]


def texts(text: str) -> list[str]:
    return [p for p, _, _ in pieces(text)]


def test_titles_and_paragraphs():
    doc = "=====\nTitle\n=====\n\nSection\n-------\n\nFirst line\nsecond line.\n\n----\n\nAfter transition.\n"
    assert pieces(doc) == [
        ("Title", "heading", True),
        ("Section", "heading", True),
        ("First line", "text", True),
        ("second line.", "text", False),
        ("After transition.", "text", True),
    ]


def test_inline_markup():
    doc = (
        "Use ``literal`` and :func:`os.path.join` and :ref:`Shown text <label>` and "
        ":doc:`install` and `hyperlink <http://x.y>`_ and `Named`_ and `default role` and |sub| [1]_ done.\n"
    )
    # A bare :doc:`install` shows the document's title, not "install" (Sphinx
    # documentation, "Cross-referencing documents"): not prose here.
    assert texts(doc) == [
        "Use", "and", "and", "Shown text", "and", "and", "hyperlink", "and", "Named", "and", "and", "done.",
    ]


def test_bare_reference_roles_are_labels():
    # Sphinx shows the section title for :ref:`label` and the document title for
    # :doc:`path` (Sphinx documentation, "Cross-referencing arbitrary locations");
    # the label is an identifier.  :term:`word` shows the word itself.
    doc = "See :ref:`dbschema` and :numref:`fig-one` or :any:`thing` for :term:`coverage data` details.\n"
    assert texts(doc) == ["See", "and", "or", "for", "coverage data", "details."]


def test_literal_blocks():
    # Any line indented more than the paragraph still belongs to the literal block.
    doc = "Example::\n\n    literal code\n\n  less indented, still literal\n\nExpanded:\n\n::\n\n    more code\n\nBack to prose.\n"
    assert texts(doc) == ["Example::", "Expanded:", "Back to prose."]


def test_literal_block_in_indented_context():
    doc = "- Item with code::\n\n      code in item\n\n  Item prose again.\n"
    assert texts(doc) == ["Item with code::", "Item prose again."]


def test_directives():
    doc = (
        ".. note:: Note text here.\n   More note text.\n\n"
        ".. warning::\n   :class: custom\n\n   Warning body.\n\n"
        ".. admonition:: Custom title\n\n   Admonition body.\n\n"
        ".. versionchanged:: 2.1\n   Changed behaviour.\n\n"
        ".. code-block:: python\n   :linenos:\n\n   code = 1\n\n"
        ".. literalinclude:: ../x.py\n   :lines: 1-3\n\n"
        ".. math::\n\n   a^2 + b^2\n\n"
        ".. figure:: fig.png\n   :width: 50%\n\n   Figure caption.\n\n"
        ".. py:function:: spam(eggs)\n\n   Spam the eggs.\n"
    )
    assert texts(doc) == [
        "Note text here.", "More note text.", "Warning body.", "Custom title", "Admonition body.",
        "Changed behaviour.", "Figure caption.", "Spam the eggs.",
    ]


def test_comments_targets_substitutions_footnotes():
    doc = (
        ".. a comment\n   continued\n\n..\n   empty-start comment\n\n"
        ".. _target: http://example.com\n\n__ http://anonymous.example\n\n"
        ".. |name| replace:: replacement words\n\n"
        ".. [1] Footnote text.\n.. [CIT2002] Citation text.\n\nEnd.\n"
    )
    assert texts(doc) == ["Footnote text.", "Citation text.", "End."]


def test_lists_fields_and_definitions():
    doc = (
        "- Bullet one\n  continued\n* Bullet two\n\n#. Auto\n(a) Lettered\n3) Numbered\n\n"
        "Term\n   Definition text.\n\n:Author: Someone\n:param x: the parameter\n"
    )
    assert pieces(doc) == [
        ("Bullet one", "text", True),
        ("continued", "text", False),
        ("Bullet two", "text", True),
        ("Auto", "text", True),
        ("Lettered", "text", True),
        ("Numbered", "text", True),
        ("Term", "text", True),
        ("Definition text.", "text", True),
        ("Someone", "text", True),
        ("the parameter", "text", True),
    ]


def test_tables_doctests_line_blocks():
    doc = (
        ">>> print('x')\nx\n\n"
        "+-------+-------+\n| One   | Two   |\n+=======+=======+\n| three | four  |\n+-------+-------+\n\n"
        "=====  =====\nColA   ColB\n=====  =====\n\n| Line one\n| Line two\n"
    )
    assert pieces(doc) == [
        ("One", "table", True),
        ("Two", "table", True),
        ("three", "table", True),
        ("four", "table", True),
        ("ColA   ColB", "text", True),
        ("Line one", "text", True),
        ("Line two", "text", True),
    ]


def test_crlf_tabs_emoji_cjk():
    doc = "Title 🎉\r\n========\r\n\r\n漢字 text\twith tab\r\n``code`` wrold\r\n"
    spans = extract(doc, "rst")
    assert [doc[s.start : s.end] for s in spans] == ["Title 🎉", "漢字 text\twith tab", "wrold"]
    assert spans[2].start == doc.index("wrold")


def test_fixture_file():
    doc = (DATA / "nasty.rst").read_text(encoding="utf-8")
    expected = (DATA / "nasty.rst.expected").read_text(encoding="utf-8").splitlines()
    got = [f"{s.start} {s.end} {s.kind} {int(s.breaks_before)} {doc[s.start:s.end]!r}" for s in extract(doc, "rst")]
    assert got == expected


_WORD = regex.compile(r"\p{L}+")


def _docutils_words(source: str) -> Counter[str]:
    docutils_core = pytest.importorskip("docutils.core")
    nodes = pytest.importorskip("docutils.nodes")
    excluded = (
        nodes.literal_block, nodes.literal, nodes.comment, nodes.target, nodes.raw, nodes.substitution_definition,
        nodes.system_message, nodes.problematic, nodes.doctest_block, nodes.field_name, nodes.title_reference,
        nodes.math, nodes.math_block, nodes.option_string, nodes.label,
    )
    tree = docutils_core.publish_doctree(source, settings_overrides={"report_level": 5, "halt_level": 5})
    words: Counter[str] = Counter()
    for text_node in tree.findall(nodes.Text):
        parent = text_node.parent
        while parent is not None and not isinstance(parent, excluded):
            parent = parent.parent
        if parent is None:
            words.update(_WORD.findall(text_node.astext()))
    return words


def _our_words(source: str) -> Counter[str]:
    words: Counter[str] = Counter()
    for s in extract(source, "rst"):
        words.update(_WORD.findall(source[s.start : s.end]))
    return words


def test_words_agree_with_docutils():
    doc = (DATA / "oracle.rst").read_text(encoding="utf-8")
    assert _our_words(doc) == _docutils_words(doc)


@pytest.mark.parametrize(
    "source",
    ["``x " * 20_000, ":r:`x " * 20_000, "|a " * 20_000, ".. " * 20_000, "::\n" * 20_000, "`" * 100_000, "\x00\udcff\ufffd"],
)
def test_adversarial_inputs_do_not_raise(source: str):
    for s in extract(source, "rst"):
        assert 0 <= s.start < s.end <= len(source)


def test_code_tab_bodies_are_code():
    # sphinx-tabs' ``code-tab`` directive (its documentation) holds code, like code-block.
    doc = ".. tabs::\n\n    .. code-tab:: ini\n\n        [report]\n        @(abc\\.)?abstractmethod\n\n    Prose after.\n"
    assert texts(doc) == ["Prose after."]

"""Quick fixes that write a directive: applying the edit makes the finding go away."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from lsprotocol import types

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "lsp"))

from fake_checker import FakeChecker  # noqa: E402

from calami.findings import DIRECTIVE  # noqa: E402
from calami.lsp import actions  # noqa: E402
from calami.lsp.diagnostics import compute  # noqa: E402
from calami.lsp.documents import Document  # noqa: E402
from calami.lsp.positions import UTF16  # noqa: E402
from calami.lsp.settings import Settings  # noqa: E402

DOCS = {
    "markdown": "# Title\n\nA line with teh word.\nAnother line.\n",
    "python": "#!/usr/bin/env python3\ndef f():\n    # A comment with teh word.\n    return 1\n",
    "rst": "Title\n=====\n\nA line with teh word.\n",
    "commit": "Fix the parser\n\nA line with teh word.\n",
    "javascript": "// A line with teh word.\nlet x = 1;\n",
    "plain": "A line with teh word.\r\nAnother line.\r\n",
}


def apply(text: str, doc: Document, edit: types.TextEdit) -> str:
    start = doc.positions.offset(edit.range.start)
    end = doc.positions.offset(edit.range.end)
    return text[:start] + edit.new_text + text[end:]


def actions_for(doc: Document):
    found = compute(doc, doc.text, doc.version, FakeChecker(), Settings())
    target = next(f for f in found if f.word == "teh")
    rng = doc.positions.range(target.start, target.end)
    return {a.title: a for a in actions.code_actions(doc, found, rng, Settings(), True)}


@pytest.mark.parametrize("kind", sorted(DOCS))
@pytest.mark.parametrize("title", [actions.SKIP_LINE_TITLE, actions.ACCEPT_IN_FILE_TITLE.format(word="teh")])
def test_directive_quick_fix_silences_the_word(kind, title):
    text = DOCS[kind]
    doc = Document("file:///t", kind, 1, text, UTF16, kind)
    offered = actions_for(doc)
    assert title in offered
    (edit,) = offered[title].edit.changes[doc.uri]
    fixed = apply(text, doc, edit)
    after = Document("file:///t", kind, 2, fixed, UTF16, kind)
    found = compute(after, fixed, 2, FakeChecker(), Settings())
    assert [f.word for f in found] == []
    if kind == "python":
        assert fixed.startswith("#!/usr/bin/env python3\n")
    if kind == "commit":
        assert fixed.startswith("Fix the parser\n")
    if kind == "plain":
        assert "\n" not in fixed.replace("\r\n", "")  # line endings kept


def test_accept_in_file_extends_an_existing_directive():
    text = "<!-- calami(known wrold) -->\nA line with teh word.\n"
    doc = Document("file:///t", "markdown", 1, text, UTF16, "markdown")
    (edit,) = actions_for(doc)[actions.ACCEPT_IN_FILE_TITLE.format(word="teh")].edit.changes[doc.uri]
    assert apply(text, doc, edit).startswith("<!-- calami(known wrold teh) -->\n")


def test_a_misspelt_directive_is_a_diagnostic_with_a_fix():
    text = "A line.\n<!-- calami(hush-nxet) -->\nteh\n"
    doc = Document("file:///t", "markdown", 1, text, UTF16, "markdown")
    found = compute(doc, text, 1, FakeChecker(), Settings())
    problem = next(f for f in found if f.kind == DIRECTIVE)
    assert "hush-nxet" in problem.note
    assert [f.word for f in found if f.kind != DIRECTIVE] == ["teh"]  # not hushed
    offered = actions.code_actions(doc, found, doc.positions.range(problem.start, problem.end), Settings(), True)
    (fix,) = offered
    (edit,) = fix.edit.changes[doc.uri]
    fixed = apply(text, doc, edit)
    after = Document("file:///t", "markdown", 2, fixed, UTF16, "markdown")
    assert compute(after, fixed, 2, FakeChecker(), Settings()) == []

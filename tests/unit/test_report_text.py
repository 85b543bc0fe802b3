"""Text and JSON reports: positions, markers, colour rules, summary wording."""

from __future__ import annotations

import io
import json

import pytest

from calami.findings import KIND_LABELS, Finding, Suggestion
from calami.report import Summary, json_array, locate
from calami.report import text as text_report
from calami.report.progress import Progress


def _finding(text, word, kind="nonword", confident=False, suggestions=("x",)):
    start = text.index(word)
    return Finding(start, start + len(word), word, kind, 0.9, tuple(Suggestion(s, 0.5) for s in suggestions), confident)


def test_locate_counts_code_points_and_handles_every_line_ending():
    text = "a\r\nb\rc\n🙂x 中 typo\n"
    [item] = locate("f", text, [_finding(text, "typo")])
    assert (item.line, item.column, item.end_line, item.end_column) == (4, 6, 4, 10)
    assert item.context == "🙂x 中 typo"


def test_findings_are_reported_in_document_order():
    text = "one two three"
    placed = locate("f", text, [_finding(text, "three"), _finding(text, "one")])
    assert [p.finding.word for p in placed] == ["one", "three"]


MARKED = text_report.MARK_OPEN + "{}" + text_report.MARK_CLOSE


def test_long_lines_are_cut_around_the_word():
    text = "word " * 60 + "typo " + "tail " * 60
    [item] = locate("f", text, [_finding(text, "typo")])
    context = text_report.render_one(item).splitlines()[1]
    assert len(context) < 220 and context.strip().startswith("…") and context.endswith("…")
    assert MARKED.format("typo") in context
    assert context.count("word") >= 5 and context.count("tail") >= 5  # context kept on both sides


def test_a_short_line_is_shown_whole_with_the_word_marked_inline():
    text = "The daemon will recieve the batch."
    [item] = locate("docs/guide.md", text, [_finding(text, "recieve", confident=True, suggestions=("receive", "relieve"))])
    label = KIND_LABELS["nonword"]
    assert text_report.render_one(item).splitlines() == [
        f"docs/guide.md:1:17: recieve ({label}, confident fix)",
        text_report.INDENT + "The daemon will " + MARKED.format("recieve") + " the batch.",
        text_report.INDENT + "fixes: receive, relieve",
    ]


def test_the_old_compiler_like_layout_is_gone():
    # Our own layout: no numbered gutter, no caret underline, no "= suggestions:" line.
    text = "some teh text"
    [item] = locate("f", text, [_finding(text, "teh")])
    block = text_report.render_one(item)
    assert " | " not in block and "^" not in block and "= suggestions" not in block


def test_render_colour_and_labels():
    text = "data form disk"
    [item] = locate("p.md", text, [_finding(text, "form", kind="realword", suggestions=("from", "fork"))])
    plain = text_report.render_one(item, colour=False)
    assert plain.splitlines()[0] == f"p.md:1:6: form ({KIND_LABELS['realword']})"
    assert plain.splitlines()[2].endswith("fixes: from, fork")
    coloured = text_report.render_one(item, colour=True)
    assert "\x1b[33m" in coloured and "\x1b[0m" in coloured
    # The marks stay with colour on, so a copied log still shows the word.
    assert text_report.MARK_OPEN in coloured and text_report.MARK_CLOSE in coloured


class _Tty(io.StringIO):
    def isatty(self):
        return True


def test_use_colour_follows_terminal_and_no_color(monkeypatch):
    # NO_COLOR convention (no-color.org): a non-empty value disables colour.
    monkeypatch.delenv("NO_COLOR", raising=False)
    assert text_report.use_colour(_Tty()) and not text_report.use_colour(io.StringIO())
    monkeypatch.setenv("NO_COLOR", "1")
    assert not text_report.use_colour(_Tty())
    assert text_report.use_colour(io.StringIO(), "always") and not text_report.use_colour(_Tty(), "never")
    monkeypatch.setenv("NO_COLOR", "")
    assert text_report.use_colour(_Tty())


@pytest.mark.parametrize(
    "summary, line",
    [
        (Summary(files_checked=3, words=1234), "No findings in 3 files checked (1,234 words)."),
        (Summary(files_checked=1, words=1, files_skipped=3, skipped={"binary": 1, "git-ignored": 2}),
         "No findings in 1 file checked (1 word); 3 skipped (2 git-ignored, 1 binary)."),
        (Summary(files_checked=4, files_with_findings=2, nonword=2, realword=1, words=1500),
         f"3 findings (2 {KIND_LABELS['nonword']}s, 1 {KIND_LABELS['realword']}) in 2 files; "
         "4 files checked (1,500 words), 2.00 findings per 1,000 words."),
        (Summary(files_skipped=2, skipped={"not a kind calami reads": 2}),
         "Nothing checked: 2 skipped (2 not a kind calami reads); --verbose names them."),
        (Summary(), "Nothing checked: no files found."),
    ],
)
def test_summary_line(summary, line):
    assert text_report.summary_line(summary) == line


def test_json_array_shape():
    text = "x\nnaïve recieve\n"
    located = locate("d/f.md", text, [_finding(text, "recieve", suggestions=("receive", "relieve"))])
    [record] = json.loads(json_array.render(located))
    assert record == {
        "path": "d/f.md", "line": 2, "column": 7, "end_line": 2, "end_column": 14, "word": "recieve",
        "kind": "nonword", "confidence": 0.9,
        "suggestions": [{"text": "receive", "probability": 0.5}, {"text": "relieve", "probability": 0.5}],
    }
    assert json.loads(json_array.render([])) == []


def test_progress_bar_only_on_a_terminal_after_a_delay():
    clock = iter([0.0, 0.1, 1.0, 1.01, 2.0]).__next__
    stream = _Tty()
    bar = Progress(10, stream, clock=clock)
    bar.update(1, "a.md")  # t=0.1: too early
    assert stream.getvalue() == ""
    bar.update(2, "b.md")  # t=1.0: shows
    assert "2/10" in stream.getvalue() and "b.md" in stream.getvalue()
    bar.update(3, "c.md")  # t=1.01: throttled
    assert "3/10" not in stream.getvalue()
    bar.close()
    assert stream.getvalue().endswith("\r\x1b[K")
    quiet = io.StringIO()
    Progress(10, quiet, clock=iter([0.0, 5.0]).__next__).update(5)
    assert quiet.getvalue() == ""

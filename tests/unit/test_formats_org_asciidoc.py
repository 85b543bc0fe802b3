"""Org and AsciiDoc: what is prose, exactly, on documents of our own.

No reference reader of either format is on PyPI that gives the rendered
text with code apart (the formats' own tools are Emacs and Asciidoctor,
outside Python), so these are exact tests of each construct; the shared
property suite (``test_formats_properties.py``) and the hostile inputs
below check the span invariants and linear scans.
"""

from __future__ import annotations

import pytest

from calami.text.formats import detect_kind, extract

ORG = """#+TITLE: The Planner Handbook
#+OPTIONS: toc:nil
#+AUTHOR: Somebody Else

* TODO [#A] Watering windows                                    :plan:core:
  :PROPERTIES:
  :ID:       1234-abcd
  :END:
  SCHEDULED: <2024-03-01 Fri>
The planner reads ~sensor.csv~ and =raw= values, see [[https://example.org][the site]]
and [[file:notes.org]] for more.

# a comment line with teh
: fixed width code teh
- [X] first item with src_python{x = teh} inline
- second item[fn:1]
  1. nested numbered
| Name | Value |
|------+-------|
| wet  | damp  |

#+BEGIN_SRC python
print("teh")
#+END_SRC

#+begin_quote
A quoted line stays prose.
#+end_quote

[fn:1] The footnote text.
** DONE Second heading
Math like \\(x^2\\) and $y$ is skipped.
"""

ASCIIDOC = """= The Planner Handbook
Somebody Else <someone@example.org>
:toc: left

== Watering windows

The planner reads `sensor.csv` and {product} values, see https://example.org[the site]
and link:notes.html[the notes] or <<setup,the set-up section>> for more. +
A hard break above.

// a comment line with teh
[source,python]
----
print("teh")
----

* [x] first item
** nested item
  continued on an indented line
. numbered item
CPU:: the processor

NOTE: An admonition paragraph.

 literal paragraph with teh typo

.A block title
====
Example block prose.
====

////
comment block teh
////

|===
| Name | Value
| wet  | damp
|===

image::diagram.png[A diagram]
"""


def pieces(text, kind):
    return [(text[s.start : s.end], s.kind, s.breaks_before) for s in extract(text, kind)]


def test_org_prose_and_what_is_cut():
    assert pieces(ORG, "org") == [
        ("The Planner Handbook", "heading", True),
        ("Watering windows", "heading", True),
        ("The planner reads", "text", True), ("and", "text", False), ("values, see", "text", False),
        ("the site", "text", False), ("and", "text", False), ("for more.", "text", False),
        ("first item with", "text", True), ("inline", "text", False),
        ("second item", "text", True),
        ("nested numbered", "text", True),
        ("Name", "table-cell", True), ("Value", "table-cell", True),
        ("wet", "table-cell", True), ("damp", "table-cell", True),
        ("A quoted line stays prose.", "text", True),
        ("The footnote text.", "text", True),
        ("Second heading", "heading", True),
        ("Math like", "text", True), ("and", "text", False), ("is skipped.", "text", False),
    ]


def test_asciidoc_prose_and_what_is_cut():
    assert pieces(ASCIIDOC, "asciidoc") == [
        ("The Planner Handbook", "heading", True),
        ("Watering windows", "heading", True),
        ("The planner reads", "text", True), ("and", "text", False), ("values, see", "text", False),
        ("the site", "text", False), ("and", "text", False), ("the notes", "text", False),
        ("or", "text", False), ("the set-up section", "text", False), ("for more.", "text", False),
        ("A hard break above.", "text", False),
        ("first item", "text", True), ("nested item", "text", True),
        ("continued on an indented line", "text", False),
        ("numbered item", "text", True),
        ("CPU", "text", True), ("the processor", "text", True),
        ("An admonition paragraph.", "text", True),
        ("A block title", "heading", True),
        ("Example block prose.", "text", True),
        ("Name", "table-cell", True), ("Value", "table-cell", True),
        ("wet", "table-cell", True), ("damp", "table-cell", True),
    ]


@pytest.mark.parametrize("kind, text", [("org", ORG), ("asciidoc", ASCIIDOC)])
def test_code_comments_and_markup_never_reach_the_spans(kind, text):
    prose = " ".join(p for p, _, _ in pieces(text, kind))
    assert "teh" not in prose and "sensor" not in prose and "example.org" not in prose


def test_crlf_and_offsets():
    org = ORG.replace("\n", "\r\n")
    assert [p for p, _, _ in pieces(org, "org")] == [p for p, _, _ in pieces(ORG, "org")]
    adoc = ASCIIDOC.replace("\n", "\r\n")
    assert [p for p, _, _ in pieces(adoc, "asciidoc")] == [p for p, _, _ in pieces(ASCIIDOC, "asciidoc")]


def test_unclosed_blocks_run_to_the_end():
    assert pieces("Before.\n#+BEGIN_SRC sh\necho teh\n", "org") == [("Before.", "text", True)]
    assert pieces("Before.\n\n----\nteh\n", "asciidoc") == [("Before.", "text", True)]


@pytest.mark.parametrize("kind", ["org", "asciidoc"])
@pytest.mark.parametrize(
    "src",
    ["~" * 50_000, "=" * 50_000, "[[" * 30_000, "`" * 50_000, "+" * 50_000, "{" * 50_000, "<<" * 30_000,
     "[" * 50_000 + "]" * 50_000, "| a " * 30_000, "#+BEGIN_SRC\n" * 5_000, "----\n" * 5_000, ":a:\n" * 5_000,
     "* " * 30_000, "\x00\udcff binary"],
)
def test_hostile_inputs_give_valid_spans(kind, src):
    for s in extract(src, kind):
        assert 0 <= s.start < s.end <= len(src)


def test_files_are_detected():
    assert [detect_kind(n) for n in ("notes.org", "guide.adoc", "book.asciidoc")] == ["org", "asciidoc", "asciidoc"]

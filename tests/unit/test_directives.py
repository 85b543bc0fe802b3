"""In-file directives (calami.text.directives): read per document kind, typos reported."""

from __future__ import annotations

import pytest

from calami.text import directives as d
from calami.text.directives import HUSH_BEGIN, HUSH_END, HUSH_HERE, HUSH_NEXT, KNOWN, directive_text

# One document per kind: the directive as a comment of that kind, then a line it hushes.
COMMENTED = {
    "markdown": "<!-- {d} -->", "html": "<!-- {d} -->", "rst": ".. {d}", "latex": "% {d}",
    "plain": "{d}", "commit": "{d}", "python": "# {d}", "shell": "# {d}", "yaml": "# {d}",
    "toml": "# {d}", "javascript": "// {d}", "typescript": "// {d}", "rust": "// {d}", "go": "// {d}",
    "c": "// {d}", "cpp": "// {d}", "java": "// {d}",
}


def hushed(text: str, kind: str) -> list[str]:
    return [text[a:b] for a, b in d.read(text, kind).holes]


@pytest.mark.parametrize("kind", sorted(COMMENTED))
def test_every_kind_reads_its_own_comment_form(kind):
    line = COMMENTED[kind].format(d=directive_text(HUSH_NEXT))
    text = f"first\n{line}\nsecond wrold\nthird\n"
    assert "second wrold\n" in hushed(text, kind)
    assert not d.read(text, kind).problems
    # comment_line writes what read understands
    assert d.comment_line(kind, directive_text(HUSH_NEXT)) == line


def test_commit_and_plain_also_read_a_hash_line():
    for kind in ("commit", "plain"):
        assert "b\n" in hushed("a\n# calami(hush-next)\nb\n", kind)
        assert hushed("a calami(hush-next)\nb\n", kind) == []  # not on a line of its own


@pytest.mark.parametrize("kind", ["python", "javascript", "markdown", "rst"])
def test_a_directive_outside_a_comment_is_plain_text(kind):
    text = "The call calami(hush-next) in prose does nothing.\nnext line\n"
    assert d.read(text, kind).holes == []


def test_hush_here_block_and_known():
    text = ("keep\nskip me # calami(hush-here)\n# calami(hush-begin)\nA\nB\n# calami(hush-end)\nafter\n"
            "# calami(known Wrold teh)\n")
    marks = d.read(text, "python")
    holes = hushed(text, "python")
    assert "skip me # calami(hush-here)\n" in holes
    assert "# calami(hush-begin)\nA\nB\n# calami(hush-end)\n" in holes
    assert not any("keep" in h or "after" in h for h in holes)
    assert marks.accepts("Wrold") and not marks.accepts("wrold")  # written capitalised: only so
    assert marks.accepts("teh") and marks.accepts("Teh") and marks.accepts("TEH")  # lower case: any case
    assert not marks.accepts("the")


def test_crlf_lines_are_hushed_whole():
    text = "a\r\n<!-- calami(hush-next) -->\r\nb wrold\r\nc\r\n"
    assert "b wrold\r\n" in hushed(text, "markdown")


def test_markdown_fences_can_show_directives():
    text = "```\n<!-- calami(hush-next) -->\n```\nchecked line\n"
    assert d.read(text, "markdown").holes == []


@pytest.mark.parametrize(
    "written, fix",
    [
        ("calami(hush-nxet)", directive_text(HUSH_NEXT)),
        ("calami(hush-begn)", directive_text(HUSH_BEGIN)),
        ("calmi(hush-here)", directive_text(HUSH_HERE)),
        ("Calami(hush-end)", directive_text(HUSH_END)),
        ("calami hush-next", directive_text(HUSH_NEXT)),
        ("calami(knwon foo)", directive_text(KNOWN, ["foo"])),
        ("calami(hush-next please)", directive_text(HUSH_NEXT)),
        ("calami(known)", None),
        ("calami(hush-next", None),
        ("calami()", None),
    ],
)
def test_a_directive_with_a_typo_is_a_problem(written, fix):
    text = f"a\n# {written}\nb\n"
    marks = d.read(text, "python")
    assert len(marks.problems) == 1, marks
    problem = marks.problems[0]
    assert problem.fix == fix
    assert text[problem.start:problem.end].startswith(written.split("(")[0].split()[0])
    assert "b\n" not in hushed(text, "python")  # nothing is hushed by a directive not understood


def test_unbalanced_blocks_are_problems():
    stray = d.read("# calami(hush-end)\ntext\n", "python")
    assert len(stray.problems) == 1 and "without" in stray.problems[0].message
    open_ = d.read("a\n# calami(hush-begin)\nb\nc\n", "python")
    assert len(open_.problems) == 1
    assert "b\nc\n" in "".join("a\n# calami(hush-begin)\nb\nc\n"[x:y] for x, y in open_.holes)
    nested = d.read("# calami(hush-begin)\n# calami(hush-begin)\n# calami(hush-end)\n", "python")
    assert len(nested.problems) == 1


def test_other_calls_in_comments_are_not_ours():
    assert d.read("# see print(x) and calendar(1)\n", "python") == d.NONE or not d.read(
        "# see print(x) and calendar(1)\n", "python").problems


def test_problem_notes_name_line_and_column():
    notes = d.problem_notes("a\n  # calami(hush-nxet)\n", d.read("a\n  # calami(hush-nxet)\n", "python"))
    assert notes == ["line 2, column 5: unknown calami directive 'hush-nxet'; did you mean 'hush-next'?"
                     " (write calami(hush-next))"]


@pytest.mark.parametrize("text", [
    "calami(" * 50_000,
    "``` " * 50_000 + "\n<!-- calami(hush-next) -->\n",
    "(hush" * 50_000,
    "\r".join(["<!-- calami(known a) -->"] * 5_000),
    "# calami(hush-begin)\n" * 5_000,
])
def test_adversarial_inputs_stay_linear(text):
    # A quadratic scan over these would take minutes; each must just finish.
    for kind in ("markdown", "python", "plain"):
        d.read(text, kind)


def test_lone_cr_line_endings():
    text = "a\r<!-- calami(hush-next) -->\rb wrold\rc\r"
    assert "b wrold\r" in hushed(text, "markdown")

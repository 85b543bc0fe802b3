"""``calami check`` end to end, against a small fake checker (the real engine
has its own tests; ``test_check_real.py`` runs this command with it).

The fake flags the words of ``TYPOS`` (non-words) and ``form`` before ``disk``
(a real-word error), honours the project's words, and records how it was
built, so these tests see exactly what the command passes to a checker.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

from calami import cli
from calami.commands import check as check_command
from calami.findings import KIND_LABELS, Finding, Suggestion, Thresholds
from calami.report.text import INDENT, MARK_CLOSE, MARK_OPEN
from calami.text.tokens import WORD, tokenize

TYPOS = {"wrold": ["world", "wold"], "recieve": ["receive"], "teh": ["the", "ten"]}
BUILT: list[dict] = []


class FakeChecker:
    def __init__(self, project, variant):
        self.words = project.words
        BUILT.append({"root": project.root, "variant": variant, "thresholds": project.config.thresholds})

    def check(self, text, spans=None):
        tokens = tokenize(text, spans)
        found = []
        for i, tok in enumerate(tokens):
            if tok.kind != WORD or self.words.accepts(tok.text):
                continue
            nxt = tokens[i + 1].text if i + 1 < len(tokens) else ""
            if tok.text.lower() in TYPOS:
                sugg = tuple(Suggestion(s, 0.9 / (n + 1)) for n, s in enumerate(TYPOS[tok.text.lower()]))
                found.append(Finding(tok.start, tok.end, tok.text, "nonword", 0.97, sugg, confident=True))
            elif tok.text == "form" and nxt == "disk":
                found.append(Finding(tok.start, tok.end, tok.text, "realword", 0.8, (Suggestion("from", 0.8),)))
        return found


@pytest.fixture(autouse=True)
def fake_checker(monkeypatch):
    BUILT.clear()
    monkeypatch.setattr(check_command, "CHECKER_FACTORY", lambda model_path: FakeChecker)
    monkeypatch.delenv("NO_COLOR", raising=False)


def run(argv, capsys, cwd=None, monkeypatch=None):
    if cwd is not None:
        monkeypatch.chdir(cwd)
    code = cli.main(["check", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def write(path: Path, text: str, newline: str = "\n") -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path, "w", encoding="utf-8", newline=newline) as handle:
        handle.write(text)
    return path


@pytest.fixture
def project(tmp_path):
    (tmp_path / ".git").mkdir()  # marks the project root
    return tmp_path


NONWORD_LABEL = KIND_LABELS["nonword"]


def test_text_report_marks_the_word_in_its_line(project, capsys, monkeypatch):
    write(project / "notes.txt", "First line is fine.\nWe will recieve it.\n")
    code, out, err = run(["notes.txt"], capsys, project, monkeypatch)
    assert code == 1
    lines = out.splitlines()
    assert lines[0] == f"notes.txt:2:9: recieve ({NONWORD_LABEL}, confident fix)"
    assert lines[1] == f"{INDENT}We will {MARK_OPEN}recieve{MARK_CLOSE} it."
    assert lines[2] == f"{INDENT}fixes: receive"
    assert lines[-1].startswith(f"1 finding (1 {NONWORD_LABEL}) in 1 file; 1 file checked")
    assert "\x1b[" not in out  # captured stdout is not a terminal


def test_marked_word_is_right_after_tabs_and_wide_characters(project, capsys, monkeypatch):
    write(project / "wide.txt", "\t中文 and 🙂 then teh end\n")
    code, out, _ = run(["wide.txt"], capsys, project, monkeypatch)
    lines = out.splitlines()
    assert lines[0] == f"wide.txt:1:16: teh ({NONWORD_LABEL}, confident fix)"
    # Tabs are expanded and the indentation dropped; the mark is inline, so it cannot drift.
    assert lines[1] == f"{INDENT}中文 and 🙂 then {MARK_OPEN}teh{MARK_CLOSE} end"
    write(project / "mid.txt", "a\tteh\n")
    assert run(["mid.txt"], capsys, project, monkeypatch)[1].splitlines()[1] == f"{INDENT}a   {MARK_OPEN}teh{MARK_CLOSE}"


def test_clean_file_exits_zero_with_a_summary(project, capsys, monkeypatch):
    write(project / "ok.md", "Nothing wrong here.\n")
    code, out, err = run(["ok.md"], capsys, project, monkeypatch)
    assert code == 0
    assert out == "No findings in 1 file checked (3 words).\n"


def test_missing_file_is_an_io_error_but_other_files_are_checked(project, capsys, monkeypatch):
    write(project / "a.txt", "teh\n")
    code, out, err = run(["nope.txt", "a.txt"], capsys, project, monkeypatch)
    assert code == 2
    assert "calami: nope.txt: no such file or folder" in err
    assert "a.txt:1:1: teh" in out


def test_standard_input(project, capsys, monkeypatch):
    import io

    monkeypatch.setattr("sys.stdin", io.StringIO("Hello wrold\n"))
    code, out, _ = run(["--format", "json", "-"], capsys, project, monkeypatch)
    assert code == 1
    [item] = json.loads(out)
    assert item["path"] == "-" and item["word"] == "wrold" and item["column"] == 7


def test_json_shape_and_code_point_columns(project, capsys, monkeypatch):
    # CRLF endings, an emoji (one code point, two UTF-16 units) and CJK before the word.
    write(project / "doc.txt", "Intro line.\r\n🙂 中文 wrold and form disk\r\n", newline="")
    code, out, _ = run(["--format", "json", "doc.txt"], capsys, project, monkeypatch)
    assert code == 1
    items = json.loads(out)
    assert [sorted(i) for i in items] == [sorted(
        ["path", "line", "column", "end_line", "end_column", "word", "kind", "confidence", "suggestions"]
    )] * 2
    first, second = items
    assert (first["line"], first["column"], first["end_line"], first["end_column"]) == (2, 6, 2, 11)
    assert first["word"] == "wrold" and first["kind"] == "nonword"
    assert first["suggestions"][0] == {"text": "world", "probability": 0.9}
    assert second["kind"] == "realword" and second["word"] == "form" and second["column"] == 16
    assert 0 <= second["confidence"] <= 1


def test_folder_walk_honours_gitignore_and_config_globs(project, capsys, monkeypatch):
    write(project / ".gitignore", "build/\n*.log.md\n")
    write(project / "calami.toml", 'exclude = ["vendor"]\ninclude = ["*.md", "docs/**"]\n')
    write(project / "README.md", "teh readme\n")
    write(project / "build" / "out.md", "teh built\n")
    write(project / "x.log.md", "teh log\n")
    write(project / "vendor" / "lib.md", "teh vendored\n")
    write(project / "docs" / "guide.rst", "teh guide\n")
    write(project / "notes.txt", "teh not included\n")
    code, out, _ = run(["--format", "json", "."], capsys, project, monkeypatch)
    assert code == 1
    assert sorted(i["path"] for i in json.loads(out)) == ["README.md", "docs/guide.rst"]


def test_project_words_and_thresholds_reach_the_checker(project, capsys, monkeypatch):
    write(project / "calami-lexicon.txt", "# jargon\nwrold\n")
    write(project / "calami.toml", "[thresholds]\nhint = 0.6\nconfident = 0.9\n")
    write(project / "a.txt", "Wrold and teh.\n")
    code, out, _ = run(["--format", "json", "--variant", "en-GB", "a.txt"], capsys, project, monkeypatch)
    assert [i["word"] for i in json.loads(out)] == ["teh"]
    assert BUILT == [{"root": project, "variant": "en-GB", "thresholds": Thresholds(0.6, 0.9)}]


def test_bad_config_value_exits_2_naming_file_and_line(project, capsys, monkeypatch):
    write(project / "calami.toml", '# settings\nvariant = "en-US"\nmax-suggestions = "many"\n')
    write(project / "a.txt", "teh\n")
    code, out, err = run(["a.txt"], capsys, project, monkeypatch)
    assert code == 2 and out == ""
    assert f"{project / 'calami.toml'}:3: max-suggestions must be" in err


def test_toml_syntax_error_exits_2_naming_file_and_line(project, capsys, monkeypatch):
    write(project / "calami.toml", 'variant = "en-US"\n\nword-lists = [\n  "a.txt"\n  "b.txt"]\n')
    write(project / "a.txt", "teh\n")
    code, _, err = run(["a.txt"], capsys, project, monkeypatch)
    assert code == 2
    assert f"{project / 'calami.toml'}:5: invalid TOML" in err


def test_skip_patterns_cut_text_out(project, capsys, monkeypatch):
    write(project / "calami.toml", "skip-patterns = ['TODO\\(teh\\)', '^>.*$']\n")
    write(project / "a.txt", "TODO(teh) fine\n> quoted teh\nreal teh\n")
    code, out, _ = run(["--format", "json", "a.txt"], capsys, project, monkeypatch)
    assert [(i["line"], i["word"]) for i in json.loads(out)] == [(3, "teh")]


def test_catastrophic_skip_pattern_is_reported_and_checking_goes_on(project, capsys, monkeypatch):
    # (a|aa)+$ backtracks exponentially on a long run of a's followed by another letter.
    write(project / "calami.toml", "skip-patterns = [\n  'teh',\n  '(a|aa)+$',\n]\n")
    write(project / "a.txt", "a" * 60 + "! wrold\n")
    monkeypatch.setattr("calami.vocab.ignore.DEFAULT_TIMEOUT", 0.2)
    monkeypatch.setattr("calami.vocab.project.DEFAULT_TIMEOUT", 0.2)
    code, out, err = run(["--format", "json", "a.txt"], capsys, project, monkeypatch)
    assert code == 1
    assert [i["word"] for i in json.loads(out)] == ["wrold"]
    assert f"{project / 'calami.toml'}:3: skip pattern '(a|aa)+$' took longer than" in err


def test_binary_and_oversized_files_are_skipped_with_a_note(project, capsys, monkeypatch):
    (project / "blob.txt").write_bytes(b"teh\x00\x01\x02")
    write(project / "big.txt", "teh " * 100)
    write(project / "small.txt", "teh\n")
    code, out, err = run(["--max-bytes", "100", "blob.txt", "big.txt", "small.txt"], capsys, project, monkeypatch)
    assert code == 1
    assert "calami: note: blob.txt: skipped (binary file)" in err
    assert "calami: note: big.txt: skipped (larger than 100 bytes (400 bytes))" in err
    assert out.splitlines()[-1] == (f"1 finding (1 {NONWORD_LABEL}) in 1 file; 1 file checked (1 word), "
                                    "1000.00 findings per 1,000 words; 2 skipped (1 binary, 1 too large).")


def test_colour_only_when_asked_or_on_a_terminal(project, capsys, monkeypatch):
    write(project / "a.txt", "teh\n")
    _, out, _ = run(["--color", "always", "a.txt"], capsys, project, monkeypatch)
    assert "\x1b[31m" in out
    monkeypatch.setenv("NO_COLOR", "1")
    _, out, _ = run(["a.txt"], capsys, project, monkeypatch)
    assert "\x1b[" not in out


def test_several_jobs_give_the_same_report(project, capsys, monkeypatch):
    for n in range(12):
        write(project / "docs" / f"f{n:02}.md", f"Page {n}.\n\nteh page and form disk {n}\n")
    _, one, _ = run(["--format", "json", "docs"], capsys, project, monkeypatch)
    code, two, _ = run(["--format", "json", "--jobs", "2", "docs"], capsys, project, monkeypatch)
    assert code == 1
    assert json.loads(one) == json.loads(two)
    assert len(json.loads(two)) == 24


def test_several_jobs_report_in_path_order_whatever_the_sizes(project, capsys, monkeypatch):
    # Workers take the largest documents first; the report must not show it.
    for n in range(12):
        write(project / "docs" / f"f{n:02}.md", "".join(f"Line {i} of page {n}: teh end.\n\n" for i in range(1 + (n * 7) % 12 * 20)))
    _, one, _ = run(["--color", "never", "docs"], capsys, project, monkeypatch)
    code, two, _ = run(["--color", "never", "--jobs", "2", "docs"], capsys, project, monkeypatch)
    assert code == 1 and one == two
    names = [line.split(":")[0] for line in two.splitlines() if line.startswith("docs/")]
    assert names == sorted(names) and len(set(names)) == 12


def test_usage_errors_exit_2(project, capsys, monkeypatch):
    write(project / "a.txt", "fine\n")
    assert run(["--jobs", "0", "a.txt"], capsys, project, monkeypatch)[0] == 2
    assert run(["--kind", "klingon", "a.txt"], capsys, project, monkeypatch)[0] == 2
    with pytest.raises(SystemExit) as exc:
        cli.main(["check", "--format", "xml", "a.txt"])
    assert exc.value.code == 2


def test_folder_walk_detects_kinds_by_shebang_and_skips_unknown_files(project, capsys, monkeypatch):
    write(project / "bin" / "tool", "#!/bin/sh\n# teh helper script\necho teh\n")
    write(project / "bin" / "data.xyz", "teh unknown kind\n")
    code, out, _ = run(["--format", "json", "bin"], capsys, project, monkeypatch)
    assert code == 1
    # Only the comment is prose in a shell script; the unknown file is not read.
    assert [(i["path"], i["line"]) for i in json.loads(out)] == [("bin/tool", 2)]


def test_old_names_still_work_with_a_note(project, capsys, monkeypatch):
    write(project / "calami.toml", "ignore-patterns = ['TODO\\(teh\\)']\n")
    write(project / "calami-words.txt", "wrold\n")
    write(project / "a.txt", "TODO(teh) wrold and teh\n")
    code, out, err = run(["--format", "json", "a.txt"], capsys, project, monkeypatch)
    assert code == 1  # notes, not errors
    assert [(i["column"], i["word"]) for i in json.loads(out)] == [(21, "teh")]
    assert "calami: note: " in err and "'ignore-patterns' is the old name of 'skip-patterns'" in err
    assert "'calami-words.txt' is the old name of the project lexicon" in err


# ------------------------------------------------------- what was left out, and why

def test_a_folder_whose_files_are_all_ignored_says_so(project, capsys, monkeypatch):
    write(project / ".gitignore", "*.md\nbuild/\n")
    write(project / "a.md", "teh\n")
    write(project / "build" / "b.txt", "teh\n")
    code, out, err = run(["."], capsys, project, monkeypatch)
    assert code == 0 and err == ""
    assert out == "Nothing checked: 3 skipped (2 git-ignored, 1 not a kind calami reads); --verbose names them.\n"
    code, out, err = run(["--verbose", "."], capsys, project, monkeypatch)
    assert code == 0
    assert sorted(err.splitlines()) == [
        "calami: note: .gitignore: skipped (no extension or shebang calami knows)",
        "calami: note: a.md: skipped (ignored by .gitignore)",
        "calami: note: build: skipped (folder ignored by .gitignore)",
    ]


def test_unsupported_kinds_and_config_exclusions_are_counted_and_named(project, capsys, monkeypatch):
    write(project / "calami.toml", 'exclude = ["old"]\n')
    write(project / "a.md", "fine words\n")
    write(project / "data.xyz", "teh\n")
    write(project / "old" / "b.md", "teh\n")
    code, out, err = run(["--verbose", "."], capsys, project, monkeypatch)
    assert code == 0
    # calami.toml is checked too (its comments are prose); it has none.
    assert out.splitlines()[-1] == "No findings in 2 files checked (2 words); 2 skipped (1 excluded by config, 1 not a kind calami reads)."
    assert "calami: note: data.xyz: skipped (calami does not read .xyz files)" in err
    assert "calami: note: old/b.md: skipped (matched by exclude in calami.toml)" in err


def test_licences_and_dependency_lists_are_not_prose_unless_named(project, capsys, monkeypatch):
    for name in ("LICENSE", "COPYING", "LICENSE-MIT", "requirements.txt", "requirements-dev.txt", "notes.txt"):
        write(project / name, "teh\n")
    code, out, err = run(["--format", "json", "--verbose", "."], capsys, project, monkeypatch)
    assert [i["path"] for i in json.loads(out)] == ["notes.txt"]
    assert "calami: note: requirements.txt: skipped (dependency list, not prose; name it to check it anyway)" in err
    assert "calami: note: LICENSE: skipped (licence or legal text, not prose; name it to check it anyway)" in err
    code, out, _ = run(["--format", "json", "LICENSE", "requirements.txt"], capsys, project, monkeypatch)
    assert code == 1 and [i["path"] for i in json.loads(out)] == ["LICENSE", "requirements.txt"]


@pytest.mark.parametrize("fmt", ["text", "json"])
def test_nothing_checked_because_of_an_error_exits_2_with_nothing_on_stdout(project, capsys, monkeypatch, fmt):
    (project / "latin.txt").write_bytes(b"caf\xe9 teh\n")
    code, out, err = run(["--format", fmt, "latin.txt"], capsys, project, monkeypatch)
    assert code == 2 and out == ""
    assert "latin.txt: skipped (not UTF-8 text (line 1))" in err
    code, out, err = run(["--format", fmt, "missing.md"], capsys, project, monkeypatch)
    assert code == 2 and out == ""
    assert "calami: missing.md: no such file or folder" in err


def test_nothing_checked_because_of_an_error_still_gives_a_failed_sarif_log(project, capsys, monkeypatch):
    code, out, _ = run(["--format", "sarif", "missing.md"], capsys, project, monkeypatch)
    assert code == 2
    [run_log] = json.loads(out)["runs"]
    assert run_log["results"] == [] and run_log["invocations"][0]["executionSuccessful"] is False


def test_a_binary_file_alone_is_a_choice_not_an_error(project, capsys, monkeypatch):
    (project / "blob.txt").write_bytes(b"teh\x00")
    code, out, err = run(["blob.txt"], capsys, project, monkeypatch)
    assert code == 0
    assert out == "Nothing checked: 1 skipped (1 binary); --verbose names them.\n"


@pytest.mark.parametrize("value", ["-1", "0", "many"])
def test_max_bytes_must_be_a_positive_number(project, capsys, monkeypatch, value):
    write(project / "a.txt", "teh\n")
    with pytest.raises(SystemExit) as exc:
        cli.main(["check", "--max-bytes", value, "a.txt"])
    assert exc.value.code == 2
    assert "--max-bytes" in capsys.readouterr().err


def test_summary_counts_the_words_checked(project, capsys, monkeypatch):
    write(project / "a.md", "We will recieve it.\n\n```\nnot prose at all here\n```\n")
    write(project / "b.md", "Two `code` words, see https://example.org.\n")
    code, out, _ = run(["a.md", "b.md"], capsys, project, monkeypatch)
    # a.md: We will recieve it (4); b.md: Two words see (3): code, URLs and code blocks are not words.
    assert out.splitlines()[-1].endswith("2 files checked (7 words), 142.86 findings per 1,000 words.")


def test_missing_word_list_named_in_the_config_is_an_error_naming_it(project, capsys, monkeypatch):
    write(project / "calami.toml", 'word-lists = ["docs/terms.txt"]\n')
    write(project / "a.txt", "teh\n")
    code, out, err = run(["a.txt"], capsys, project, monkeypatch)
    assert code == 2 and out == ""
    assert f"word list {project / 'docs' / 'terms.txt'} named in word-lists does not exist" in err

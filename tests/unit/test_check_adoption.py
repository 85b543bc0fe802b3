"""``calami check`` --fix, --diff, --baseline, --write-baseline, --changed, --staged and directives,
end to end against a small fake checker (the real engine: test_check_real.py).
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
from pathlib import Path

import pytest

from calami import cli
from calami.commands import check as check_command
from calami.findings import Finding, Suggestion
from calami.text.tokens import WORD, tokenize

# typed -> (best fix, confident?)
TYPOS = {"teh": ("the", True), "wrold": ("world", True), "recieve": ("receive", True), "ofen": ("often", False)}


class FakeChecker:
    def __init__(self, project, variant):
        self.words = project.words

    def check(self, text, spans=None):
        found = []
        for tok in tokenize(text, spans):
            if tok.kind != WORD or self.words.accepts(tok.text) or tok.text.lower() not in TYPOS:
                continue
            best, confident = TYPOS[tok.text.lower()]
            if tok.text[0].isupper():
                best = best.capitalize()
            found.append(Finding(tok.start, tok.end, tok.text, "nonword", 0.97 if confident else 0.7,
                                 (Suggestion(best, 0.9),), confident=confident))
        return found


@pytest.fixture(autouse=True)
def fake_checker(monkeypatch):
    monkeypatch.setattr(check_command, "CHECKER_FACTORY", lambda model_path: FakeChecker)
    monkeypatch.setenv("NO_COLOR", "1")


@pytest.fixture
def project(tmp_path, monkeypatch):
    (tmp_path / ".git").mkdir()
    monkeypatch.chdir(tmp_path)
    return tmp_path


def run(argv, capsys):
    code = cli.main(["check", *argv])
    out, err = capsys.readouterr()
    return code, out, err


# One document per kind: (file name, text, the text --fix must produce).  Code
# holds the same misspellings and must stay byte-identical.
KIND_DOCS = {
    "markdown": ("a.md", "# Teh title\n\nWe saw teh `teh` wrold.\n\n```\nteh code\n```\n", "# The title\n\nWe saw the `teh` world.\n\n```\nteh code\n```\n"),
    "rst": ("a.rst", "Title\n=====\n\nWe saw teh ``teh`` wrold.\n\n::\n\n    teh code\n", "Title\n=====\n\nWe saw the ``teh`` world.\n\n::\n\n    teh code\n"),
    "latex": ("a.tex", "We saw teh \\verb|teh| wrold.\n% teh comment\n", None),
    "html": ("a.html", "<p>We saw teh <code>teh</code> wrold.</p>\n", "<p>We saw the <code>teh</code> world.</p>\n"),
    "plain": ("a.txt", "We saw teh wrold.\r\nIt was ofen teh case.\r\n", "We saw the world.\r\nIt was ofen the case.\r\n"),
    "commit": ("COMMIT_EDITMSG", "Fix teh parser\n\nIt read teh wrold.\n# teh comment\n", "Fix the parser\n\nIt read the world.\n# teh comment\n"),
    "python": ("a.py", "teh = 1  # set teh wrold\ndef f():\n    \"\"\"Return teh value.\"\"\"\n    return teh\n",
               "teh = 1  # set the world\ndef f():\n    \"\"\"Return the value.\"\"\"\n    return teh\n"),
    "javascript": ("a.js", "let teh = 1; // teh wrold\n", "let teh = 1; // the world\n"),
    "c": ("a.c", "int teh; /* teh wrold */\n", "int teh; /* the world */\n"),
    "shell": ("a.sh", "teh=1  # teh wrold\n", "teh=1  # the world\n"),
    "yaml": ("a.yaml", "teh: 1  # teh wrold\n", "teh: 1  # the world\n"),
    "toml": ("a.toml", "teh = 1  # teh wrold\n", "teh = 1  # the world\n"),
    "rust": ("a.rs", "let teh = 1; // teh wrold\n", "let teh = 1; // the world\n"),
    "go": ("a.go", "var teh = 1 // teh wrold\n", "var teh = 1 // the world\n"),
    "java": ("A.java", "int teh; // teh wrold\n", "int teh; // the world\n"),
    "cpp": ("a.cpp", "int teh; // teh wrold\n", "int teh; // the world\n"),
    "typescript": ("a.ts", "let teh = 1; // teh wrold\n", "let teh = 1; // the world\n"),
}


@pytest.mark.parametrize("kind", sorted(KIND_DOCS))
def test_fix_changes_only_the_flagged_prose_words(project, capsys, kind):
    name, text, expected = KIND_DOCS[kind]
    path = project / name
    path.write_bytes(text.encode("utf-8"))
    code, out, err = run([name], capsys)
    assert code == 1
    code, out, err = run(["--diff", name], capsys)
    assert path.read_bytes() == text.encode("utf-8")  # --diff writes nothing
    assert out.startswith(f"--- a/{name}\n+++ b/{name}\n")
    code, out, err = run(["--fix", name], capsys)
    fixed = path.read_bytes().decode("utf-8")
    if expected is not None:
        assert fixed == expected
    else:  # LaTeX: the comment may or may not be prose; the verbatim code never changes
        assert "\\verb|teh|" in fixed and "the" in fixed and "world" in fixed
    left_ofen = "ofen" in fixed
    assert code == (1 if left_ofen else 0)
    assert "fixed" in err
    # Fixing again changes nothing.
    run(["--fix", name], capsys)
    assert path.read_bytes().decode("utf-8") == fixed


def test_diff_applies_with_git_apply(project, capsys):
    if shutil.which("git") is None:
        pytest.skip("git not installed")
    shutil.rmtree(project / ".git")
    subprocess.run(["git", "init", "-q"], cwd=project, check=True)
    (project / "a.txt").write_bytes(b"We saw teh wrold.\r\nKeep ofen.\r\nno end teh")
    code, out, err = run(["--diff", "a.txt"], capsys)
    assert code == 1  # "ofen" would be left
    (project / "fix.patch").write_text(out, encoding="utf-8", newline="")
    # git apply is the outside reference for the diff format.
    subprocess.run(["git", "apply", "fix.patch"], cwd=project, check=True)
    assert (project / "a.txt").read_bytes() == b"We saw the world.\r\nKeep ofen.\r\nno end the"


def test_fix_keeps_a_byte_order_mark_and_the_file_mode(project, capsys):
    path = project / "a.md"
    path.write_bytes(b"\xef\xbb\xbfWe saw teh wrold.\n")
    os.chmod(path, 0o640)
    code, out, err = run(["--fix", "a.md"], capsys)
    assert code == 0
    assert path.read_bytes() == b"\xef\xbb\xbfWe saw the world.\n"
    assert os.stat(path).st_mode & 0o777 == 0o640


def test_fix_refuses_a_file_changed_since_it_was_read(project, capsys, monkeypatch):
    path = project / "a.md"
    path.write_text("We saw teh wrold.\n", encoding="utf-8")
    original_run = check_command.Worker.run

    def run_then_edit(self, task):
        result = original_run(self, task)
        path.write_text("An editor saved this meanwhile: teh.\n", encoding="utf-8")
        return result

    monkeypatch.setattr(check_command.Worker, "run", run_then_edit)
    code, out, err = run(["--fix", "a.md"], capsys)
    assert code == 2
    assert "changed on disk" in err
    assert path.read_text(encoding="utf-8") == "An editor saved this meanwhile: teh.\n"


def test_fix_never_leaves_a_half_written_file(project, capsys, monkeypatch):
    path = project / "a.md"
    path.write_text("We saw teh wrold.\n", encoding="utf-8")
    from calami.vocab import atomic

    def fail(handle_path, data):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(atomic, "atomic_write_bytes", fail)
    code, out, err = run(["--fix", "a.md"], capsys)
    assert code == 2 and "No space left" in err
    assert path.read_text(encoding="utf-8") == "We saw teh wrold.\n"
    assert sorted(p.name for p in project.iterdir()) == [".git", "a.md"]


def test_fix_and_diff_refusals(project, capsys):
    (project / "a.md").write_text("teh\n", encoding="utf-8")
    for argv in (["--fix", "--diff", "a.md"], ["--fix", "-"], ["--diff", "--format", "json", "a.md"],
                 ["--write-baseline", "b.json", "--fix", "a.md"]):
        code, out, err = run(argv, capsys)
        assert code == 2 and err.startswith("calami: "), argv


def test_fix_with_json_reports_what_is_left(project, capsys):
    (project / "a.txt").write_text("teh ofen wrold\n", encoding="utf-8")
    code, out, err = run(["--fix", "--format", "json", "a.txt"], capsys)
    assert code == 1
    assert [item["word"] for item in json.loads(out)] == ["ofen"]
    assert (project / "a.txt").read_text(encoding="utf-8") == "the ofen world\n"


# --------------------------------------------------------------- directives in the CLI


def test_directives_hush_and_accept_and_typos_are_noted(project, capsys):
    (project / "a.md").write_text(
        "We saw teh cat.\n<!-- calami(hush-next) -->\nA wrold here.\n<!-- calami(known recieve) -->\n"
        "We recieve it.\n<!-- calami(hush-nxet) -->\nofen\n", encoding="utf-8")
    code, out, err = run(["--format", "json", "a.md"], capsys)
    assert [item["word"] for item in json.loads(out)] == ["teh", "ofen"]
    assert "a.md: line 6, column 6: unknown calami directive 'hush-nxet'" in err


# --------------------------------------------------------------- baseline


def test_baseline_hides_old_findings_across_line_moves(project, capsys):
    doc = project / "docs" / "a.md"
    doc.parent.mkdir()
    doc.write_text("Intro.\n\nWe saw teh cat.\n\nAnd teh dog, teh bird.\n", encoding="utf-8")
    code, out, err = run(["--write-baseline", "calami-baseline.json", "docs"], capsys)
    assert code == 0 and "recorded 3 finding(s)" in err
    recorded = json.loads((project / "calami-baseline.json").read_text(encoding="utf-8"))
    assert {e["file"] for e in recorded["findings"]} == {"docs/a.md"}
    # Lines move; an old line appears a second time (its count was one) and a
    # new finding appears on a new line.
    doc.write_text("New heading.\n\nMore text.\n\nIntro.\n\nWe saw teh cat.\n\nAnd teh dog, teh bird.\n\n"
                   "We saw teh cat.\n\nA wrold.\n", encoding="utf-8")
    code, out, err = run(["--baseline", "calami-baseline.json", "--format", "json", "docs"], capsys)
    found = [(item["line"], item["word"]) for item in json.loads(out)]
    assert code == 1
    assert found == [(11, "teh"), (13, "wrold")]
    # Run from another folder: the file is still named relative to the project root.
    os.chdir(doc.parent)
    code, out, err = run(["--baseline", "../calami-baseline.json", "--format", "json", "a.md"], capsys)
    assert [(item["line"], item["word"]) for item in json.loads(out)] == [(11, "teh"), (13, "wrold")]


@pytest.mark.parametrize("content", [b"", b"{not json", b"[]", b'{"calami-baseline": 2, "findings": []}',
                                     b'{"calami-baseline": 1, "findings": [{"file": 1}]}', b"\xff\xfe",
                                     b'{"calami-baseline": 1, "findings": [{"file": "a", "word": "b", "line": "c", "count": 0}]}'])
def test_a_corrupt_baseline_is_a_clear_error(project, capsys, content):
    (project / "a.md").write_text("teh\n", encoding="utf-8")
    (project / "b.json").write_bytes(content)
    code, out, err = run(["--baseline", "b.json", "a.md"], capsys)
    assert code == 2
    assert err.startswith("calami: b.json: ") and "baseline" in err
    assert (project / "b.json").read_bytes() == content


def test_a_missing_baseline_is_a_clear_error(project, capsys):
    (project / "a.md").write_text("teh\n", encoding="utf-8")
    code, out, err = run(["--baseline", "nowhere.json", "a.md"], capsys)
    assert code == 2 and "cannot read the baseline" in err


# --------------------------------------------------------------- --changed / --staged


def git(cwd: Path, *args: str) -> str:
    env = {**os.environ, "GIT_AUTHOR_NAME": "t", "GIT_AUTHOR_EMAIL": "t@example.org",
           "GIT_COMMITTER_NAME": "t", "GIT_COMMITTER_EMAIL": "t@example.org"}
    return subprocess.run(["git", *args], cwd=cwd, check=True, capture_output=True, text=True, env=env).stdout


@pytest.fixture
def repo(tmp_path, monkeypatch):
    if shutil.which("git") is None:
        pytest.skip("git not installed")
    git(tmp_path, "init", "-q", "-b", "main")
    (tmp_path / "old.md").write_text("Old teh line.\n\nAnother old wrold.\n", encoding="utf-8")
    (tmp_path / "same.md").write_text("Untouched teh.\n", encoding="utf-8")
    git(tmp_path, "add", ".")
    git(tmp_path, "commit", "-q", "-m", "start")
    monkeypatch.chdir(tmp_path)
    return tmp_path


def test_changed_reports_only_new_lines(repo, capsys):
    git(repo, "checkout", "-q", "-b", "topic")
    (repo / "old.md").write_text("Old teh line.\n\nA new teh line.\n\nAnother old wrold.\n", encoding="utf-8")
    git(repo, "commit", "-q", "-am", "edit")
    (repo / "new file.md").write_text("Brand new wrold.\n", encoding="utf-8")  # untracked: all new
    code, out, err = run(["--changed", "--format", "json"], capsys)
    assert code == 1, err
    found = sorted((item["path"], item["line"], item["word"]) for item in json.loads(out))
    assert found == [("new file.md", 1, "wrold"), ("old.md", 3, "teh")]
    # An explicit revision, and paths given before it.
    code, out, err = run(["old.md", "--changed=HEAD", "--format", "json"], capsys)
    assert code == 0 and json.loads(out) == []


def test_staged_reads_the_index(repo, capsys):
    (repo / "same.md").write_text("Untouched teh.\nStaged wrold.\n", encoding="utf-8")
    git(repo, "add", "same.md")
    (repo / "same.md").write_text("Untouched teh.\nStaged wrold.\nUnstaged teh.\n", encoding="utf-8")
    code, out, err = run(["--staged", "--format", "json"], capsys)
    assert [(item["line"], item["word"]) for item in json.loads(out)] == [(2, "wrold")]


def test_changed_outside_a_repository_is_a_clear_error(tmp_path, capsys, monkeypatch):
    if shutil.which("git") is None:
        pytest.skip("git not installed")
    monkeypatch.chdir(tmp_path)
    monkeypatch.setenv("GIT_CEILING_DIRECTORIES", str(tmp_path.parent))
    code, out, err = run(["--changed"], capsys)
    assert code == 2 and "not in one" in err


def test_changed_with_an_unknown_revision(repo, capsys):
    code, out, err = run(["--changed=no-such-branch", "."], capsys)
    assert code == 2 and "unknown revision" in err


def test_git_path_quoting_is_undone():
    from calami.gitdiff import unquote

    # Quoting as git writes it (git-diff(1), core.quotePath): C escapes and octal bytes.
    assert unquote('"a\\tb\\"c\\\\d"') == 'a\tb"c\\d'
    assert unquote('"caf\\303\\251.md"') == "café.md"
    assert unquote("plain.md") == "plain.md"


def test_fix_with_worker_processes(project, capsys):
    for n in range(6):
        (project / f"d{n}.md").write_text(f"Doc {n}: teh wrold and ofen.\n", encoding="utf-8")
    code, out, err = run(["--fix", "--jobs", "2", "."], capsys)
    assert code == 1 and "fixed 12 word(s) in 6 file(s)" in err
    for n in range(6):
        assert (project / f"d{n}.md").read_text(encoding="utf-8") == f"Doc {n}: the world and ofen.\n"


def test_changed_followed_by_a_path_reads_it_as_a_path(repo, capsys):
    (repo / "same.md").write_text("Untouched teh.\nNew wrold.\n", encoding="utf-8")
    (repo / "old.md").write_text("Old teh line.\n\nAnother old wrold.\nMore teh.\n", encoding="utf-8")
    git(repo, "checkout", "-q", "-b", "topic")
    code, out, err = run(["--format", "json", "--changed", "same.md"], capsys)
    assert [(item["path"], item["line"]) for item in json.loads(out)] == [("same.md", 2)]


def test_staged_before_the_first_commit(tmp_path, capsys, monkeypatch):
    if shutil.which("git") is None:
        pytest.skip("git not installed")
    git(tmp_path, "init", "-q")
    (tmp_path / "a.md").write_text("A first teh.\n", encoding="utf-8")
    git(tmp_path, "add", "a.md")
    monkeypatch.chdir(tmp_path)
    code, out, err = run(["--staged", "--format", "json"], capsys)
    assert code == 1, err
    assert [item["word"] for item in json.loads(out)] == ["teh"]


def test_diff_of_standard_input(project, capsys, monkeypatch):
    import io

    monkeypatch.setattr("sys.stdin", io.StringIO("We saw teh wrold.\n"))
    code, out, err = run(["--diff", "-"], capsys)
    assert code == 0
    assert out == "--- a/-\n+++ b/-\n@@ -1 +1 @@\n-We saw teh wrold.\n+We saw the world.\n"


def test_changed_learns_the_workspace_from_the_whole_tree(repo, capsys, monkeypatch):
    # The workspace vocabulary (lead's pre-pass) must see unchanged files too,
    # or a changed line would be judged differently than by a full check.
    seen = []

    class LearningChecker(FakeChecker):
        usage = None

        def check(self, text, spans=None):
            seen.append(self.usage)
            return super().check(text, spans)

    monkeypatch.setattr(check_command, "CHECKER_FACTORY", lambda model_path: LearningChecker)
    (repo / "glossary.md").write_text("The zorblax engine. A zorblax run.\n", encoding="utf-8")
    git(repo, "add", "glossary.md")
    git(repo, "commit", "-q", "-m", "glossary")
    (repo / "same.md").write_text("Untouched teh.\nThe zorblax again.\n", encoding="utf-8")
    code, out, err = run(["--changed=HEAD", "--format", "json"], capsys)
    assert seen and seen[0] is not None
    assert seen[0].use("zorblax") is not None and seen[0].use("zorblax").files >= 2

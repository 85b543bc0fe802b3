"""File discovery: our .gitignore matcher is compared with git itself."""

from __future__ import annotations

import os
import shutil
import subprocess
from pathlib import Path

import pytest

from calami.vocab.globs import compile_glob, parse_ignore_file
from calami.walk import (
    BINARY, EXCLUDED, IGNORED, LINKED_FOLDER, NOT_UTF8, TOO_LARGE, Skipped, decode_document, read_document, walk,
)

FILES = [
    "README.md", "notes.txt", "debug.log", "logs/today.log", "logs/keep.log", "build/out.md",
    "docs/build/page.md", "docs/guide.md", "docs/a/b/deep.md", "docs/tmp/x.md", "docs/tmp/keep/y.md",
    "src/main.py", "src/gen/auto.py", "src/gen/manual.py", "vendor/lib/readme.md", "#hash.md", "!bang.md",
    "trailing .md", "space file.md", "nested/.gitignore-target/z.md", "a/doc/frotz/x.md", "a/frotz/y.md",
    "img/photo.PNG", "img/photo.png", "one/two/three/file.md", "exact.md", "sub/exact.md",
    "only_dir/file.md", "only_file", "x/only_file/inner.md", "excluded_by_info.md",
]
ROOT_IGNORE = """\
# comments and blank lines are ignored

*.log
!keep.log
/build/
docs/tmp/*
!docs/tmp/keep/
\\#hash.md
\\!bang.md
trailing.md\\ \x20
a/**/frotz
**/three
/exact.md
only_dir/
*.png
"""
NESTED = {"src/.gitignore": "gen/*\n!manual.py\n!gen/manual.py\n", "vendor/.gitignore": "*\n!.gitignore\n"}


def _make_tree(root: Path) -> None:
    for name in FILES:
        path = root / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text("text\n")
    (root / ".gitignore").write_text(ROOT_IGNORE)
    for name, text in NESTED.items():
        (root / name).write_text(text)


@pytest.mark.skipif(shutil.which("git") is None, reason="git is the reference for .gitignore rules")
def test_walk_agrees_with_git_on_tricky_patterns(tmp_path):
    # Reference: `git ls-files --others --exclude-standard` lists what git does not ignore.
    env = dict(os.environ, GIT_CONFIG_GLOBAL=os.devnull, GIT_CONFIG_NOSYSTEM="1", HOME=str(tmp_path))
    subprocess.run(["git", "init", "-q", str(tmp_path)], check=True, env=env)
    _make_tree(tmp_path)
    (tmp_path / ".git" / "info").mkdir(exist_ok=True)
    (tmp_path / ".git" / "info" / "exclude").write_text("excluded_by_info.md\n")
    listed = subprocess.run(
        ["git", "ls-files", "--others", "--exclude-standard"], cwd=tmp_path, env=env,
        capture_output=True, text=True, check=True,
    ).stdout.splitlines()
    expected = sorted(p for p in listed if not p.endswith(".gitignore") and not p.startswith('"'))
    # git quotes unusual names; compare them through -z to be exact.
    raw = subprocess.run(
        ["git", "ls-files", "-z", "--others", "--exclude-standard"], cwd=tmp_path, env=env,
        capture_output=True, check=True,
    ).stdout.decode().split("\0")
    expected = sorted(p for p in raw if p and not p.endswith(".gitignore"))
    ours = sorted(p.relative_to(tmp_path).as_posix() for p in walk(tmp_path) if p.name != ".gitignore")
    assert ours == expected
    assert "docs/guide.md" in ours and "debug.log" not in ours  # the test is not vacuous


def test_walking_a_subfolder_applies_the_ignore_files_above_it(tmp_path):
    (tmp_path / ".git").mkdir()
    _make_tree(tmp_path)
    found = sorted(p.relative_to(tmp_path).as_posix() for p in walk(tmp_path / "docs"))
    assert found == ["docs/a/b/deep.md", "docs/build/page.md", "docs/guide.md", "docs/tmp/keep/y.md"]
    assert list(walk(tmp_path / "build")) == []  # an ignored folder named explicitly yields nothing


def test_without_a_work_tree_the_folders_own_gitignore_counts(tmp_path):
    (tmp_path / ".gitignore").write_text("*.tmp\n")
    (tmp_path / "a.md").write_text("x")
    (tmp_path / "b.tmp").write_text("x")
    assert [p.name for p in walk(tmp_path)] == [".gitignore", "a.md"]


def test_symlinked_folders_are_not_followed(tmp_path):
    (tmp_path / "real").mkdir()
    (tmp_path / "real" / "a.md").write_text("x")
    (tmp_path / "loop").symlink_to(tmp_path, target_is_directory=True)
    assert [p.relative_to(tmp_path).as_posix() for p in walk(tmp_path)] == ["real/a.md"]


@pytest.mark.parametrize(
    "pattern, path, is_dir, expected",
    [
        ("*.md", "docs/a.md", False, True),  # no slash: any depth
        ("/a.md", "docs/a.md", False, False),
        ("docs/*.md", "docs/x/a.md", False, False),  # '*' does not cross '/'
        ("docs/**/a.md", "docs/x/y/a.md", False, True),
        ("docs/**/a.md", "docs/a.md", False, True),  # '/**/' matches zero folders
        ("build/", "build", False, False),  # folders only
        ("build/", "build", True, True),
        ("[a-c]?.txt", "b1.txt", False, True),
        ("[!a-c]?.txt", "b1.txt", False, False),
    ],
)
def test_glob_rules(pattern, path, is_dir, expected):
    # Rules as described in git's gitignore(5) manual page.
    assert compile_glob(pattern).matches(path, is_dir) is expected


def test_ignore_file_parsing_handles_comments_negation_and_escapes():
    globs = parse_ignore_file("# c\n\n!keep\n\\!literal\n\\#x\nend\\ \n")
    assert [(g.pattern, g.negated) for g in globs] == [("!keep", True), ("\\!literal", False), ("\\#x", False), ("end\\ ", False)]
    assert globs[1].matches("!literal", False) and globs[3].matches("end ", False)


def test_read_document_skips_binary_large_and_non_utf8(tmp_path):
    (tmp_path / "bin").write_bytes(b"abc\x00def")
    (tmp_path / "big").write_text("x" * 50)
    (tmp_path / "latin").write_bytes(b"ok\ncaf\xe9\n")
    (tmp_path / "bom").write_bytes("\ufeffhello".encode("utf-8"))
    assert read_document(tmp_path / "bin") == Skipped(tmp_path / "bin", "binary file", BINARY)
    assert read_document(tmp_path / "big", max_bytes=10).category == TOO_LARGE
    assert read_document(tmp_path / "latin").reason == "not UTF-8 text (line 2)"
    assert read_document(tmp_path / "latin").category == NOT_UTF8
    assert read_document(tmp_path / "bom") == "hello"  # the byte-order mark is not text
    assert decode_document(Path("x"), "naïve 🙂".encode()) == "naïve 🙂"


def test_every_path_left_out_is_reported_with_its_category(tmp_path):
    (tmp_path / ".git").mkdir()
    (tmp_path / ".gitignore").write_text("build/\n*.tmp\n")
    for name in ("a.md", "b.tmp", "build/out.md", "build/deep/x.md", "drop.md", "real/c.md"):
        (tmp_path / name).parent.mkdir(parents=True, exist_ok=True)
        (tmp_path / name).write_text("x")
    (tmp_path / "loop").symlink_to(tmp_path / "real", target_is_directory=True)
    skipped = []
    found = list(walk(tmp_path, lambda p: p.name != "drop.md", lambda p, c, r: skipped.append((p.name, c))))
    assert [p.name for p in found] == [".gitignore", "a.md", "c.md"]
    # The ignored folder counts once; nothing inside it is visited.
    assert sorted(skipped) == sorted([("b.tmp", IGNORED), ("build", IGNORED), ("drop.md", EXCLUDED), ("loop", LINKED_FOLDER)])
    inside = []
    assert list(walk(tmp_path / "build", on_skip=lambda p, c, r: inside.append((p.name, c, r)))) == []
    assert inside == [("build", IGNORED, "inside a folder ignored by .gitignore")]

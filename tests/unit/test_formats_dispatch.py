"""The formats package API: KINDS, extract() dispatch and detect_kind()."""

from __future__ import annotations

import pytest

from calami.text.formats import KINDS, ExtractOptions, detect_kind, extract


def test_kinds_cover_the_required_languages():
    required = {"markdown", "rst", "latex", "plain", "commit", "html", "python", "javascript", "typescript",
                "rust", "go", "c", "cpp", "java", "shell", "yaml", "toml"}
    assert required <= set(KINDS)


@pytest.mark.parametrize("kind", KINDS)
def test_every_kind_extracts(kind: str):
    spans = extract("# hello world\n// hello world\nhello world\n", kind)
    assert all(0 <= s.start < s.end for s in spans)


def test_unknown_kind_is_a_clear_error():
    with pytest.raises(ValueError, match="unknown document kind 'cobol'"):
        extract("x", "cobol")


def test_options_reach_the_extractor():
    src = 'x = "quoted words"\n'
    assert extract(src, "python") == []
    assert [src[s.start : s.end] for s in extract(src, "python", ExtractOptions(strings=True))] == ["quoted words"]


@pytest.mark.parametrize(
    "path, first_line, kind",
    [
        ("README.md", "", "markdown"),
        ("docs/index.RST", "", "rst"),
        ("paper.tex", "", "latex"),
        ("notes.txt", "", "plain"),
        ("/repo/.git/COMMIT_EDITMSG", "", "commit"),
        (".git/MERGE_MSG", "", "commit"),
        (".git/TAG_EDITMSG", "", "commit"),
        ("site/page.html", "", "html"),
        ("pkg/mod.py", "", "python"),
        ("stubs/mod.pyi", "", "python"),
        ("app.js", "", "javascript"),
        ("app.mjs", "", "javascript"),
        ("app.tsx", "", "typescript"),
        ("lib.rs", "", "rust"),
        ("main.go", "", "go"),
        ("x.c", "", "c"),
        ("x.h", "", "c"),
        ("x.cpp", "", "cpp"),
        ("x.hpp", "", "cpp"),
        ("X.java", "", "java"),
        ("build.sh", "", "shell"),
        (".github/workflows/ci.yml", "", "yaml"),
        ("pyproject.toml", "", "toml"),
        ("bin/tool", "#!/usr/bin/env python3", "python"),
        ("bin/tool", "#!/bin/bash", "shell"),
        ("bin/tool", "#! /usr/bin/env -S node --flag", "javascript"),
        ("bin/tool", "#!/usr/bin/perl", None),
        ("image.png", "", None),
        ("Makefile", "", None),
        ("C:\\repo\\docs\\guide.md", "", "markdown"),
    ],
)
def test_detect_kind(path: str, first_line: str, kind: str | None):
    assert detect_kind(path, first_line) == kind

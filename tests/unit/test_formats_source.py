"""Comments and docstrings of source files: exact spans and an outside oracle.

The oracle is Pygments (a well-kept lexer library; test-only here): on
fixture files whose comments are all prose, the words in its comment (and
doc-string) tokens must be exactly the words in our spans.  Where a file
has a construct Pygments reads differently, the fixture avoids it and an
exact test below covers it.
"""

from __future__ import annotations

from collections import Counter
from pathlib import Path

import pytest
import regex

from calami.text.formats import ExtractOptions, extract

DATA = Path(__file__).resolve().parents[1] / "data" / "formats"
_WORD = regex.compile(r"\p{L}+")


def pieces(text: str, kind: str, strings: bool = False) -> list[tuple[str, str, bool]]:
    spans = extract(text, kind, ExtractOptions(strings=strings))
    for a, b in zip(spans, spans[1:]):
        assert a.end <= b.start
    return [(text[s.start : s.end], s.kind, s.breaks_before) for s in spans]


def texts(text: str, kind: str, strings: bool = False) -> list[str]:
    return [p for p, _, _ in pieces(text, kind, strings)]


# --- C family -----------------------------------------------------------------------


def test_c_markers_strings_preprocessor_and_heuristics():
    src = (
        "// SPDX-License-Identifier: MIT\n// Copyright 2024 Someone\n"
        '#include <stdio.h> // include comment\n#define X "/* not */" // after define\n'
        "/* Multi\n * line comment with `code`\n */\n"
        "int main(void) { // eslint-disable-line\n    // return 0;\n    // x = foo(bar);\n"
        "    char c = '\"'; // quote char\n    const char *s = \"string with // slashes\";\n"
        "    return 0; /* unterminated\n"
    )
    assert pieces(src, "c") == [
        ("include comment", "comment", True),
        ("after define", "comment", True),
        ("Multi", "comment", True),
        ("line comment with", "comment", False),
        ("quote char", "comment", True),
        ("unterminated", "comment", True),
    ]


def test_consecutive_line_comments_form_a_block():
    src = "// First line\n// second line\n//\n// new paragraph\nx = 1; // trailing\n// next block\n"
    assert pieces(src, "c") == [
        ("First line", "comment", True),
        ("second line", "comment", False),
        ("new paragraph", "comment", True),
        ("trailing", "comment", True),
        ("next block", "comment", True),
    ]


def test_cpp_raw_string():
    src = 'auto r = R"delim(raw )" // not )delim"; // after raw\n'
    assert texts(src, "cpp") == ["after raw"]


def test_javadoc_and_jsdoc_tags():
    src = (
        "/** Javadoc with {@code x} and {@link Foo#bar()}.\n * @param name the name\n"
        " * @return the result\n * @throws IOException when it fails\n */\n"
        "/**\n * @param {string} label - the label to show\n * @returns {Promise<void>} nothing useful\n */\n"
    )
    assert pieces(src, "javascript") == [
        ("Javadoc with", "doc", True),
        ("and", "doc", False),
        (".", "doc", False),
        ("the name", "doc", False),
        ("the result", "doc", False),
        ("when it fails", "doc", False),
        ("- the label to show", "doc", True),
        ("nothing useful", "doc", False),
    ]


def test_java_text_block():
    src = 'String s = """\n    text // not\n    """; // real\n'
    assert texts(src, "java") == ["real"]
    assert texts(src, "java", strings=True) == ["text // not", "real"]


def test_javascript_regex_template_division():
    src = (
        "const re = /\\/\\/ not comment/; // real one\n"
        "const t = `template ${x /* inside */} // not`;\n"
        "const d = a / b / c; // division\n"
    )
    assert texts(src, "typescript") == ["real one", "division"]


def test_go_doc_comment_code_and_directives():
    src = (
        "// Package main does things.\n//\n// Indented code:\n//\n//\tx := 1\n//\n// More prose.\n"
        "//go:generate stringer\nfunc main() {\n\ts := `raw // string`\n\tr := '\\''  // rune\n}\n"
    )
    assert pieces(src, "go") == [
        ("Package main does things.", "comment", True),
        ("Indented code:", "comment", True),
        ("More prose.", "comment", True),
        ("rune", "comment", True),
    ]


def test_rust_doc_comments_fences_lifetimes_nesting():
    src = (
        "//! Crate docs.\n/// Rust doc with `code`.\n/// ```\n/// let x = 1;\n/// ```\n"
        "fn f<'a>(x: &'a str) -> char { 'x' } // lifetime ok\n"
        'let s = r#"raw // "string"#; /* outer /* nested */ still */\n'
    )
    assert pieces(src, "rust") == [
        ("Crate docs.", "doc", True),
        ("Rust doc with", "doc", False),
        (".", "doc", False),
        ("lifetime ok", "comment", True),
        ("outer /* nested */ still", "comment", True),
    ]


# --- Python --------------------------------------------------------------------------


def test_python_docstrings_comments_and_strings():
    src = (
        '#!/usr/bin/env python\n# -*- coding: utf-8 -*-\n"""Module docstring with ``code`` and :func:`foo`.\n\n'
        '>>> x = 1\n1\n"""\nimport os  # trailing comment here\nx = "a # not comment"\n'
        "# first line of block\n# second line\n# x = foo(bar)\n\n"
        'def f():\n    """Do the thing::\n\n        literal code\n\n    :param x: the value\n    """\n'
        "    return 'text'  # type: ignore\n"
    )
    assert pieces(src, "python") == [
        ("Module docstring with", "docstring", True),
        ("and", "docstring", False),
        (".", "docstring", False),
        ("trailing comment here", "comment", True),
        ("first line of block", "comment", True),
        ("second line", "comment", False),
        ("Do the thing::", "docstring", True),
        ("the value", "docstring", True),
    ]
    assert "text" in texts(src, "python", strings=True)
    assert "a # not comment" in texts(src, "python", strings=True)


def test_python_numpy_style_and_attribute_docstrings():
    src = (
        'class Foo:\n    """Class docstring.\n\n    Parameters\n    ----------\n    x : int\n        The value.\n    """\n\n'
        '    attr = 1\n    """Attribute docstring."""\n\n    def f(self):\n        x = """not a docstring"""\n'
        "        y = f\"f-string # {x}\"  # comment after fstring\n"
    )
    assert texts(src, "python") == [
        "Class docstring.", "Parameters", "The value.", "Attribute docstring.", "comment after fstring",
    ]


def test_python_google_style_sections():
    src = (
        'def f(x, y):\n    """Add two numbers.\n\n    Args:\n        x (int): The first value.\n'
        '        max_len: The second value,\n            continued here.\n\n    Returns:\n'
        '        int: The sum.\n\n    Note: this line is prose.\n    """\n'
    )
    assert texts(src, "python") == [
        "Add two numbers.", "Args:", "The first value.", "The second value,", "continued here.", "Returns:",
        "The sum.", "Note: this line is prose.",
    ]


def test_python_strings_in_brackets_are_not_docstrings():
    src = 'x = (\n    "implicit concatenation part"\n    "second part"\n)\nfoo(\n    "argument text"\n)\n'
    assert texts(src, "python") == []
    assert texts(src, "python", strings=True) == ["implicit concatenation part", "second part", "argument text"]


def test_python_string_escapes_are_holes():
    src = 'msg = "Hello\\nWorld %s and {name}"\nb = b"bytes are not prose"\n'
    assert texts(src, "python", strings=True) == ["Hello", "World", "and"]


# --- hash-comment languages ----------------------------------------------------------------


def test_shell():
    src = (
        "#!/usr/bin/env bash\n# Deploy script\nset -e\n"
        "echo \"# not\" '# not' $# ${#arr[@]} foo#bar \\# not\n"
        "cat <<-'END'\n\t# heredoc\n\tEND\nif [ -z \"$x\" ]; then # check value\n  :\nfi\n"
    )
    assert texts(src, "shell") == ["Deploy script", "check value"]


def test_yaml():
    src = (
        "# Top comment\nkey: \"value # not\" # quoted then comment\nurl: http://x.y/#anchor\n"
        "msg: it's fine # apostrophe in plain scalar\nlist:\n  - 'single # not' # after single\n"
        "  - \"double \\\" # not\" # after double\nrun: |\n  # inside block scalar\n  echo hi\n"
        "folded: >-\n  text # not a comment\nafter: 1 # after block\n"
    )
    assert texts(src, "yaml") == [
        "Top comment", "quoted then comment", "apostrophe in plain scalar", "after single", "after double",
        "after block",
    ]


def test_yaml_strings_option():
    src = (
        "title: A short description of the build\nname: \"quoted value here\"\nid: single\n"
        "notes: |\n  Block scalar prose\n  second line\nafter: x # comment\n"
    )
    assert texts(src, "yaml", strings=True) == [
        "A short description of the build", "quoted value here", "Block scalar prose", "second line", "comment",
    ]


def test_toml():
    src = (
        '# TOML comment\na = "x # not" # after\nb = \'lit # not\' # after lit\nc = """\nmulti # not\n""" # after multi\n'
        "d = '''lit ml # not'''\n[table] # table comment\n"
    )
    assert texts(src, "toml") == ["TOML comment", "after", "after lit", "after multi", "table comment"]
    assert "multi # not" in texts(src, "toml", strings=True)


def test_css_block_comments_only():
    src = (
        '/* Panel layout. */\na { background: url(http://example.org//x.png); }\n'
        'b::before { content: "/* not */"; } /* after */\n/** Doc block. */\n// not a CSS comment\n'
    )
    assert pieces(src, "css") == [("Panel layout.", "comment", True), ("after", "comment", True),
                                  ("Doc block.", "doc", True)]
    assert "/* not */" in texts(src, "css", strings=True)


def test_ruby_strings_literals_heredocs_and_end_marker():
    src = (
        "# Top comment.\n"
        'a = "x # not" # after dq\n'
        "b = 'y # not' # after sq\n"
        "c = %q(nested (parens # not) here) # after percent\n"
        "d = %w[e#f g] # after words\n"
        "e = x / 2 # after division\n"
        "f = text =~ /#not/ # after regex\n"
        "g = ?# # after char\n"
        "h = <<~EOS\n  # not in heredoc\nEOS\n"
        "k = <<-'RAW'\n  # raw not\n  RAW\n"
        "=begin\nDoc block line.\n=end\n"
        "# After the block.\n"
        "__END__\n# data, not code\n"
    )
    assert texts(src, "ruby") == [
        "Top comment.", "after dq", "after sq", "after percent", "after words", "after division",
        "after regex", "after char", "Doc block line.", "After the block.",
    ]
    assert pieces(src, "ruby")[8][1] == "doc"
    with_strings = texts(src, "ruby", strings=True)
    assert "x # not" in with_strings and "nested (parens # not) here" in with_strings
    assert "e#f g" not in with_strings  # a word list is not prose


def test_ruby_and_css_files_are_detected():
    from calami.text.formats import detect_kind

    assert [detect_kind(n) for n in ("a.rb", "Rakefile", "x.gemspec", "site.css")] == ["ruby", "ruby", "ruby", "css"]
    assert detect_kind("tool", "#!/usr/bin/env ruby") == "ruby"


# --- offsets with CRLF, tabs, emoji, CJK ----------------------------------------------------


@pytest.mark.parametrize(
    "kind, src",
    [
        ("python", "x = '漢字 🎉'\r\n\t# 🎉 漢字 wrold here\r\n"),
        ("c", "s = \"漢字 🎉\";\r\n\t// 🎉 漢字 wrold here\r\n"),
        ("rust", "/* 漢字 🎉 */\r\n\t// 🎉 漢字 wrold here\r\n"),
        ("shell", "echo '漢字 🎉'\r\n\t# 🎉 漢字 wrold here\r\n"),
        ("yaml", "k: '漢字 🎉'\r\n\t# 🎉 漢字 wrold here\r\n"),
        ("toml", "k = '漢字 🎉'\r\n\t# 🎉 漢字 wrold here\r\n"),
        ("ruby", "x = '漢字 🎉'\r\n\t# 🎉 漢字 wrold here\r\n"),
        ("css", "a { content: '漢字 🎉' }\r\n\t/* 🎉 漢字 wrold here */\r\n"),
    ],
)
def test_offsets_survive_crlf_tabs_emoji_cjk(kind: str, src: str):
    spans = extract(src, kind)
    assert src[spans[-1].start : spans[-1].end] == "🎉 漢字 wrold here"
    assert spans[-1].start + 5 == src.index("wrold")


# --- Pygments as an oracle -----------------------------------------------------------------

_ORACLE = {
    "c": ("c", "c"), "cpp": ("cpp", "cpp"), "java": ("java", "java"), "js": ("javascript", "javascript"),
    "ts": ("typescript", "typescript"), "go": ("go", "go"), "rs": ("rust", "rust"), "py": ("python", "python"),
    "sh": ("shell", "bash"), "yaml": ("yaml", "yaml"), "toml": ("toml", "toml"),
    "css": ("css", "css"), "rb": ("ruby", "ruby"),
}
# Pygments keeps a comment's own markers in the token where they are words.
_MARKER_WORDS = {"ruby": regex.compile(r"^=(?:begin|end)\b", regex.MULTILINE)}


@pytest.mark.parametrize("ext", sorted(_ORACLE))
def test_comment_words_agree_with_pygments(ext: str):
    lexers = pytest.importorskip("pygments.lexers")
    token = pytest.importorskip("pygments.token")
    kind, lexer_name = _ORACLE[ext]
    src = (DATA / f"comments.{ext}").read_text(encoding="utf-8")
    theirs: Counter[str] = Counter()
    for tok, value in lexers.get_lexer_by_name(lexer_name).get_tokens(src):
        is_comment = tok in token.Comment and not (
            tok in token.Comment.Preproc or tok in token.Comment.PreprocFile or tok in token.Comment.Hashbang
        )
        if is_comment or (tok in token.String.Doc and kind in ("python", "rust")):
            if kind in _MARKER_WORDS:
                value = _MARKER_WORDS[kind].sub("", value)
            theirs.update(_WORD.findall(value))
    ours: Counter[str] = Counter()
    for s in extract(src, kind):
        ours.update(_WORD.findall(src[s.start : s.end]))
    assert ours == theirs
    assert ours, "the fixture must have comments"


# --- robustness ------------------------------------------------------------------------------


@pytest.mark.parametrize("kind", ["python", "javascript", "typescript", "rust", "go", "c", "cpp", "java", "shell", "yaml", "toml",
                                  "css", "ruby"])
@pytest.mark.parametrize(
    "src",
    [
        "/* \" ' ` r#\" \"\"\" ''' " * 5_000,
        "'" * 50_000,
        '"' * 50_000,
        "/" * 50_000,
        "#" * 50_000,
        "<<EOF\n" * 5_000,
        "\x00\x01\udcff\ufffd binary junk",
        "`" * 100_000,
        "/[" * 30_000,  # JavaScript: every '/' may open a regex literal with an unclosed class
        '"a\\' * 30_000,  # one long line of strings: line ends must not be searched again and again
        "%q(" * 30_000,  # Ruby: unclosed %-literals, each would search to the end
        "<<~EOS\n" * 5_000,  # Ruby: here-documents that never end
        "=begin\n" * 5_000,
    ],
)
def test_adversarial_inputs_do_not_raise(kind: str, src: str):
    for strings in (False, True):
        for s in extract(src, kind, ExtractOptions(strings=strings)):
            assert 0 <= s.start < s.end <= len(src)

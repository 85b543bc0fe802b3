"""Property: ``calami check --fix`` changes nothing but the flagged words.

The expected result is rebuilt independently of ``calami.fixes``: from the
JSON report of a plain check (1-based lines and code-point columns), the
confident words are replaced line by line; the file written by ``--fix``
must equal that byte for byte, in every kind tried, with any line endings.
"""

from __future__ import annotations

import io
import json
import os
import sys
import tempfile
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "unit"))

from test_check_adoption import TYPOS, FakeChecker  # noqa: E402

from calami import cli  # noqa: E402
from calami.commands import check as check_command  # noqa: E402

PIECES = ["teh", "Teh", "wrold", "ofen", "recieve", "the", "cat", "word", " ", " ", ". ", "\n", "\r\n", "\n\n",
          "`teh`", "# ", "- ", "😀", "é", "```\nteh\n```\n", "<!-- calami(hush-next) -->\n", "# teh x\n", "\t", "'", "\""]
NAMES = {"markdown": "doc.md", "python": "doc.py", "plain": "doc.txt", "rst": "doc.rst", "shell": "doc.sh"}


def cli_run(argv: list[str]) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = cli.main(["check", *argv])
    return code, out.getvalue()


def expected_after_fix(text: str, report: list[dict]) -> str:
    lines = text.split("\n")  # columns count code points within a line; "\r" stays part of the line
    by_line: dict[int, list[dict]] = {}
    for item in report:
        if TYPOS[item["word"].lower()][1]:
            by_line.setdefault(item["line"] - 1, []).append(item)
    for number, items in by_line.items():
        line = lines[number]
        for item in sorted(items, key=lambda i: -i["column"]):
            start, end = item["column"] - 1, item["end_column"] - 1
            assert line[start:end] == item["word"]
            line = line[:start] + item["suggestions"][0]["text"] + line[end:]
        lines[number] = line
    return "\n".join(lines)


@settings(max_examples=60, deadline=None)
@given(pieces=st.lists(st.sampled_from(PIECES), max_size=30), kind=st.sampled_from(sorted(NAMES)),
       bom=st.booleans())
def test_fix_changes_only_the_flagged_words(pieces, kind, bom):
    text = "".join(pieces)
    saved = check_command.CHECKER_FACTORY
    check_command.CHECKER_FACTORY = lambda model_path: FakeChecker
    old_cwd = os.getcwd()
    try:
        with tempfile.TemporaryDirectory() as folder:
            os.chdir(folder)
            os.mkdir(".git")
            path = Path(folder) / NAMES[kind]
            path.write_bytes((b"\xef\xbb\xbf" if bom else b"") + text.encode("utf-8"))
            _, out = cli_run(["--format", "json", path.name])
            report = json.loads(out)
            cli_run(["--fix", path.name])
            after = path.read_bytes()
            assert after == (b"\xef\xbb\xbf" if bom else b"") + expected_after_fix(text, report).encode("utf-8")
    finally:
        os.chdir(old_cwd)
        check_command.CHECKER_FACTORY = saved

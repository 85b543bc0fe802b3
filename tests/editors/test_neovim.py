"""Real Neovim (headless) with the shipped config against `calami serve`.

Neovim loads editor-configs/neovim/init-minimal.lua, which starts the venv's
calami through the documented CALAMI_NVIM_CMD override; nvim_driver.lua
opens the demo files, waits for the hints, applies the preferred fix with
:CalamiFix and writes what it saw to JSON.  The expected hints are the rows
of demo/EXPECTED.md, located in the files by this test.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest

from editor_support import (
    EDITOR_CONFIGS, project_word_title, check_word_added, copy_demo, isolated_env, missing_model,
    path_without_calami, planted_mistakes, project_word_list, replaced, server_command, word_actions,
)

NVIM = shutil.which("nvim") or "nvim"
pytestmark = [
    pytest.mark.editor,
    pytest.mark.skipif(shutil.which("nvim") is None, reason="nvim is not on PATH (Debian package: neovim)"),
]

HERE = Path(__file__).parent
INIT = EDITOR_CONFIGS / "neovim" / "init-minimal.lua"
DRIVER = HERE / "nvim_driver.lua"
WAIT_MS = 60_000  # one budget for all of the driver's waiting

# LSP DiagnosticSeverity (LSP 3.17 spec): 3 = Information, 4 = Hint.  The
# shipped config's documented defaults: nonword "information", realword "hint".
SEVERITY = {"nonword": 3, "realword": 4}


def run_neovim(tmp_path: Path, demo: Path, files: list[str], **env_changes: str) -> dict:
    out = tmp_path / "nvim-result.json"
    env = isolated_env(tmp_path)
    command = server_command()
    assert not any(" " in part for part in command), f"CALAMI_NVIM_CMD splits on spaces: {command}"
    env.update(
        CALAMI_NVIM_CMD=" ".join(command),
        CALAMI_TEST_OUT=str(out),
        CALAMI_TEST_FILES="|".join(files),
        CALAMI_TEST_TIMEOUT_MS=str(WAIT_MS),
    )
    env.update(env_changes)
    proc = subprocess.run(
        [NVIM, "--headless", "-u", str(INIT), "-c", f"luafile {DRIVER}"],
        cwd=demo, env=env, stdin=subprocess.DEVNULL, capture_output=True, text=True,
        timeout=WAIT_MS / 1000 + 30,
    )
    log = Path(env["XDG_CACHE_HOME"]) / "nvim" / "lsp.log"  # Neovim 0.7's stdpath('cache')
    log_tail = log.read_text(encoding="utf-8", errors="replace")[-3000:] if log.exists() else "(no LSP log)"
    assert out.exists(), f"Neovim wrote no result (exit {proc.returncode}):\n{proc.stderr}\n{log_tail}"
    result = json.loads(out.read_text(encoding="utf-8"))
    result["log_tail"] = log_tail
    assert not result["errors"], "\n".join(result["errors"])
    return result


def test_neovim_shows_the_demo_hints_and_applies_the_preferred_fix(tmp_path):
    demo = copy_demo(tmp_path)
    planted = planted_mistakes(demo)
    files = list(dict.fromkeys(p.file for p in planted))  # EXPECTED.md's order
    target = next(p for p in planted if p.file == "README.md" and p.kind == "nonword")
    added = next(p for p in planted if p.file == target.file and p.kind == "nonword" and p is not target)
    original = (demo / target.file).read_text(encoding="utf-8")
    word_list = project_word_list(demo)
    listed_before = word_list.read_text(encoding="utf-8") if word_list.exists() else None

    result = run_neovim(
        tmp_path, demo, files,
        CALAMI_TEST_FIX=f"{target.line - 1}:{target.byte_col}",
        CALAMI_TEST_ADD=f"{added.line - 1}:{added.byte_col}",
        CALAMI_TEST_ADD_TITLE=project_word_title(added.word),
        CALAMI_TEST_WORD_LIST=str(word_list),
    )
    errors = [m["msg"] for m in result["messages"] if m["level"] == 4]  # vim.log.levels.ERROR
    assert not errors, f"{errors}\nLSP log:\n{result['log_tail']}"
    assert not result["server_gone"], f"calami serve stopped: {result['messages']}\n{result['log_tail']}"

    for file in files:
        seen = result["files"][file]
        assert seen["attached"], f"calami did not attach to {file} (filetype {seen['filetype']!r})"
        assert not seen["timed_out"], f"no calami hints for {file} within {WAIT_MS} ms: {result['messages']}"
        want = [p for p in planted if p.file == file]
        got = seen["diagnostics"]
        # Exactly the planted mistakes of this file, each where the word is.
        assert [(d["lnum"], d["col"], d["end_lnum"], d["end_col"]) for d in got] == [
            (p.line - 1, p.byte_col, p.line - 1, p.byte_col + len(p.word.encode("utf-8"))) for p in want
        ], (file, got)
        for d, p in zip(got, want):
            assert d["code"] == f"calami.{p.kind}", (file, d)
            assert d["severity"] == SEVERITY[p.kind], (file, d)
            # The message names the typed word and, as its best fix, the intended one.
            assert f"'{p.word}'" in d["message"] and f"best fix: '{p.intended}'" in d["message"], (file, d)

    fix = result["fix"]
    assert fix["changed"], "the buffer did not change after :CalamiFix"
    assert fix["lines_before"] == original.splitlines()
    expected = replaced(fix["lines_before"], target.line - 1, target.char_col, target.word, target.intended)
    assert fix["lines_after"] == expected  # the word replaced, nothing else changed
    assert fix["modified"] and (demo / target.file).read_text(encoding="utf-8") == original  # not saved
    # The server re-checked the edited text: that hint is gone, the others stay.
    assert fix["rechecked"]
    assert [(d["lnum"], d["col"]) for d in fix["diagnostics_after"]] == [
        (p.line - 1, p.byte_col) for p in planted if p.file == target.file and p is not target
    ]
    # :CalamiFix also ran the action's command, which records the accepted fix.
    from calami.vocab.profile import Profile

    assert fix["recorded"], "the accepted fix never reached the profile"
    assert dict(Profile(tmp_path / "profile").corrections(target.word)) == {target.intended: 1}

    # "Add to the project lexicon" from vim.lsp.buf.code_action()'s menu.
    add = result["add"]
    assert add["shown"], "vim.lsp.buf.code_action() showed no menu"
    assert add["menu"][-3:] == word_actions(added.word), add["menu"]
    assert add["written"], f"{word_list} did not change"
    check_word_added(listed_before, word_list.read_text(encoding="utf-8"), added.word)
    assert add["rechecked"], "the hint on the added word did not go away"
    assert [(d["lnum"], d["col"]) for d in add["diagnostics_after"]] == [
        (p.line - 1, p.byte_col) for p in planted if p.file == target.file and p not in (target, added)
    ]
    assert add["lines_after"] == expected  # the buffer is as the fix left it


def test_neovim_without_calami_on_path_says_how_to_fix_it(tmp_path):
    demo = copy_demo(tmp_path)
    result = run_neovim(tmp_path, demo, ["README.md"], PATH=path_without_calami(), CALAMI_NVIM_CMD="",
                        CALAMI_TEST_SCENARIO="start-only")
    assert not result["attached"]
    warnings = [m["msg"] for m in result["messages"] if m["level"] == 3]  # vim.log.levels.WARN
    # README "When something is missing", word for word.
    assert warnings == [
        "calami: the server program 'calami' was not found on PATH; install calami (for example "
        "`pipx install calami`) or pass cmd = {'/full/path/to/calami', 'serve'} to require('calami').setup()"
    ], result["messages"]


def test_neovim_with_the_model_missing_shows_calamis_reason(tmp_path):
    demo = copy_demo(tmp_path)
    change, line = missing_model(tmp_path)
    result = run_neovim(tmp_path, demo, ["README.md"], CALAMI_TEST_SCENARIO="start-only", **change)
    errors = [m["msg"] for m in result["messages"] if m["level"] == 4]  # vim.log.levels.ERROR
    assert errors == [line], (result["messages"], result["log_tail"])  # calami's own line, read from the LSP log
    # Neovim 0.7's own warning comes first (README: "When something is missing").
    assert [m["msg"] for m in result["messages"] if m["level"] == 3] == ["Client 1 quit with exit code 2 and signal 0"]

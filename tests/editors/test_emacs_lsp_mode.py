"""Real Emacs (batch) with lsp-mode and the shipped calami-lsp-mode.el.

lsp_mode_driver.el follows the README's set-up (calami-lsp-mode after
lsp-mode, `lsp-deferred' on markdown-mode-hook) with the venv's calami as
`lsp-calami-server-command' (the documented override), opens the demo
README, waits for the Flymake diagnostics lsp-mode makes from calami's, and
picks from `lsp-execute-code-action''s menu: the preferred fix on one word,
"add to the project lexicon" on another.  Expected hints: demo/EXPECTED.md's
rows for the file.  The two failure tests start Emacs the same way without
calami on PATH, and with the model missing, and check what the user is told.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest

from editor_support import (
    EDITOR_CONFIGS, project_word_title, REPLACE_TITLE, check_word_added, copy_demo, isolated_env,
    missing_model, path_without_calami, planted_mistakes, project_word_list, replaced, server_command,
    word_actions,
)

pytestmark = pytest.mark.editor

HERE = Path(__file__).parent
DRIVER = HERE / "lsp_mode_driver.el"
WAIT_MS = 60_000  # one budget for all of the driver's waiting
FILE = "README.md"
# LSP DiagnosticSeverity (LSP 3.17): 3 Information, 4 Hint, the shipped
# defaults for nonword/realword; lsp-mode 8.0's Flymake backend maps both
# to `:note' (lsp-diagnostics.el, `lsp-diagnostics--flymake-update-diagnostics').
SEVERITY = {"nonword": 3, "realword": 4}
FLYMAKE_TYPE = ":note"


@pytest.fixture(scope="module")
def emacs_with_lsp_mode() -> str:
    """Skip unless Emacs, lsp-mode and markdown-mode are all there."""
    emacs = shutil.which("emacs")
    if emacs is None:
        pytest.skip("emacs is not on PATH (Debian packages: emacs-nox elpa-lsp-mode elpa-markdown-mode)")
    probe = subprocess.run(
        [emacs, "--batch", "--eval", "(progn (package-initialize) (require 'lsp-mode) (require 'markdown-mode))"],
        stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=60,
    )
    if probe.returncode != 0:
        pytest.skip("Emacs has no lsp-mode or markdown-mode (Debian packages: elpa-lsp-mode elpa-markdown-mode): "
                    + probe.stderr.strip().splitlines()[-1])
    return emacs


def run_emacs(emacs: str, tmp_path: Path, demo: Path, **env_changes: str) -> tuple[dict, subprocess.CompletedProcess]:
    out = tmp_path / "lsp-mode-result.json"
    env = isolated_env(tmp_path)
    env.update(
        CALAMI_TEST_CONFIGS=str(EDITOR_CONFIGS / "emacs"),
        CALAMI_TEST_FILE=FILE,
        CALAMI_TEST_OUT=str(out),
        CALAMI_TEST_TIMEOUT_MS=str(WAIT_MS),
    )
    env.update(env_changes)
    proc = subprocess.run(
        [emacs, "--batch", "-l", str(DRIVER)], cwd=demo, env=env,
        stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=WAIT_MS / 1000 + 30,
    )
    assert out.exists(), f"Emacs wrote no result (exit {proc.returncode}):\n{proc.stdout}\n{proc.stderr}"
    result = json.loads(out.read_text(encoding="utf-8"))
    assert not result["errors"], f"{result['errors']}\n{proc.stderr}\nserver stderr:\n{result['server_stderr']}"
    assert result["major_mode"] == "markdown-mode"
    return result, proc


def test_lsp_mode_shows_the_demo_hints_applies_the_preferred_fix_and_adds_a_word(tmp_path, emacs_with_lsp_mode):
    demo = copy_demo(tmp_path)
    planted = [p for p in planted_mistakes(demo) if p.file == FILE]
    target, added = [p for p in planted if p.kind == "nonword"][:2]
    original = (demo / FILE).read_text(encoding="utf-8")
    word_list = project_word_list(demo)
    listed_before = word_list.read_text(encoding="utf-8") if word_list.exists() else None
    command = server_command()
    assert not any(" " in part for part in command), f"the driver splits the command on spaces: {command}"

    result, proc = run_emacs(
        emacs_with_lsp_mode, tmp_path, demo,
        CALAMI_EMACS_CMD=" ".join(command),
        CALAMI_TEST_FIX=f"{target.line}:{target.char_col}",
        CALAMI_TEST_ADD=f"{added.line}:{added.char_col}",
        CALAMI_TEST_ADD_TITLE=project_word_title(added.word),
        CALAMI_TEST_WORD_LIST=str(word_list),
    )
    assert result["started"], f"lsp-mode did not start calami: {proc.stderr}"
    assert result["server_command"] == command  # lsp-calami-server-command was honoured
    assert result["found"], f"no diagnostics within {WAIT_MS} ms:\n{result['server_stderr']}"
    assert not result["questions"], result["questions"]  # nothing asked the user on the way

    got = result["diagnostics"]
    assert [(d["line"], d["col"], d["length"]) for d in got] == [
        (p.line, p.char_col, len(p.word)) for p in planted
    ], got
    for d, p in zip(got, planted):
        assert (d["source"], d["code"], d["severity"], d["type"]) == (
            "calami", f"calami.{p.kind}", SEVERITY[p.kind], FLYMAKE_TYPE), d
        assert f"'{p.word}'" in d["text"] and f"best fix: '{p.intended}'" in d["text"], d

    # The menu: the preferred replacement (the only one marked so) first,
    # the word-list actions after the replacements.
    choices = result["menu_choices"]
    assert result["menu_preferred"] == [REPLACE_TITLE.format(word=target.intended)]
    assert choices[0] == REPLACE_TITLE.format(word=target.intended)
    assert choices[-3:] == word_actions(target.word)

    assert result["changed"] and result["modified"]
    assert result["text_before"] == original
    lines = original.split("\n")
    fixed = replaced(lines, target.line - 1, target.char_col, target.word, target.intended)
    assert result["text_after"] == "\n".join(fixed)
    assert result["rechecked"], "the hint on the fixed word did not go away"
    assert [(d["line"], d["col"]) for d in result["diagnostics_after_fix"]] == [
        (p.line, p.char_col) for p in planted if p is not target
    ]
    from calami.vocab.profile import Profile

    assert result["recorded"], "the accepted fix never reached the profile"
    assert dict(Profile(tmp_path / "profile").corrections(target.word)) == {target.intended: 1}

    # "Add to the project lexicon" on the second word: the file gains it, the
    # hint goes, the buffer is untouched by it and nothing was saved.
    assert result["add_menu_choices"][-3:] == word_actions(added.word)
    assert result["word_list_written"], f"{word_list} did not change"
    check_word_added(listed_before, word_list.read_text(encoding="utf-8"), added.word)
    assert result["add_rechecked"], "the hint on the added word did not go away"
    assert [(d["line"], d["col"]) for d in result["diagnostics_after_add"]] == [
        (p.line, p.char_col) for p in planted if p not in (target, added)
    ]
    assert result["text_final"] == "\n".join(fixed)
    assert (demo / FILE).read_text(encoding="utf-8") == original


def test_lsp_mode_without_calami_on_path_says_how_to_fix_it(tmp_path, emacs_with_lsp_mode):
    demo = copy_demo(tmp_path)
    result, proc = run_emacs(emacs_with_lsp_mode, tmp_path, demo, PATH=path_without_calami(),
                             CALAMI_TEST_SCENARIO="start-only")
    assert not result["started"] and result["server_command"] is None
    # The config's own warning, once, naming the setting to change (README: "When something is missing").
    warning = ("calami: the server program `calami' was not found on PATH; install calami "
               "(for example `pipx install calami') or set `lsp-calami-server-command'")
    assert result["warnings"].count(warning) == 1, result["warnings"]
    # Then lsp-mode's own notice that no server could be started.
    assert "support current file but do not have automatic installation" in result["messages"], result["messages"]


def test_lsp_mode_with_the_model_missing_shows_calamis_reason(tmp_path, emacs_with_lsp_mode):
    demo = copy_demo(tmp_path)
    change, line = missing_model(tmp_path)
    command = server_command()
    result, proc = run_emacs(emacs_with_lsp_mode, tmp_path, demo, CALAMI_EMACS_CMD=" ".join(command),
                             CALAMI_TEST_SCENARIO="start-only", **change)
    assert not result["started"]
    assert result["server_error"] == line  # read back from the server's stderr buffer
    messages = result["messages"]
    assert "calami has exited (exited abnormally with code 2)" in messages, messages
    # The echo area shows calami's own line right after lsp-mode's exit notice.
    assert messages.index(line) > messages.index("calami has exited"), messages
    # lsp-mode then offers a restart (answered no by the driver).
    assert len(result["questions"]) == 1 and "Do you want to restart it?" in result["questions"][0]

"""Real Emacs (batch) with Eglot and the shipped calami-eglot.el.

emacs_driver.el loads editor-configs/emacs/calami-eglot.el with the venv's
calami as `calami-eglot-program` (the documented override), opens the demo
README in markdown-mode, waits for calami's Flymake diagnostics, and applies
the quick-fix menu's default (the preferred fix) through
`eglot-code-actions`.  Expected hints: demo/EXPECTED.md's rows for the file.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest

from editor_support import (
    EDITOR_CONFIGS, project_word_title, REPLACE_TITLE, check_word_added, copy_demo, isolated_env, missing_model,
    path_without_calami, planted_mistakes, project_word_list, replaced, server_command, word_actions,
)

pytestmark = pytest.mark.editor

HERE = Path(__file__).parent
DRIVER = HERE / "emacs_driver.el"
WAIT_MS = 60_000  # one budget for all of the driver's waiting
FILE = "README.md"
# What Eglot 1.9 puts in front of a diagnostic's message: "source [code]: ".
PREFIX = "calami [calami.{kind}]: "
# Eglot maps LSP severities 3 (Information) and 4 (Hint) to its note type.
FLYMAKE_TYPE = {"nonword": "eglot-note", "realword": "eglot-note"}


@pytest.fixture(scope="module")
def emacs_with_eglot() -> str:
    """Skip unless Emacs, Eglot and markdown-mode are all there."""
    emacs = shutil.which("emacs")
    if emacs is None:
        pytest.skip("emacs is not on PATH (Debian packages: emacs-nox elpa-eglot elpa-markdown-mode)")
    probe = subprocess.run(
        [emacs, "--batch", "--eval", "(progn (package-initialize) (require 'eglot) (require 'markdown-mode))"],
        stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=60,
    )
    if probe.returncode != 0:
        pytest.skip("Emacs has no Eglot or markdown-mode (Debian packages: elpa-eglot elpa-markdown-mode): "
                    + probe.stderr.strip().splitlines()[-1])
    return emacs


def run_emacs(emacs: str, tmp_path: Path, demo: Path, **env_changes: str) -> tuple[dict, subprocess.CompletedProcess]:
    out = tmp_path / "emacs-result.json"
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


def test_emacs_eglot_shows_the_demo_hints_and_applies_the_preferred_fix(tmp_path, emacs_with_eglot):
    demo = copy_demo(tmp_path)
    planted = [p for p in planted_mistakes(demo) if p.file == FILE]
    target, added = [p for p in planted if p.kind == "nonword"][:2]
    original = (demo / FILE).read_text(encoding="utf-8")
    word_list = project_word_list(demo)
    listed_before = word_list.read_text(encoding="utf-8") if word_list.exists() else None
    command = server_command()
    assert not any(" " in part for part in command), f"the driver splits the command on spaces: {command}"
    result, proc = run_emacs(
        emacs_with_eglot, tmp_path, demo,
        CALAMI_EMACS_CMD=" ".join(command),
        CALAMI_TEST_FIX=f"{target.line}:{target.char_col}",
        CALAMI_TEST_ADD=f"{added.line}:{added.char_col}",
        CALAMI_TEST_ADD_TITLE=project_word_title(added.word),
        CALAMI_TEST_WORD_LIST=str(word_list),
    )
    assert result["managed"], f"Eglot did not start calami: {proc.stderr}"
    assert result["server_command"] == command  # calami-eglot-program was honoured
    assert result["found"], f"no calami diagnostics within {WAIT_MS} ms:\n{result['server_stderr']}"

    got = result["diagnostics"]
    assert [(d["line"], d["col"], d["length"]) for d in got] == [
        (p.line, p.char_col, len(p.word)) for p in planted
    ], got
    for d, p in zip(got, planted):
        assert d["text"].startswith(PREFIX.format(kind=p.kind)), d
        assert f"'{p.word}'" in d["text"] and f"best fix: '{p.intended}'" in d["text"], d
        assert d["type"] == FLYMAKE_TYPE[p.kind], d

    # The quick-fix menu: the preferred replacement is its default, and the
    # word-list actions follow the replacements.
    preferred = REPLACE_TITLE.format(word=target.intended)
    assert (result["menu_prompt"] or "").endswith(f"(default {preferred}): "), result["menu_prompt"]
    choices = result["menu_choices"]
    assert choices[0] == preferred
    assert choices[-3:] == word_actions(target.word)

    assert result["changed"] and result["modified"]
    assert result["text_before"] == original
    lines = original.split("\n")
    fixed = "\n".join(replaced(lines, target.line - 1, target.char_col, target.word, target.intended))
    assert result["text_after"] == fixed
    assert (demo / FILE).read_text(encoding="utf-8") == original  # the buffer was not saved
    assert result["rechecked"], "the hint on the fixed word did not go away"
    assert [(d["line"], d["col"]) for d in result["diagnostics_after"]] == [
        (p.line, p.char_col) for p in planted if p is not target
    ]
    from calami.vocab.profile import Profile

    assert result["recorded"], "the accepted fix never reached the profile"
    assert dict(Profile(tmp_path / "profile").corrections(target.word)) == {target.intended: 1}

    # "Add to the project lexicon" on the second word, from the same menu.
    assert result["add_menu_choices"][-3:] == word_actions(added.word)
    assert result["word_list_written"], f"{word_list} did not change"
    check_word_added(listed_before, word_list.read_text(encoding="utf-8"), added.word)
    assert result["add_rechecked"], "the hint on the added word did not go away"
    assert [(d["line"], d["col"]) for d in result["diagnostics_after_add"]] == [
        (p.line, p.char_col) for p in planted if p not in (target, added)
    ]
    assert result["text_final"] == fixed


def test_emacs_eglot_without_calami_on_path_says_how_to_fix_it(tmp_path, emacs_with_eglot):
    demo = copy_demo(tmp_path)
    result, _ = run_emacs(emacs_with_eglot, tmp_path, demo, PATH=path_without_calami(),
                          CALAMI_TEST_SCENARIO="start-only")
    assert not result["managed"]
    # The config's user-error; Emacs shows it with curved quotes (`format-message').
    message = ("calami: the server program \u2018calami\u2019 was not found on PATH; install calami "
               "(for example \u2018pipx install calami\u2019) or set \u2018calami-eglot-program\u2019")
    assert f"Error in post-command-hook: {message}" in result["messages"], result["messages"]


def test_emacs_eglot_with_the_model_missing_shows_calamis_reason(tmp_path, emacs_with_eglot):
    demo = copy_demo(tmp_path)
    change, line = missing_model(tmp_path)
    result, _ = run_emacs(emacs_with_eglot, tmp_path, demo, CALAMI_EMACS_CMD=" ".join(server_command()),
                          CALAMI_TEST_SCENARIO="start-only", **change)
    assert not result["managed"]
    assert result["server_error"] == line
    # calami-eglot.el turns Eglot's "[eglot] -1: Server died" into calami's own line.
    assert f"error in process sentinel: {line}" in result["messages"], result["messages"]
    assert "Server died" not in result["messages"]

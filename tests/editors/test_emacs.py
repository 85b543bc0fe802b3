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

from calami.lsp.actions import add_to_lexicon_title
from editor_support import EDITOR_CONFIGS, copy_demo, isolated_env, planted_mistakes, replaced, server_command

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


def test_emacs_eglot_shows_the_demo_hints_and_applies_the_preferred_fix(tmp_path, emacs_with_eglot):
    demo = copy_demo(tmp_path)
    planted = [p for p in planted_mistakes(demo) if p.file == FILE]
    target = next(p for p in planted if p.kind == "nonword")
    original = (demo / FILE).read_text(encoding="utf-8")
    out = tmp_path / "emacs-result.json"
    env = isolated_env(tmp_path)
    command = server_command()
    assert not any(" " in part for part in command), f"the driver splits the command on spaces: {command}"
    env.update(
        CALAMI_TEST_CONFIGS=str(EDITOR_CONFIGS / "emacs"),
        CALAMI_EMACS_CMD=" ".join(command),
        CALAMI_TEST_FILE=FILE,
        CALAMI_TEST_OUT=str(out),
        CALAMI_TEST_FIX=f"{target.line}:{target.char_col}",
        CALAMI_TEST_TIMEOUT_MS=str(WAIT_MS),
    )
    proc = subprocess.run(
        [emacs_with_eglot, "--batch", "-l", str(DRIVER)], cwd=demo, env=env,
        stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=WAIT_MS / 1000 + 30,
    )
    assert out.exists(), f"Emacs wrote no result (exit {proc.returncode}):\n{proc.stdout}\n{proc.stderr}"
    result = json.loads(out.read_text(encoding="utf-8"))
    assert not result["errors"], f"{result['errors']}\n{proc.stderr}\nserver stderr:\n{result['server_stderr']}"
    assert result["major_mode"] == "markdown-mode"
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
    assert (result["menu_prompt"] or "").endswith(f"(default Replace with '{target.intended}'): "), result["menu_prompt"]
    choices = result["menu_choices"]
    assert choices[0] == f"Replace with '{target.intended}'"
    assert choices[-3:] == [add_to_lexicon_title(target.word), f"Add '{target.word}' to my words",
                            f"Ignore '{target.word}' in this document"]

    assert result["changed"] and result["modified"]
    assert result["text_before"] == original
    lines = original.split("\n")
    assert result["text_after"] == "\n".join(
        replaced(lines, target.line - 1, target.char_col, target.word, target.intended))
    assert (demo / FILE).read_text(encoding="utf-8") == original  # the buffer was not saved
    assert result["rechecked"], "the hint on the fixed word did not go away"
    assert [(d["line"], d["col"]) for d in result["diagnostics_after"]] == [
        (p.line, p.char_col) for p in planted if p is not target
    ]
    from calami.vocab.profile import Profile

    assert result["recorded"], "the accepted fix never reached the profile"
    assert dict(Profile(tmp_path / "profile").corrections(target.word)) == {target.intended: 1}

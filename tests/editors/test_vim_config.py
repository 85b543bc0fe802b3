"""editor-configs/vim/calami.vim loaded by real Vim, against stand-ins for
the vim-lsp plugin it expects.

vim-lsp is not packaged for Debian and is not on PyPI or npm, so it cannot
be installed here and no end-to-end test drives it.  What is checked
instead: Vim parses and runs the file; on vim-lsp's `User lsp_setup` event
it registers one server with the command, filetypes, root, language ids and
settings the README documents (the dictionary keys are vim-lsp's as
remembered from its documentation, not checked against vim-lsp); and without
calami on PATH it registers nothing and says so.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest

from editor_support import (
    EDITOR_CONFIGS, copy_demo, isolated_env, path_without_calami, server_command, server_defaults,
)

pytestmark = [
    pytest.mark.editor,
    pytest.mark.skipif(shutil.which("vim") is None, reason="vim is not on PATH (Debian package: vim)"),
]

HERE = Path(__file__).parent
CONFIG = EDITOR_CONFIGS / "vim" / "calami.vim"


def run_vim(tmp_path: Path, demo: Path, **env_changes: str) -> dict:
    out = tmp_path / "vim-result.json"
    env = isolated_env(tmp_path)
    env.update(CALAMI_TEST_CONFIG=str(CONFIG), CALAMI_TEST_STANDIN=str(HERE / "vim_lsp_standin"),
               CALAMI_TEST_FILE=str(demo / "README.md"), CALAMI_TEST_OUT=str(out))
    env.update(env_changes)
    proc = subprocess.run([shutil.which("vim"), "-Nu", "NONE", "-i", "NONE", "-es", "-S", str(HERE / "vim_driver.vim")],
                          cwd=demo, env=env, stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=120)
    assert out.exists(), f"Vim wrote no result (exit {proc.returncode}):\n{proc.stdout}\n{proc.stderr}"
    return json.loads(out.read_text(encoding="utf-8"))


def test_vim_registers_calami_with_vim_lsp_as_documented(tmp_path):
    demo = copy_demo(tmp_path)
    command = server_command()
    result = run_vim(tmp_path, demo, CALAMI_TEST_CMD=" ".join(command),
                     CALAMI_TEST_SETTINGS=json.dumps({"variant": "en-GB", "severity": {"realword": "warning"}}))
    assert len(result["registered"]) == 1, result
    info = result["registered"][0]
    assert info["name"] == "calami" and info["cmd"] == command
    assert {"markdown", "rst", "tex", "text", "gitcommit", "python"} <= set(info["allowlist"])
    assert info["root_uri"] == (demo / "README.md").parent.as_uri()
    [call] = result["calls"]
    assert call[1] == str(demo / "README.md") and "calami.toml" in call[2]
    assert info["language_ids"] == {"markdown": "markdown", "rst": "restructuredtext", "gitcommit": "git-commit",
                                    "text": "plaintext", "tex": "latex", "sh": "shellscript", "python": "python"}
    # g:calami_settings merged over the defaults (nested tables key by key).
    want = {**server_defaults(), "variant": "en-GB", "severity": {"nonword": "information", "realword": "warning"}}
    got = info["initialization_options"]
    assert got == want
    assert info["workspace_config"] == {"calami": got}
    assert result["messages"].strip() == ""


def test_vim_without_calami_on_path_registers_nothing_and_says_why(tmp_path):
    demo = copy_demo(tmp_path)
    result = run_vim(tmp_path, demo, PATH=path_without_calami())
    assert result["registered"] == []
    assert result["messages"].strip() == (
        "calami: the server program 'calami' was not found on PATH; install calami "
        "(for example `pipx install calami`) or set g:calami_cmd to its full path")

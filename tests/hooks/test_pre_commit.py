"""The hooks of .pre-commit-hooks.yaml, run by the pre-commit framework itself (PyPI ``pre-commit``)
against a throw-away repository.  ``pre-commit try-repo`` installs calami from this
work tree into its own environment (pip, from PyPI), so this is slow: ``-m hooks``
(``.ci/run`` runs it as a second pytest call).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
pytestmark = [pytest.mark.slow, pytest.mark.hooks]

ENV_KEYS = {"GIT_AUTHOR_NAME": "t", "GIT_AUTHOR_EMAIL": "t@example.org",
            "GIT_COMMITTER_NAME": "t", "GIT_COMMITTER_EMAIL": "t@example.org"}


@pytest.fixture(scope="module")
def env(tmp_path_factory):
    if shutil.which("git") is None:
        pytest.skip("git not installed")
    home = tmp_path_factory.mktemp("pre-commit-home")  # one hook environment for the module
    return {**os.environ, **ENV_KEYS, "PRE_COMMIT_HOME": str(home)}


def pre_commit(cwd: Path, env: dict, *args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "pre_commit", "try-repo", str(REPO), *args, "--verbose"],
                          cwd=cwd, env=env, capture_output=True, text=True, timeout=900)


def git(cwd: Path, env: dict, *args: str) -> None:
    subprocess.run(["git", *args], cwd=cwd, env=env, check=True, capture_output=True)


@pytest.fixture
def repo(tmp_path, env):
    git(tmp_path, env, "init", "-q", "-b", "main")
    (tmp_path / "old.md").write_text("An old line with teh mistake.\n", encoding="utf-8")
    git(tmp_path, env, "add", ".")
    git(tmp_path, env, "commit", "-q", "-m", "start")
    return tmp_path


def test_staged_hook_flags_only_new_lines(repo, env):
    (repo / "old.md").write_text("An old line with teh mistake.\n\nWe will recieve it.\n", encoding="utf-8")
    git(repo, env, "add", "old.md")
    done = pre_commit(repo, env, "calami")
    assert done.returncode == 1, done.stdout + done.stderr
    assert "recieve" in done.stdout
    assert "teh" not in done.stdout  # an old finding, not in the staged lines

    (repo / "old.md").write_text("An old line with teh mistake.\n\nWe will receive it.\n", encoding="utf-8")
    git(repo, env, "add", "old.md")
    done = pre_commit(repo, env, "calami")
    assert done.returncode == 0, done.stdout + done.stderr


def test_commit_message_hook(repo, env):
    message = repo / "message.txt"
    message.write_text("Fix the parser\n\nIt read teh file twice.\n# teh comment is skipped\n", encoding="utf-8")
    done = pre_commit(repo, env, "calami-commit-msg", "--hook-stage", "commit-msg", "--commit-msg-filename", str(message))
    assert done.returncode == 1, done.stdout + done.stderr
    assert "teh" in done.stdout and ":3:" in done.stdout

    message.write_text("Fix the parser\n\nIt read the file twice.\n# teh comment is skipped\n", encoding="utf-8")
    done = pre_commit(repo, env, "calami-commit-msg", "--hook-stage", "commit-msg", "--commit-msg-filename", str(message))
    assert done.returncode == 0, done.stdout + done.stderr

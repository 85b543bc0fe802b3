"""What the real-editor tests share: the demo's planted mistakes, a private
copy of the demo, and an environment that keeps editors out of the real home."""

from __future__ import annotations

import os
import re
import shutil
import sys
from dataclasses import dataclass
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
DEMO = REPO / "demo"
EDITOR_CONFIGS = REPO / "editor-configs"


@dataclass(frozen=True)
class Planted:
    """One row of demo/EXPECTED.md, with where the word sits in the file."""

    file: str
    line: int  # 1-based, as in EXPECTED.md
    word: str
    kind: str
    intended: str
    char_col: int  # 0-based code-point column of the word
    byte_col: int  # 0-based UTF-8 byte column (Neovim's diagnostic columns)


def planted_mistakes(demo: Path = DEMO) -> list[Planted]:
    """The rows of EXPECTED.md's table, each located in its file.

    The word must occur exactly once on its line (as a whole word), so that
    the expected column is not a guess."""
    rows = []
    for raw in (demo / "EXPECTED.md").read_text(encoding="utf-8").splitlines():
        cells = [c.strip() for c in raw.strip().strip("|").split("|")]
        if len(cells) != 5 or cells[0] in ("file", "") or set(cells[0]) <= {"-", " "}:
            continue
        file, line, word, kind, intended = cells
        text = (demo / file).read_text(encoding="utf-8").splitlines()[int(line) - 1]
        hits = [m.start() for m in re.finditer(rf"(?<!\w){re.escape(word)}(?!\w)", text)]
        assert len(hits) == 1, f"{file}:{line}: '{word}' occurs {len(hits)} times on the line"
        col = hits[0]
        rows.append(Planted(file, int(line), word, kind, intended, col, len(text[:col].encode("utf-8"))))
    assert rows, "demo/EXPECTED.md has no table rows"
    return rows


def copy_demo(tmp_path: Path) -> Path:
    """A private copy of demo/, so nothing an editor does can change the repo."""
    target = tmp_path / "demo"
    shutil.copytree(DEMO, target)
    return target


def server_command() -> list[str]:
    """`calami serve` of the Python running the tests (the venv's calami)."""
    script = Path(sys.executable).with_name("calami")
    if script.is_file() and os.access(script, os.X_OK):
        return [str(script), "serve"]
    return [sys.executable, "-m", "calami", "serve"]


def isolated_env(tmp_path: Path) -> dict[str, str]:
    """HOME, XDG folders and the calami profile all under tmp_path."""
    home = tmp_path / "home"
    env = dict(os.environ)
    env["HOME"] = str(home)
    for name in ("XDG_CONFIG_HOME", "XDG_DATA_HOME", "XDG_STATE_HOME", "XDG_CACHE_HOME", "XDG_RUNTIME_DIR"):
        path = home / name.lower()
        path.mkdir(mode=0o700, parents=True, exist_ok=True)
        env[name] = str(path)
    env["CALAMI_PROFILE_DIR"] = str(tmp_path / "profile")
    env.pop("CALAMI_MODEL", None)  # the shipped model, as a user gets it
    return env


def replaced(lines: list[str], line: int, col: int, old: str, new: str) -> list[str]:
    """`lines` with `old` at (line, col) (0-based, code points) replaced by `new`."""
    text = lines[line]
    assert text[col:col + len(old)] == old, (text, col, old)
    return lines[:line] + [text[:col] + new + text[col + len(old):]] + lines[line + 1:]


# --- what the tests look for in the editors' menus and files --------------
# The quick-fix titles the server offers, kept here in one place so that a
# renamed label touches one line; the project lexicon's comes from
# calami.lsp.actions itself.
REPLACE_TITLE = "Replace with '{word}'"
USER_WORD_TITLE = "Add '{word}' to my words"
IGNORE_TITLE = "Ignore '{word}' in this document"


def project_word_title(word: str) -> str:
    """The title of "add `word` to the project lexicon"."""
    from calami.lsp.actions import add_to_lexicon_title

    return add_to_lexicon_title(word)


def word_actions(word: str) -> list[str]:
    """The menu's last entries for a flagged word, in the server's order."""
    return [project_word_title(word), USER_WORD_TITLE.format(word=word), IGNORE_TITLE.format(word=word)]


def project_word_list(root: Path) -> Path:
    """The file "add to the project lexicon" edits, as the server's own project code names it."""
    from calami.vocab.project import Project

    return Path(Project(root).word_list_path)


def check_word_added(before: str | None, after: str, word: str) -> None:
    """`after` is `before` with one more line, `word`, and nothing lost."""
    old = (before or "").splitlines()
    new = after.splitlines()
    assert sorted(set(new) - set(old)) == [word], (old, new)
    assert len(new) == len(old) + 1, (old, new)
    kept = iter(new)
    assert all(line in kept for line in old), (old, new)  # the old lines, in their order


def path_without_calami() -> str:
    """PATH with every folder that holds a `calami` program left out."""
    keep = [d for d in os.environ.get("PATH", "").split(os.pathsep)
            if d and not shutil.which("calami", path=d)]
    return os.pathsep.join(keep)


def missing_model(tmp_path: Path) -> tuple[dict[str, str], str]:
    """Environment changes that make the model missing, and the line calami
    itself prints then (asked from `calami serve`, not written down here)."""
    import subprocess

    change = {"CALAMI_MODEL": str(tmp_path / "no-such-model.msgpack")}
    proc = subprocess.run(server_command(), env={**os.environ, **change}, stdin=subprocess.DEVNULL,
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == 2, (proc.returncode, proc.stderr)
    lines = [line for line in proc.stderr.splitlines() if line.startswith("calami: ")]
    assert len(lines) == 1 and "model" in lines[0], proc.stderr
    return change, lines[0]


def server_defaults() -> dict:
    """The server's own setting defaults (calami.lsp.settings), under the names editors send."""
    from calami.lsp.settings import Settings

    d = Settings()
    return {
        "variant": d.variant, "hintThreshold": d.hint_threshold, "confidentThreshold": d.confident_threshold,
        "severity": {"nonword": d.severity_nonword, "realword": d.severity_realword},
        "maxSuggestions": d.max_suggestions, "checkStrings": d.check_strings, "debounceMs": d.debounce_ms,
        "modelPath": d.model_path, "wordList": d.word_list,
    }


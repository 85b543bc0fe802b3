"""Real Kate (KDE's editor, LSP Client plugin) under Xvfb with the shipped
editor-configs/kate/settings.json against `calami serve`.

The shipped settings go into Kate's user server settings file unchanged
except for `command` (the README says to use a full path when calami is
not on PATH): here the venv's calami behind lsp_tap.py, which writes down
the messages.  kate_support.py types at Kate with xdotool; see there.
Expected hints: demo/EXPECTED.md's rows for the README.
"""

from __future__ import annotations

import json
import time
from pathlib import Path

import pytest

from editor_support import (
    EDITOR_CONFIGS, project_word_title, REPLACE_TITLE, check_word_added, copy_demo, isolated_env,
    missing_model, planted_mistakes, project_word_list, replaced, server_command, word_actions,
)
from kate_support import Kate, Tap, missing_programs, tap_command, wait_until

pytestmark = [
    pytest.mark.editor,
    # A GUI driven by synthetic key presses on a virtual screen: on a loaded
    # machine a key can land before Kate is ready.  A failure that repeats
    # three times is real (pytest-rerunfailures).
    pytest.mark.flaky(reruns=2, reruns_delay=2),
    pytest.mark.skipif(bool(missing_programs()),
                       reason=f"{', '.join(missing_programs())} not on PATH (Debian packages: kate xvfb xdotool)"),
]

SETTINGS = EDITOR_CONFIGS / "kate" / "settings.json"
FILE = "README.md"
TIMEOUT = 60.0  # seconds, for each wait on Kate or the server
# LSP DiagnosticSeverity (LSP 3.17): the shipped defaults.
SEVERITY = {"nonword": 3, "realword": 4}


def utf16_column(text: str, col: int) -> int:
    return len(text[:col].encode("utf-16-le")) // 2


@pytest.fixture
def kate_session(tmp_path):
    sessions = []

    def start(env: dict[str, str], settings: dict, allowed: list[str], demo: Path) -> Kate:
        kate = Kate(tmp_path, env, TIMEOUT)
        sessions.append(kate)
        kate.configure(settings, allowed)
        kate.start(demo, FILE)
        return kate

    yield start
    for kate in sessions:
        kate.close()


def test_kate_shows_the_demo_hints_applies_the_preferred_fix_and_adds_a_word(tmp_path, kate_session):
    demo = copy_demo(tmp_path)
    planted = [p for p in planted_mistakes(demo) if p.file == FILE]
    target, added = [p for p in planted if p.kind == "nonword"][:2]
    original = (demo / FILE).read_text(encoding="utf-8")
    lines = original.split("\n")
    uri = (demo / FILE).resolve().as_uri()
    word_list = project_word_list(demo)
    listed_before = word_list.read_text(encoding="utf-8") if word_list.exists() else None

    shipped = json.loads(SETTINGS.read_text(encoding="utf-8"))
    settings = json.loads(SETTINGS.read_text(encoding="utf-8"))
    tap = Tap(tmp_path / "lsp-tap.jsonl")
    command = tap_command(tap.path, server_command())
    settings["servers"]["calami"]["command"] = command
    kate = kate_session(isolated_env(tmp_path), settings, command, demo)

    # Kate starts the server with the shipped settings and opens the file.
    init = wait_until(lambda: tap.from_editor("initialize"), TIMEOUT, "initialize")[0]
    assert init["params"]["initializationOptions"] == shipped["servers"]["calami"]["initializationOptions"]
    opened = wait_until(lambda: tap.from_editor("textDocument/didOpen"), TIMEOUT, "didOpen")[0]["params"]
    assert opened["textDocument"]["uri"] == uri and opened["textDocument"]["text"] == original
    # Kate 22.12 sends the key of the "servers" entry as the language id.
    assert opened["textDocument"]["languageId"] == "calami"
    config = tap.from_editor("workspace/didChangeConfiguration")
    assert config and config[0]["params"]["settings"] == shipped["servers"]["calami"]["settings"]

    # Every planted mistake, at its line and (UTF-16) column.
    published = wait_until(lambda: [d for d in tap.diagnostics(uri) if d], TIMEOUT, "calami's diagnostics")[0]
    assert [(d["range"]["start"]["line"], d["range"]["start"]["character"], d["range"]["end"]["character"])
            for d in published] == [
        (p.line - 1, utf16_column(lines[p.line - 1], p.char_col),
         utf16_column(lines[p.line - 1], p.char_col + len(p.word))) for p in planted
    ], published
    for d, p in zip(published, planted):
        assert (d["source"], d["code"], d["severity"]) == ("calami", f"calami.{p.kind}", SEVERITY[p.kind]), d
        assert f"'{p.word}'" in d["message"] and f"best fix: '{p.intended}'" in d["message"], d

    # The preferred fix: cursor on the word, Alt+Return, the entry calami
    # marked preferred (the first one, since calami lists it first).
    request, actions, index = kate.pick_code_action(
        tap, target.line - 1, target.char_col,
        lambda acts: next(i for i, a in enumerate(acts) if a.get("isPreferred")))
    assert request["params"]["range"]["start"]["line"] == target.line - 1  # Kate asks for the cursor's line
    assert index == 0 and actions[0]["title"] == REPLACE_TITLE.format(word=target.intended)
    assert [a["title"] for a in actions][-3:] == word_actions(target.word)
    fixed = "\n".join(replaced(lines, target.line - 1, target.char_col, target.word, target.intended))
    state = wait_until(lambda: (s := kate.command("calamistate"))["text"] == fixed and s, TIMEOUT,
                       "the fixed buffer")
    assert state["modified"] and (demo / FILE).read_text(encoding="utf-8") == original  # edited, not saved
    recorded = wait_until(lambda: tap.from_editor("workspace/executeCommand"), TIMEOUT, "the fix's command")
    assert [r["params"]["command"] for r in recorded] == ["calami.recordReplacement"]
    # calami re-checked the text Kate sent: that hint is gone, the others stay.
    after_fix = wait_until(lambda: [d for d in tap.diagnostics(uri)[-1:] if d and all(
        x["range"]["start"]["line"] != target.line - 1 for x in d)], TIMEOUT, "the re-check")[0]
    assert [x["range"]["start"]["line"] for x in after_fix] == [p.line - 1 for p in planted if p is not target]
    from calami.vocab.profile import Profile

    wait_until(lambda: (tmp_path / "profile" / "profile.msgpack").exists(), TIMEOUT, "the profile")
    assert dict(Profile(tmp_path / "profile").corrections(target.word)) == {target.intended: 1}

    # "Add to the project lexicon" on the second word.
    title = project_word_title(added.word)
    _, actions, index = kate.pick_code_action(tap, added.line - 1, added.char_col,
                                              lambda acts: [a["title"] for a in acts].index(title))
    assert [a["title"] for a in actions][-3:] == word_actions(added.word)
    wait_until(lambda: word_list.exists() and word_list.read_text(encoding="utf-8") != listed_before,
               TIMEOUT, f"{word_list} to change")
    check_word_added(listed_before, word_list.read_text(encoding="utf-8"), added.word)
    commands = [r["params"]["command"] for r in tap.from_editor("workspace/executeCommand")]
    assert commands == ["calami.recordReplacement", "calami.addProjectWord"]
    wait_until(lambda: [d for d in tap.diagnostics(uri)[-1:] if [x["range"]["start"]["line"] for x in d] == [
        p.line - 1 for p in planted if p not in (target, added)]], TIMEOUT, "the hint on the added word to go")
    assert kate.command("calamistate")["text"] == fixed  # adding a word does not touch the buffer


def test_kate_with_the_model_missing_restarts_calami_once_then_gives_up(tmp_path, kate_session):
    """What Kate shows then (its Output view: calami's own "calami: ..." line
    after "LSP Server Log", then "Server terminated unexpectedly ...
    Restarting", and "... NOT Restarting" the second time) was read on a
    screenshot; this test checks the part a test can see: the server is
    started twice, and never gets past initialize."""
    demo = copy_demo(tmp_path)
    change, _line = missing_model(tmp_path)
    settings = json.loads(SETTINGS.read_text(encoding="utf-8"))
    tap = Tap(tmp_path / "lsp-tap.jsonl")
    command = tap_command(tap.path, server_command())
    settings["servers"]["calami"]["command"] = command
    kate_session({**isolated_env(tmp_path), **change}, settings, command, demo)
    wait_until(lambda: len(tap.from_editor("initialize")) >= 2, TIMEOUT, "Kate's restart of the server")
    time.sleep(3)  # room for a third start, which must not come
    assert len(tap.from_editor("initialize")) == 2
    assert not [m for m in tap.messages() if m["from"] == "server"]  # calami exited before answering

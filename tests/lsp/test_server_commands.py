"""Commands: accepting a fix teaches the profile; words lists; argument validation."""

from __future__ import annotations

import os

import pytest
from lsprotocol import types
from pygls.exceptions import JsonRpcException

from calami.vocab.profile import Profile
from session import open_doc, published_for, start, stop, until


def _actions(client, uri, diag):
    return client.text_document_code_action_async(
        types.CodeActionParams(types.TextDocumentIdentifier(uri), diag.range, types.CodeActionContext([diag]))
    )


def _apply(client, uri, action):
    """Apply a code action's edit the way an editor does: a didChange."""
    edit = action.edit.changes[uri][0]
    client.text_document_did_change(types.DidChangeTextDocumentParams(
        types.VersionedTextDocumentIdentifier(version=2, uri=uri),
        [types.TextDocumentContentChangePartial(range=edit.range, text=edit.new_text)],
    ))


async def test_applying_a_fix_then_its_command_teaches_the_profile_across_restarts(tmp_path, folder):
    profile_dir = tmp_path / "profile"
    client, _ = await start(profile_dir, [folder], options={"debounceMs": 0})
    try:
        uri = open_doc(client, folder / "a.md", "Cook it in the ofen tonight.\n")
        params = await until(lambda: published_for(client, uri, 1))
        actions = await _actions(client, uri, params.diagnostics[0])
        assert [a.title for a in actions[:2]] == ["Replace with 'often'", "Replace with 'oven'"]
        oven = actions[1]  # the user picks the second suggestion
        _apply(client, uri, oven)
        await client.workspace_execute_command_async(
            types.ExecuteCommandParams(oven.command.command, list(oven.command.arguments)))
        params = await until(lambda: published_for(client, uri, 2))
        assert list(params.diagnostics) == []
    finally:
        await stop(client)
    assert Profile(profile_dir).corrections("ofen") == {"oven": 1}
    # A new server (an editor restart) ranks the learnt fix first.
    client, _ = await start(profile_dir, [folder])
    try:
        uri = open_doc(client, folder / "b.md", "An ofen again.\n")
        params = await until(lambda: published_for(client, uri, 1))
        actions = await _actions(client, uri, params.diagnostics[0])
        assert actions[0].title == "Replace with 'oven'" and actions[0].is_preferred
        assert "'oven'" in params.diagnostics[0].message
    finally:
        await stop(client)


async def test_add_project_word_edits_only_the_configured_list(tmp_path, folder):
    (folder / "calami.toml").write_text('word-lists = ["docs/words.txt"]\n')
    (folder / "docs").mkdir()
    client, _ = await start(tmp_path / "profile", [folder], options={"debounceMs": 0})
    try:
        uri = open_doc(client, folder / "a.md", "Teh speling here.\n")
        await until(lambda: published_for(client, uri, 1))
        await client.workspace_execute_command_async(
            types.ExecuteCommandParams("calami.addProjectWord", [uri, "speling"]))
        assert (folder / "docs" / "words.txt").read_text() == "speling\n"
        await until(lambda: (p := published_for(client, uri, 1)) and len(client.diagnostics[uri]) == 1)
        assert client.diagnostics[uri][0].data["word"] == "Teh"
    finally:
        await stop(client)


async def test_user_words_and_ignores(tmp_path, folder):
    profile_dir = tmp_path / "profile"
    client, _ = await start(profile_dir, [folder], options={"debounceMs": 0})
    try:
        a = open_doc(client, folder / "a.md", "teh wrold\n")
        b = open_doc(client, folder / "b.md", "teh wrold\n")
        await until(lambda: published_for(client, a, 1) and published_for(client, b, 1))
        await client.workspace_execute_command_async(types.ExecuteCommandParams("calami.addUserWord", ["wrold"]))
        await client.workspace_execute_command_async(types.ExecuteCommandParams("calami.ignoreWord", [a, "teh"]))
        # "wrold" is gone everywhere; "teh" only in the document where it was ignored.
        await until(lambda: len(client.diagnostics.get(a, [1])) == 0 and len(client.diagnostics.get(b, [])) == 1)
        assert client.diagnostics[b][0].data["word"] == "teh"
    finally:
        await stop(client)
    saved = Profile(profile_dir)
    assert saved.accepts("wrold") and saved.ignored("teh") == 1


BAD_CALLS = [
    ("calami.recordReplacement", ["teh"]),
    ("calami.recordReplacement", ["teh", 3, "", ""]),
    ("calami.recordReplacement", ["teh", "two words", "", ""]),
    ("calami.addUserWord", [{"path": "/etc/passwd"}]),
    ("calami.addUserWord", ["x" * 1000]),
    ("calami.addProjectWord", ["file:///etc/passwd", "word"]),
    ("calami.addProjectWord", [None, "word"]),
    ("calami.ignoreWord", ["file:///nowhere.md", "teh"]),
    ("calami.reloadConfiguration", ["extra"]),
    ("calami.noSuchCommand", []),
]


async def test_malformed_command_arguments_get_an_error_and_write_nothing(tmp_path, folder):
    profile_dir = tmp_path / "profile"
    client, _ = await start(profile_dir, [folder])
    before = sorted(os.listdir(tmp_path))
    try:
        uri = open_doc(client, folder / "a.md", "teh\n")
        await until(lambda: published_for(client, uri, 1))
        for command, args in BAD_CALLS:
            with pytest.raises(JsonRpcException):
                await client.workspace_execute_command_async(types.ExecuteCommandParams(command, args))
        # Still serving.
        hover = await client.text_document_hover_async(types.HoverParams(types.TextDocumentIdentifier(uri),
                                                                         types.Position(0, 1)))
        assert hover is not None
    finally:
        await stop(client)
    assert sorted(os.listdir(tmp_path)) == before
    assert not profile_dir.exists()
    assert os.listdir(folder) == [".git"]

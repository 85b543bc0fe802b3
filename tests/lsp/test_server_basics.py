"""End to end over stdio: initialize, open, diagnostics, edits, actions, hover."""

from __future__ import annotations

import pytest
from lsprotocol import types

from calami.lsp import actions
from calami.lsp.actions import add_to_lexicon_title
from session import capabilities, edit, open_doc, published_for, start, stop, until


async def test_initialize_advertises_our_features(tmp_path, folder):
    client, result = await start(tmp_path / "profile", [folder])
    try:
        caps = result.capabilities
        assert result.server_info.name == "calami"
        assert caps.text_document_sync.change == types.TextDocumentSyncKind.Incremental
        assert caps.code_action_provider
        assert caps.hover_provider
        assert caps.diagnostic_provider is not None
        assert set(caps.execute_command_provider.commands) >= {
            "calami.recordReplacement", "calami.addProjectWord", "calami.addUserWord",
            "calami.ignoreWord", "calami.reloadConfiguration",
        }
        assert caps.position_encoding == types.PositionEncodingKind.Utf16
    finally:
        await stop(client)


async def test_open_publishes_diagnostics_with_codes_ranges_and_messages(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder])
    try:
        uri = open_doc(client, folder / "notes.md", "# Notes\n\nWe went to teh shop.\nThey came form far.\n")
        params = await until(lambda: published_for(client, uri, 1))
        diags = sorted(params.diagnostics, key=lambda d: d.range.start.line)
        assert [d.code for d in diags] == ["calami.nonword", "calami.realword"]
        assert all(d.source == "calami" for d in diags)
        assert diags[0].range == types.Range(types.Position(2, 11), types.Position(2, 14))
        assert diags[1].range == types.Range(types.Position(3, 10), types.Position(3, 14))
        assert "'teh'" in diags[0].message and "'the'" in diags[0].message
        assert "'form'" in diags[1].message and "'from'" in diags[1].message
        assert diags[0].severity == types.DiagnosticSeverity.Information
        assert diags[1].severity == types.DiagnosticSeverity.Hint
    finally:
        await stop(client)


async def test_incremental_edits_update_diagnostics_and_versions(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder], options={"debounceMs": 0})
    try:
        uri = open_doc(client, folder / "a.md", "We went to teh shop.\n")
        await until(lambda: published_for(client, uri, 1))
        edit(client, uri, 2, (0, 11), (0, 14), "the")  # fix the typo
        params = await until(lambda: published_for(client, uri, 2))
        assert list(params.diagnostics) == []
        edit(client, uri, 3, (1, 0), (1, 0), "Please recieve it.\n")  # add a line with a new one
        params = await until(lambda: published_for(client, uri, 3))
        assert [(d.range.start.line, d.range.start.character) for d in params.diagnostics] == [(1, 7)]
    finally:
        await stop(client)


async def test_rapid_typing_never_publishes_an_older_version(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder], options={"debounceMs": 50})
    try:
        uri = open_doc(client, folder / "a.md", "start\n")
        await until(lambda: published_for(client, uri, 1))
        text = "teh wrold "
        for i, ch in enumerate(text):
            edit(client, uri, i + 2, (0, i), (0, i), ch)
        last = len(text) + 1
        params = await until(lambda: published_for(client, uri, last))
        assert {d.code for d in params.diagnostics} == {"calami.nonword"}
        assert len(params.diagnostics) == 2
        versions = [p.version for p in client.published if p.uri == uri]
        assert versions == sorted(versions)
        # Debounced: far fewer checks than keystrokes.
        assert len(versions) < len(text)
    finally:
        await stop(client)


async def test_code_actions_rank_fixes_and_offer_word_commands(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder], options={"maxSuggestions": 2})
    try:
        uri = open_doc(client, folder / "a.md", "We went to teh shop.\n")
        params = await until(lambda: published_for(client, uri, 1))
        diag = params.diagnostics[0]
        result = await client.text_document_code_action_async(
            types.CodeActionParams(
                text_document=types.TextDocumentIdentifier(uri), range=diag.range,
                context=types.CodeActionContext(diagnostics=[diag]),
            )
        )
        titles = [a.title for a in result]
        assert titles == [
            "Replace with 'the'", "Replace with 'ten'",
            actions.SKIP_LINE_TITLE, actions.ACCEPT_IN_FILE_TITLE.format(word="teh"), add_to_lexicon_title("teh"),
            "Add 'teh' to my words", "Ignore 'teh' in this document",
        ]
        assert result[0].is_preferred and not result[1].is_preferred
        assert result[0].edit.changes[uri][0].new_text == "the"
        assert result[0].command.command == "calami.recordReplacement"
        assert list(result[0].command.arguments) == ["teh", "the", "to", "shop"]
    finally:
        await stop(client)


async def test_hover_explains_suggestions_and_context(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder])
    try:
        uri = open_doc(client, folder / "a.md", "They came form far.\n")
        await until(lambda: published_for(client, uri, 1))
        hover = await client.text_document_hover_async(
            types.HoverParams(types.TextDocumentIdentifier(uri), types.Position(0, 11))
        )
        assert hover is not None
        text = hover.contents.value
        assert "`form`" in text and "`from` — 80%" in text
        assert "came … far" in text
        nothing = await client.text_document_hover_async(
            types.HoverParams(types.TextDocumentIdentifier(uri), types.Position(0, 1))
        )
        assert nothing is None
    finally:
        await stop(client)


async def test_close_clears_diagnostics(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder])
    try:
        uri = open_doc(client, folder / "a.md", "teh\n")
        await until(lambda: published_for(client, uri, 1))
        client.text_document_did_close(types.DidCloseTextDocumentParams(types.TextDocumentIdentifier(uri)))
        await until(lambda: list(client.diagnostics.get(uri, [None])) == [])
    finally:
        await stop(client)

"""Bad input: the server answers or logs, keeps serving, and writes nothing."""

from __future__ import annotations

import asyncio
import os

import pytest
from lsprotocol import types
from pygls.exceptions import JsonRpcException

from calami.lsp.documents import MAX_CHECKED_CHARS
from fake_checker import GATE_ENV, STALL_WORD
from session import edit, open_doc, published_for, start, stop, until


# Only to notice a hang: what these tests assert is about order, not speed,
# so a loaded machine can take as long as it needs.
HANG_S = 600.0


async def _still_serving(client, folder, name="alive.md"):
    uri = open_doc(client, folder / name, "teh\n")
    params = await until(lambda: published_for(client, uri, 1), timeout=HANG_S)
    assert len(params.diagnostics) == 1


def _logged(client, needle):
    return any(needle in m.message for m in client.log_messages)


async def test_invalid_change_ranges_are_refused_and_logged(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder], options={"debounceMs": 0})
    try:
        uri = open_doc(client, folder / "a.md", "teh one\nline two\n")
        await until(lambda: published_for(client, uri, 1))
        edit(client, uri, 2, (1, 5), (0, 1), "x")  # end before start
        await until(lambda: _logged(client, "refused a change"))
        # A negative line cannot even be built client-side: send raw JSON.
        client.protocol._send_data({"jsonrpc": "2.0", "method": "textDocument/didChange", "params": {
            "textDocument": {"uri": uri, "version": 3},
            "contentChanges": [{"range": {"start": {"line": -1, "character": 0},
                                          "end": {"line": 0, "character": 0}}, "text": "x"}],
        }})
        edit(client, uri, 4, (0, 0), (0, 3), "the")  # a good one still applies
        params = await until(lambda: published_for(client, uri, 4))
        assert list(params.diagnostics) == []
        await _still_serving(client, folder)
    finally:
        await stop(client)


async def test_unknown_uris(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder])
    try:
        ghost = (folder / "ghost.md").as_uri()
        edit(client, ghost, 2, (0, 0), (0, 0), "x")
        client.text_document_did_close(types.DidCloseTextDocumentParams(types.TextDocumentIdentifier(ghost)))
        await until(lambda: _logged(client, "not open"))
        hover = await client.text_document_hover_async(types.HoverParams(types.TextDocumentIdentifier(ghost),
                                                                         types.Position(0, 0)))
        assert hover is None
        actions = await client.text_document_code_action_async(types.CodeActionParams(
            types.TextDocumentIdentifier(ghost), types.Range(types.Position(0, 0), types.Position(0, 1)),
            types.CodeActionContext([])))
        assert not actions
        with pytest.raises(JsonRpcException):
            await client.text_document_diagnostic_async(types.DocumentDiagnosticParams(types.TextDocumentIdentifier(ghost)))
        await _still_serving(client, folder)
    finally:
        await stop(client)


async def test_a_5mb_single_line_document_is_capped_and_the_server_stays_responsive(tmp_path, folder):
    gate = tmp_path / "checker-busy"
    gate.write_text("")  # the fake checker waits on STALL_WORD while this exists
    client, _ = await start(tmp_path / "profile", [folder], env={GATE_ENV: str(gate)})
    try:
        small = open_doc(client, folder / "small.md", "teh\n")
        await until(lambda: published_for(client, small, 1), timeout=HANG_S)
        text = f"{STALL_WORD} " + "teh quick brown fox " * 262_144  # 5 MiB, one line
        uri = open_doc(client, folder / "big.txt", text, language="plaintext")
        await until(lambda: _logged(client, "checking only the first"), timeout=HANG_S)
        # The big document's check is held at the gate, so it cannot have ended:
        # answers now prove that requests are served while it runs.
        hover = await asyncio.wait_for(client.text_document_hover_async(types.HoverParams(
            types.TextDocumentIdentifier(small), types.Position(0, 1))), HANG_S)
        assert hover is not None and "teh" in hover.contents.value
        actions = await asyncio.wait_for(client.text_document_code_action_async(types.CodeActionParams(
            types.TextDocumentIdentifier(small), types.Range(types.Position(0, 0), types.Position(0, 3)),
            types.CodeActionContext([]))), HANG_S)
        assert actions and actions[0].title == "Replace with 'the'"
        assert published_for(client, uri, 1) is None  # still held: the order above is certain
        gate.unlink()
        params = await until(lambda: published_for(client, uri, 1), timeout=HANG_S)
        assert params.diagnostics  # the first part was checked ...
        assert max(d.range.end.character for d in params.diagnostics) <= MAX_CHECKED_CHARS  # ... and only that
        await _still_serving(client, folder)
    finally:
        if gate.exists():
            gate.unlink()
        await stop(client)


async def test_binary_content_is_skipped_with_a_warning(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder])
    try:
        uri = open_doc(client, folder / "blob.txt", "teh\x00\x01\x02teh", language="plaintext")
        params = await until(lambda: published_for(client, uri, 1))
        assert list(params.diagnostics) == []
        assert _logged(client, "NUL bytes")
        await _still_serving(client, folder)
    finally:
        await stop(client)
    assert os.listdir(folder) == [".git"]

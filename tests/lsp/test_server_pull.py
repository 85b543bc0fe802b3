"""Pull diagnostics (LSP 3.17 textDocument/diagnostic): resultId, unchanged reports, no debounce wait."""

from __future__ import annotations

import asyncio

from lsprotocol import types

from session import capabilities, edit, open_doc, start, stop


async def _pull(client, uri, previous=None):
    return await client.text_document_diagnostic_async(
        types.DocumentDiagnosticParams(types.TextDocumentIdentifier(uri), previous_result_id=previous))


async def test_result_id_changes_only_when_the_diagnostics_do(folder, tmp_path):
    client, _ = await start(tmp_path / "profile", [folder], caps=capabilities(pull=True), options={"debounceMs": 0})
    try:
        uri = open_doc(client, folder / "a.md", "teh end\n\nAll good here.\n")
        first = await _pull(client, uri)
        assert first.kind == "full" and [d.data["word"] for d in first.items] == ["teh"]

        # An edit that changes no diagnostic: the same resultId, and an unchanged report.
        edit(client, uri, 2, (2, 11), (2, 11), "x")  # "herxe" is no known slip
        same = await _pull(client, uri, first.result_id)
        assert same.kind == "unchanged" and same.result_id == first.result_id

        # A new finding: a full report with a new id.
        edit(client, uri, 3, (2, 0), (2, 0), "wrold ")
        changed = await _pull(client, uri, first.result_id)
        assert changed.kind == "full" and changed.result_id != first.result_id
        assert [d.data["word"] for d in changed.items] == ["teh", "wrold"]
        assert changed.items[1].range == types.Range(types.Position(2, 0), types.Position(2, 5))

        # A line inserted above moves every range: full again, ranges moved.
        edit(client, uri, 4, (0, 0), (0, 0), "\n")
        moved = await _pull(client, uri, changed.result_id)
        assert moved.kind == "full" and moved.result_id not in (first.result_id, changed.result_id)
        assert [d.range.start.line for d in moved.items] == [1, 3]

        # An id the server never gave (another run's, a stale one) gets the full list.
        again = await _pull(client, uri, "not-an-id")
        assert again.kind == "full" and again.result_id == moved.result_id and len(again.items) == 2
    finally:
        await stop(client)


async def test_pull_does_not_wait_for_the_debounce(folder, tmp_path):
    # debounceMs is for pushing while someone types; a pull asks for the result now.
    client, _ = await start(tmp_path / "profile", [folder], caps=capabilities(pull=True), options={"debounceMs": 10_000})
    try:
        uri = open_doc(client, folder / "a.md", "All good.\n")
        assert list((await _pull(client, uri)).items) == []
        edit(client, uri, 2, (0, 0), (0, 0), "teh ")
        report = await asyncio.wait_for(_pull(client, uri), timeout=8)  # the debounce alone would take 10 s
        assert [d.data["word"] for d in report.items] == ["teh"]
    finally:
        await stop(client)


async def test_pull_for_a_closed_document_is_refused_and_the_server_goes_on(folder, tmp_path):
    client, _ = await start(tmp_path / "profile", [folder], caps=capabilities(pull=True))
    try:
        uri = open_doc(client, folder / "a.md", "teh\n")
        assert len((await _pull(client, uri)).items) == 1
        client.text_document_did_close(types.DidCloseTextDocumentParams(types.TextDocumentIdentifier(uri)))
        try:
            await _pull(client, uri)
        except Exception as exc:  # JsonRpcInvalidParams on the client side
            assert "not open" in str(exc)
        else:
            raise AssertionError("a pull for a closed document was answered")
        uri2 = open_doc(client, folder / "b.md", "wrold\n")
        assert len((await _pull(client, uri2)).items) == 1
    finally:
        await stop(client)

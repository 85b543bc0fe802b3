"""In-file directives over the protocol: honoured in diagnostics, typos shown, quick fixes that write them."""

from __future__ import annotations

from lsprotocol import types

from calami.lsp.actions import ACCEPT_IN_FILE_TITLE, SKIP_LINE_TITLE
from calami.lsp.diagnostics import CODES
from calami.findings import DIRECTIVE
from session import open_doc, published_for, start, stop, until


def _actions(client, uri, diag):
    return client.text_document_code_action_async(
        types.CodeActionParams(types.TextDocumentIdentifier(uri), diag.range, types.CodeActionContext([diag]))
    )


def _apply(client, uri, action, version):
    edit = action.edit.changes[uri][0]
    client.text_document_did_change(types.DidChangeTextDocumentParams(
        types.VersionedTextDocumentIdentifier(version=version, uri=uri),
        [types.TextDocumentContentChangePartial(range=edit.range, text=edit.new_text)],
    ))


async def test_directives_in_the_server(tmp_path, folder):
    client, _ = await start(tmp_path / "profile", [folder], options={"debounceMs": 0})
    try:
        text = ("<!-- calami(hush-next) -->\nA wrold here.\n<!-- calami(known recieve) -->\nWe recieve it.\n"
                "<!-- calami(hush-nxet) -->\nCook it in the ofen.\n")
        uri = open_doc(client, folder / "a.md", text)
        params = await until(lambda: published_for(client, uri, 1))
        codes = sorted(d.code for d in params.diagnostics)
        assert codes == sorted([CODES[DIRECTIVE], "calami.nonword"])
        directive = next(d for d in params.diagnostics if d.code == CODES[DIRECTIVE])
        assert directive.range.start.line == 4 and directive.severity == types.DiagnosticSeverity.Warning
        word = next(d for d in params.diagnostics if d.code == "calami.nonword")
        assert word.range.start.line == 5
        titles = [a.title for a in await _actions(client, uri, word)]
        assert SKIP_LINE_TITLE in titles and ACCEPT_IN_FILE_TITLE.format(word="ofen") in titles
        skip = next(a for a in await _actions(client, uri, word) if a.title == SKIP_LINE_TITLE)
        _apply(client, uri, skip, 2)
        params = await until(lambda: published_for(client, uri, 2))
        assert [d.code for d in params.diagnostics] == [CODES[DIRECTIVE]]  # only the misspelt directive is left
    finally:
        await stop(client)

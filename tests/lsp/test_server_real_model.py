"""`calami serve` itself: start-up failures, and the shipped model end to end."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest
from lsprotocol import types

from calami.model import default_model_path
from session import REAL_SERVER, capabilities, open_doc, published_for, start, stop, until

HAVE_MODEL = default_model_path().exists()

@pytest.fixture(scope="module")
def tiny_model(tmp_path_factory):
    """A tiny model built with the real pipeline (tests/tiny_model.py)."""
    from tiny_model import build_tiny_model

    path = tmp_path_factory.mktemp("model") / "tiny.msgpack"
    build_tiny_model(path)
    return path


async def test_calami_serve_with_the_real_checker(tmp_path, tiny_model):
    root = tmp_path / "proj"
    root.mkdir()
    (root / ".git").mkdir()
    client, _ = await start(tmp_path / "profile", [root], command=[*REAL_SERVER, "--model", str(tiny_model)],
                            options={"debounceMs": 0})
    try:
        uri = open_doc(client, root / "a.md", "# Notes\n\nWe loaded teh file form disk.\n")
        params = await until(lambda: published_for(client, uri, 1), timeout=60)
        found = {d.data["word"]: d for d in params.diagnostics}
        assert found["teh"].code == "calami.nonword" and found["teh"].data["suggestions"][0] == "the"
        assert found["form"].code == "calami.realword" and "'from'" in found["form"].message
        assert found["teh"].range == types.Range(types.Position(2, 10), types.Position(2, 13))
        hover = await client.text_document_hover_async(
            types.HoverParams(types.TextDocumentIdentifier(uri), types.Position(2, 20)))
        assert "file … disk" in hover.contents.value
        await client.workspace_execute_command_async(types.ExecuteCommandParams("calami.addUserWord", ["teh"]))
        await until(lambda: [d.data["word"] for d in client.diagnostics[uri]] == ["form"])
    finally:
        await stop(client)


@pytest.mark.parametrize("content", [None, b"", b"\x93NUMPY not a model", b"\xc1" * 64])
def test_model_load_failure_is_one_line_naming_the_fix(tmp_path, content):
    model = tmp_path / "broken.msgpack"
    if content is not None:
        model.write_bytes(content)
    out = subprocess.run([*REAL_SERVER, "--model", str(model)], input="", capture_output=True, text=True,
                         timeout=60, env=dict(os.environ, CALAMI_PROFILE_DIR=str(tmp_path / "p")))
    assert out.returncode == 2
    assert out.stdout == ""  # stdout belongs to the protocol
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("calami: "), out.stderr
    assert "--model" in lines[0] or "CALAMI_MODEL" in lines[0] or "reinstall" in lines[0]


def test_tcp_address_parsing():
    from calami.commands.serve import parse_address
    from calami.errors import CalamiError

    assert parse_address("2087") == ("127.0.0.1", 2087)
    assert parse_address("localhost:2087") == ("localhost", 2087)
    assert parse_address("[::1]:2087") == ("::1", 2087)
    for bad in ("x", "1:0", "host:99999"):
        with pytest.raises(CalamiError):
            parse_address(bad)


@pytest.mark.skipif(not HAVE_MODEL, reason="shipped model not built yet")
async def test_shipped_model_end_to_end(tmp_path):
    root = tmp_path / "proj"
    root.mkdir()
    (root / ".git").mkdir()
    client, result = await start(tmp_path / "profile", [root], command=REAL_SERVER, options={"debounceMs": 0})
    try:
        assert result.server_info.name == "calami"
        uri = open_doc(client, root / "a.md", "We will recieve the parcel tomorrow.\n")
        params = await until(lambda: published_for(client, uri, 1), timeout=60)
        words = {d.data["word"]: d for d in params.diagnostics}
        assert "recieve" in words
        diag = words["recieve"]
        assert diag.code == "calami.nonword" and diag.data["suggestions"][0] == "receive"
        actions = await client.text_document_code_action_async(
            types.CodeActionParams(types.TextDocumentIdentifier(uri), diag.range, types.CodeActionContext([diag])))
        assert actions[0].title == "Replace with 'receive'" and actions[0].is_preferred
    finally:
        await stop(client)


@pytest.mark.skipif(not HAVE_MODEL, reason="shipped model not built yet")
async def test_a_word_the_workspace_code_uses_is_not_flagged_in_its_docs(tmp_path):
    """The workspace vocabulary end to end: learnt from the folder's code, updated on a watched change."""
    uses, plain = tmp_path / "uses", tmp_path / "plain"
    for root in (uses, plain):
        (root / "src").mkdir(parents=True)
        (root / ".git").mkdir()
    (uses / "src" / "tls.py").write_text("import certifi\n\nBUNDLE = certifi.where()\n")
    doc_text = "Upgrade certifi before you recieve the next release.\n"
    client, _ = await start(tmp_path / "profile", [uses, plain], command=REAL_SERVER, options={"debounceMs": 0},
                            caps=capabilities(watch=True))
    try:
        uri_uses = open_doc(client, uses / "README.md", doc_text)
        uri_plain = open_doc(client, plain / "README.md", doc_text)

        def words(uri):
            params = published_for(client, uri, 1)
            return None if params is None else {d.data["word"] for d in params.diagnostics}

        await until(lambda: words(uri_plain) is not None and words(uri_uses) is not None and
                    "certifi" not in words(uri_uses), timeout=60)
        assert words(uri_uses) == {"recieve"}  # a typo stays flagged beside the project's own word
        assert words(uri_plain) == {"certifi", "recieve"}
        # The hover says why the word was accepted (and says nothing where it was not).
        said = await client.text_document_hover_async(types.HoverParams(
            types.TextDocumentIdentifier(uri_uses), types.Position(line=0, character=10)))
        assert said is not None and "workspace uses it" in said.contents.value and "2 uses" in said.contents.value
        plain_hover = await client.text_document_hover_async(types.HoverParams(
            types.TextDocumentIdentifier(uri_plain), types.Position(line=0, character=10)))
        assert plain_hover is None or "workspace" not in plain_hover.contents.value

        # The other folder starts using the word in its code: a watched change teaches it.
        code = plain / "src" / "tls.py"
        code.write_text("import certifi\n\nprint(certifi.where())\n")
        before = len(client.published)
        client.workspace_did_change_watched_files(types.DidChangeWatchedFilesParams(
            changes=[types.FileEvent(uri=code.as_uri(), type=types.FileChangeType.Created)]))
        await until(lambda: any(p.uri == uri_plain and "certifi" not in {d.data["word"] for d in p.diagnostics}
                                for p in client.published[before:]), timeout=60)
    finally:
        await stop(client)

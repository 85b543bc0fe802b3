"""Start a calami server under a real JSON-RPC client (pytest-lsp) and talk to it."""

from __future__ import annotations

import asyncio
import os
import sys
from pathlib import Path
from typing import Any, Callable, Union

from lsprotocol import types
from pygls.protocol import default_converter
from pytest_lsp import ClientServerConfig, LanguageClient
from pytest_lsp.client import DEFAULT_CLIENT_FEATURES

HERE = Path(__file__).parent
FAKE_SERVER = [sys.executable, str(HERE / "fake_server.py")]
REAL_SERVER = [sys.executable, "-m", "calami", "serve"]


def make_client() -> LanguageClient:
    """pytest-lsp's client, plus a record of every publishDiagnostics with its version."""
    client = LanguageClient(converter_factory=default_converter)
    converter = client.protocol._converter

    # lsprotocol's client-side hook reads any object with a "command" key as a
    # Command, but a CodeAction may carry a command too.  Per the LSP 3.17
    # spec a Command's "command" is a string, a CodeAction's is an object.
    def code_action_or_command(obj: Any, _: type) -> Any:
        if isinstance(obj.get("command"), str):
            return converter.structure(obj, types.Command)
        return converter.structure(obj, types.CodeAction)

    converter.register_structure_hook(Union[types.Command, types.CodeAction], code_action_or_command)
    client.published = []  # type: ignore[attr-defined]
    client.registrations = []  # type: ignore[attr-defined]
    client.applied_edits = []  # type: ignore[attr-defined]
    for method, func in DEFAULT_CLIENT_FEATURES.items():
        if method != types.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS:
            client.feature(method)(func)

    @client.feature(types.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
    def publish(ls: LanguageClient, params: types.PublishDiagnosticsParams) -> None:
        ls.diagnostics[params.uri] = params.diagnostics
        ls.published.append(params)  # type: ignore[attr-defined]

    @client.feature(types.CLIENT_REGISTER_CAPABILITY)
    def register(ls: LanguageClient, params: types.RegistrationParams) -> None:
        ls.registrations.extend(params.registrations)  # type: ignore[attr-defined]

    return client


def capabilities(
    *, encodings: list[str] | None = None, pull: bool = False, configuration: bool = False, watch: bool = False
) -> types.ClientCapabilities:
    return types.ClientCapabilities(
        general=types.GeneralClientCapabilities(position_encodings=encodings) if encodings else None,
        text_document=types.TextDocumentClientCapabilities(
            diagnostic=types.DiagnosticClientCapabilities() if pull else None,
            publish_diagnostics=types.PublishDiagnosticsClientCapabilities(version_support=True),
        ),
        workspace=types.WorkspaceClientCapabilities(
            configuration=configuration,
            did_change_watched_files=types.DidChangeWatchedFilesClientCapabilities(dynamic_registration=True) if watch else None,
            diagnostics=types.DiagnosticWorkspaceClientCapabilities(refresh_support=True) if pull else None,
        ),
    )


async def start(
    profile_dir: Path,
    folders: list[Path],
    *,
    command: list[str] | None = None,
    caps: types.ClientCapabilities | None = None,
    options: Any = None,
    configuration: dict[str, Any] | None = None,
    env: dict[str, str] | None = None,
) -> tuple[LanguageClient, types.InitializeResult]:
    server_env = dict(os.environ)
    server_env["CALAMI_PROFILE_DIR"] = str(profile_dir)
    server_env.update(env or {})
    config = ClientServerConfig(server_command=command or FAKE_SERVER, client_factory=make_client, server_env=server_env)
    client = await config.start()
    if configuration is not None:
        client.set_configuration(configuration)
    result = await client.initialize_session(
        types.InitializeParams(
            capabilities=caps or capabilities(),
            workspace_folders=[types.WorkspaceFolder(uri=f.as_uri(), name=f.name) for f in folders],
            initialization_options=options,
        )
    )
    return client, result


async def stop(client: LanguageClient) -> None:
    await client.shutdown_session()
    await client.stop()


async def until(predicate: Callable[[], Any], timeout: float = 10.0) -> Any:
    """Wait until ``predicate()`` is truthy (the server answers asynchronously)."""
    deadline = asyncio.get_running_loop().time() + timeout
    while True:
        value = predicate()
        if value:
            return value
        if asyncio.get_running_loop().time() > deadline:
            raise AssertionError("timed out waiting for the server")
        await asyncio.sleep(0.01)


def published_for(client: LanguageClient, uri: str, version: int) -> types.PublishDiagnosticsParams | None:
    for params in reversed(client.published):  # type: ignore[attr-defined]
        if params.uri == uri and params.version == version:
            return params
    return None


def open_doc(client: LanguageClient, path: Path, text: str, language: str = "markdown", version: int = 1) -> str:
    uri = path.as_uri()
    client.text_document_did_open(
        types.DidOpenTextDocumentParams(types.TextDocumentItem(uri=uri, language_id=language, version=version, text=text))
    )
    return uri


def edit(client: LanguageClient, uri: str, version: int, start: tuple[int, int], end: tuple[int, int], text: str) -> None:
    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=version),
            content_changes=[
                types.TextDocumentContentChangePartial(
                    range=types.Range(types.Position(*start), types.Position(*end)), text=text
                )
            ],
        )
    )

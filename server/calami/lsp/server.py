"""The language server: wires LSP messages to documents, checks and commands.

The checker is injected (``make_checker``) so tests can run the whole
protocol against a small fake and the shipped model alike.
"""

from __future__ import annotations

import logging
from pathlib import Path
from typing import Any

from lsprotocol import types
from pygls.lsp.server import LanguageServer
from pygls.protocol import LanguageServerProtocol
from pygls.protocol.language_server import lsp_method

from calami import __version__
from calami.lsp.actions import ArgumentError
from calami.lsp.diagnostics import Scheduler
from calami.lsp.documents import Document, uri_to_path
from calami.lsp.positions import UTF8
from calami.lsp.settings import Settings, parse
from calami.lsp.workspace import CheckerFactory, Projects
from calami.vocab.profile import Profile
from calami.vocab.project import LEXICON_NAMES

log = logging.getLogger("calami.lsp")

WATCHED = ("calami.toml", "pyproject.toml", *LEXICON_NAMES)


class ReadyJSON(dict):
    """A handler's result that is LSP JSON already: sent as is, not through cattrs.

    Unstructuring thousands of diagnostics per pull request cost more than
    computing them (same reason as ``_publish``).
    """


class CalamiProtocol(LanguageServerProtocol):
    """Keeps documents out of pygls' workspace: ours validates every change."""

    def _send_response(self, msg_id: Any, result: Any = None, error: Any = None) -> None:
        if error is None and isinstance(result, ReadyJSON):
            self._send_data({"jsonrpc": "2.0", "id": msg_id, "result": result})
            return
        super()._send_response(msg_id, result, error)

    @lsp_method(types.INITIALIZE)
    def lsp_initialize(self, params: types.InitializeParams):
        general = params.capabilities.general
        if general is not None and general.position_encodings and UTF8 in general.position_encodings:
            # Offered UTF-8: prefer it (cheapest for us), whatever the client's order.
            general.position_encodings = [types.PositionEncodingKind.Utf8]
        return (yield from super().lsp_initialize(params))

    @lsp_method(types.TEXT_DOCUMENT_DID_OPEN)
    def lsp_text_document__did_open(self, params: types.DidOpenTextDocumentParams):
        if (handler := self.fm.features.get(types.TEXT_DOCUMENT_DID_OPEN)) is not None:
            yield handler, (params,), None

    @lsp_method(types.TEXT_DOCUMENT_DID_CHANGE)
    def lsp_text_document__did_change(self, params: types.DidChangeTextDocumentParams):
        if (handler := self.fm.features.get(types.TEXT_DOCUMENT_DID_CHANGE)) is not None:
            yield handler, (params,), None

    @lsp_method(types.TEXT_DOCUMENT_DID_CLOSE)
    def lsp_text_document__did_close(self, params: types.DidCloseTextDocumentParams):
        if (handler := self.fm.features.get(types.TEXT_DOCUMENT_DID_CLOSE)) is not None:
            yield handler, (params,), None


class CalamiServer(LanguageServer):
    def __init__(self, make_checker: CheckerFactory, profile: Profile, warm_up: Any = None) -> None:
        super().__init__("calami", __version__, protocol_cls=CalamiProtocol, max_workers=2)
        # Called once the client has our initialize answer (starts loading the model).
        self.warm_up = warm_up
        self.profile = profile
        self.docs: dict[str, Document] = {}
        self.settings = Settings()
        self.folder_settings: dict[Path, Settings] = {}
        self.encoding = "utf-16"
        self.pull_mode = False
        self.projects = Projects(make_checker, [profile])
        self.projects.report = self.show
        self.scheduler = Scheduler(
            self._checker_for, self.settings_for, self._publish, lambda doc: self.projects.project_for(doc.path),
            ready=lambda doc: self.projects.scans.ready(doc.path),
        )

    # -- helpers used by handlers -------------------------------------------
    def settings_for(self, doc: Document) -> Settings:
        folder = self.projects.folder_of(doc.path)
        base = self.folder_settings.get(folder, self.settings) if folder else self.settings
        return self.projects.effective_settings(doc.path, base)

    def _checker_for(self, doc: Document) -> Any:
        folder = self.projects.folder_of(doc.path)
        base = self.folder_settings.get(folder, self.settings) if folder else self.settings
        return self.projects.checker_for(doc.path, base)

    def _publish(self, doc: Document, diagnostics: list[dict[str, Any]]) -> None:
        if self.pull_mode or self.docs.get(doc.uri) is not doc:
            return
        # Already LSP JSON: hand it to the transport as is (pygls' own notify
        # would unstructure every diagnostic again through cattrs).
        self.protocol._send_data({
            "jsonrpc": "2.0",
            "method": types.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS,
            "params": {"uri": doc.uri, "version": doc.version, "diagnostics": diagnostics},
        })

    def document(self, uri: Any) -> Document:
        if not isinstance(uri, str) or uri not in self.docs:
            raise ArgumentError(f"unknown document {uri!r} (not open in this server)")
        return self.docs[uri]

    def show(self, message: str, kind: types.MessageType = types.MessageType.Warning) -> None:
        """Tell the user (window/showMessage) and keep a trace in the log."""
        log.warning("calami: %s", message)
        self.window_show_message(types.ShowMessageParams(type=kind, message=f"calami: {message}"))

    def recheck_all(self) -> None:
        """Words or settings changed: every open document needs fresh findings."""
        self.scheduler.stale()
        for doc in self.docs.values():
            self.scheduler.schedule(doc, delay_ms=0)
        if self.pull_mode and _refresh_supported(self.client_capabilities):
            self.workspace_diagnostic_refresh(None)

    def learn_vocabulary(self, loop: Any) -> None:
        """Start learning each folder's vocabulary; re-check when a scan is done."""
        def done(folder: Path) -> None:
            try:
                loop.call_soon_threadsafe(self._vocabulary_changed)
            except RuntimeError:  # the server stopped while the scan ran: nothing left to re-check
                pass

        self.projects.scans.on_done = done
        self.projects.scans.start(self.projects.folders)

    def _vocabulary_changed(self) -> None:
        log.info("calami: the workspace vocabulary changed; checking open documents again")
        self.projects.invalidate()
        self.recheck_all()

    def relearn(self, paths: list[Path | None]) -> bool:
        """Learn saved or changed files again; re-check if the vocabulary changed."""
        changed = False
        for path in paths:
            if path is not None:
                changed |= self.projects.scans.learn(path)
        if changed:
            self._vocabulary_changed()
        return changed

    def apply_settings(self, raw: Any, folder: Path | None = None) -> None:
        base = self.settings if folder is not None else Settings()
        settings, problems = parse(raw, base)
        for problem in problems:
            self.show(problem)
        if folder is None:
            self.settings = settings
        else:
            self.folder_settings[folder] = settings
        self.projects.invalidate()

    async def pull_configuration(self) -> None:
        """Ask the client for the "calami" section, globally and per folder."""
        if not _config_supported(self.client_capabilities):
            return
        folders = list(self.projects.folders)
        items = [types.ConfigurationItem(section="calami")]
        items += [types.ConfigurationItem(section="calami", scope_uri=f.as_uri()) for f in folders]
        try:
            results = await self.workspace_configuration_async(types.ConfigurationParams(items=items))
        except Exception as exc:
            log.warning("calami: workspace/configuration failed: %s", exc)
            return
        if not results:
            return
        self.apply_settings(results[0])
        for folder, raw in zip(folders, results[1:]):
            if raw is not None and raw != results[0]:
                self.apply_settings(raw, folder)


def _config_supported(caps: types.ClientCapabilities) -> bool:
    return bool(caps.workspace and caps.workspace.configuration)


def _refresh_supported(caps: types.ClientCapabilities) -> bool:
    return bool(caps.workspace and caps.workspace.diagnostics and caps.workspace.diagnostics.refresh_support)


def _folders(params: types.InitializeParams) -> list[Path]:
    uris = [f.uri for f in params.workspace_folders or []]
    if not uris and params.root_uri:
        uris = [params.root_uri]
    return [p for p in (uri_to_path(u) for u in uris) if p is not None]


def build_server(make_checker: CheckerFactory, profile: Profile | None = None, warm_up: Any = None) -> CalamiServer:
    """A ready-to-start server; ``make_checker(adaptations, settings)`` builds checkers.

    ``warm_up()``, if given, runs when the client confirms initialization
    (``initialized``): slow preparation such as loading the model starts
    only after the editor has its ``initialize`` answer.
    """
    from calami.lsp import handlers

    server = CalamiServer(make_checker, profile if profile is not None else Profile(), warm_up)
    handlers.lifecycle(server)
    handlers.documents(server)
    handlers.features(server)
    handlers.commands(server)
    return server


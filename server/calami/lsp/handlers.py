"""LSP message handlers, registered on a CalamiServer instance.

Handlers stay small: they validate, update state, and hand the real work to
documents / diagnostics / actions / hover.  No handler lets an exception
escape for a notification: the server logs it and keeps serving.
"""

from __future__ import annotations

import asyncio
import inspect
import logging
import time
from pathlib import Path
from typing import Any

from lsprotocol import types
from pygls.exceptions import JsonRpcInvalidParams

from calami.errors import CalamiError
from calami.lsp import actions, logs
from calami.lsp.actions import ArgumentError, check_arguments, context_argument, word_argument
from calami.lsp.documents import ChangeError, Document, document_kind, uri_to_path
from calami.lsp.hover import hover, workspace_hover
from calami.lsp.positions import choose_encoding
from calami.lsp.server import WATCHED, CalamiServer, ReadyJSON, _folders, _config_supported

log = logging.getLogger("calami.lsp")

# Files whose words feed the workspace vocabulary when they change on disk.
VOCABULARY_GLOB = "**/*.{md,markdown,rst,txt,tex,html,py,pyi,js,jsx,ts,tsx,rs,go,c,h,cc,cpp,hpp,java,sh,yaml,yml,toml,json,cfg}"

# Errors a command turns into an InvalidParams response (the server goes on).
REFUSED = (ArgumentError, PermissionError, CalamiError, ValueError, OSError)


def lifecycle(server: CalamiServer) -> None:
    @server.feature(types.INITIALIZE)
    def initialize(ls: CalamiServer, params: types.InitializeParams) -> None:
        logs.to_client(ls)
        caps = params.capabilities
        offered = caps.general.position_encodings if caps.general else None
        ls.encoding = choose_encoding(list(offered) if offered else None)
        ls.pull_mode = bool(caps.text_document and caps.text_document.diagnostic)
        ls.projects.set_folders(_folders(params))
        if params.initialization_options is not None:
            ls.apply_settings(params.initialization_options)
        for warning in ls.profile.warnings:
            ls.show(warning)
        ls.profile.on_warning = ls.show  # later problems (disk full, ...) reach the user too
        log.info("calami: initialized (positions %s, %s diagnostics)", ls.encoding, "pull" if ls.pull_mode else "push")

    @server.feature(types.INITIALIZED)
    async def initialized(ls: CalamiServer, params: types.InitializedParams) -> None:
        if ls.warm_up is not None:
            ls.warm_up()
        ls.learn_vocabulary(asyncio.get_running_loop())
        caps = ls.client_capabilities
        if caps.workspace and caps.workspace.did_change_watched_files and caps.workspace.did_change_watched_files.dynamic_registration:
            watchers = [types.FileSystemWatcher(glob_pattern=f"**/{name}") for name in WATCHED]
            watchers.append(types.FileSystemWatcher(glob_pattern=VOCABULARY_GLOB))
            settings_list = ls.settings.word_list
            if settings_list not in WATCHED:
                watchers.append(types.FileSystemWatcher(glob_pattern=f"**/{settings_list}"))
            try:
                await ls.client_register_capability_async(types.RegistrationParams(registrations=[
                    types.Registration(
                        id="calami-watch", method=types.WORKSPACE_DID_CHANGE_WATCHED_FILES,
                        register_options=types.DidChangeWatchedFilesRegistrationOptions(watchers=watchers),
                    )
                ]))
            except Exception as exc:
                log.warning("calami: could not register file watchers: %s", exc)
        if _config_supported(caps):
            await ls.pull_configuration()
            ls.recheck_all()

    @server.feature(types.WORKSPACE_DID_CHANGE_CONFIGURATION)
    async def did_change_configuration(ls: CalamiServer, params: types.DidChangeConfigurationParams) -> None:
        if _config_supported(ls.client_capabilities):
            await ls.pull_configuration()
        elif isinstance(params.settings, dict):
            ls.apply_settings(params.settings.get("calami", params.settings))
        ls.recheck_all()

    @server.feature(types.WORKSPACE_DID_CHANGE_WATCHED_FILES)
    def did_change_watched_files(ls: CalamiServer, params: types.DidChangeWatchedFilesParams) -> None:
        every = [uri_to_path(c.uri) for c in params.changes]
        settings_names = set(WATCHED) | {ls.settings.word_list}
        changed = [p for p in every if p is None or p.name in settings_names or p.name == ls.profile.path.name]
        ls.relearn([p for p in every if p is not None and p not in changed])
        if not changed:
            return
        for path in changed:
            ls.projects.reload(path)
        if any(p is not None and p.name == ls.profile.path.name and p.parent == ls.profile.directory for p in changed):
            ls.profile.reload()
        log.info("calami: reloaded project settings after %d file change(s)", len(changed))
        ls.recheck_all()

    @server.feature(types.WORKSPACE_DID_CHANGE_WORKSPACE_FOLDERS)
    def did_change_folders(ls: CalamiServer, params: types.DidChangeWorkspaceFoldersParams) -> None:
        folders = {f for f in ls.projects.folders}
        for removed in params.event.removed:
            path = uri_to_path(removed.uri)
            folders.discard(path)
            ls.folder_settings.pop(path, None)
        for added in params.event.added:
            path = uri_to_path(added.uri)
            if path is not None:
                folders.add(path)
        ls.projects.set_folders(sorted(folders))
        ls.projects.scans.start(ls.projects.folders)
        ls.recheck_all()


def documents(server: CalamiServer) -> None:
    @server.feature(types.TEXT_DOCUMENT_DID_OPEN)
    def did_open(ls: CalamiServer, params: types.DidOpenTextDocumentParams) -> None:
        item = params.text_document
        doc = Document(item.uri, item.language_id, item.version, item.text, ls.encoding)
        doc.kind = document_kind(item.language_id, item.uri, item.text)
        ls.docs[item.uri] = doc
        ls.scheduler.schedule(doc, delay_ms=0)

    @server.feature(types.TEXT_DOCUMENT_DID_CHANGE)
    def did_change(ls: CalamiServer, params: types.DidChangeTextDocumentParams) -> None:
        uri = params.text_document.uri
        doc = ls.docs.get(uri)
        if doc is None:
            log.warning("calami: change for %s, which is not open; ignored", uri)
            return
        try:
            doc.apply(list(params.content_changes), params.text_document.version)
        except ChangeError as exc:
            log.warning("calami: refused a change to %s (%s); keeping version %d", uri, exc, doc.version)
            return
        ls.scheduler.schedule(doc)

    @server.feature(types.TEXT_DOCUMENT_DID_SAVE)
    def did_save(ls: CalamiServer, params: types.DidSaveTextDocumentParams) -> None:
        ls.relearn([uri_to_path(params.text_document.uri)])

    @server.feature(types.TEXT_DOCUMENT_DID_CLOSE)
    def did_close(ls: CalamiServer, params: types.DidCloseTextDocumentParams) -> None:
        uri = params.text_document.uri
        if ls.docs.pop(uri, None) is None:
            log.warning("calami: close for %s, which is not open; ignored", uri)
            return
        ls.scheduler.forget(uri)
        if not ls.pull_mode:
            ls.text_document_publish_diagnostics(types.PublishDiagnosticsParams(uri=uri, diagnostics=[]))


def features(server: CalamiServer) -> None:
    @server.feature(
        types.TEXT_DOCUMENT_DIAGNOSTIC,
        types.DiagnosticOptions(identifier="calami", inter_file_dependencies=False, workspace_diagnostics=False),
    )
    async def pull_diagnostics(ls: CalamiServer, params: types.DocumentDiagnosticParams) -> ReadyJSON:
        doc = ls.docs.get(params.text_document.uri)
        if doc is None:
            raise JsonRpcInvalidParams(f"unknown document {params.text_document.uri!r} (not open in this server)")
        items = await ls.scheduler.current(doc)
        result_id = ls.scheduler.result_id(doc, items)
        log.debug("calami: %s v%d: pull answered, %d diagnostics (%.1f ms since the change arrived)",
                  doc.uri, doc.version, len(items), (time.perf_counter() - doc.changed_at) * 1000)
        if params.previous_result_id == result_id:
            return ReadyJSON({"kind": "unchanged", "resultId": result_id})
        # Already LSP JSON (types.RelatedFullDocumentDiagnosticReport's wire form): no cattrs pass.
        return ReadyJSON({"kind": "full", "resultId": result_id, "items": items})

    @server.feature(
        types.TEXT_DOCUMENT_CODE_ACTION,
        types.CodeActionOptions(code_action_kinds=[types.CodeActionKind.QuickFix]),
    )
    def code_action(ls: CalamiServer, params: types.CodeActionParams) -> list[types.CodeAction]:
        doc = ls.docs.get(params.text_document.uri)
        if doc is None:
            return []
        found = ls.scheduler.findings.get(doc.uri)
        if found is None or found[0] != doc.version:
            return []  # findings are being recomputed; the editor asks again
        try:
            ls.projects.word_list_for(doc.path, ls.settings)
            can_add = True
        except PermissionError:
            can_add = False
        return actions.code_actions(doc, found[1], params.range, ls.settings_for(doc), can_add)

    @server.feature(types.TEXT_DOCUMENT_HOVER)
    def on_hover(ls: CalamiServer, params: types.HoverParams) -> types.Hover | None:
        doc = ls.docs.get(params.text_document.uri)
        found = ls.scheduler.findings.get(doc.uri) if doc else None
        if doc is None or found is None or found[0] != doc.version:
            return None
        answer = hover(doc, found[1], params.position, ls.settings_for(doc).max_suggestions)
        return answer if answer is not None else workspace_hover(doc, ls._checker_for(doc), params.position)


def commands(server: CalamiServer) -> None:
    def guarded(name: str):
        """Register a command whose bad arguments become an InvalidParams error."""

        def refuse(exc: Exception) -> JsonRpcInvalidParams:
            log.warning("calami: %s refused: %s", name, exc)
            return JsonRpcInvalidParams(f"{name}: {exc}")

        def wrap(fn):
            if inspect.iscoroutinefunction(fn):

                @server.command(name)
                async def run_async(ls: CalamiServer, *args: Any) -> Any:
                    try:
                        return await fn(ls, list(args))
                    except REFUSED as exc:
                        raise refuse(exc) from None

            else:

                @server.command(name)
                def run(ls: CalamiServer, *args: Any) -> Any:
                    try:
                        return fn(ls, list(args))
                    except REFUSED as exc:
                        raise refuse(exc) from None

            return fn

        return wrap

    @guarded(actions.RECORD_REPLACEMENT)
    def record_replacement(ls: CalamiServer, args: list[Any]) -> None:
        check_arguments(args, 4, actions.RECORD_REPLACEMENT)
        typed = word_argument(args[0], "typed")
        chosen = word_argument(args[1], "chosen")
        ls.profile.record_replacement(typed, chosen, context_argument(args[2], "left"), context_argument(args[3], "right"))
        _after_profile_change(ls)

    @guarded(actions.ADD_USER_WORD)
    def add_user_word(ls: CalamiServer, args: list[Any]) -> None:
        check_arguments(args, 1, actions.ADD_USER_WORD)
        ls.profile.add_word(word_argument(args[0], "word"))
        _after_profile_change(ls)

    @guarded(actions.REMOVE_USER_WORD)
    def remove_user_word(ls: CalamiServer, args: list[Any]) -> None:
        check_arguments(args, 1, actions.REMOVE_USER_WORD)
        ls.profile.remove_word(word_argument(args[0], "word"))
        _after_profile_change(ls)

    @guarded(actions.ADD_PROJECT_WORD)
    def add_project_word(ls: CalamiServer, args: list[Any]) -> None:
        _edit_project_words(ls, args, actions.ADD_PROJECT_WORD, add=True)

    @guarded(actions.REMOVE_PROJECT_WORD)
    def remove_project_word(ls: CalamiServer, args: list[Any]) -> None:
        _edit_project_words(ls, args, actions.REMOVE_PROJECT_WORD, add=False)

    @guarded(actions.IGNORE_WORD)
    def ignore_word(ls: CalamiServer, args: list[Any]) -> None:
        check_arguments(args, 2, actions.IGNORE_WORD)
        doc = ls.document(args[0])
        word = word_argument(args[1], "word")
        doc.ignored.add(word)
        ls.profile.ignore(word)
        _after_profile_change(ls)

    @guarded(actions.RELOAD_CONFIGURATION)
    async def reload_configuration(ls: CalamiServer, args: list[Any]) -> None:
        check_arguments(args, 0, actions.RELOAD_CONFIGURATION)
        ls.projects.reload()
        ls.profile.reload()
        await ls.pull_configuration()
        ls.recheck_all()


def _edit_project_words(ls: CalamiServer, args: list[Any], name: str, add: bool) -> None:
    from calami.vocab.wordlist import add_words, remove_words

    check_arguments(args, 2, name)
    doc = ls.document(args[0])
    word = word_argument(args[1], "word")
    target: Path = ls.projects.word_list_for(doc.path, ls.settings)
    (add_words if add else remove_words)(target, [word])
    log.info("calami: %s '%s' %s %s", "added" if add else "removed", word, "to" if add else "from", target)
    ls.projects.reload(target)
    ls.recheck_all()


def _after_profile_change(ls: CalamiServer) -> None:
    ls.projects.invalidate()
    ls.recheck_all()

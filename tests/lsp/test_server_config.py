"""Pull diagnostics, settings (initializationOptions / workspace/configuration), watched files, multi-root."""

from __future__ import annotations

from lsprotocol import types

from session import capabilities, open_doc, published_for, start, stop, until


def _project(root, toml=None, words=None):
    root.mkdir(parents=True)
    (root / ".git").mkdir()
    if toml is not None:
        (root / "calami.toml").write_text(toml)
    if words is not None:
        (root / "calami-lexicon.txt").write_text(words)
    return root


async def test_pull_diagnostics_and_unchanged_reports(tmp_path):
    root = _project(tmp_path / "p")
    client, _ = await start(tmp_path / "profile", [root], caps=capabilities(pull=True))
    try:
        uri = open_doc(client, root / "a.md", "teh end\n")
        report = await client.text_document_diagnostic_async(
            types.DocumentDiagnosticParams(types.TextDocumentIdentifier(uri)))
        assert [d.code for d in report.items] == ["calami.nonword"]
        again = await client.text_document_diagnostic_async(
            types.DocumentDiagnosticParams(types.TextDocumentIdentifier(uri), previous_result_id=report.result_id))
        assert again.kind == "unchanged"
        assert client.published == []  # pull mode: nothing pushed
    finally:
        await stop(client)


async def test_bad_settings_are_reported_and_defaults_used(tmp_path):
    root = _project(tmp_path / "p")
    options = {"maxSuggestions": "many", "severity": {"nonword": "warning"}, "hintThreshold": 7, "bogus": 1}
    client, _ = await start(tmp_path / "profile", [root], options=options)
    try:
        uri = open_doc(client, root / "a.md", "teh end\n")
        params = await until(lambda: published_for(client, uri, 1))
        assert params.diagnostics[0].severity == types.DiagnosticSeverity.Warning  # the good value is used
        texts = " | ".join(m.message for m in client.messages)
        assert "calami.maxSuggestions" in texts and "calami.hintThreshold" in texts and "calami.bogus" in texts
    finally:
        await stop(client)


async def test_workspace_configuration_change_rechecks(tmp_path):
    root = _project(tmp_path / "p")
    client, _ = await start(tmp_path / "profile", [root], caps=capabilities(configuration=True),
                            configuration={"calami": {"severity": {"realword": "error"}}})
    try:
        uri = open_doc(client, root / "a.md", "They came form far.\n")
        await until(lambda: (p := published_for(client, uri, 1))
                    and p.diagnostics and p.diagnostics[0].severity == types.DiagnosticSeverity.Error)
        client.set_configuration({"calami": {"hintThreshold": 0.8}})
        n = len(client.published)
        client.workspace_did_change_configuration(types.DidChangeConfigurationParams(settings=None))
        # The fake's real-word confidence is 0.7: below the new threshold.
        await until(lambda: len(client.published) > n and list(client.diagnostics[uri]) == [])
    finally:
        await stop(client)


async def test_watched_word_list_change_reloads_words(tmp_path):
    root = _project(tmp_path / "p", words="# team words\n")
    client, _ = await start(tmp_path / "profile", [root], caps=capabilities(watch=True), options={"debounceMs": 0})
    try:
        await until(lambda: client.registrations)
        globs = [w["globPattern"] for w in client.registrations[0].register_options["watchers"]]
        assert "**/calami-lexicon.txt" in globs and "**/calami.toml" in globs
        assert "**/calami-words.txt" in globs  # the old name is still read, so watched
        uri = open_doc(client, root / "a.md", "teh wrold\n")
        await until(lambda: published_for(client, uri, 1))
        (root / "calami-lexicon.txt").write_text("# team words\nwrold\n")  # a teammate's git pull
        client.workspace_did_change_watched_files(types.DidChangeWatchedFilesParams(
            [types.FileEvent((root / "calami-lexicon.txt").as_uri(), types.FileChangeType.Changed)]))
        await until(lambda: [d.data["word"] for d in client.diagnostics[uri]] == ["teh"])
    finally:
        await stop(client)


async def test_each_folder_has_its_own_words_and_config(tmp_path):
    one = _project(tmp_path / "one", words="teh\n")
    two = _project(tmp_path / "two", toml="[thresholds]\nhint = 0.95\nconfident = 0.99\n")
    client, _ = await start(tmp_path / "profile", [one, two])
    try:
        a = open_doc(client, one / "a.md", "teh wrold\n")
        b = open_doc(client, two / "b.md", "teh wrold\n")
        c = open_doc(client, tmp_path / "c.md", "teh wrold\n")  # outside both folders
        await until(lambda: all(published_for(client, u, 1) for u in (a, b, c)))
        assert [d.data["word"] for d in client.diagnostics[a]] == ["wrold"]
        assert list(client.diagnostics[b]) == []  # 0.9 < the folder's hint threshold
        assert [d.data["word"] for d in client.diagnostics[c]] == ["teh", "wrold"]
    finally:
        await stop(client)


async def test_broken_project_config_is_reported_and_defaults_used(tmp_path):
    root = _project(tmp_path / "p", toml="variant = [unclosed\n")
    client, _ = await start(tmp_path / "profile", [root])
    try:
        uri = open_doc(client, root / "a.md", "teh\n")
        await until(lambda: published_for(client, uri, 1))
        assert len(client.diagnostics[uri]) == 1
        assert any("calami.toml" in m.message for m in client.messages)
    finally:
        await stop(client)


async def test_a_damaged_profile_is_moved_aside_and_the_user_told(tmp_path):
    root = _project(tmp_path / "p")
    profile_dir = tmp_path / "profile"
    profile_dir.mkdir()
    (profile_dir / "profile.msgpack").write_bytes(b"\xc1\xc1 torn")
    client, _ = await start(profile_dir, [root])
    try:
        await until(lambda: any("damaged" in m.message for m in client.messages))
        uri = open_doc(client, root / "a.md", "teh\n")
        await until(lambda: published_for(client, uri, 1))
        await client.workspace_execute_command_async(types.ExecuteCommandParams("calami.addUserWord", ["teh"]))
        await until(lambda: list(client.diagnostics[uri]) == [])
    finally:
        await stop(client)
    names = sorted(p.name for p in profile_dir.iterdir())
    assert names[0] == "profile.msgpack" and names[1].startswith("profile.msgpack.corrupt-")


async def test_old_lexicon_name_is_read_with_a_note_and_the_quick_fix_edits_it(tmp_path):
    from calami.lsp.actions import add_to_lexicon_title
    from calami.vocab.project import LEGACY_WORD_LIST

    root = _project(tmp_path / "p")
    (root / LEGACY_WORD_LIST).write_text("wrold\n")
    client, _ = await start(tmp_path / "profile", [root], options={"debounceMs": 0})
    try:
        uri = open_doc(client, root / "a.md", "teh wrold\n")
        params = await until(lambda: published_for(client, uri, 1))
        assert [d.data["word"] for d in params.diagnostics] == ["teh"]  # the old list still counts
        await until(lambda: any(LEGACY_WORD_LIST in m.message and "rename" in m.message for m in client.messages))
        actions = await client.text_document_code_action_async(types.CodeActionParams(
            types.TextDocumentIdentifier(uri), params.diagnostics[0].range, types.CodeActionContext(params.diagnostics)))
        [add] = [a for a in actions if a.title == add_to_lexicon_title("teh")]
        await client.workspace_execute_command_async(types.ExecuteCommandParams(add.command.command, add.command.arguments))
        await until(lambda: (root / LEGACY_WORD_LIST).read_text() == "teh\nwrold\n")
        assert not (root / "calami-lexicon.txt").exists()  # one list, not two
    finally:
        await stop(client)

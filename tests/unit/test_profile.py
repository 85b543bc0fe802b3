"""The adaptive profile: adaptation protocol, merge-on-write, damage handling, CLI."""

from __future__ import annotations

import json
import os
import stat
import subprocess
import sys

import msgpack
import pytest

from calami.vocab.profile import FILE_NAME, MAX_CONTEXT_CHARS, SCHEMA, Profile, ProfileFormatError, validate


def test_empty_profile_accepts_nothing(tmp_path):
    p = Profile(tmp_path)
    assert not p.accepts("calami")
    assert p.corrections("teh") == {}
    assert p.ignored("teh") == 0
    assert not (tmp_path / FILE_NAME).exists()  # nothing written until something changes


def test_user_words_follow_the_case_rule(tmp_path):
    p = Profile(tmp_path)
    p.add_word("calami")
    p.add_word("PyPI")
    assert p.accepts("calami") and p.accepts("Calami") and p.accepts("CALAMI")
    assert p.accepts("PyPI") and not p.accepts("pypi")
    p.remove_word("calami")
    assert not p.accepts("calami")


def test_replacements_and_ignores_persist_across_instances(tmp_path):
    p = Profile(tmp_path)
    for _ in range(3):
        p.record_replacement("teh", "the", "to", "shop")
    p.record_replacement("Teh", "The", "", "cat")  # case only follows the typed word: folded
    p.ignore("Gronk")
    again = Profile(tmp_path)
    assert again.corrections("teh") == {"the": 4}
    assert again.corrections("TEH") == {"the": 4}
    assert again.ignored("gronk") == 1
    assert again.contexts("teh", "the") == [["to", "shop", 3], ["", "cat", 1]]


def test_a_fix_whose_capitals_matter_keeps_them(tmp_path):
    p = Profile(tmp_path)
    p.record_replacement("github", "GitHub")
    assert p.corrections("github") == {"GitHub": 1}


def test_two_servers_lose_nothing(tmp_path):
    a = Profile(tmp_path)
    b = Profile(tmp_path)  # loaded before a writes: a stale view
    a.add_word("alpha")
    a.record_replacement("teh", "the")
    b.add_word("beta")
    b.record_replacement("teh", "the")
    b.ignore("zork")
    fresh = Profile(tmp_path)
    assert fresh.words == ["alpha", "beta"]
    assert fresh.corrections("teh") == {"the": 2}
    assert fresh.ignored("zork") == 1


def test_only_words_and_short_contexts_are_stored(tmp_path):
    p = Profile(tmp_path)
    secret = "x" * 500
    p.record_replacement("teh", "the", secret, "shop")
    data = msgpack.unpackb((tmp_path / FILE_NAME).read_bytes(), raw=False)
    assert set(data) == {"schema", "words", "corrections", "contexts", "ignored"}
    assert data["contexts"]["teh"]["the"][0][0] == "x" * MAX_CONTEXT_CHARS
    with pytest.raises(ValueError):
        p.record_replacement("two words", "the")  # a phrase is not a word
    with pytest.raises(ValueError):
        p.add_word("")


def test_corrupt_file_is_moved_aside_with_a_warning(tmp_path):
    (tmp_path / FILE_NAME).write_bytes(b"\xc1 not msgpack")
    warnings: list[str] = []
    p = Profile(tmp_path, warn=warnings.append)
    assert len(warnings) == 1 and "damaged" in warnings[0]
    aside = [f for f in os.listdir(tmp_path) if f.startswith(FILE_NAME + ".corrupt-")]
    assert len(aside) == 1
    assert (tmp_path / aside[0]).read_bytes() == b"\xc1 not msgpack"  # kept, not overwritten
    p.add_word("fresh")
    assert Profile(tmp_path).words == ["fresh"]


def test_wrong_shape_counts_as_corrupt(tmp_path):
    (tmp_path / FILE_NAME).write_bytes(msgpack.packb({"schema": 1, "words": "not a list"}))
    warnings: list[str] = []
    Profile(tmp_path, warn=warnings.append)
    assert warnings and "words" in warnings[0]


def test_newer_schema_is_left_untouched(tmp_path):
    original = msgpack.packb({"schema": SCHEMA + 1, "whatever": True})
    (tmp_path / FILE_NAME).write_bytes(original)
    warnings: list[str] = []
    p = Profile(tmp_path, warn=warnings.append)
    p.add_word("kept")
    assert p.accepts("kept")  # works in memory
    assert p.in_memory and "newer" in warnings[0]
    assert (tmp_path / FILE_NAME).read_bytes() == original


@pytest.mark.skipif(os.geteuid() == 0, reason="root can write anywhere")
def test_unwritable_folder_keeps_working_in_memory(tmp_path):
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(stat.S_IRUSR | stat.S_IXUSR)
    try:
        warnings: list[str] = []
        p = Profile(folder, warn=warnings.append)
        p.add_word("memo")
        assert p.accepts("memo") and p.in_memory and warnings
    finally:
        folder.chmod(stat.S_IRWXU)


def test_unwritable_target_keeps_working_in_memory(tmp_path):
    # Works as root too: the profile "folder" is a regular file, so mkdir fails.
    blocker = tmp_path / "file"
    blocker.write_text("")
    warnings: list[str] = []
    p = Profile(blocker / "sub", warn=warnings.append)
    p.add_word("memo")
    assert p.accepts("memo") and p.in_memory
    assert len(warnings) == 1 and "memory" in warnings[0]
    p.add_word("more")  # no second warning
    assert len(warnings) == 1


def test_validate_rejects_bad_exports():
    with pytest.raises(ProfileFormatError):
        validate([1, 2])
    with pytest.raises(ProfileFormatError):
        validate({"schema": 1, "corrections": {"teh": {"the": -1}}})
    assert validate({"schema": 1})["words"] == []


def _cli(args, tmp_path, stdin=None):
    env = dict(os.environ, CALAMI_PROFILE_DIR=str(tmp_path))
    return subprocess.run([sys.executable, "-m", "calami", "profile", *args], env=env, input=stdin,
                          capture_output=True, text=True, timeout=60)


def test_cli_export_import_show_reset(tmp_path):
    src = tmp_path / "a"
    p = Profile(src)
    p.add_word("calami")
    p.record_replacement("teh", "the", "to", "shop")
    out = _cli(["export"], src)
    assert out.returncode == 0, out.stderr
    exported = json.loads(out.stdout)
    assert exported["words"] == ["calami"]
    dst = tmp_path / "b"
    imported = _cli(["import", "-"], dst, stdin=out.stdout)
    assert imported.returncode == 0, imported.stderr
    imported = _cli(["import", "-"], dst, stdin=out.stdout)  # counts add up
    assert Profile(dst).corrections("teh") == {"the": 2}
    show = _cli(["show"], dst)
    assert "teh -> the  x2" in show.stdout and str(dst) in show.stdout
    refused = _cli(["reset"], dst)
    assert refused.returncode == 2 and refused.stderr.startswith("calami: ") and "--yes" in refused.stderr
    assert _cli(["reset", "--yes"], dst).returncode == 0
    assert Profile(dst).words == []


def test_cli_import_of_a_bad_file_is_one_line(tmp_path):
    bad = tmp_path / "bad.json"
    bad.write_text('{"schema": "one"}')
    out = _cli(["import", str(bad)], tmp_path / "p")
    assert out.returncode == 2
    assert out.stderr.count("\n") == 1 and "not a calami profile export" in out.stderr

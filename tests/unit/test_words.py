"""The project word list: format, editing rules, and ``calami words``."""

from __future__ import annotations

from pathlib import Path

import pytest

from calami import cli
from calami.errors import CalamiError
from calami.vocab import wordlist
from calami.vocab.project import add_words, remove_words

SAMPLE = """\
# Words of the Lumen project.
# Keep one per line.

zebra
# the product name, always capitalised
Lumen
apple
# trailing note
"""


def test_parse_and_render_round_trip_keeps_every_comment():
    parsed = wordlist.parse(SAMPLE)
    assert parsed.header == ["# Words of the Lumen project.", "# Keep one per line.", ""]
    assert parsed.words == ["zebra", "Lumen", "apple"]
    assert parsed.entries[1].comments == ["# the product name, always capitalised"]
    assert parsed.trailer == ["# trailing note"]
    assert parsed.render() == SAMPLE


def test_add_sorts_case_insensitively_and_moves_comments_with_their_entry(tmp_path):
    path = tmp_path / "words.txt"
    path.write_text(SAMPLE, encoding="utf-8")
    assert add_words(path, ["mango", "apple", "Banana"]) == ["mango", "Banana"]
    assert path.read_text(encoding="utf-8") == """\
# Words of the Lumen project.
# Keep one per line.

apple
Banana
# the product name, always capitalised
Lumen
mango
zebra
# trailing note
"""


def test_duplicates_are_merged_and_case_variants_kept_in_stable_order(tmp_path):
    path = tmp_path / "words.txt"
    path.write_text("beta\n# first\nalpha\nAlpha\n# second\nalpha\n", encoding="utf-8")
    add_words(path, ["gamma"])
    assert path.read_text(encoding="utf-8") == "# first\n# second\nalpha\nAlpha\nbeta\ngamma\n"


def test_remove_takes_the_attached_comment_along(tmp_path):
    path = tmp_path / "words.txt"
    path.write_text(SAMPLE, encoding="utf-8")
    assert remove_words(path, ["Lumen", "absent"]) == ["Lumen"]
    text = path.read_text(encoding="utf-8")
    assert "Lumen\n" not in text and "capitalised" not in text
    assert text.startswith("# Words of the Lumen project.") and text.endswith("zebra\n# trailing note\n")


def test_crlf_files_stay_crlf_and_a_missing_file_is_created(tmp_path):
    path = tmp_path / "w.txt"
    path.write_bytes(b"# head\r\n\r\nzeta\r\n")
    add_words(path, ["eta"])
    assert path.read_bytes() == b"# head\r\n\r\neta\r\nzeta\r\n"
    fresh = tmp_path / "new.txt"
    assert add_words(fresh, ["one"]) == ["one"]
    assert fresh.read_text() == "one\n"


def test_entries_may_contain_a_hash_after_the_first_character(tmp_path):
    path = tmp_path / "w.txt"
    add_words(path, ["C#", "F#"])
    assert wordlist.read(path).words == ["C#", "F#"]


@pytest.mark.parametrize("bad", ["", "  ", "two words", "#tag"])
def test_bad_new_words_are_refused_before_touching_the_file(tmp_path, bad):
    path = tmp_path / "w.txt"
    path.write_text("keep\n")
    with pytest.raises(CalamiError):
        add_words(path, ["fine", bad])
    assert path.read_text() == "keep\n"


def test_a_non_utf8_list_is_an_error_not_a_rewrite(tmp_path):
    path = tmp_path / "w.txt"
    path.write_bytes(b"caf\xe9\n")
    with pytest.raises(CalamiError, match="not UTF-8"):
        add_words(path, ["new"])
    assert path.read_bytes() == b"caf\xe9\n"


def test_nothing_is_rewritten_when_nothing_changes(tmp_path):
    path = tmp_path / "w.txt"
    path.write_text("b\na\n")  # unsorted, but the user did not ask for an edit
    assert add_words(path, ["a"]) == []
    assert path.read_text() == "b\na\n"


# ------------------------------------------------------------------ the CLI


@pytest.fixture
def repo(tmp_path, monkeypatch):
    (tmp_path / ".git").mkdir()
    (tmp_path / "sub").mkdir()
    monkeypatch.chdir(tmp_path / "sub")
    return tmp_path


def test_cli_add_edits_the_first_list_at_the_project_root(repo, capsys):
    assert cli.main(["lexicon", "add", "Zorblat", "quux"]) == 0
    assert (repo / "calami-lexicon.txt").read_text() == "quux\nZorblat\n"
    assert "Added to" in capsys.readouterr().out
    assert cli.main(["lexicon", "add", "quux"]) == 0
    assert "Already in" in capsys.readouterr().out


def test_cli_uses_the_configured_list_and_lists_all_lists(repo, capsys):
    (repo / "calami.toml").write_text('word-lists = ["docs/terms.txt", "more.txt"]\n')
    (repo / "docs").mkdir()
    (repo / "more.txt").write_text("extra\n")
    assert cli.main(["lexicon", "add", "widget"]) == 0
    assert (repo / "docs" / "terms.txt").read_text() == "widget\n"
    capsys.readouterr()
    assert cli.main(["lexicon", "list"]) == 0
    assert capsys.readouterr().out == "widget\nextra\n"


def test_cli_remove_reports_missing_words_with_exit_1(repo, capsys):
    (repo / "calami-lexicon.txt").write_text("alpha\nbeta\n")
    assert cli.main(["lexicon", "remove", "alpha", "gamma"]) == 1
    out, err = capsys.readouterr()
    assert "Removed from" in out and "not in" in err and "gamma" in err
    assert (repo / "calami-lexicon.txt").read_text() == "beta\n"


def test_cli_file_option_and_bad_word_exit_2(tmp_path, capsys):
    target = tmp_path / "list.txt"
    assert cli.main(["lexicon", "add", "--file", str(target), "one"]) == 0
    assert target.read_text() == "one\n"
    assert cli.main(["lexicon", "add", "--file", str(target), "two words"]) == 2
    assert "whitespace" in capsys.readouterr().err
    assert cli.main(["lexicon", "list", "--file", str(tmp_path / "nope.txt")]) == 2


def test_old_command_name_still_works_with_a_note_and_keeps_the_old_file(repo, capsys):
    (repo / "calami-words.txt").write_text("alpha\n")
    assert cli.main(["words", "add", "beta"]) == 0
    out, err = capsys.readouterr()
    assert "'calami words' is now 'calami lexicon'" in err
    assert (repo / "calami-words.txt").read_text() == "alpha\nbeta\n"  # the one list the team has
    assert not (repo / "calami-lexicon.txt").exists()

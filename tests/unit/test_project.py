"""Project discovery, config parsing (with error lines), case rules, skip patterns, old names."""

from __future__ import annotations

from pathlib import Path

import pytest

from calami.errors import ConfigError
from calami.findings import Thresholds
from calami.vocab.project import ProjectWords, find_root, load_project, read_config


def test_root_is_the_nearest_marked_folder(tmp_path):
    (tmp_path / ".git").mkdir()
    deep = tmp_path / "a" / "b"
    deep.mkdir(parents=True)
    (deep / "f.md").write_text("x")
    assert find_root(deep / "f.md") == tmp_path
    (tmp_path / "a" / "calami-lexicon.txt").write_text("")
    assert find_root(deep) == tmp_path / "a"
    (deep / "pyproject.toml").write_text("[project]\nname = 'x'\n")  # no [tool.calami]: not a marker
    assert find_root(deep) == tmp_path / "a"
    (deep / "pyproject.toml").write_text("[tool.calami]\nvariant = 'en-GB'\n")
    assert find_root(deep) == deep


def test_missing_config_gives_defaults(tmp_path):
    project = load_project(tmp_path)
    assert project.config.errors == [] and project.config.path is None
    assert project.config.variant == "any" and project.config.thresholds == Thresholds()
    assert project.word_list_path == tmp_path / "calami-lexicon.txt"
    assert len(project.words) == 0


def test_all_keys_are_read(tmp_path):
    (tmp_path / "calami.toml").write_text(
        'variant = "en-GB"\ninclude = ["docs/**"]\nexclude = ["docs/old"]\n'
        'word-lists = ["terms.txt", "names.txt"]\nskip-patterns = ["\\\\bTODO\\\\b"]\n'
        "check-strings = true\nmax-suggestions = 3\n[thresholds]\nhint = 0.4\nconfident = 0.9\n"
    )
    (tmp_path / "terms.txt").write_text("frobnicate\n")
    (tmp_path / "names.txt").write_text("Quenya\n")
    project = load_project(tmp_path)
    config = project.config
    assert config.errors == []
    assert (config.variant, config.include, config.exclude) == ("en-GB", ["docs/**"], ["docs/old"])
    assert config.check_strings is True and config.max_suggestions == 3
    assert config.thresholds == Thresholds(0.4, 0.9)
    assert project.word_list_path == tmp_path / "terms.txt"
    assert project.words.accepts("Frobnicate") and project.words.accepts("Quenya")
    assert project.ignore_holes("a TODO b")[0] == [(2, 6)]


def test_pyproject_table_and_calami_toml_wins(tmp_path):
    (tmp_path / "pyproject.toml").write_text('[project]\nname = "x"\n\n[tool.calami]\nvariant = "en-US"\n\n[tool.calami.thresholds]\nhint = 2\n')
    config = read_config(tmp_path)
    assert config.variant == "en-US"
    assert config.errors == [f"{tmp_path / 'pyproject.toml'}:8: thresholds.hint must be a number in (0, 1]"]
    (tmp_path / "calami.toml").write_text('variant = "en-GB"\n')
    assert read_config(tmp_path).variant == "en-GB"


@pytest.mark.parametrize(
    "text, line, message",
    [
        ('variant = "en-AU"\n', 1, "variant must be one of any, en-US, en-GB"),
        ('\n\ninclude = "docs"\n', 3, "include must be a list of strings"),
        ("check-strings = 1\n", 1, "check-strings must be true or false"),
        ("max-suggestions = 0\n", 1, "max-suggestions must be a whole number"),
        ("colour = true\n", 1, "unknown setting 'colour'"),
        ('word-lists = []\n', 1, "word-lists must name at least one file"),
        ("[thresholds]\nhint = 0.9\nconfident = 0.5\n", 2, "thresholds.hint must not exceed"),
        ("[thresholds]\nloud = 0.9\n", 2, "unknown threshold 'loud'"),
        ("x = 1\nthresholds = 3\n", 2, "thresholds must be a table"),
    ],
)
def test_bad_values_are_reported_with_file_and_line_and_replaced_by_defaults(tmp_path, text, line, message):
    (tmp_path / "calami.toml").write_text(text)
    config = read_config(tmp_path)
    assert any(e.startswith(f"{tmp_path / 'calami.toml'}:{line}: {message}") for e in config.errors), config.errors
    assert config.variant == "any" and config.thresholds == Thresholds() and config.word_lists == ["calami-lexicon.txt"]


def test_bad_skip_pattern_names_its_line(tmp_path):
    (tmp_path / "calami.toml").write_text('skip-patterns = [\n  "fine",\n  "(broken",\n]\n')
    project = load_project(tmp_path)
    assert len(project.skip_patterns) == 1
    [error] = project.config.errors
    assert error.startswith(f"{tmp_path / 'calami.toml'}:3: skip pattern '(broken' is not a valid regular expression")


def test_toml_syntax_error_raises_with_line(tmp_path):
    (tmp_path / "calami.toml").write_text('variant = "en-GB"\nbroken = [\n')
    with pytest.raises(ConfigError, match=r"calami\.toml:3: invalid TOML"):
        load_project(tmp_path)


def test_every_missing_word_list_named_in_the_config_is_an_error_naming_it(tmp_path):
    (tmp_path / "calami.toml").write_text('word-lists = [\n  "first.txt",\n  "second.txt",\n]\n')
    errors = load_project(tmp_path).config.errors
    assert [e.split(" named in")[0] for e in errors] == [
        f"{tmp_path / 'calami.toml'}:2: word list {tmp_path / 'first.txt'}",
        f"{tmp_path / 'calami.toml'}:3: word list {tmp_path / 'second.txt'}",
    ]
    assert all("does not exist" in e for e in errors)
    (tmp_path / "first.txt").write_text("")
    (tmp_path / "second.txt").write_text("")
    assert load_project(tmp_path).config.errors == []


def test_missing_default_lexicon_is_not_an_error(tmp_path):
    assert load_project(tmp_path).config.errors == []


def test_case_rules():
    words = ProjectWords(["calami", "GitHub", "iOS"])
    assert words.accepts("calami") and words.accepts("Calami") and words.accepts("CALAMI")
    assert words.accepts("GitHub") and not words.accepts("github") and not words.accepts("Github")
    assert words.accepts("iOS") and not words.accepts("IOS")
    assert words.accepts("GitHub's") and words.accepts("calami’s")  # possessives, both apostrophes
    assert not words.accepts("calamity")
    assert words.corrections("calami") == {} and words.ignored("calami") == 0
    assert "Calami" in words and 3 not in words


def test_reload_picks_up_edits(tmp_path):
    project = load_project(tmp_path)
    assert not project.words.accepts("zorp")
    (tmp_path / "calami-lexicon.txt").write_text("zorp\n")
    project.reload()
    assert project.words.accepts("zorp")


def test_selects_applies_include_and_exclude(tmp_path):
    (tmp_path / "calami.toml").write_text('include = ["*.md", "guide/"]\nexclude = ["drafts", "**/*.gen.md"]\n')
    project = load_project(tmp_path)
    assert project.selects(tmp_path / "a.md")
    assert project.selects(tmp_path / "x" / "b.md")
    assert project.selects(tmp_path / "guide" / "c.rst")
    assert not project.selects(tmp_path / "c.rst")
    assert not project.selects(tmp_path / "drafts" / "d.md")
    assert not project.selects(tmp_path / "x" / "e.gen.md")
    assert project.selects(Path("/elsewhere/f.rst"))  # outside the project: not ours to judge


def test_skip_pattern_timeout_is_reported(tmp_path):
    (tmp_path / "calami.toml").write_text("skip-patterns = ['(a|aa)+$', 'ok']\n")
    project = load_project(tmp_path)
    holes, warnings = project.ignore_holes("a" * 60 + "! ok", timeout=0.1)
    assert holes == [(62, 64)]
    assert len(warnings) == 1 and "took longer than 0.1s" in warnings[0]


def test_word_lists_are_never_selected_when_walking(tmp_path):
    from calami.vocab.project import load_project

    (tmp_path / "calami.toml").write_text('word-lists = ["words.txt", "more/jargon.txt"]\n', encoding="utf-8")
    (tmp_path / "more").mkdir()
    for name in ("words.txt", "more/jargon.txt", "notes.txt"):
        (tmp_path / name).write_text("x\n", encoding="utf-8")
    project = load_project(tmp_path)
    assert not project.selects(tmp_path / "words.txt")
    assert not project.selects(tmp_path / "more" / "jargon.txt")
    assert project.selects(tmp_path / "notes.txt")


# ------------------------------------------------------------ old names still read

def test_old_lexicon_name_alone_is_read_and_edited_with_a_note(tmp_path):
    from calami.vocab.project import DEFAULT_WORD_LIST, LEGACY_WORD_LIST

    (tmp_path / LEGACY_WORD_LIST).write_text("zorp\n")
    assert find_root(tmp_path / "sub" / "f.md") == tmp_path
    project = load_project(tmp_path)
    assert project.words.accepts("zorp")
    assert project.word_list_path == tmp_path / LEGACY_WORD_LIST  # one list, not two
    [warning] = project.config.warnings
    assert LEGACY_WORD_LIST in warning and DEFAULT_WORD_LIST in warning and "rename" in warning
    assert project.config.errors == []
    assert not project.selects(tmp_path / LEGACY_WORD_LIST)


def test_both_lexicon_names_are_read_and_the_new_one_is_edited(tmp_path):
    from calami.vocab.project import DEFAULT_WORD_LIST, LEGACY_WORD_LIST

    (tmp_path / LEGACY_WORD_LIST).write_text("zorp\n")
    (tmp_path / DEFAULT_WORD_LIST).write_text("quux\n")
    project = load_project(tmp_path)
    assert project.words.accepts("zorp") and project.words.accepts("quux")
    assert project.word_list_path == tmp_path / DEFAULT_WORD_LIST
    [warning] = project.config.warnings
    assert "move its words into" in warning
    assert not project.selects(tmp_path / LEGACY_WORD_LIST) and not project.selects(tmp_path / DEFAULT_WORD_LIST)


def test_new_lexicon_name_gives_no_note(tmp_path):
    (tmp_path / "calami-lexicon.txt").write_text("zorp\n")
    project = load_project(tmp_path)
    assert project.words.accepts("zorp") and project.config.warnings == []


def test_old_skip_patterns_key_is_read_with_a_warning(tmp_path):
    (tmp_path / "calami.toml").write_text("# old name\nignore-patterns = ['TODO']\n")
    project = load_project(tmp_path)
    assert project.config.errors == []
    assert project.ignore_holes("a TODO b")[0] == [(2, 6)]
    assert project.config.warnings == [
        f"{tmp_path / 'calami.toml'}:2: 'ignore-patterns' is the old name of 'skip-patterns'; it still works, but please rename it"
    ]
    (tmp_path / "calami.toml").write_text("ignore-patterns = ['(bad']\n")
    assert "calami.toml:1: skip pattern '(bad'" in load_project(tmp_path).config.errors[0]


def test_old_and_new_skip_keys_together_are_an_error(tmp_path):
    (tmp_path / "calami.toml").write_text("skip-patterns = ['a']\nignore-patterns = ['b']\n")
    [error] = read_config(tmp_path).errors
    assert error == f"{tmp_path / 'calami.toml'}:2: ignore-patterns is the old name of skip-patterns; give only skip-patterns"


@pytest.mark.parametrize(
    "line, hint",
    [
        ('varient = "en-GB"', "did you mean 'variant'?"),
        ("skip_patterns = []", "did you mean 'skip-patterns'?"),
        ("wordlists = []", "did you mean 'word-lists'?"),
        ("colour = true", None),
    ],
)
def test_unknown_keys_get_a_did_you_mean(tmp_path, line, hint):
    (tmp_path / "calami.toml").write_text(line + "\n")
    [error] = read_config(tmp_path).errors
    assert "unknown setting" in error
    if hint:
        assert error.endswith(hint)
    else:
        assert "did you mean" not in error


def test_unknown_threshold_gets_a_did_you_mean(tmp_path):
    (tmp_path / "calami.toml").write_text("[thresholds]\nconfidnt = 0.9\n")
    [error] = read_config(tmp_path).errors
    assert error.endswith(":2: unknown threshold 'confidnt'; did you mean 'confident'?")

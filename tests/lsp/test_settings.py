"""Settings parsing: names, nesting, validation with defaults, project precedence."""

from __future__ import annotations

from lsprotocol import types

from calami.lsp.settings import Settings, parse, with_project
from calami.vocab.project import ProjectConfig


def test_defaults_match_the_documented_values():
    s = Settings()
    assert (s.variant, s.hint_threshold, s.confident_threshold, s.max_suggestions) == ("any", 0.5, 0.95, 5)
    assert (s.severity_nonword, s.severity_realword, s.check_strings, s.debounce_ms) == ("information", "hint", False, 150)
    assert (s.model_path, s.word_list) == ("", "calami-lexicon.txt")


def test_dotted_nested_and_whole_tree_forms_mean_the_same():
    a, _ = parse({"severity.nonword": "warning", "debounceMs": 0})
    b, _ = parse({"severity": {"nonword": "warning"}, "debounceMs": 0})
    c, _ = parse({"calami": {"severity": {"nonword": "warning"}, "debounceMs": 0}})
    assert a == b == c
    assert a.severity("nonword") == types.DiagnosticSeverity.Warning


def test_each_bad_value_is_reported_and_replaced_by_its_default():
    s, problems = parse({
        "variant": "en-AU", "hintThreshold": 0, "confidentThreshold": True, "maxSuggestions": 0,
        "checkStrings": "yes", "debounceMs": -5, "wordList": "../../etc/passwd", "severity": {"realword": "loud"},
    })
    assert s == Settings()
    assert len(problems) == 8
    assert all(p.startswith("calami.") and "using" in p for p in problems)


def test_hint_above_confident_falls_back_to_both_defaults():
    s, problems = parse({"hintThreshold": 0.9, "confidentThreshold": 0.6})
    assert (s.hint_threshold, s.confident_threshold) == (0.5, 0.95)
    assert problems


def test_not_an_object():
    s, problems = parse(["variant"])
    assert s == Settings() and problems


def test_the_project_file_wins_for_the_keys_it_sets():
    editor, _ = parse({"variant": "en-US", "maxSuggestions": 3, "hintThreshold": 0.6})
    config = ProjectConfig(variant="en-GB")
    merged = with_project(editor, config)
    assert merged.variant == "en-GB"  # set in calami.toml
    assert merged.max_suggestions == 3 and merged.hint_threshold == 0.6  # left to the editor


def test_editor_owned_keys_are_ignored_quietly():
    # VS Code sends how it starts the server and its tracing level under "calami".
    settings, problems = parse({"serverPath": "calami", "serverArgs": ["serve"], "trace": {"server": "off"}, "variant": "en-GB"})
    assert problems == []
    assert settings.variant == "en-GB"


def test_helix_wrapped_settings_are_unwrapped():
    settings, problems = parse({"calami": {"maxSuggestions": 3}})
    assert problems == [] and settings.max_suggestions == 3


def test_editor_language_names_map_to_kinds():
    from calami.lsp.documents import LANGUAGE_KINDS

    pairs = {"gitcommit": "commit", "rst": "rst", "tex": "latex", "sh": "shell", "tsx": "typescript",
             "ruby": "ruby", "css": "css", "org": "org", "asciidoc": "asciidoc"}
    for language, kind in pairs.items():
        assert LANGUAGE_KINDS[language] == kind

"""The workspace vocabulary (a cache model) and the rules that use it, on the shipped model.

Words here are chosen so that the shipped model flags them when it judges
them alone; each test then shows what the workspace's own use changes.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings, strategies as st

from calami.checker import Checker
from calami.text.formats import extract
from calami.text.formats.scoring_tokens import scoring_tokens
from calami.text.tokens import sentences
from calami.vocab.package_names import manifest_names
from calami.vocab.usage import CODE, HANDLE, LINK, META, PER_FILE_CAP, PROSE, WorkspaceVocabulary, uses_in_text
from calami.vocab.workspace_scan import scan_tree


def findings(checker: Checker, text: str, kind: str = "markdown"):
    out = []
    for sentence in sentences(scoring_tokens(text, extract(text, kind))):
        out += checker.check_sentence(sentence)
    return out


def flagged(checker: Checker, text: str, kind: str = "markdown") -> set[str]:
    return {f.word for f in findings(checker, text, kind)}


@pytest.fixture
def known(model):
    return lambda key: key in model.lexicon.ids


# ---------------------------------------------------------------- collection


def test_uses_come_from_urls_addresses_handles_identifiers_and_prose():
    uses = uses_in_text(
        "Try [redio](https://github.com/Tronic/redio) by @mindojo-victor (bryan.bugyi@example.org); "
        "call `HookWrapper` or hook_wrapper.", "markdown")
    sources = {k: v & 31 for k, v in uses.items()}
    assert sources["redio"] == PROSE | LINK
    assert sources["tronic"] == LINK
    assert sources["mindojo"] == HANDLE and sources["victor"] == HANDLE
    assert sources["bugyi"] == LINK
    # An identifier's parts, and the identifier written as one word.
    assert sources["hookwrapper"] == CODE and sources["wrapper"] & CODE
    assert "github" not in uses and "org" not in uses  # host labels that name no project


def test_source_files_are_code_uses():
    uses = uses_in_text("def fetch(sesh):\n    return sesh\n", "python")
    assert uses["sesh"] & 31 == CODE and uses["sesh"] >> 5 == 2


def test_counts_are_capped_per_file_and_follow_replaced_and_removed_files():
    vocabulary = WorkspaceVocabulary()
    vocabulary.add_text("a.md", "quorbly " * 10, "markdown")
    use = vocabulary.use("quorbly")
    assert (use.files, use.count, use.raw) == (1, PER_FILE_CAP, 10)
    vocabulary.add_text("b.md", "quorbly", "markdown")
    assert vocabulary.use("quorbly").files == 2
    vocabulary.add_text("a.md", "42 + 1", "markdown")  # the file was edited
    assert vocabulary.use("quorbly").files == 1
    vocabulary.remove("b.md")
    assert vocabulary.use("quorbly") is None and vocabulary.total == 0


@given(st.lists(st.tuples(st.sampled_from("abc"), st.text(alphabet="xyz qr_Q", max_size=30)), max_size=12))
@settings(max_examples=60, deadline=None)
def test_totals_equal_a_fresh_count_after_any_sequence_of_file_versions(versions):
    """Adding files again (saves) keeps totals equal to learning the last versions once."""
    live = WorkspaceVocabulary()
    last = {}
    for name, text in versions:
        live.add_text(name, text, "plain")
        last[name] = text
    fresh = WorkspaceVocabulary()
    for name, text in last.items():
        fresh.add_text(name, text, "plain")
    assert live._totals == fresh._totals and live.total == fresh.total


def test_manifest_names(tmp_path):
    assert set(manifest_names(Path("pyproject.toml"), '[project]\nname = "quorbly-tools"\n'
                              'dependencies = ["zestful>=1", "pydantic[email]"]\n')) == {"quorbly-tools", "zestful", "pydantic"}
    assert manifest_names(Path("package.json"), '{"name": "@acme/quorbly", "dependencies": {"zestful": "1"}}') == ["quorbly", "zestful"]
    assert manifest_names(Path("Cargo.toml"), '[package]\nname = "quorbly"\n[dependencies]\nserde = "1"\n') == ["quorbly", "serde"]
    assert manifest_names(Path("setup.cfg"), "[metadata]\nname = quorbly\n[options]\ninstall_requires =\n  zestful\n") == ["quorbly", "zestful"]
    assert manifest_names(Path("pyproject.toml"), "[project\nname=") == []  # broken: no names, no error


def test_scan_tree_reads_manifests_and_honours_gitignore(tmp_path, known):
    (tmp_path / ".gitignore").write_text("build/\n")
    (tmp_path / "pyproject.toml").write_text('[project]\nname = "quorbly"\n')
    (tmp_path / "build").mkdir()
    (tmp_path / "build" / "junk.md").write_text("zestfulness zestfulness")
    (tmp_path / "src.py").write_text("glimbar = 1\n")
    vocabulary = WorkspaceVocabulary(known)
    report = scan_tree(vocabulary, [tmp_path])
    assert report.complete
    assert vocabulary.use("quorbly").sources & META
    assert vocabulary.use("glimbar").sources == CODE
    assert vocabulary.use("zestfulness") is None  # ignored folder
    assert vocabulary.use("the") is None  # listed words are not tracked


def test_scan_stops_at_its_budget(tmp_path):
    for i in range(5):
        (tmp_path / f"f{i}.md").write_text("quorbly")
    report = scan_tree(WorkspaceVocabulary(), [tmp_path], max_files=2)
    assert not report.complete and report.files == 2


# ---------------------------------------------------------------- decisions


def test_a_project_name_used_across_files_is_accepted(model, known):
    text = "Upgrade certifi before the first request."
    assert "certifi" in flagged(Checker(model), text)
    vocabulary = WorkspaceVocabulary(known)
    for i in range(3):
        vocabulary.add_text(f"doc{i}.md", "The certifi bundle is small.", "markdown")
    events = []
    checker = Checker(model, usage=vocabulary)
    checker.observer = lambda at, word, rule, detail: events.append((word, rule, detail))
    assert "certifi" not in flagged(checker, text)
    assert events and events[0][:2] == ("certifi", "workspace") and "3 files" in events[0][2]


def test_a_word_one_edit_from_a_frequent_word_needs_a_named_use(model, known):
    """"sesh" (one edit from "ssh"): typed prose alone never makes it right, its code does."""
    text = "Configure the sesh client before the first request."
    assert "sesh" in flagged(Checker(model), text)
    prose = WorkspaceVocabulary(known)
    for i in range(4):
        prose.add_text(f"doc{i}.md", text, "markdown")
    assert "sesh" in flagged(Checker(model, usage=prose), text)
    code = WorkspaceVocabulary(known)
    code.add_text("client.py", "class SeshPool:\n    def open(self, sesh):\n        return sesh\n", "python")
    code.add_text("README.md", text, "markdown")
    assert "sesh" not in flagged(Checker(model, usage=code), text)


@pytest.mark.parametrize("times", [1, 2])
def test_a_typo_of_a_frequent_word_used_once_or_twice_stays_flagged(model, known, times):
    text = "We will recieve the readings."
    vocabulary = WorkspaceVocabulary(known)
    for i in range(times):
        vocabulary.add_text(f"doc{i}.md", text, "markdown")
    found = findings(Checker(model, usage=vocabulary), text)
    assert [f.word for f in found] == ["recieve"] and found[0].best == "receive"


def test_a_repeated_typo_inside_one_file_stays_flagged(model, known):
    text = "We will recieve the readings. " * 6
    vocabulary = WorkspaceVocabulary(known)
    vocabulary.add_text("doc.md", text, "markdown")
    assert "recieve" in flagged(Checker(model, usage=vocabulary), text)


def test_a_copied_name_one_edit_from_a_word_is_not_accepted_on_two_uses(model, known):
    """A name beside its repository URL: still only two uses, one edit from "toolkit"."""
    text = "* [tomlkit](https://github.com/example/tomlkit) - a small client."
    vocabulary = WorkspaceVocabulary(known)
    vocabulary.add_text("list.md", text, "markdown")
    found = findings(Checker(model, usage=vocabulary), text)
    assert [f.word for f in found] == ["tomlkit"]
    assert not found[0].confident  # the workspace names it: a hint, not a fix to apply unread


# ---------------------------------------------------------------- names


@pytest.mark.parametrize("line", ["- Bryan Bugyi", "- Daniele Esposti", "- Kadir Can Ozden `@bysiber`"])
def test_names_in_contributor_lists_are_not_flagged(model, line):
    assert flagged(Checker(model), line) == set()


def test_name_context_is_what_keeps_them_quiet(model):
    """The same surname starting an ordinary sentence is flagged; in a credits file, less surely."""
    alone = findings(Checker(model), "Bugyi fixed the parser.")
    among_names = findings(Checker(model).with_names(), "Bugyi fixed the parser.")
    assert [f.word for f in alone] == ["Bugyi"]
    assert not among_names or among_names[0].confidence < alone[0].confidence - 0.2
    assert not any(f.confident for f in among_names)


def test_a_typo_of_a_common_word_among_names_stays_flagged(model):
    assert "Documentaton" in flagged(Checker(model), "- Improve Documentaton")


def test_a_capitalised_name_that_is_also_a_word_is_not_a_real_word_slip(model):
    assert flagged(Checker(model), "- [Calum Lind](mailto:calum@example.org)") == set()


# ---------------------------------------------------------------- compounds


@pytest.mark.parametrize("word", ["contextmanager", "refcount", "upperbound", "linewidth"])
def test_a_closed_compound_is_never_a_confident_fix(model, word):
    for f in findings(Checker(model), f"Pass the {word} to the parser.") + findings(
            Checker(model), f"The {word} is set here."):
        assert not f.confident, f


def test_a_missing_space_after_a_short_word_can_still_be_confident(model):
    found = findings(Checker(model), "Write it tothe disk.")
    assert found and found[0].best == "to the" and found[0].confident


# ---------------------------------------------------------------- function words


# Each of these was a hint before the rule (checked against the previous release).
@pytest.mark.parametrize("text", [
    "Call ``next()`` to fetch the item, an ``async for`` loop does it.",  # code beside "an"
    "Is your request related to a problem?",                              # a question
    "Is there a mailing list?",
])
def test_function_word_swaps_need_known_neighbours_and_no_question(model, text):
    assert not [f for f in findings(Checker(model), text) if f.kind == "realword"]


@pytest.mark.parametrize("text, word, fix", [
    ("The file was loaded form disk.", "form", "from"),   # a content word: the usual rule
    ("Their is no need to restart it.", "Their", "There"),  # a published confusion set
])
def test_other_real_word_errors_are_still_found(model, text, word, fix):
    found = [f for f in findings(Checker(model), text) if f.kind == "realword"]
    assert [(f.word, f.best) for f in found] == [(word, fix)]


# ---------------------------------------------------------------- calami check


def test_calami_check_learns_the_tree_and_explains(tmp_path, monkeypatch, capsys):
    from calami import cli

    (tmp_path / ".git").mkdir()
    (tmp_path / "src").mkdir()
    (tmp_path / "src" / "tls.py").write_text("import certifi\n\nprint(certifi.where())\n")
    (tmp_path / "README.md").write_text("Upgrade certifi before you recieve the next release.\n")
    monkeypatch.chdir(tmp_path)

    assert cli.main(["check", "--explain", "--color", "never", "."]) == 1
    out = capsys.readouterr().out
    assert "README.md:1:9: why: 'certifi' accepted: the workspace uses it" in out
    assert "README.md:1:28: why: 'recieve' flagged" in out
    assert ">>certifi<<" not in out and ">>recieve<<" in out

    assert cli.main(["check", "--no-workspace", "--format", "json", "README.md"]) == 1
    words = {f["word"] for f in __import__("json").loads(capsys.readouterr().out)}
    assert words == {"certifi", "recieve"}

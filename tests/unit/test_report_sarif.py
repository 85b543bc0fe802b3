"""SARIF output is valid against the official SARIF 2.1.0 schema and says what we mean."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest

from calami.findings import Finding, Suggestion
from calami.report import Summary, locate
from calami.report import sarif

# The OASIS SARIF 2.1.0 schema; source and checksum in tests/data/sarif/README.md.
SCHEMA_PATH = Path(__file__).parents[1] / "data" / "sarif" / "sarif-2.1.0-rtm.5.json"


@pytest.fixture(scope="module")
def validator():
    schema = json.loads(SCHEMA_PATH.read_text(encoding="utf-8"))
    jsonschema.Draft4Validator.check_schema(schema)
    return jsonschema.Draft4Validator(schema)


TEXT = "Intro.\n🙂 We recieve teh data form disk.\n"


def _at(word):
    start = TEXT.index(word)
    return start, start + len(word)


def _findings():
    return [
        Finding(*_at("recieve"), "recieve", "nonword", 0.99, (Suggestion("receive", 0.97), Suggestion("relieve", 0.01)), True),
        Finding(*_at("teh"), "teh", "nonword", 0.7, (Suggestion("the", 0.6),), False),
        Finding(*_at("form"), "form", "realword", 0.6, (Suggestion("from", 0.6),), False),
    ]


def _log(tmp_path, findings=None, summary=None, path="docs/a b.md"):
    located = locate(path, TEXT, _findings() if findings is None else findings)
    return sarif.build(located, summary or Summary(notes=["x.bin: skipped (binary file)"]), tmp_path)


def test_log_validates_against_the_schema(validator, tmp_path):
    log = _log(tmp_path)
    errors = sorted(validator.iter_errors(log), key=str)
    assert errors == []


def test_the_schema_check_can_fail(validator, tmp_path):
    log = _log(tmp_path)
    log["runs"][0]["results"][0]["level"] = "loud"  # not a SARIF level
    del log["version"]
    assert len(list(validator.iter_errors(log))) == 2


def test_empty_and_failed_runs_validate(validator, tmp_path):
    log = _log(tmp_path, findings=[], summary=Summary(failed=True, notes=[]))
    assert list(validator.iter_errors(log)) == []
    assert log["runs"][0]["invocations"][0]["executionSuccessful"] is False
    assert log["runs"][0]["results"] == []


def test_regions_are_code_point_columns_and_uris_relative(validator, tmp_path):
    log = _log(tmp_path)
    run = log["runs"][0]
    assert run["columnKind"] == "unicodeCodePoints"
    first = run["results"][0]
    location = first["locations"][0]["physicalLocation"]
    assert location["artifactLocation"] == {"uri": "docs/a%20b.md", "uriBaseId": "%SRCROOT%"}
    # "🙂 We recieve": the emoji is one code point, so 'recieve' starts at column 6.
    assert location["region"] == {"startLine": 2, "startColumn": 6, "endLine": 2, "endColumn": 13, "snippet": {"text": "recieve"}}
    assert run["originalUriBaseIds"]["%SRCROOT%"]["uri"] == tmp_path.resolve().as_uri() + "/"


def test_rules_levels_and_fixes(tmp_path):
    results = _log(tmp_path)["runs"][0]["results"]
    assert [r["ruleId"] for r in results] == ["nonword", "nonword", "realword"]
    assert [r["ruleIndex"] for r in results] == [0, 0, 1]
    assert [r["level"] for r in results] == ["warning", "note", "note"]
    assert "fixes" in results[0] and "fixes" not in results[1]
    change = results[0]["fixes"][0]["artifactChanges"][0]["replacements"][0]
    assert change["insertedContent"] == {"text": "receive"}
    assert change["deletedRegion"] == {"startLine": 2, "startColumn": 6, "endLine": 2, "endColumn": 13}
    assert results[2]["properties"]["suggestions"] == [{"text": "from", "probability": 0.6}]


def test_notes_become_notifications_and_absolute_paths_file_uris(validator, tmp_path):
    log = _log(tmp_path, path=str(tmp_path / "abs.md"))
    assert list(validator.iter_errors(log)) == []
    invocation = log["runs"][0]["invocations"][0]
    assert invocation["toolExecutionNotifications"][0]["message"]["text"] == "x.bin: skipped (binary file)"
    artifact = log["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]
    assert artifact == {"uri": (tmp_path / "abs.md").as_uri()}


def test_cli_sarif_output_validates(validator, tmp_path, monkeypatch, capsys):
    from calami import cli
    from calami.commands import check as check_command

    class Flags:
        def __init__(self, project, variant):
            pass

        def check(self, text, spans=None):
            at = text.index("teh")
            return [Finding(at, at + 3, "teh", "nonword", 0.99, (Suggestion("the", 0.99),), True)]

    monkeypatch.setattr(check_command, "CHECKER_FACTORY", lambda model_path: Flags)
    (tmp_path / ".git").mkdir()
    (tmp_path / "a.md").write_text("# Title\n\nSee teh notes.\n")
    monkeypatch.chdir(tmp_path)
    assert cli.main(["check", "--format", "sarif", "a.md"]) == 1
    log = json.loads(capsys.readouterr().out)
    assert list(validator.iter_errors(log)) == []
    assert log["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["region"]["startLine"] == 3

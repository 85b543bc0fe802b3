"""``calami suggest``: the line protocol, on the shipped model."""

import json
import subprocess
import sys

from calami.commands.suggest import parse_item


def run(stdin: str, *args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "calami", "suggest", *args], input=stdin,
                          capture_output=True, text=True, timeout=120)


def test_parse_item():
    assert parse_item("teh\n") == ("", "teh", "")
    assert parse_item("the file was loaded\tform\tdisk\r\n") == ("the file was loaded", "form", "disk")
    assert parse_item("\n") is None
    assert parse_item("a\tb\n") is None
    assert parse_item("left\t\tright\n") is None


def test_one_json_object_per_line_best_first():
    proc = run("teh\nthe file was loaded\tform\tdisk\nwe loaded it\tfrom\tdisk\n", "--limit", "3")
    assert proc.returncode == 0, proc.stderr
    records = [json.loads(line) for line in proc.stdout.splitlines()]
    assert [r["word"] for r in records] == ["teh", "form", "from"]
    for r in records:
        assert 1 <= len(r["suggestions"]) <= 3
        probs = [s["probability"] for s in r["suggestions"]]
        assert probs == sorted(probs, reverse=True)
    assert records[0]["suggestions"][0]["text"] == "the"
    assert records[1]["suggestions"][0]["text"] == "from"
    assert records[2]["suggestions"][0]["text"] == "from"  # a right word in context ranks itself first


def test_malformed_line_is_reported_and_the_rest_answered():
    proc = run("a\tb\nteh\n")
    assert proc.returncode == 2
    assert "line 1" in proc.stderr
    assert json.loads(proc.stdout.splitlines()[0])["word"] == "teh"


def test_bad_limit():
    proc = run("teh\n", "--limit", "0")
    assert proc.returncode == 2 and proc.stderr.startswith("calami: ")


def test_says_whether_the_word_is_known_and_leaves_out_zero_alternatives():
    proc = run("teh\nthe\nnormalised\ncolour\n", "--limit", "5")
    assert proc.returncode == 0, proc.stderr
    records = {r["word"]: r for r in map(json.loads, proc.stdout.splitlines())}
    assert [records[w]["known"] for w in ("teh", "the", "normalised", "colour")] == [False, True, True, True]
    for record in records.values():
        assert all(s["probability"] > 0 for s in record["suggestions"]), record
    # A right word in one variant is never offered its other-variant spelling.
    assert "normalized" not in [s["text"] for s in records["normalised"]["suggestions"]]
    assert "color" not in [s["text"] for s in records["colour"]["suggestions"]]


def test_known_follows_the_variant():
    proc = run("colour\n", "--variant", "en-US")
    [record] = map(json.loads, proc.stdout.splitlines())
    assert record["known"] is False and record["suggestions"][0]["text"] == "color"

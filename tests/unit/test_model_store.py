"""Model file round trip and the one-line errors for bad files."""

import subprocess
import sys

import msgpack
import pytest

from calami.errors import ModelError
from calami.model import Model, load
from tiny_model import build_tiny_model
from calami.model.store import FORMAT, read_model

@pytest.fixture(scope="module")
def tiny(tmp_path_factory):
    path = tmp_path_factory.mktemp("model") / "tiny.msgpack"
    return build_tiny_model(path), path


def test_round_trip_preserves_everything(tiny):
    model, path = tiny
    loaded = Model.from_payload(read_model(path)[1])
    assert loaded.lexicon.keys == model.lexicon.keys
    assert loaded.lexicon.flags == model.lexicon.flags
    assert loaded.lexicon.cased == model.lexicon.cased
    from calami.model.language import LanguageModel

    for name in LanguageModel.ARRAYS:
        assert list(getattr(loaded.lm, name)) == list(getattr(model.lm, name)), name
        assert getattr(loaded.lm, name).typecode == getattr(model.lm, name).typecode, name
    for name in LanguageModel.SCALARS:
        assert getattr(loaded.lm, name) == getattr(model.lm, name), name
    assert len(model.lm.tri_col) > 0  # the tiny corpus repeats its sentences: trigrams are stored
    assert loaded.lm_id("<code>") == model.code != model.unk
    loaded.candidates.wait()
    assert loaded.candidates.ids == model.candidates.ids
    assert loaded.candidates.tags == model.candidates.tags
    assert list(loaded.neighbours) == list(model.neighbours)
    assert loaded.sound_index == model.sound_index
    assert loaded.channel.to_dict() == model.channel.to_dict()
    header = read_model(path)[0]
    assert header["counts"]["keys"] == len(model.lexicon)
    assert len(header["sha256"]) == 64


def test_missing_file(tmp_path):
    with pytest.raises(ModelError, match="not found"):
        load(tmp_path / "nope.msgpack")


def test_a_path_the_user_gave_is_a_typo_not_a_broken_installation(tmp_path, monkeypatch):
    with pytest.raises(ModelError) as given:
        load(tmp_path / "nope.msgpack")
    assert str(tmp_path / "nope.msgpack") in str(given.value) and "--model" in str(given.value)
    assert "reinstall" not in str(given.value)
    monkeypatch.setenv("CALAMI_MODEL", str(tmp_path / "env.msgpack"))
    with pytest.raises(ModelError) as from_env:
        load()
    assert "CALAMI_MODEL" in str(from_env.value) and "reinstall" not in str(from_env.value)


def test_a_missing_shipped_model_still_says_reinstall(tmp_path, monkeypatch):
    import calami.model as model_module

    monkeypatch.delenv("CALAMI_MODEL", raising=False)
    monkeypatch.setattr(model_module, "default_model_path", lambda: tmp_path / "shipped.msgpack")
    with pytest.raises(ModelError, match="reinstall calami"):
        load()


def test_truncated_file(tiny, tmp_path):
    _, path = tiny
    bad = tmp_path / "truncated.msgpack"
    bad.write_bytes(path.read_bytes()[: path.stat().st_size // 2])
    with pytest.raises(ModelError, match="truncated or corrupt"):
        load(bad)


def test_flipped_byte_fails_the_checksum(tiny, tmp_path):
    _, path = tiny
    data = bytearray(path.read_bytes())
    data[-100] ^= 0xFF
    bad = tmp_path / "flipped.msgpack"
    bad.write_bytes(bytes(data))
    with pytest.raises(ModelError, match="checksum|corrupt"):
        load(bad)


def test_wrong_version(tmp_path):
    bad = tmp_path / "future.msgpack"
    bad.write_bytes(msgpack.packb({"format": FORMAT, "version": 99, "header": {}, "payload": b""}))
    with pytest.raises(ModelError, match="version 99"):
        load(bad)


def test_older_format_names_the_fix(tmp_path):
    # A version-1 file (the bigram model, before <code> had an id of its own).
    old = tmp_path / "old.msgpack"
    old.write_bytes(msgpack.packb({"format": FORMAT, "version": 1, "header": {}, "payload": b""}))
    with pytest.raises(ModelError) as err:
        load(old)
    message = str(err.value)
    assert "\n" not in message and "older format" in message and "calami model build" in message
    proc = subprocess.run([sys.executable, "-m", "calami", "suggest", "--model", str(old)],
                          input="teh\n", capture_output=True, text=True)
    assert proc.returncode == 2 and proc.stderr.count("\n") == 1 and "calami model build" in proc.stderr


def test_not_a_model(tmp_path):
    bad = tmp_path / "other.msgpack"
    bad.write_bytes(msgpack.packb([1, 2, 3]))
    with pytest.raises(ModelError, match="not a calami model"):
        load(bad)


def test_cli_prints_one_line_not_a_traceback(tmp_path):
    bad = tmp_path / "garbage.msgpack"
    bad.write_bytes(b"\x00\x01garbage")
    proc = subprocess.run([sys.executable, "-m", "calami", "suggest", "--model", str(bad)],
                          input="teh\n", capture_output=True, text=True)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and proc.stderr.startswith("calami: ")
    assert "Traceback" not in proc.stderr


def test_tiny_model_checks_context(tiny):
    from calami.checker import Checker

    model, _ = tiny
    checker = Checker(model)
    assert checker.suggest("teh")[0].text == "the"
    variant = Checker(model, variant="en-US")
    found = variant.check("The colour of the cache.")
    assert [f.word for f in found] == ["colour"]
    assert Checker(model, variant="en-GB").check("The colour of the cache.") == []


def test_index_unpacked_in_the_background_reports_failures_on_first_use():
    from calami.model.candidates import CandidateIndex

    def broken():
        raise ValueError("bad blob")

    index = CandidateIndex.unpacking(["a", "b"], 2, broken)
    with pytest.raises(ValueError, match="bad blob"):
        index.within("a")

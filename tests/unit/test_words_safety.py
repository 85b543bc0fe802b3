"""The word list survives concurrent editors and failed writes."""

from __future__ import annotations

import multiprocessing
import os
from pathlib import Path

import pytest

from calami.errors import CalamiError
from calami.vocab import atomic, wordlist
from calami.vocab.atomic import atomic_write_bytes, lock_path, locked

PROCESSES = 8
WORDS_EACH = 20


def _add_many(path: str, worker: int) -> None:
    for n in range(WORDS_EACH):
        # One call per word: the most read-modify-write cycles, the most races.
        wordlist.add_words(path, [f"w{worker:02d}x{n:02d}"])


def test_concurrent_adds_from_many_processes_lose_nothing(tmp_path):
    path = tmp_path / "calami-lexicon.txt"
    path.write_text("# shared list\n\nseed\n")
    context = multiprocessing.get_context("spawn")  # fresh interpreters: no shared state
    procs = [context.Process(target=_add_many, args=(str(path), w)) for w in range(PROCESSES)]
    for proc in procs:
        proc.start()
    for proc in procs:
        proc.join(120)
        assert proc.exitcode == 0
    words = wordlist.read(path).words
    expected = {f"w{w:02d}x{n:02d}" for w in range(PROCESSES) for n in range(WORDS_EACH)} | {"seed"}
    assert set(words) == expected and len(words) == len(expected)
    assert words == sorted(words, key=str.casefold)
    assert path.read_text().startswith("# shared list\n\n")
    assert not lock_path(path).exists()  # the sidecar lock is cleaned up
    assert [p.name for p in tmp_path.iterdir()] == [path.name]  # no temp files left


@pytest.mark.parametrize("failing", ["replace", "fsync"])
def test_a_failure_while_writing_leaves_the_old_file_intact(tmp_path, monkeypatch, failing):
    path = tmp_path / "calami-lexicon.txt"
    original = "# keep me\n\nalpha\nbeta\n"
    path.write_text(original)

    def boom(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(atomic.os, failing, boom)
    with pytest.raises(CalamiError, match="No space left on device"):
        wordlist.add_words(path, ["gamma"])
    monkeypatch.undo()
    assert path.read_text() == original
    assert sorted(p.name for p in tmp_path.iterdir()) == [path.name]  # temp file removed


def test_a_crash_in_the_middle_of_writing_data_leaves_the_old_file(tmp_path, monkeypatch):
    path = tmp_path / "w.txt"
    path.write_bytes(b"old content\n")
    real_fdopen = os.fdopen

    class HalfWriter:
        def __init__(self, handle):
            self.handle = handle

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.handle.close()

        def write(self, data):
            self.handle.write(data[: len(data) // 2])
            raise KeyboardInterrupt  # the user pressed Ctrl-C half way

    monkeypatch.setattr(atomic.os, "fdopen", lambda fd, mode: HalfWriter(real_fdopen(fd, mode)))
    with pytest.raises(KeyboardInterrupt):
        atomic_write_bytes(path, b"new content that is much longer than the old one\n")
    assert path.read_bytes() == b"old content\n"
    assert [p.name for p in tmp_path.iterdir()] == ["w.txt"]


def test_atomic_write_keeps_permission_bits(tmp_path):
    path = tmp_path / "w.txt"
    path.write_text("x\n")
    os.chmod(path, 0o640)
    atomic_write_bytes(path, b"y\n")
    assert path.read_bytes() == b"y\n"
    assert os.stat(path).st_mode & 0o777 == 0o640


def _hold_lock(path: str, started, release) -> None:
    with locked(path):
        started.set()
        release.wait(30)


def test_lock_excludes_another_process(tmp_path):
    import fcntl

    path = tmp_path / "w.txt"
    context = multiprocessing.get_context("spawn")
    started, release = context.Event(), context.Event()
    holder = context.Process(target=_hold_lock, args=(str(path), started, release))
    holder.start()
    try:
        assert started.wait(30)
        fd = os.open(lock_path(path), os.O_RDWR)
        try:
            with pytest.raises(BlockingIOError):
                fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        finally:
            os.close(fd)
    finally:
        release.set()
        holder.join(30)
    assert holder.exitcode == 0


def test_atomic_write_through_a_symbolic_link_keeps_the_link(tmp_path):
    real = tmp_path / "shared" / "words.txt"
    real.parent.mkdir()
    real.write_text("a\n")
    link = tmp_path / "calami-lexicon.txt"
    link.symlink_to(real)
    wordlist.add_words(link, ["b"])
    assert link.is_symlink() and real.read_text() == "a\nb\n"

"""SIGKILL in the middle of profile writes: the file is always old or new, never damaged."""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import textwrap

import msgpack

from calami.vocab.profile import FILE_NAME, validate

WRITER = textwrap.dedent(
    """
    import sys
    from calami.vocab.profile import Profile
    profile = Profile(sys.argv[1])
    i = 0
    while True:
        profile.record_replacement("teh", "the", "w%d" % (i % 50), "shop")
        profile.add_word("word%d" % (i % 30))
        i += 1
        print(i, flush=True)  # both changes of round i are on disk now
    """
)


def _count(folder) -> int:
    path = folder / FILE_NAME
    if not path.exists():
        return 0
    data = validate(msgpack.unpackb(path.read_bytes(), raw=False))  # raises if damaged
    return data["corrections"].get("teh", {}).get("the", 0)


def _read_until(writer: subprocess.Popen, rounds: int) -> int:
    """Read the writer's acknowledgements until it has done ``rounds`` (or died); the last one seen."""
    last = 0
    while last < rounds:
        line = writer.stdout.readline()
        if not line:
            break
        last = int(line)
    return last


def test_killed_writers_never_leave_a_damaged_profile(tmp_path):
    rng = random.Random(4)
    acknowledged = 0
    for _ in range(12):
        writers = [
            subprocess.Popen([sys.executable, "-c", WRITER, str(tmp_path)], stdout=subprocess.PIPE, text=True)
            for _ in range(2)
        ]
        # Let each writer acknowledge a random number of rounds, then kill both
        # while they keep writing: counted in writes, not seconds, so a loaded
        # machine changes nothing but the duration.
        seen = [_read_until(w, rng.randint(3, 15)) for w in writers]
        for w in writers:
            os.kill(w.pid, signal.SIGKILL)
        for n, w in enumerate(writers):
            w.wait()
            lines = w.stdout.read().split()
            acknowledged += int(lines[-1]) if lines else seen[n]
        count = _count(tmp_path)
        # Every acknowledged write is on disk; at most one unacknowledged one per writer.
        assert acknowledged <= count <= acknowledged + 2
        acknowledged = count
        leftovers = [n for n in os.listdir(tmp_path) if ".corrupt-" in n]
        assert leftovers == []
    assert acknowledged > 50  # the loop really wrote while being killed

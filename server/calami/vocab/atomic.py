"""Crash-safe file writes and a cross-process lock for user-owned files.

Word lists and profiles belong to the user: a crash, a full disk or two
editors writing at once must never leave them truncated or lose an entry.

* ``atomic_write_bytes`` writes a temporary file in the same folder, fsyncs
  it and renames it over the target (``os.replace`` is atomic on POSIX), so
  readers see either the old content or the new, never half of it.
* ``locked`` serialises read-modify-write cycles between processes with
  ``fcntl.flock`` on a sidecar ``<name>.lock`` file.  The target itself cannot
  carry the lock because every atomic write replaces its inode.
"""

from __future__ import annotations

import contextlib
import fcntl
import os
import tempfile
from pathlib import Path
from typing import Iterator


def atomic_write_bytes(path: str | os.PathLike[str], data: bytes) -> None:
    """Replace ``path`` with ``data`` so that no reader ever sees a partial file.

    The file's permission bits are kept when it already exists.  On any error
    the temporary file is removed and the original is left untouched.
    """
    # Write through a symbolic link to the real file, so the link survives.
    target = Path(os.path.realpath(path))
    folder = target.parent
    try:
        mode: int | None = os.stat(target).st_mode & 0o7777
    except FileNotFoundError:
        mode = None
    fd, tmp_name = tempfile.mkstemp(dir=folder, prefix=f".{target.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        if mode is not None:
            os.chmod(tmp_name, mode)
        else:
            # mkstemp creates 0600; a new file gets the usual umask-derived mode.
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp_name, 0o666 & ~umask)
        os.replace(tmp_name, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp_name)
        raise
    _fsync_folder(folder)


def _fsync_folder(folder: Path) -> None:
    """Make the rename itself durable (best effort: not every FS allows it)."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def lock_path(path: str | os.PathLike[str]) -> Path:
    """The sidecar lock file used for ``path``."""
    target = Path(path)
    return target.with_name(target.name + ".lock")


@contextlib.contextmanager
def locked(path: str | os.PathLike[str]) -> Iterator[None]:
    """Hold an exclusive lock for ``path`` (blocking) for the ``with`` body.

    The sidecar file is removed on release so it does not litter a checked-in
    folder.  Removal is safe because a waiter that wakes up holding a lock on
    a file that has since been unlinked (or replaced) notices that the inode
    behind the name changed and tries again.
    """
    sidecar = lock_path(path)
    while True:
        fd = os.open(sidecar, os.O_RDWR | os.O_CREAT, 0o644)
        try:
            fcntl.flock(fd, fcntl.LOCK_EX)
            try:
                current = os.stat(sidecar)
            except FileNotFoundError:
                current = None
            mine = os.fstat(fd)
            if current is not None and (current.st_ino, current.st_dev) == (mine.st_ino, mine.st_dev):
                break
        except BaseException:
            os.close(fd)
            raise
        os.close(fd)  # lost the race with a releaser: lock the new file instead
    try:
        yield
    finally:
        with contextlib.suppress(OSError):
            os.unlink(sidecar)
        os.close(fd)  # closing releases the flock

"""The workspace vocabulary of each workspace folder, learnt off the main thread.

When the editor opens a workspace, each folder is scanned on a background
thread (``vocab.workspace_scan``, bounded by ``SCAN_SECONDS``).  The first
check of a document waits for its folder's scan at most ``FIRST_WAIT``
seconds after the scan started, so a small repository's first diagnostics
already know its names; a larger one gets its diagnostics at once and
again when the scan is done.  Saved and watched files are learnt again;
a change of the vocabulary makes new checkers (the caches go with them),
so incremental results always equal a full re-check.
"""

from __future__ import annotations

import asyncio
import logging
import threading
import time
from pathlib import Path
from typing import Callable, Sequence

from calami.vocab.usage import WorkspaceVocabulary
from calami.vocab.workspace_scan import learn_file, scan_tree, wanted

log = logging.getLogger("calami.lsp")

SCAN_SECONDS = 20.0
FIRST_WAIT = 1.5


class _Scan:
    def __init__(self, folder: Path, vocabulary: WorkspaceVocabulary) -> None:
        self.folder = folder
        self.vocabulary = vocabulary
        self.done = threading.Event()
        self.started = time.monotonic()
        self.stop = False


class WorkspaceScans:
    """One vocabulary per workspace folder, and the scans that fill them."""

    def __init__(self, known: Callable[[], Callable[[str], bool] | None] = lambda: None) -> None:
        self._known = known  # called on the scan thread: may wait for the model
        self._scans: dict[Path, _Scan] = {}
        self.on_done: Callable[[Path], None] = lambda folder: None

    def start(self, folders: Sequence[Path]) -> None:
        """Scan every folder not scanned yet; forget folders no longer open."""
        wanted_folders = set(folders)
        for folder in list(self._scans):
            if folder not in wanted_folders:
                self._scans.pop(folder).stop = True
        for folder in folders:
            if folder in self._scans or not folder.is_dir():
                continue
            scan = self._scans[folder] = _Scan(folder, WorkspaceVocabulary())
            threading.Thread(target=self._run, args=(scan,), name="calami-vocabulary", daemon=True).start()

    def _run(self, scan: _Scan) -> None:
        try:
            known = self._known()
            if known is not None:
                scan.vocabulary = WorkspaceVocabulary(known)
            report = scan_tree(scan.vocabulary, [scan.folder], deadline=time.monotonic() + SCAN_SECONDS,
                               cancelled=lambda: scan.stop)
            log.info("calami: learnt the vocabulary of %s: %d files, %d words of its own in %.2f s%s",
                     scan.folder, report.files, len(scan.vocabulary), report.seconds,
                     "" if report.complete else " (stopped early: the budget ran out)")
        except Exception:  # a scan failure must never stop the hints
            log.exception("calami: learning the vocabulary of %s failed", scan.folder)
        finally:
            scan.done.set()
        if not scan.stop:
            self.on_done(scan.folder)

    def _scan_of(self, path: Path | None) -> _Scan | None:
        if path is None:
            return None
        best = None
        for folder, scan in self._scans.items():
            try:
                path.relative_to(folder)
            except ValueError:
                continue
            if best is None or len(folder.parts) > len(best.folder.parts):
                best = scan
        return best

    def vocabulary_for(self, path: Path | None) -> WorkspaceVocabulary | None:
        """The vocabulary of the folder holding ``path``, once its scan is done."""
        scan = self._scan_of(path)
        return scan.vocabulary if scan is not None and scan.done.is_set() else None

    async def ready(self, path: Path | None) -> None:
        """Wait (without blocking the event loop) for the scan, up to FIRST_WAIT after it began."""
        scan = self._scan_of(path)
        if scan is None or scan.done.is_set():
            return
        remaining = scan.started + FIRST_WAIT - time.monotonic()
        if remaining > 0:
            await asyncio.get_running_loop().run_in_executor(None, scan.done.wait, remaining)

    def learn(self, path: Path) -> bool:
        """Learn a saved or changed file again; True if the vocabulary changed."""
        scan = self._scan_of(path)
        if scan is None or not scan.done.is_set() or not wanted(path):
            return False
        name = str(path)
        old = scan.vocabulary.uses_of(name)
        if path.is_file():
            learn_file(scan.vocabulary, path)
        else:
            scan.vocabulary.remove(name)
        return scan.vocabulary.uses_of(name) != old

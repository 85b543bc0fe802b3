"""A one-line progress bar on stderr for long runs at a terminal.

It appears only when stderr is a terminal and the run has lasted long enough
to be worth watching, redraws at most ten times a second, and erases itself
at the end so the report that follows stays clean.
"""

from __future__ import annotations

import time
from typing import IO

WIDTH = 30
DELAY = 0.5  # seconds before the bar first shows
INTERVAL = 0.1


class Progress:
    def __init__(self, total: int, stream: IO[str], enabled: bool | None = None, clock=time.monotonic) -> None:
        self.total = total
        self.stream = stream
        if enabled is None:
            isatty = getattr(stream, "isatty", None)
            enabled = bool(isatty and isatty())
        self.enabled = enabled and total > 1
        self.clock = clock
        self.started = clock()
        self.last_draw = 0.0
        self.shown = False

    def update(self, done: int, label: str = "") -> None:
        if not self.enabled:
            return
        now = self.clock()
        if now - self.started < DELAY or (self.shown and now - self.last_draw < INTERVAL and done < self.total):
            return
        self.last_draw = now
        self.shown = True
        filled = WIDTH * done // max(1, self.total)
        bar = "#" * filled + "-" * (WIDTH - filled)
        tail = label[-40:]
        self.stream.write(f"\r\x1b[K[{bar}] {done}/{self.total} {tail}")
        self.stream.flush()

    def close(self) -> None:
        if self.shown:
            self.stream.write("\r\x1b[K")
            self.stream.flush()
            self.shown = False

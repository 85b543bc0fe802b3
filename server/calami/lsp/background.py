"""The model, loaded on a thread after ``initialize`` has been answered.

Loading the shipped model takes about as long as importing the protocol
library; doing both before answering ``initialize`` made start-up miss its
budget.  The editor gets its answer first; the first check waits for the
model.  A model that turns out unreadable still ends the server with one
line on stderr and exit status 2, as a missing model does at start.
"""

from __future__ import annotations

import logging
import os
import sys
import threading
from typing import Any, Callable

from calami.errors import CalamiError

log = logging.getLogger("calami.lsp")


class BackgroundModel:
    """``get()`` returns the loaded model, waiting for the loading thread if needed."""

    def __init__(self, load: Callable[[], Any], exit: Callable[[int], Any] = os._exit) -> None:
        self._load = load
        self._exit = exit
        self._lock = threading.Lock()
        self._done = threading.Event()
        self._thread: threading.Thread | None = None
        self._model: Any = None
        self._error: BaseException | None = None

    def start(self) -> None:
        """Begin loading (once); called when the client says it is initialized."""
        with self._lock:
            if self._thread is None:
                self._thread = threading.Thread(target=self._run, name="calami-model", daemon=True)
                self._thread.start()

    def get(self) -> Any:
        self.start()
        self._done.wait()
        if self._error is not None:
            raise self._error
        return self._model

    def _run(self) -> None:
        try:
            self._model = self._load()
        except CalamiError as exc:
            self._error = exc
            print(f"calami: {exc}", file=sys.stderr, flush=True)
            self._exit(2)
        except BaseException as exc:  # noqa: BLE001 - report any failure as one line, then stop
            self._error = exc
            print(f"calami: cannot load the model: {exc.__class__.__name__}: {exc}", file=sys.stderr, flush=True)
            self._exit(2)
        finally:
            self._done.set()

"""Logging for the server: stderr always, and window/logMessage once connected.

stdout carries the JSON-RPC stream over stdio, so nothing may ever print
there.  Records logged from the checking thread are handed to the event
loop, which owns the connection.
"""

from __future__ import annotations

import asyncio
import logging
import sys
from typing import Any

from lsprotocol import types

LEVELS = {
    logging.ERROR: types.MessageType.Error,
    logging.WARNING: types.MessageType.Warning,
    logging.INFO: types.MessageType.Info,
    logging.DEBUG: types.MessageType.Log,
}


class ClientLogHandler(logging.Handler):
    """Forwards log records to the client as window/logMessage."""

    def __init__(self, server: Any, loop: asyncio.AbstractEventLoop) -> None:
        # Same threshold as stderr: --log-level debug shows per-check timings in the editor too.
        super().__init__(min(logging.INFO, logging.getLogger("calami").getEffectiveLevel()))
        self.server = server
        self.loop = loop

    def emit(self, record: logging.LogRecord) -> None:
        try:
            params = types.LogMessageParams(type=_level(record.levelno), message=self.format(record))
            if self.loop.is_closed():
                return
            try:
                running = asyncio.get_running_loop()
            except RuntimeError:
                running = None
            if running is self.loop:
                self.server.window_log_message(params)
            else:
                self.loop.call_soon_threadsafe(self.server.window_log_message, params)
        except Exception:  # never let logging break the server
            self.handleError(record)


def _level(levelno: int) -> types.MessageType:
    for level, kind in LEVELS.items():
        if levelno >= level:
            return kind
    return types.MessageType.Log


def to_stderr(level: int = logging.INFO) -> None:
    """Send calami's (and pygls') records to stderr, never stdout."""
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(logging.Formatter("%(asctime)s %(levelname)s %(name)s: %(message)s"))
    root = logging.getLogger()
    root.handlers[:] = [handler]
    root.setLevel(logging.WARNING)
    logging.getLogger("calami").setLevel(level)


def to_client(server: Any) -> None:
    """Also forward calami's records to the client (called once the loop runs)."""
    logger = logging.getLogger("calami")
    if any(isinstance(h, ClientLogHandler) for h in logger.handlers):
        return
    handler = ClientLogHandler(server, asyncio.get_event_loop())
    handler.setFormatter(logging.Formatter("%(message)s"))
    logger.addHandler(handler)

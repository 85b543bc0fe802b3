"""Stands between an editor and `calami serve`, writing down every message.

For editors that cannot report what they did themselves (a GUI under
Xvfb), the test reads this log: what the editor asked, what calami
answered, and the edits the editor sent back.  The editor starts it as its
server command:

    python lsp_tap.py LOG -- calami serve

Each message is one JSON line in LOG: {"from": "editor"|"server", "message": ...}.
Bytes are passed through unchanged; the log is a copy.
"""

from __future__ import annotations

import json
import subprocess
import sys
import threading
from typing import BinaryIO


def read_message(stream: BinaryIO) -> bytes | None:
    """One LSP frame (headers and body) from ``stream``, or None at its end."""
    headers = b""
    while not headers.endswith(b"\r\n\r\n"):
        byte = stream.read(1)
        if not byte:
            return None
        headers += byte
    length = 0
    for line in headers.split(b"\r\n"):
        name, _, value = line.partition(b":")
        if name.strip().lower() == b"content-length":
            length = int(value.strip())
    body = stream.read(length)
    return headers + body if len(body) == length else None


def pump(source: BinaryIO, target: BinaryIO, side: str, log: BinaryIO, lock: threading.Lock) -> None:
    while (frame := read_message(source)) is not None:
        body = frame.split(b"\r\n\r\n", 1)[1]
        try:
            message = json.loads(body)
        except ValueError:
            message = {"unparsed": body.decode("utf-8", "replace")}
        with lock:
            log.write(json.dumps({"from": side, "message": message}).encode("utf-8") + b"\n")
            log.flush()
        try:
            target.write(frame)
            target.flush()
        except (BrokenPipeError, ValueError):
            return
    try:
        target.close()
    except (BrokenPipeError, ValueError):
        pass


def main(argv: list[str]) -> int:
    log_path, separator, *command = argv
    assert separator == "--" and command, "usage: lsp_tap.py LOG -- COMMAND..."
    server = subprocess.Popen(command, stdin=subprocess.PIPE, stdout=subprocess.PIPE)
    lock = threading.Lock()
    with open(log_path, "ab") as log:
        to_server = threading.Thread(target=pump, args=(sys.stdin.buffer, server.stdin, "editor", log, lock),
                                     daemon=True)
        to_server.start()
        pump(server.stdout, sys.stdout.buffer, "server", log, lock)
        code = server.wait()
    return code


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))

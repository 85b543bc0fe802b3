"""--tcp: the same protocol over a loopback socket."""

from __future__ import annotations

import json
import os
import socket
import subprocess
import time

from session import FAKE_SERVER


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _frame(message: dict) -> bytes:
    body = json.dumps(message).encode()
    return b"Content-Length: %d\r\n\r\n" % len(body) + body


def _read_until_response(sock: socket.socket, msg_id: int) -> dict:
    """Read frames (log notifications may come first) until the response with ``msg_id``."""
    buffer = b""
    while True:
        while b"\r\n\r\n" in buffer:
            header, rest = buffer.split(b"\r\n\r\n", 1)
            length = int(header.split(b"Content-Length: ")[1].split(b"\r\n")[0])
            if len(rest) < length:
                break
            message = json.loads(rest[:length])
            buffer = rest[length:]
            if message.get("id") == msg_id:
                return message
        chunk = sock.recv(65536)
        assert chunk, "server closed the connection"
        buffer += chunk


def test_tcp_server_answers_initialize_on_loopback(tmp_path):
    port = _free_port()
    proc = subprocess.Popen([*FAKE_SERVER, "--tcp", str(port)], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            env=dict(os.environ, CALAMI_PROFILE_DIR=str(tmp_path)))
    try:
        deadline = time.time() + 30
        while True:
            try:
                sock = socket.create_connection(("127.0.0.1", port), timeout=10)
                break
            except OSError:
                if time.time() > deadline:
                    raise
                time.sleep(0.1)
        with sock:
            sock.sendall(_frame({"jsonrpc": "2.0", "id": 1, "method": "initialize",
                                 "params": {"processId": None, "rootUri": None, "capabilities": {}}}))
            reply = _read_until_response(sock, 1)
        assert reply["id"] == 1 and reply["result"]["serverInfo"]["name"] == "calami"
        # Bound to loopback only: the listening socket is not reachable on other addresses.
        listening = subprocess.run(["ss", "-ltnH", f"sport = :{port}"], capture_output=True, text=True)
        if listening.returncode == 0 and listening.stdout.strip():
            # Columns: state, recv-q, send-q, local address:port, peer address:port.
            local = [line.split()[3] for line in listening.stdout.splitlines() if line.strip()]
            assert local and all(address.startswith("127.0.0.1:") for address in local), local
    finally:
        proc.kill()
        proc.wait()
    assert proc.stdout.read() == b""  # nothing on stdout, even over TCP

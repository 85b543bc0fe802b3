"""Server latency as the editor sees it (prints figures; never asserts on time).

    python tests/benchmarks/bench_server.py [--fake] [--model FILE] [--edits N] [--baseline REV [--baseline-model own]] [--modes push,pull]

A plain JSON-RPC client (asyncio pipes, ``Content-Length`` framing,
``json``; no LSP library on the client side, so its own decoding does not
count) drives ``calami serve`` over stdio and measures, on the client's
clock:

1. process spawn -> ``initialize`` answer;
2. ``didOpen`` of a 20,000-word Markdown document -> its first diagnostics;
3. one-character ``didChange`` -> the diagnostics for that version
   (median, p95), with the server's own figure beside it (from its debug
   log: change received -> diagnostics written), so the gap shows;

each in push mode (``textDocument/publishDiagnostics`` with the version)
and pull mode (``textDocument/diagnostic`` after every change, passing the
last ``resultId`` as an editor does); then RSS with ten 5,000-word
documents open.

``--baseline REV`` runs the server of another commit (checked out with
``git worktree`` under build/) in the same run: the two servers take turns
on every measurement, so load from other work on the machine falls on both
alike, and the ratios are printed.  Both use the same model file, unless
``--baseline-model own``: then the baseline serves the model shipped in its
own checkout (to compare a new model with the previous one; a model file of
another format version cannot be read by the other server).

The prose is real English: docstrings of the Python standard library
(installed with Python itself), laid out as Markdown paragraphs, with a few
misspellings folded in so there is something to publish.  ``--fake`` runs
the protocol with the small test checker (for when no model is installed).
"""

from __future__ import annotations

import argparse
import asyncio
import importlib
import json
import os
import random
import re
import statistics
import subprocess
import sys
import tempfile
import time
import warnings
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
REPO = HERE.parents[1]

MODULES = [
    "argparse", "asyncio", "collections", "concurrent.futures", "contextlib", "csv", "dataclasses", "datetime",
    "decimal", "email", "enum", "fractions", "functools", "heapq", "http.client", "inspect", "json", "logging",
    "mailbox", "multiprocessing", "optparse", "pathlib", "pickle", "random", "shutil", "smtplib", "socket",
    "statistics", "subprocess", "tarfile", "tempfile", "textwrap", "threading", "typing", "unittest", "urllib.request",
    "zipfile", "turtle", "pydoc", "difflib", "imaplib", "ftplib", "calendar", "locale", "gettext",
]
SLIPS = {"the": "teh", "receive": "recieve", "world": "wrold", "from": "form", "often": "ofen"}


def stdlib_paragraphs() -> list[str]:
    """Docstring paragraphs of stdlib modules: real prose, offline, stable per Python version."""
    warnings.simplefilter("ignore", DeprecationWarning)  # typing.io & co. warn when touched
    out: list[str] = []
    for name in MODULES:
        try:
            module = importlib.import_module(name)
        except Exception:
            continue
        objects = [module] + [getattr(module, a) for a in sorted(dir(module)) if not a.startswith("_")]
        for obj in objects:
            doc = getattr(obj, "__doc__", None)
            if not isinstance(doc, str):
                continue
            for para in doc.split("\n\n"):
                words = para.split()
                if len(words) >= 8 and sum(w.isalpha() for w in words) > 0.7 * len(words):
                    out.append(" ".join(words))
    return list(dict.fromkeys(out))


def markdown_document(words: int, seed: int) -> str:
    rng = random.Random(seed)
    paragraphs = stdlib_paragraphs()
    rng.shuffle(paragraphs)
    parts: list[str] = []
    count = 0
    for i, para in enumerate(paragraphs * 10):
        tokens = [SLIPS.get(w, w) if rng.random() < 0.05 else w for w in para.split()]
        if i % 12 == 0:
            parts.append(f"## Section {i // 12 + 1}")
        parts.append(" ".join(tokens))
        count += len(tokens)
        if count >= words:
            break
    return "\n\n".join(parts) + "\n"


def one_char_edits(text: str, count: int, seed: int = 2) -> list[tuple[int, int, int, str]]:
    """(line, start column, end column, new text): insert an 'x', then delete a character, alternately."""
    lines = text.split("\n")
    rng = random.Random(seed)
    long_lines = [i for i, line in enumerate(lines) if len(line) > 20]
    out = []
    for n in range(count):
        line = rng.choice(long_lines)
        col = rng.randrange(1, len(lines[line]) - 1)
        if n % 2 == 0:
            lines[line] = lines[line][:col] + "x" + lines[line][col:]
            out.append((line, col, col, "x"))
        else:
            lines[line] = lines[line][:col] + lines[line][col + 1:]
            out.append((line, col, col + 1, ""))
    return out


# Server-side figure from the debug log: the current server says how long
# since the change arrived; older ones only timed the check.
# In pull mode only the pull answer counts.
SINCE_CHANGE = re.compile(r"v(\d+): \d+ diagnostics in [0-9.]+ ms \(([0-9.]+) ms since the change arrived")
PULL_ANSWERED = re.compile(r"v(\d+): pull answered, \d+ diagnostics \(([0-9.]+) ms since the change arrived")
CHECK_ONLY = re.compile(r"v(\d+): \d+ diagnostics in ([0-9.]+) ms$")


def _median_p95(values: list[float]) -> tuple[float, float]:
    ordered = sorted(values)
    return statistics.median(ordered), ordered[min(len(ordered) - 1, int(0.95 * len(ordered)))]


def rss_mb(pid: int) -> float:
    for line in Path(f"/proc/{pid}/status").read_text().splitlines():
        if line.startswith("VmRSS:"):
            return int(line.split()[1]) / 1024
    return float("nan")


class Client:
    """A minimal LSP client: framing, ids, notifications; answers the server's few requests."""

    def __init__(self, proc: asyncio.subprocess.Process, pull: bool) -> None:
        self.proc = proc
        self.pull = pull
        self.next_id = 0
        self.waiting: dict[int, asyncio.Future[Any]] = {}
        self.published: dict[tuple[str, int], tuple[float, int]] = {}  # (uri, version) -> (arrival, count)
        self.server_ms: dict[tuple[str, int], float] = {}  # (uri path tail, version) -> server's figure
        self.events: dict[tuple[str, int], asyncio.Event] = {}
        self.reader = asyncio.ensure_future(self._read())

    @classmethod
    async def spawn(cls, command: list[str], env: dict[str, str], pull: bool) -> "Client":
        proc = await asyncio.create_subprocess_exec(
            *command, stdin=asyncio.subprocess.PIPE, stdout=asyncio.subprocess.PIPE, stderr=asyncio.subprocess.DEVNULL,
            env=env, limit=2**26,
        )
        return cls(proc, pull)

    def _write(self, message: dict[str, Any]) -> None:
        body = json.dumps(message).encode()
        self.proc.stdin.write(b"Content-Length: %d\r\n\r\n" % len(body) + body)

    def request(self, method: str, params: Any) -> asyncio.Future[Any]:
        self.next_id += 1
        future = asyncio.get_running_loop().create_future()
        self.waiting[self.next_id] = future
        self._write({"jsonrpc": "2.0", "id": self.next_id, "method": method, "params": params})
        return future

    def notify(self, method: str, params: Any) -> None:
        self._write({"jsonrpc": "2.0", "method": method, "params": params})

    def event(self, uri: str, version: int) -> asyncio.Event:
        return self.events.setdefault((uri, version), asyncio.Event())

    async def _read(self) -> None:
        stream = self.proc.stdout
        while True:
            length = 0
            while True:
                line = await stream.readline()
                if not line:
                    return
                if line.lower().startswith(b"content-length:"):
                    length = int(line.split(b":")[1])
                elif line in (b"\r\n", b"\n"):
                    break
            message = json.loads(await stream.readexactly(length))
            now = time.perf_counter()
            if "id" in message and "method" not in message:
                future = self.waiting.pop(message["id"], None)
                if future is not None and not future.done():
                    future.set_result((now, message))
            elif "id" in message:  # a request from the server
                result = [None] * len(message["params"].get("items", [])) if message["method"] == "workspace/configuration" else None
                self._write({"jsonrpc": "2.0", "id": message["id"], "result": result})
            elif message.get("method") == "textDocument/publishDiagnostics":
                params = message["params"]
                key = (params["uri"], params.get("version"))
                self.published[key] = (now, len(params["diagnostics"]))
                self.event(*key).set()
            elif message.get("method") == "window/logMessage":
                text = message["params"]["message"]
                match = PULL_ANSWERED.search(text) if self.pull else SINCE_CHANGE.search(text) or CHECK_ONLY.search(text)
                if match:
                    self.server_ms[(text.split(" v")[0].rsplit("/", 1)[-1], int(match.group(1)))] = float(match.group(2))

    async def stop(self) -> None:
        try:
            await asyncio.wait_for(self.request("shutdown", None), 10)
            self.notify("exit", None)
            await asyncio.wait_for(self.proc.wait(), 10)
        except (asyncio.TimeoutError, ConnectionError):
            self.proc.kill()
            await self.proc.wait()
        self.reader.cancel()


class Server:
    """One server build under test: how to start it and what it is called."""

    def __init__(self, label: str, command: list[str], env: dict[str, str]) -> None:
        self.label = label
        self.command = command
        self.env = env

    async def start(self, root: Path, pull: bool) -> tuple[Client, float]:
        """Spawn and initialize; returns the client and spawn -> initialize answer (s)."""
        started = time.perf_counter()
        client = await Client.spawn(self.command, self.env, pull)
        caps: dict[str, Any] = {"textDocument": {"publishDiagnostics": {"versionSupport": True}}}
        if pull:
            caps["textDocument"]["diagnostic"] = {}
        answered, _ = await client.request("initialize", {
            "processId": os.getpid(), "rootUri": root.as_uri(), "capabilities": caps,
            "workspaceFolders": [{"uri": root.as_uri(), "name": root.name}],
            "initializationOptions": {"debounceMs": 0},
        })
        client.notify("initialized", {})
        return client, answered - started


async def first_diagnostics(client: Client, uri: str, text: str, pull: bool) -> tuple[float, int, Any]:
    """didOpen -> diagnostics of version 1: (seconds, count, resultId)."""
    started = time.perf_counter()
    client.notify("textDocument/didOpen", {"textDocument": {"uri": uri, "languageId": "markdown", "version": 1, "text": text}})
    if pull:
        arrived, message = await client.request("textDocument/diagnostic", {"textDocument": {"uri": uri}})
        result = message["result"]
        return arrived - started, len(result.get("items", [])), result.get("resultId")
    await client.event(uri, 1).wait()
    arrived, count = client.published[(uri, 1)]
    return arrived - started, count, None


async def one_edit(client: Client, uri: str, version: int, edit: tuple[int, int, int, str], pull: bool,
                   result_id: Any) -> tuple[float, Any]:
    line, start, end, new = edit
    started = time.perf_counter()
    client.notify("textDocument/didChange", {
        "textDocument": {"uri": uri, "version": version},
        "contentChanges": [{"range": {"start": {"line": line, "character": start}, "end": {"line": line, "character": end}},
                            "text": new}],
    })
    if pull:
        params: dict[str, Any] = {"textDocument": {"uri": uri}}
        if result_id is not None:
            params["previousResultId"] = result_id
        arrived, message = await client.request("textDocument/diagnostic", params)
        return arrived - started, message["result"].get("resultId", result_id)
    await client.event(uri, version).wait()
    return client.published[(uri, version)][0] - started, None


def _ms(values: list[float]) -> str:
    median, p95 = _median_p95(values)
    return f"median {median * 1000:6.1f} ms, p95 {p95 * 1000:6.1f} ms"


async def bench_start(servers: list[Server], root: Path, runs: int) -> None:
    times: dict[str, list[float]] = {s.label: [] for s in servers}
    for _ in range(runs):
        for server in servers:  # take turns, so load falls on both alike
            client, took = await server.start(root, pull=False)
            times[server.label].append(took)
            await client.stop()
    print(f"\nspawn -> initialize answer ({runs} runs each, alternating):")
    for server in servers:
        t = times[server.label]
        print(f"  {server.label:10s} median {statistics.median(t) * 1000:6.0f} ms (min {min(t) * 1000:.0f}, max {max(t) * 1000:.0f})")
    if len(servers) == 2:
        a, b = (statistics.median(times[s.label]) for s in servers)
        print(f"  ratio {servers[0].label}/{servers[1].label}: {a / b:.2f}")


async def bench_mode(servers: list[Server], root: Path, text: str, edits: int, pull: bool) -> None:
    mode = "pull" if pull else "push"
    print(f"\n{mode} mode, 20,000-word Markdown ({len(text):,} chars):")
    clients, uris, result_ids = [], [], []
    try:
        for server in servers:  # one at a time: a server that waits costs the other nothing
            client, _ = await server.start(root, pull)
            clients.append(client)
            uri = (root / f"big-{mode}-{server.label}.md").as_uri()
            took, count, result_id = await first_diagnostics(client, uri, text, pull)
            uris.append(uri)
            result_ids.append(result_id)
            print(f"  {server.label:10s} didOpen right after initialized -> first diagnostics {took * 1000:6.0f} ms "
                  f"({count} diagnostics; includes waiting for the model)")
        plan = one_char_edits(text, edits)
        timings: list[list[float]] = [[] for _ in servers]
        for n, edit in enumerate(plan):
            for i, client in enumerate(clients):  # take turns edit by edit
                took, result_ids[i] = await one_edit(client, uris[i], n + 2, edit, pull, result_ids[i])
                timings[i].append(took)
        await asyncio.sleep(0.2)  # let the last log messages arrive
        print(f"  one-character didChange -> diagnostics of that version ({edits} edits, alternating):")
        for i, server in enumerate(servers):
            tail = uris[i].rsplit("/", 1)[-1]
            server_side = [clients[i].server_ms[(tail, v)] for v in range(2, edits + 2) if (tail, v) in clients[i].server_ms]
            side = (f"server's own figure: median {_median_p95(server_side)[0]:5.1f} ms, p95 {_median_p95(server_side)[1]:5.1f} ms"
                    if len(server_side) >= edits // 2 else "server's own figure: not logged")
            print(f"  {server.label:10s} client sees {_ms(timings[i])};  {side}")
        if len(servers) == 2:
            (m0, p0), (m1, p1) = _median_p95(timings[0]), _median_p95(timings[1])
            print(f"  ratio {servers[0].label}/{servers[1].label}: median {m0 / m1:.2f}, p95 {p0 / p1:.2f}")
        fresh: list[list[float]] = [[] for _ in servers]
        for seed in (3, 4, 5):  # documents neither server has seen, taking turns
            other = markdown_document(20_000, seed=seed)
            for i, (server, client) in enumerate(zip(servers, clients)):
                uri = (root / f"other{seed}-{mode}-{server.label}.md").as_uri()
                took, count, _ = await first_diagnostics(client, uri, other, pull)
                fresh[i].append(took)
        for i, server in enumerate(servers):
            print(f"  {server.label:10s} didOpen of another 20,000-word document, model loaded -> diagnostics: "
                  f"median {statistics.median(fresh[i]) * 1000:6.0f} ms of 3")
        if len(servers) == 2:
            print(f"  ratio {servers[0].label}/{servers[1].label}: {statistics.median(fresh[0]) / statistics.median(fresh[1]):.2f}")
    finally:
        for client in clients:
            await client.stop()


async def bench_rss(server: Server, root: Path) -> None:
    client, _ = await server.start(root, pull=False)
    try:
        base = rss_mb(client.proc.pid)
        uris = []
        for i in range(10):
            uri = (root / f"doc{i}.md").as_uri()
            client.notify("textDocument/didOpen", {"textDocument": {
                "uri": uri, "languageId": "markdown", "version": 1, "text": markdown_document(5_000, seed=10 + i)}})
            uris.append(uri)
        for uri in uris:
            await client.event(uri, 1).wait()
        print(f"\nRSS ({server.label}): {base:.0f} MB after initialize; {rss_mb(client.proc.pid):.0f} MB with ten 5,000-word documents open")
    finally:
        await client.stop()


def baseline_tree(rev: str) -> Path:
    """A checkout of ``rev`` under build/ (made once per commit, reused)."""
    commit = subprocess.run(["git", "rev-parse", "--short", rev], cwd=REPO, capture_output=True, text=True, check=True).stdout.strip()
    tree = REPO / "build" / f"bench-baseline-{commit}"
    if not (tree / "server" / "calami").is_dir():
        subprocess.run(["git", "worktree", "add", "--detach", str(tree), commit], cwd=REPO, check=True,
                       stdout=subprocess.DEVNULL)
    return tree


def server_for(tree: Path, label: str, fake: bool, model: str | None, profile: Path) -> Server:
    env = dict(os.environ, CALAMI_PROFILE_DIR=str(profile), PYTHONPATH=str(tree / "server"))
    if fake:
        command = [sys.executable, str(tree / "tests" / "lsp" / "fake_server.py"), "--debug"]
    else:
        command = [sys.executable, "-m", "calami", "serve", "--log-level", "debug"] + (["--model", model] if model else [])
    return Server(label, command, env)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--fake", action="store_true", help="use the small test checker instead of the model")
    parser.add_argument("--model", help="model file for calami serve (default: the shipped model)")
    parser.add_argument("--edits", type=int, default=60)
    parser.add_argument("--starts", type=int, default=5, help="spawn -> initialize runs per server")
    parser.add_argument("--baseline", metavar="REV", help="also run this commit's server, taking turns with this one")
    parser.add_argument("--baseline-model", choices=("same", "own"), default="same",
                        help="'own': the baseline serves the model shipped in its checkout")
    parser.add_argument("--modes", default="push,pull")
    args = parser.parse_args()

    model = args.model
    if not args.fake and model is None:  # the same model file for both servers
        sys.path.insert(0, str(REPO / "server"))
        from calami.model import default_model_path

        model = str(default_model_path())
    with tempfile.TemporaryDirectory() as tmp:
        root = Path(tmp) / "proj"
        (root / ".git").mkdir(parents=True)
        servers = [server_for(REPO, "this", args.fake, model, Path(tmp) / "profile")]
        if args.baseline:
            tree = baseline_tree(args.baseline)
            own = str(tree / "models" / "calami-en.msgpack") if args.baseline_model == "own" else model
            servers.append(server_for(tree, args.baseline, args.fake, own, Path(tmp) / "profile"))
        print(f"servers: {', '.join(s.label for s in servers)}; checker: {'fake' if args.fake else model}; "
              f"python {sys.version.split()[0]}; {os.cpu_count()} cores")
        text = markdown_document(20_000, seed=1)
        asyncio.run(bench_start(servers, root, args.starts))
        for mode in args.modes.split(","):
            asyncio.run(bench_mode(servers, root, text, args.edits, pull=mode.strip() == "pull"))
        asyncio.run(bench_rss(servers[0], root))


if __name__ == "__main__":
    main()

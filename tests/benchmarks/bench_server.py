"""Server benchmark (prints figures; never asserts on time).

    python tests/benchmarks/bench_server.py [--fake] [--edits N]

1. one-character edit -> published diagnostics in a 20,000-word Markdown
   document (median, p95), and the ratio to a full re-check of that document;
2. server start -> ``initialize`` response;
3. server RSS with ten 5,000-word documents open.

The prose is real English: docstrings of the Python standard library
(installed with Python itself), laid out as Markdown paragraphs, with a few
misspellings folded in so there is something to publish.  ``--fake`` runs
the protocol with the small test checker (for when no model is installed).
"""

from __future__ import annotations

import argparse
import asyncio
import warnings
import importlib
import random
import re
import statistics
import sys
import time
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent / "lsp"))


import session  # noqa: E402

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


SERVER_TIME = re.compile(r"diagnostics in ([0-9.]+) ms")


def _median_p95(values: list[float]) -> tuple[float, float]:
    ordered = sorted(values)
    return statistics.median(ordered), ordered[min(len(ordered) - 1, int(0.95 * len(ordered)))]


def rss_mb(pid: int) -> float:
    for line in Path(f"/proc/{pid}/status").read_text().splitlines():
        if line.startswith("VmRSS:"):
            return int(line.split()[1]) / 1024
    return float("nan")


async def wait_version(client: Any, uri: str, version: int, timeout: float = 600) -> Any:
    return await session.until(lambda: session.published_for(client, uri, version), timeout=timeout)


async def bench_edits(command: list[str], edits: int, tmp: Path) -> None:
    text = markdown_document(20_000, seed=1)
    path = tmp / "big.md"
    client, _ = await session.start(tmp / "profile", [tmp], command=command, options={"debounceMs": 0})
    try:
        t0 = time.perf_counter()
        uri = session.open_doc(client, path, text)
        first = await wait_version(client, uri, 1)
        open_s = time.perf_counter() - t0
        print(f"20,000-word Markdown ({len(text):,} chars): open -> diagnostics {open_s * 1000:.0f} ms, "
              f"{len(first.diagnostics)} diagnostics")
        lines = text.split("\n")
        rng = random.Random(2)
        timings = []
        for n in range(edits):
            version = n + 2
            line = rng.choice([i for i, l in enumerate(lines) if len(l) > 20])
            col = rng.randrange(1, len(lines[line]) - 1)
            if n % 2 == 0:
                rng_ = ((line, col), (line, col))
                new = "x"
                lines[line] = lines[line][:col] + "x" + lines[line][col:]
            else:  # delete a character again
                rng_ = ((line, col), (line, col + 1))
                new = ""
                lines[line] = lines[line][:col] + lines[line][col + 1:]
            t = time.perf_counter()
            session.edit(client, uri, version, rng_[0], rng_[1], new)
            await wait_version(client, uri, version)
            timings.append(time.perf_counter() - t)
        median, p95 = _median_p95(timings)
        print(f"one-char edit -> published diagnostics ({edits} edits, client-measured round trip): "
              f"median {median * 1000:.1f} ms, p95 {p95 * 1000:.1f} ms")
        server_ms = [float(m.group(1)) for m in (SERVER_TIME.search(x.message) for x in client.log_messages)
                     if m and "big.md" in m.string][1:]  # [0] is the open
        if server_ms:
            s_median, s_p95 = _median_p95(server_ms)
            print(f"  server time (edit received -> diagnostics written, from the server's debug log): "
                  f"median {s_median:.1f} ms, p95 {s_p95:.1f} ms")
        # A full re-check of the same document: a fresh document (cold cache).
        t = time.perf_counter()
        uri2 = session.open_doc(client, tmp / "copy.md", "\n".join(lines))
        await wait_version(client, uri2, 1)
        full = time.perf_counter() - t
        print(f"full re-check of the same document (cold cache, same server, client-measured): {full * 1000:.0f} ms; "
              f"median edit / full = 1/{full / median:.0f}")
        copy_ms = [float(m.group(1)) for m in (SERVER_TIME.search(x.message) for x in client.log_messages)
                   if m and "copy.md" in m.string]
        if server_ms and copy_ms:
            print(f"  server time: full check {copy_ms[-1]:.0f} ms; median edit / full = 1/{copy_ms[-1] / s_median:.0f}")
    finally:
        await session.stop(client)


async def bench_start(command: list[str], tmp: Path, runs: int = 5) -> None:
    times = []
    for i in range(runs):
        t = time.perf_counter()
        client, _ = await session.start(tmp / "profile", [tmp], command=command)
        times.append(time.perf_counter() - t)
        await session.stop(client)
    print(f"server start -> initialize response: median {statistics.median(times) * 1000:.0f} ms "
          f"(min {min(times) * 1000:.0f}, max {max(times) * 1000:.0f}, {runs} runs)")


async def bench_rss(command: list[str], tmp: Path) -> None:
    client, _ = await session.start(tmp / "profile", [tmp], command=command, options={"debounceMs": 0})
    try:
        pid = client._server.pid
        base = rss_mb(pid)
        uris = [session.open_doc(client, tmp / f"doc{i}.md", markdown_document(5_000, seed=10 + i)) for i in range(10)]
        for uri in uris:
            await wait_version(client, uri, 1)
        print(f"RSS: {base:.0f} MB after initialize; {rss_mb(pid):.0f} MB with ten 5,000-word documents open")
    finally:
        await session.stop(client)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--fake", action="store_true", help="use the small test checker instead of the model")
    parser.add_argument("--model", help="model file for calami serve (default: the shipped model)")
    parser.add_argument("--edits", type=int, default=60)
    args = parser.parse_args()
    command = (session.FAKE_SERVER + ["--debug"] if args.fake
               else session.REAL_SERVER + ["--log-level", "debug"] + (["--model", args.model] if args.model else []))
    label = "fake checker" if args.fake else f"calami serve ({args.model or 'shipped model'})"
    print(f"server: {label}; python {sys.version.split()[0]}")
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        root = Path(tmp)
        (root / ".git").mkdir()
        asyncio.run(bench_start(command, root))
        asyncio.run(bench_edits(command, args.edits, root))
        asyncio.run(bench_rss(command, root))


if __name__ == "__main__":
    main()

"""Model file size, load time and memory, each in a fresh process.

    python tests/benchmarks/bench_model.py [--model PATH] [--runs 5]

Load time is measured inside the child from just before ``load()`` to just
after, and to the moment the candidate index (unpacked on a background
thread) is ready; interpreter start-up and our imports are printed
separately.
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]

CHILD = r"""
import json, resource, sys, time
t0 = time.perf_counter()
import calami.model, calami.checker
t1 = time.perf_counter()
model = calami.model.load(sys.argv[1] or None)
t2 = time.perf_counter()
model.candidates.wait()
t2b = time.perf_counter()
calami.checker.Checker(model).check("Teh parser loaded the file form disk.")
t3 = time.perf_counter()
rss = int(open('/proc/self/status').read().split('VmRSS:')[1].split()[0]) / 1024
print(json.dumps({"import": t1 - t0, "load": t2 - t1, "index_ready": t2b - t1, "first_check": t3 - t2b, "rss_mb": rss}))
"""


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--model", default="")
    ap.add_argument("--runs", type=int, default=5)
    args = ap.parse_args()
    sys.path.insert(0, str(REPO / "server"))
    from calami.model import default_model_path

    path = Path(args.model) if args.model else default_model_path()
    runs = []
    for _ in range(args.runs):
        out = subprocess.run([sys.executable, "-c", CHILD, str(path)], capture_output=True, text=True, check=True)
        runs.append(json.loads(out.stdout))
    med = {k: statistics.median(r[k] for r in runs) for k in runs[0]}
    print(f"model file {path}: {path.stat().st_size / 1e6:.1f} MB")
    print(f"median of {args.runs} fresh processes: import {med['import'] * 1000:.0f} ms, load() returns after"
          f" {med['load'] * 1000:.0f} ms, candidate index ready (background unpacking) after {med['index_ready'] * 1000:.0f} ms,"
          f" first check {med['first_check'] * 1000:.0f} ms, RSS {med['rss_mb']:.0f} MB")


if __name__ == "__main__":
    main()

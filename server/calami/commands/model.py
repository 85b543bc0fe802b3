"""``calami model build|info``: rebuild the shipped model, or describe one."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path


def register(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("model", help="build or describe a model file")
    msub = p.add_subparsers(dest="model_command", metavar="ACTION")
    b = msub.add_parser("build", help="train a model from word lists, a prose corpus and misspelling pairs")
    b.add_argument("--scowl", type=Path, default=Path("/usr/share/dict/scowl"), help="folder of SCOWL word lists")
    b.add_argument("--scowl-size", type=int, default=70, help="largest SCOWL size to include (default 70)")
    b.add_argument("--corpus", type=Path, nargs="*", default=[], help="prose files, one paragraph per line")
    b.add_argument("--pairs", type=Path, nargs="*", default=[], help="misspelling<TAB>correction files (train split used)")
    b.add_argument("--no-general-frequencies", action="store_true", help="do not blend in wordfreq frequencies")
    b.add_argument("--sources", type=Path, help="JSON file describing the sources, copied into the header")
    b.add_argument("--jobs", type=int, default=1, help="worker processes for the corpus pass (default 1)")
    b.add_argument("-o", "--output", type=Path, required=True)
    b.set_defaults(run=run_build)
    i = msub.add_parser("info", help="print a model file's header")
    i.add_argument("path", nargs="?", type=Path)
    i.set_defaults(run=run_info)
    p.set_defaults(run=lambda args: (p.print_help(sys.stderr), 2)[1])


def run_build(args: argparse.Namespace) -> int:
    from calami.errors import CalamiError
    from calami.model.build import BuildConfig, build, wordfreq_frequency
    from calami.model.pairs import read_pairs, split

    pairs = []
    for path in args.pairs:
        if not path.exists():
            raise CalamiError(f"pairs file not found: {path}")
        pairs.extend(split(read_pairs(path))[0])
    for path in args.corpus:
        if not path.exists():
            raise CalamiError(f"corpus file not found: {path}")
    cfg = BuildConfig(
        scowl_dir=args.scowl if args.scowl and args.scowl.exists() else None,
        scowl_max_size=args.scowl_size,
        corpus_files=list(args.corpus),
        pairs=pairs,
        general_frequency=None if args.no_general_frequencies else wordfreq_frequency(),
        log=lambda msg: print(msg, file=sys.stderr, flush=True),
        jobs=max(1, args.jobs),
    )
    if cfg.scowl_dir is None:
        raise CalamiError(f"word lists not found at {args.scowl}; install the Debian package 'scowl' or pass --scowl")
    model, header = build(cfg)
    if args.sources:
        header["sources"] = json.loads(args.sources.read_text(encoding="utf-8"))
    size = model.save(args.output, header)
    print(f"wrote {args.output} ({size / 1e6:.1f} MB) in {header['build_seconds']} s", file=sys.stderr)
    return 0


def run_info(args: argparse.Namespace) -> int:
    from calami.model import default_model_path
    from calami.model.store import read_model

    path = args.path or default_model_path()
    header, _ = read_model(path)
    print(json.dumps(header, indent=2, sort_keys=True))
    return 0

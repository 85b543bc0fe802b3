"""Command-line entry point: ``calami <command> ...``.

Each command lives in its own module under ``calami.commands`` and exposes
``register(subparsers)`` and ``run(args) -> int``.  Modules are imported only
when their command runs, so ``calami suggest`` does not pay for the server.
"""

from __future__ import annotations

import argparse
import importlib
import sys

from calami import __version__
from calami.errors import CalamiError

COMMANDS = {
    "check": "calami.commands.check",
    "suggest": "calami.commands.suggest",
    "serve": "calami.commands.serve",
    "lexicon": "calami.commands.words",  # also answers to its old name, "words"
    "profile": "calami.commands.profile",
    "model": "calami.commands.model",
}


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="calami", description="Context-aware spelling hints for prose, comments and docstrings.")
    parser.add_argument("--version", action="version", version=f"calami {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, module_name in COMMANDS.items():
        try:
            module = importlib.import_module(module_name)
        except ModuleNotFoundError as exc:
            if exc.name == module_name:
                continue  # command not built yet
            raise
        module.register(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "run", None):
        parser.print_help(sys.stderr)
        return 2
    try:
        return int(args.run(args) or 0)
    except CalamiError as exc:
        print(f"calami: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return 0

"""``calami serve``: the language server over stdio (default) or TCP."""

from __future__ import annotations

import argparse
import ipaddress
import logging
from pathlib import Path
from typing import Any, Sequence

from calami.errors import CalamiError

LOG_LEVELS = ("debug", "info", "warning", "error")


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "serve",
        help="run the language server",
        description="Run the calami language server. Talks LSP over stdin/stdout unless --tcp is given; logs go to stderr.",
    )
    parser.add_argument("--stdio", action="store_true", help="use stdin/stdout (the default)")
    parser.add_argument("--tcp", metavar="[HOST:]PORT", help="listen on TCP instead (HOST defaults to 127.0.0.1)")
    parser.add_argument("--model", metavar="PATH", help="model file (default: $CALAMI_MODEL or the shipped model)")
    parser.add_argument("--log-level", choices=LOG_LEVELS, default="info", help="stderr log level (default: info)")
    parser.set_defaults(run=run)


def parse_address(value: str) -> tuple[str, int]:
    """'PORT' or 'HOST:PORT' (IPv6 in brackets); loopback unless a host is named."""
    host, sep, port_text = value.rpartition(":")
    if not sep:
        host, port_text = "127.0.0.1", value
    host = host.strip("[]") or "127.0.0.1"
    try:
        port = int(port_text)
    except ValueError:
        raise CalamiError(f"--tcp expects [HOST:]PORT, got {value!r}") from None
    if not 0 < port < 65536:
        raise CalamiError(f"--tcp port must be between 1 and 65535, got {port}")
    return host, port


class ModelCheckers:
    """Builds checkers on the loaded model; a calami.modelPath setting loads another once."""

    def __init__(self, model: Any, default_path: str | None) -> None:
        self.models: dict[str, Any] = {default_path or "": model}
        self.default = model
        self.failed: set[str] = set()

    def model_for(self, path: str) -> Any:
        if not path or path in self.failed:
            return self.default.get() if hasattr(self.default, "get") else self.default
        if path not in self.models:
            from calami.model import load

            try:
                self.models[path] = load(path)
            except (CalamiError, OSError) as exc:
                self.failed.add(path)
                logging.getLogger("calami.lsp").error("calami: calami.modelPath: %s; using the default model", exc)
                return self.model_for("")
        return self.models[path]

    def known_word_predicate(self):
        """Lexicon membership for the workspace scan (waits for the model)."""
        ids = self.model_for("").lexicon.ids
        return ids.__contains__

    def __call__(self, adaptations: Sequence[Any], settings: Any) -> Any:
        from calami.checker import Checker

        return Checker(
            self.model_for(settings.model_path),
            adaptations=list(adaptations),
            variant=settings.variant,
            thresholds=settings.thresholds,
            max_suggestions=settings.max_suggestions,
        )


def load_model(path: str | None) -> Any:
    """The model, or a one-line CalamiError naming the fix (no traceback)."""
    from calami.model import load

    try:
        return load(path)
    except CalamiError as exc:
        raise CalamiError(f"{exc} (fix: pass --model PATH or set CALAMI_MODEL to a valid model file)") from None
    except OSError as exc:
        raise CalamiError(f"cannot read the model: {exc} (fix: pass --model PATH or set CALAMI_MODEL)") from None
    except Exception as exc:  # a damaged file may fail anywhere in decoding
        raise CalamiError(
            f"the model file is unreadable ({exc.__class__.__name__}: {exc}) "
            "(fix: reinstall calami or pass --model PATH to a valid model file)"
        ) from None


def run(args: argparse.Namespace) -> int:
    from calami.lsp import logs

    logs.to_stderr(getattr(logging, args.log_level.upper()))
    address = parse_address(args.tcp) if args.tcp else None
    from calami.model_location import default_model_path  # not calami.model: too slow to import here

    path = Path(args.model).expanduser() if args.model else default_model_path()
    if not path.is_file():  # the cheap part of load_model's checks, before answering anyone
        load_model(args.model)
    from calami.lsp.background import BackgroundModel

    # Loaded once the client has its initialize answer (see lsp/background.py).
    model = BackgroundModel(lambda: load_model(args.model))

    from calami.lsp.server import build_server
    from calami.vocab.profile import Profile

    server = build_server(ModelCheckers(model, args.model), Profile(), warm_up=model.start)
    if address is None:
        server.start_io()
        model.get()  # a broken model still ends with one line and status 2, client or not
    else:
        host, port = address
        if not _is_loopback(host):
            logging.getLogger("calami.lsp").warning("calami: listening on %s, which is not a loopback address", host)
        server.start_tcp(host, port)
        model.get()
    return 0


def _is_loopback(host: str) -> bool:
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False

"""Start the real server (stdio) with the fake checker: ``python fake_server.py``."""

import logging
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))

from fake_checker import make_fake  # noqa: E402

from calami.lsp import logs  # noqa: E402
from calami.lsp.server import build_server  # noqa: E402
from calami.vocab.profile import Profile  # noqa: E402

if __name__ == "__main__":
    logs.to_stderr(logging.DEBUG if "--debug" in sys.argv else logging.INFO)
    build_server(make_fake, Profile()).start_io()

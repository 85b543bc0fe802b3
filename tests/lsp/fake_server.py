"""Start the real server with the fake checker: ``python fake_server.py [--debug] [--tcp [HOST:]PORT]``."""

import logging
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))

from fake_checker import make_fake  # noqa: E402

from calami.commands.serve import parse_address  # noqa: E402
from calami.lsp import logs  # noqa: E402
from calami.lsp.server import build_server  # noqa: E402
from calami.vocab.profile import Profile  # noqa: E402

if __name__ == "__main__":
    logs.to_stderr(logging.DEBUG if "--debug" in sys.argv else logging.INFO)
    server = build_server(make_fake, Profile())
    if "--tcp" in sys.argv:
        server.start_tcp(*parse_address(sys.argv[sys.argv.index("--tcp") + 1]))
    else:
        server.start_io()

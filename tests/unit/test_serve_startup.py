"""`calami serve` answers initialize before it imports the model code (start-up time)."""

from __future__ import annotations

import subprocess
import sys


def test_the_server_path_does_not_import_the_model_code():
    # What serve.run imports before the initialize answer (the model itself
    # loads on a thread afterwards, see lsp/background.py).
    code = (
        "import sys\n"
        "import calami.commands.serve, calami.lsp.logs, calami.lsp.background, calami.lsp.server, calami.lsp.handlers\n"
        "import calami.vocab.profile, calami.model_location\n"
        "calami.model_location.default_model_path()\n"
        "print(sorted(m for m in sys.modules if m == 'calami.model' or m.startswith(('calami.model.', 'calami.checker'))))\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "[]"


def test_the_model_package_still_names_its_file():
    from calami import model, model_location

    assert model.default_model_path() == model_location.default_model_path()
    assert model.MODEL_FILENAME == model_location.MODEL_FILENAME == "calami-en.msgpack"

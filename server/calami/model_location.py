"""Where the model file is, without importing the model code.

The server checks that the model exists before it answers ``initialize``;
importing ``calami.model`` for that (the statistics code and its
dependencies) cost a noticeable share of start-up.
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

MODEL_FILENAME = "calami-en.msgpack"


def default_model_path() -> Path:
    """$CALAMI_MODEL, the repository's models/ folder, or the installed share/ copy."""
    env = os.environ.get("CALAMI_MODEL")
    if env:
        return Path(env).expanduser()
    here = Path(__file__).resolve()
    repo_copy = here.parents[2] / "models" / MODEL_FILENAME
    if repo_copy.exists():
        return repo_copy
    for prefix in (sys.prefix, sys.base_prefix):
        shared = Path(prefix) / "share" / "calami" / MODEL_FILENAME
        if shared.exists():
            return shared
    return repo_copy

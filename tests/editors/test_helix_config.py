"""editor-configs/helix/languages.toml, checked without Helix.

Helix is not packaged for Debian bookworm and is not on PyPI or npm, so no
test runs it.  Helix publishes no schema for languages.toml; what is checked
is that the file parses as TOML (Python's tomllib, TOML 1.0) and carries
what the README promises: the calami server, its settings equal to the
server's own defaults, and calami in every language entry.  The key names
are Helix's as remembered from its documentation (24.x), not checked
against a running Helix.
"""

from __future__ import annotations

import tomllib

from editor_support import EDITOR_CONFIGS, server_defaults

FILE = EDITOR_CONFIGS / "helix" / "languages.toml"
# The languages the README lists under "Which files are checked".
LANGUAGES = {"markdown", "rst", "latex", "git-commit", "text", "html", "python", "javascript", "jsx",
             "typescript", "tsx", "rust", "go", "c", "cpp", "java", "bash", "yaml", "toml"}


def test_helix_languages_toml_defines_the_calami_server_with_the_server_defaults():
    data = tomllib.loads(FILE.read_text(encoding="utf-8"))
    server = data["language-server"]["calami"]
    assert server["command"] == "calami" and server["args"] == ["serve"]
    assert server["config"] == {"calami": server_defaults()}


def test_helix_languages_toml_adds_calami_to_every_listed_language():
    data = tomllib.loads(FILE.read_text(encoding="utf-8"))
    entries = {entry["name"]: entry for entry in data["language"]}
    assert set(entries) == LANGUAGES
    for name, entry in entries.items():
        servers = entry["language-servers"]
        assert servers[-1] == "calami" and servers.count("calami") == 1, (name, servers)
    # The plain-text language the file defines itself.
    assert entries["text"]["file-types"] == ["txt", "text"] and entries["text"]["scope"] == "text.plain"

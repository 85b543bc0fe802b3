"""Write models/recipe/sources.json: every input of the model, with version and licence.

    python models/recipe/write_sources.py [build/corpus/stats.json]

The JSON is copied into the model file's header by `calami model build
--sources`, so a model always says what it was made from.
"""

from __future__ import annotations

import json
import subprocess
import sys
from importlib import metadata
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]


def dpkg_version(package: str) -> str:
    try:
        out = subprocess.run(["dpkg-query", "-W", "-f=${Version}", package], capture_output=True, text=True, check=True)
        return out.stdout.strip()
    except (OSError, subprocess.CalledProcessError):
        return "unknown"


def main() -> None:
    stats_path = Path(sys.argv[1]) if len(sys.argv) > 1 else REPO / "build" / "corpus" / "stats.json"
    stats = json.loads(stats_path.read_text(encoding="utf-8"))
    try:
        wordfreq_version = metadata.version("wordfreq")
    except metadata.PackageNotFoundError:
        wordfreq_version = "not installed"
    sources = {
        "word_lists": {"name": "SCOWL", "debian_package": "scowl", "version": dpkg_version("scowl"),
                       "sizes": "<= 70; english, american, british, british_z, variant_1 lists",
                       "licence": "permissive (SCOWL copyright notice; see /usr/share/doc/scowl/copyright)"},
        "general_frequencies": {"name": "wordfreq", "pypi_package": "wordfreq", "version": wordfreq_version,
                                "licence": "code Apache-2.0; data CC BY-SA 4.0"},
        "corpus": {
            "word_tokens": stats["word_tokens"], "paragraphs": stats["paragraphs"],
            "packages": {name: {k: s[k] for k in ("package", "version", "licence", "word_tokens")}
                         for name, s in sorted(stats["sources"].items())},
        },
        "misspellings": "models/data/misspellings (train split); sources and licences in its README.md",
    }
    out = REPO / "models" / "recipe" / "sources.json"
    out.write_text(json.dumps(sources, indent=1, sort_keys=True) + "\n", encoding="utf-8")
    print(f"wrote {out}")


if __name__ == "__main__":
    main()

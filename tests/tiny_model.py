"""A tiny model built with the real pipeline, for tests that need a model
file but not the shipped one (round trips, corrupt files, `calami serve`)."""

from __future__ import annotations

from pathlib import Path

from calami.model.build import BuildConfig, build
from calami.model.lexicon import GB, US

CORPUS = [
    "The parser reads the file from disk and writes the result to the cache.",
    "There is no cache for the result when the file is missing.",
    "Their parser is faster than the old one, and the cache is smaller than before.",
    "We loaded the file from disk, then we parsed it.",
] * 5

WORDS = ("the parser reads file from disk and writes result to cache there is no for when missing their faster "
         "than old one smaller before we loaded then parsed it form farm a an of or were where").split()


def build_tiny_model(path: Path):
    """Build, save to ``path`` and return the model."""
    cfg = BuildConfig(extra_words=[(w, US | GB) for w in WORDS] + [("colour", GB), ("color", US), ("Python", US | GB)],
                      corpus_lines=CORPUS, pairs=[("teh", "the"), ("recieve", "receive"), ("form", "from")],
                      admit_min_count=1000)
    model, header = build(cfg)
    model.save(path, header)
    return model

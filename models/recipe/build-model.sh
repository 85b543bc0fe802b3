#!/bin/sh
# Rebuild the shipped model from the corpus in build/corpus (see README.md
# beside this file for the corpus steps), then tune its decision constants
# on development data.  Run from the repository root.
set -eu
PY=${PYTHON:-.venv/bin/python}
OUT=${1:-models/calami-en.msgpack}
CORPUS_DIR=${CORPUS_DIR:-build/corpus}
CORPUS=$(ls "$CORPUS_DIR"/*.txt | grep -v dev-heldout.txt)
$PY -m calami model build --jobs "${JOBS:-2}" \
    --scowl /usr/share/dict/scowl --scowl-size 70 \
    --corpus $CORPUS \
    --pairs models/data/misspellings/*.tsv \
    --sources models/recipe/sources.json \
    -o "$OUT"
$PY models/recipe/tune_params.py "$OUT" --dev "$CORPUS_DIR/dev-heldout.txt" --write
$PY -m calami model info "$OUT" | head -40

#!/bin/sh
# Rebuild the shipped model from the corpus in build/corpus (see README.md
# beside this file for the corpus steps), then tune its decision constants
# on development data.  Run from the repository root.
set -eu
PY=${PYTHON:-.venv/bin/python}
OUT=${1:-models/calami-en.msgpack}
CORPUS=$(ls build/corpus/*.txt | grep -v dev-heldout.txt)
$PY -m calami model build \
    --scowl /usr/share/dict/scowl --scowl-size 70 \
    --corpus $CORPUS \
    --pairs models/data/misspellings/*.tsv \
    --sources models/recipe/sources.json \
    -o "$OUT"
$PY models/recipe/tune_params.py "$OUT" --write
$PY -m calami model info "$OUT" | head -40

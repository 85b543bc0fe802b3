"""Candidate sets against a brute-force rapidfuzz scan of the whole lexicon.

Queries are real misspellings from the dev split of the shipped misspelling
sets (models/data/misspellings, sources in its README).  rapidfuzz.process
with the OSA scorer (PyPI rapidfuzz) is the outside reference.
"""

import random
from pathlib import Path

import pytest
from rapidfuzz import process
from rapidfuzz.distance import OSA

from calami.model.candidates import CandidateIndex, deletion_neighbourhood
from calami.model.pairs import read_pairs, split

DATA = Path(__file__).resolve().parents[2] / "models" / "data" / "misspellings"


def dev_queries(n: int) -> list[str]:
    words = []
    for path in sorted(DATA.glob("*.tsv")):
        words += [typed.lower() for typed, _ in split(read_pairs(path))[1] if " " not in typed]
    random.Random(7).shuffle(words)
    return words[:n]


def test_candidates_equal_brute_force_scan(model):
    keys = model.lexicon.keys
    for q in dev_queries(150):
        ours = {keys[k]: d for k, d in model.candidates.within(q, 2).items()}
        ref = {m: int(d) for m, d, _ in process.extract(q, keys, scorer=OSA.distance, score_cutoff=2, limit=None)}
        assert ours == ref, q


def test_distance_one_queries(model):
    keys = model.lexicon.keys
    for q in dev_queries(40):
        ours = {keys[k] for k in model.candidates.within(q, 1)}
        ref = {m for m, _, _ in process.extract(q, keys, scorer=OSA.distance, score_cutoff=1, limit=None)}
        assert ours == ref, q


def test_small_index_with_hash_collisions_is_exact():
    # Four buckets force many collisions; verification must remove them all.
    keys = ["the", "then", "than", "they", "form", "from", "farm", "fro", "a", "an", "and", "ant"]
    index = CandidateIndex.build(keys, bucket_bits=2)
    for q in ["teh", "fomr", "thn", "ab", "x", "andd", ""]:
        ours = {keys[k]: d for k, d in index.within(q, 2).items()}
        ref = {m: int(d) for m, d, _ in process.extract(q, keys, scorer=OSA.distance, score_cutoff=2, limit=None)} if q else {}
        assert ours == ref, q


def test_deletion_neighbourhood_contents():
    assert deletion_neighbourhood("abc", 1) == {"abc", "ab", "ac", "bc"}
    assert deletion_neighbourhood("abc", 2) == {"abc", "ab", "ac", "bc", "a", "b", "c"}


def test_inconsistent_arrays_are_rejected():
    with pytest.raises(ValueError):
        CandidateIndex(["a"], 2, [0, 0, 0, 0, 5], b"", b"")


def test_distance_three_fallback_is_a_verified_subset_of_the_scan(model):
    """at_three() is partial by design; whatever it returns must be exactly distance 3 (rapidfuzz OSA)."""
    keys = model.lexicon.keys
    found_any = 0
    for q in dev_queries(30):
        ours = {keys[k]: d for k, d in model.candidates.at_three(q).items()}
        ref = {m for m, d, _ in process.extract(q, keys, scorer=OSA.distance, score_cutoff=3, limit=None) if d == 3}
        assert set(ours) <= ref, q
        assert set(ours.values()) <= {3}
        found_any += len(ours)
    assert found_any > 0


def test_distance_three_fallback_reaches_far_misspellings(model):
    # Pairs from the train split of toefl-spell / wikipedia-mitton (models/data/misspellings), OSA distance 3.
    keys = model.lexicon.keys
    for typed, intended in [("nessecary", "necessary"), ("pususading", "persuading"), ("exagerrerated", "exaggerated")]:
        assert OSA.distance(typed, intended) == 3
        assert intended in {keys[k] for k in model.candidates.at_three(typed)}


def test_distance_three_fallback_skips_short_and_non_ascii_words(model):
    assert model.candidates.at_three("장준영") == {}
    assert model.candidates.at_three("türkçe") == {}
    assert model.candidates.at_three("xqzt") == {}

"""Our OSA distance against rapidfuzz (PyPI), an outside implementation.

We implement the *restricted* Damerau-Levenshtein distance (optimal string
alignment): rapidfuzz.distance.OSA is the matching reference.  The
unrestricted variant (rapidfuzz.distance.DamerauLevenshtein) differs only
when a transposed pair is edited again, e.g. "ca" -> "abc" (OSA 3, DL 2).
"""

from hypothesis import given, settings
from hypothesis import strategies as st
from rapidfuzz.distance import OSA, DamerauLevenshtein

from calami.model.distance import osa_distance, osa_distance_dp, pattern_masks

small_alphabet = st.text(alphabet="abcde'", max_size=12)
any_text = st.text(max_size=20)


@settings(max_examples=3000, deadline=None)
@given(small_alphabet, small_alphabet)
def test_bit_parallel_equals_rapidfuzz_osa(a, b):
    assert osa_distance(a, b) == OSA.distance(a, b)


@settings(max_examples=1000, deadline=None)
@given(any_text, any_text)
def test_unicode_strings_equal_rapidfuzz_osa(a, b):
    assert osa_distance(a, b, pattern_masks(a)) == OSA.distance(a, b) == osa_distance_dp(a, b)


def test_restricted_differs_from_unrestricted_where_expected():
    assert osa_distance("ca", "abc") == 3
    assert DamerauLevenshtein.distance("ca", "abc") == 2


def test_long_patterns_beyond_64_characters():
    a = "x" * 70 + "ab"
    b = "x" * 70 + "ba"
    assert osa_distance(a, b) == OSA.distance(a, b) == 1

"""Restricted Damerau-Levenshtein distance (optimal string alignment, OSA).

The restricted variant counts an adjacent transposition as one edit but
never edits a substring twice; it is what the candidate generator and the
error model's single-edit classes assume.  The bit-parallel form (Hyyrö
2003, "A bit-vector algorithm for computing Levenshtein and Damerau edit
distances") does one pass of a few integer operations per character of the
second string, which is what makes verifying candidates cheap in Python.
"""

from __future__ import annotations


def pattern_masks(pattern: str) -> dict[str, int]:
    """Bit mask of the positions of each character in ``pattern`` (reusable)."""
    masks: dict[str, int] = {}
    bit = 1
    for ch in pattern:
        masks[ch] = masks.get(ch, 0) | bit
        bit <<= 1
    return masks


def osa_distance(a: str, b: str, masks: dict[str, int] | None = None) -> int:
    """OSA distance between ``a`` and ``b``; pass ``pattern_masks(a)`` to reuse work."""
    m = len(a)
    if m == 0:
        return len(b)
    if masks is None:
        masks = pattern_masks(a)
    full = (1 << m) - 1
    last = 1 << (m - 1)
    vp = full
    vn = 0
    d0 = 0
    pm_prev = 0
    score = m
    get = masks.get
    for ch in b:
        pm = get(ch, 0)
        tr = (((~d0) & pm) << 1) & pm_prev
        d0 = ((((pm & vp) + vp) ^ vp) | pm | vn | tr) & full
        hp = vn | (~(d0 | vp) & full)
        hn = d0 & vp
        if hp & last:
            score += 1
        elif hn & last:
            score -= 1
        hp = ((hp << 1) | 1) & full
        hn = (hn << 1) & full
        vp = hn | (~(d0 | hp) & full)
        vn = hp & d0
        pm_prev = pm
    return score


def osa_distance_dp(a: str, b: str) -> int:
    """Textbook dynamic-programming OSA distance, kept as a readable cross-check."""
    prev2: list[int] = []
    prev = list(range(len(b) + 1))
    for i in range(1, len(a) + 1):
        cur = [i] + [0] * len(b)
        for j in range(1, len(b) + 1):
            cost = 0 if a[i - 1] == b[j - 1] else 1
            best = min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost)
            if i > 1 and j > 1 and a[i - 1] == b[j - 2] and a[i - 2] == b[j - 1]:
                best = min(best, prev2[j - 2] + 1)
            cur[j] = best
        prev2, prev = prev, cur
    return prev[len(b)]

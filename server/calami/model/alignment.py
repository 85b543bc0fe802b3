"""Character alignment of a misspelling with its correction (unit-cost OSA).

Shared by the error model's counting (single-letter edits in context) and
the multi-character rules: both must see the same alignment.
"""

from __future__ import annotations

START = "^"  # the word start, as a context character


def align_columns(typed: str, intended: str) -> list[tuple[str, str]]:
    """Unit-cost OSA alignment as columns (intended chunk, typed chunk), left to right.

    A match is ``(x, x)``, a substitution ``(c, t)``, a deletion ``(c, "")``,
    an insertion ``("", t)`` and a transposition ``(xy, yx)``.
    """
    n, m = len(typed), len(intended)
    INF = 1 << 30
    d = [[INF] * (m + 1) for _ in range(n + 1)]
    for i in range(n + 1):
        d[i][0] = i
    for j in range(m + 1):
        d[0][j] = j
    for i in range(1, n + 1):
        for j in range(1, m + 1):
            cost = 0 if typed[i - 1] == intended[j - 1] else 1
            best = min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost)
            if i > 1 and j > 1 and typed[i - 1] == intended[j - 2] and typed[i - 2] == intended[j - 1]:
                best = min(best, d[i - 2][j - 2] + 1)
            d[i][j] = best
    cols: list[tuple[str, str]] = []
    i, j = n, m
    while i > 0 or j > 0:
        if i > 0 and j > 0 and typed[i - 1] == intended[j - 1] and d[i][j] == d[i - 1][j - 1]:
            cols.append((intended[j - 1], typed[i - 1]))
            i, j = i - 1, j - 1
        elif i > 0 and j > 0 and d[i][j] == d[i - 1][j - 1] + 1:
            cols.append((intended[j - 1], typed[i - 1]))
            i, j = i - 1, j - 1
        elif (i > 1 and j > 1 and typed[i - 1] == intended[j - 2] and typed[i - 2] == intended[j - 1]
                and d[i][j] == d[i - 2][j - 2] + 1):
            cols.append((intended[j - 2 : j], typed[i - 2 : i]))
            i, j = i - 2, j - 2
        elif j > 0 and d[i][j] == d[i][j - 1] + 1:
            cols.append((intended[j - 1], ""))
            j -= 1
        else:
            cols.append(("", typed[i - 1]))
            i -= 1
    cols.reverse()
    return cols


def align(typed: str, intended: str) -> list[tuple[str, str, str]] | None:
    """Unit-cost OSA alignment as a list of edits (kind, x, y), or None if equal.

    Edits use the conventions of the module docstring; x is the context
    character for del/ins/trans, the typed character for sub.  A doubled
    letter typed once is always "del[x, x]", a letter typed twice "ins[x, x]".
    """
    n, m = len(typed), len(intended)
    edits: list[tuple[str, str, str]] = []
    i = j = 0  # typed / intended characters before the current column
    for c, t in align_columns(typed, intended):
        if c == t:
            pass
        elif len(c) == 2:
            edits.append(("trans", c[0], c[1]))
        elif c and t:
            edits.append(("sub", t, c))
        elif c:
            prev = intended[j - 1] if j > 0 else START
            if j + 1 < m and intended[j + 1] == c:
                prev = c
            edits.append(("del", prev, c))
        else:
            prev = typed[i - 1] if i > 0 else START
            if i + 1 < n and typed[i + 1] == t:
                prev = t
            edits.append(("ins", prev, t))
        i, j = i + len(t), j + len(c)
    return edits or None

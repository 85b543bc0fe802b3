"""The error model P(typed | intended), learned from real misspellings.

Edits follow Kernighan, Church & Gale (1990): deletion, insertion,
substitution and adjacent transposition, each conditioned on the
neighbouring character ("^" marks the word start):

    del[x, y]   intended "xy" typed "x"     rate = del / count("xy")
    ins[x, y]   intended "x"  typed "xy"    rate = ins / count("x")
    sub[t, c]   intended "c"  typed "t"     rate = sub / count("c")
    trans[x, y] intended "xy" typed "yx"    rate = trans / count("xy")

Counts come from aligning misspelling/correction pairs; the denominators are
character frequencies of running text (scaled to the size of the pairs'
correct side) so a rate reads as "errors of this kind per occurrence".
Smoothing adds ``beta`` pseudo-counts spread by a keyboard-adjacency prior:
neighbouring keys get ten times the mass of distant ones.

Rates are turned into a distribution over the typos of a given word:
Q1(t | c) = rate(e) / Z(c), where Z(c) sums the rates of every single edit
applicable to c.  A typo that needs k edits gets P(k edits) times the
product of its edits' shares; P(k) is estimated from the training pairs.
The whole channel is P(t | c) = alpha if t == c else (1 - alpha) * Q(t | c).
Multi-edit typos are aligned by a weighted edit distance (the cheapest path).
"""

from __future__ import annotations

import math
from collections import Counter
from dataclasses import dataclass, field
from typing import Iterable, Sequence

from calami.model.alignment import START, align
from calami.model.rules import BEGIN, END, MAX_SIDE, RuleTable

# Matched characters kept around the differing middle, for rule context.  Rules
# reaching two letters into the matched part are then not used: on the train
# pairs (2-fold CV) top-1 stays within 0.2 points of MARGIN 2, 30% cheaper.
MARGIN = 1
BOUNDS = (BEGIN, END)

LETTERS = "abcdefghijklmnopqrstuvwxyz'"

# QWERTY rows; adjacency = same or neighbouring row within one column (common practice).
_ROWS = ["1234567890-", "qwertyuiop", "asdfghjkl;'", "zxcvbnm,."]


def _keyboard_neighbours() -> dict[str, set[str]]:
    pos = {ch: (r, c) for r, row in enumerate(_ROWS) for c, ch in enumerate(row)}
    out: dict[str, set[str]] = {}
    for a, (ra, ca) in pos.items():
        out[a] = {b for b, (rb, cb) in pos.items() if b != a and abs(ra - rb) <= 1 and abs(ca - cb) <= 1 + (rb != ra)}
    return out


KEYBOARD = _keyboard_neighbours()


def adjacent(a: str, b: str) -> bool:
    return b in KEYBOARD.get(a, ())


# ---------------------------------------------------------------- the model


@dataclass
class ChannelModel:
    """Edit counts, context counts and the derived per-edit rates."""

    dels: dict[str, float]  # key x+y
    inss: dict[str, float]  # key x+y
    subs: dict[str, float]  # key t+c
    trans: dict[str, float]  # key x+y
    unigrams: dict[str, float]  # char -> count in running text (scaled)
    bigrams: dict[str, float]  # "xy" -> count in running text (scaled)
    edits_k: list[float]  # P(k edits | error), k = 1, 2, 3+
    beta: float = 0.5
    alphabet: str = LETTERS
    first_factor: float = 1.0  # how much rarer an edit is at the first letter than elsewhere
    split_share: float = 0.01  # share of errors that are a missing space between two words
    z_ref: float = 0.0  # Z of an average word in running text (0: normalise per word)
    rules: RuleTable = field(default_factory=lambda: RuleTable({}, {}, 0.0))
    _sub_total: dict[str, float] = field(default_factory=dict, repr=False)
    _ins_total: dict[str, float] = field(default_factory=dict, repr=False)

    def __post_init__(self) -> None:
        a = self.alphabet
        self._sub_total = {c: sum(self.sub_rate(t, c) for t in a if t != c) for c in a}
        self._ins_total = {x: sum(self.ins_rate(x, y) for y in a) for x in (START + a)}
        k = self.edits_k
        self._log_first = math.log(k[0])
        # Each edit after the first costs the ratio of successive P(k).
        self._log_more = math.log(max(k[1], 1e-6) / k[0])
        self._cost_cache: dict[tuple[str, str, str], float] = {}
        self._rate_of = {"s": self.sub_rate, "d": self.del_rate, "i": self.ins_rate, "t": self.trans_rate}

    def _neg_log_rate(self, kind: str, x: str, y: str) -> float:
        """-log rate of one single-letter edit ("s"ub t,c / "d"el / "i"ns / "t"rans x,y), cached.

        The weighted alignment reads the cache itself on its hot path and
        calls this on a miss.
        """
        key = (kind, x, y)
        v = self._cost_cache.get(key)
        if v is None:
            v = self._cost_cache[key] = -math.log(self._rate_of[kind](x, y))
        return v

    # -- rates (smoothed) ---------------------------------------------------

    def _uni(self, c: str) -> float:
        return self.unigrams.get(c, 0.0) + 1.0

    def _bi(self, xy: str) -> float:
        return self.bigrams.get(xy, 0.0) + 1.0

    def sub_rate(self, t: str, c: str) -> float:
        prior = 1.0 if adjacent(t, c) else 0.1
        return (self.subs.get(t + c, 0.0) + self.beta * prior) / self._uni(c)

    def del_rate(self, x: str, y: str) -> float:
        prior = 1.0 if x == y else 0.3  # doubled letters are dropped most often
        return (self.dels.get(x + y, 0.0) + self.beta * prior) / self._bi(x + y)

    def ins_rate(self, x: str, y: str) -> float:
        prior = 1.0 if (x == y or adjacent(x, y)) else 0.1
        return (self.inss.get(x + y, 0.0) + self.beta * prior) / self._uni(x)

    def trans_rate(self, x: str, y: str) -> float:
        return (self.trans.get(x + y, 0.0) + self.beta * 0.5) / self._bi(x + y)

    def edit_rate(self, edit: tuple[str, str, str]) -> float:
        kind, x, y = edit
        if kind == "sub":
            return self.sub_rate(x, y)
        if kind == "del":
            return self.del_rate(x, y)
        if kind == "ins":
            return self.ins_rate(x, y)
        return self.trans_rate(x, y)

    # -- normalisation over the typos of one intended word -----------------

    def total_rate(self, intended: str) -> float:
        """Z(c): the summed rate of every single edit applicable to ``intended``."""
        sub_total, ins_total = self._sub_total, self._ins_total
        z = 0.0
        prev = START
        for i, ch in enumerate(intended):
            z += sub_total.get(ch, 0.0) or self.beta * 0.1
            z += self.del_rate(prev, ch)
            if i + 1 < len(intended):
                z += self.trans_rate(ch, intended[i + 1])
            if i == 0:
                z = (z + self._ins_total.get(START, 0.0)) * self.first_factor
            z += ins_total.get(ch, 0.0) or self.beta * 0.1
            prev = ch
        return z

    def log_q(self, typed: str, intended: str, rules: bool = True) -> float:
        """log Q(typed | intended): the typo's probability given that an error occurred.

        ``rules=False`` scores single-letter edits only: the real-word check
        uses that, because rules learned from non-word misspellings
        ("d$" -> "$") make slips between short frequent words ("and"/"an")
        look far likelier than they are in edited prose.
        """
        if typed == intended:
            return 0.0
        # Longer words offer more ways to go wrong *and* go wrong more often;
        # the two cancel, so rates are compared on one scale (as in Kernighan,
        # Church & Gale), normalised by the Z of an average word.
        log_z = math.log(self.z_ref if self.z_ref > 0 else self.total_rate(intended))
        cost = self._cheapest_path(typed, intended, log_z, rules)
        return self._log_first - cost

    def _cheapest_path(self, typed: str, intended: str, log_z: float, rules: bool = True) -> float:
        """Weighted OSA plus multi-character rules; each edit costs -log(share) - log(P(k+1)/P(k))."""
        more = -self._log_more
        # Strip the common prefix/suffix: alignment there is free anyway, but
        # keep MARGIN matched characters (or the word boundary) for context.
        p = 0
        while p < len(typed) and p < len(intended) and typed[p] == intended[p]:
            p += 1
        s = 0
        while (s < len(typed) - p and s < len(intended) - p
               and typed[len(typed) - 1 - s] == intended[len(intended) - 1 - s]):
            s += 1
        costs = self.rules.costs if rules else None
        if costs:
            a, b = max(0, p - MARGIN), max(0, s - MARGIN)
            end = END if b == 0 else ""
        else:
            # Single-letter edits need one character of left context only.
            a, b, end = max(0, p - 1), s, ""
        t = (START if a == 0 else "") + typed[a : len(typed) - b] + end
        c = (START if a == 0 else "") + intended[a : len(intended) - b] + end
        # Index (in c) of the word's first letter, if the segment reaches it.
        first = 1 if a == 0 else -1

        # Every edit costs -log(rate) + (log_z + more); rates are cached per model.
        step = log_z + more
        nlr = self._neg_log_rate
        cache = self._cost_cache
        # Edits that change the first letter are rarer than elsewhere.
        first_penalty = -math.log(self.first_factor)
        n, m = len(t), len(c)
        # Rule transitions that fit here, by target cell: (i, j) <- (i0, j0) at a cost.
        # Built once per pair, so the cell loop below pays only for rules that apply.
        jumps: dict[tuple[int, int], list[tuple[int, int, float]]] = {}
        if costs:
            ends: dict[str, list[int]] = {}
            for i in range(n + 1):
                for lb in range(min(MAX_SIDE, i) + 1):
                    ends.setdefault(t[i - lb : i], []).append(i)
            for j in range(1, m + 1):
                for la in range(1, min(MAX_SIDE, j) + 1):
                    alpha = c[j - la : j]
                    betas = costs.get(alpha)
                    if not betas:
                        continue
                    j0 = j - la
                    covers_first = j0 <= first < j
                    for beta, rc in betas.items():
                        at = ends.get(beta)
                        if not at:
                            continue
                        if covers_first and alpha.lstrip(START)[:1] != beta.lstrip(START)[:1]:
                            rc += first_penalty
                        for i in at:
                            jumps.setdefault((i, j), []).append((i - len(beta), j0, rc))
        INF = float("inf")
        # Costs that depend on one side only are looked up once per pair, not once per cell.
        cs = ["", *c]  # cs[j] is the j-th character of c
        dels: list[float | None] = [None] * (m + 1)
        for j in range(1, m + 1):
            cj = c[j - 1]
            if cj not in BOUNDS:
                ctx = c[j - 2] if j > 1 else START
                v = cache.get(("d", ctx, cj))
                dels[j] = nlr("d", ctx, cj) if v is None else v
        at_first_of = [first_penalty if j - 1 == first else 0.0 for j in range(m + 1)]
        ins_first_of = [first_penalty if j == first else 0.0 for j in range(m + 1)]
        d = [[INF] * (m + 1) for _ in range(n + 1)]
        d[0][0] = 0.0
        for i in range(n + 1):
            ti = t[i - 1] if i > 0 else ""
            prev_t = t[i - 2] if i > 1 else START
            row, up = d[i], d[i - 1] if i > 0 else None
            ins_ok = i > 0 and ti not in BOUNDS
            if ins_ok:
                v = cache.get(("i", prev_t, ti))
                ins_cost = nlr("i", prev_t, ti) if v is None else v
            for j in range(m + 1):
                if i == 0 and j == 0:
                    continue
                best = INF
                cj = cs[j]
                at_first = at_first_of[j]
                if i > 0 and j > 0:
                    if ti == cj:
                        best = up[j - 1]
                    elif ti not in BOUNDS and cj not in BOUNDS:
                        v = cache.get(("s", ti, cj))
                        best = up[j - 1] + (nlr("s", ti, cj) if v is None else v) + step + at_first
                dv = dels[j]
                if dv is not None:
                    x = row[j - 1] + dv + step + at_first
                    if x < best:
                        best = x
                if ins_ok:
                    x = up[j] + ins_cost + step + ins_first_of[j]
                    if x < best:
                        best = x
                if (i > 1 and j > 1 and ti == c[j - 2] and prev_t == cj and ti != cj
                        and ti not in BOUNDS and cj not in BOUNDS):
                    v = cache.get(("t", ti, cj))
                    x = d[i - 2][j - 2] + (nlr("t", ti, cj) if v is None else v) + step + (first_penalty if j - 2 == first else 0.0)
                    if x < best:
                        best = x
                if jumps:
                    for i0, j0, rc in jumps.get((i, j), ()):
                        x = d[i0][j0] + rc + step
                        if x < best:
                            best = x
                row[j] = best
        # The first edit is not charged the "more edits" ratio.
        return d[n][m] - more

    # -- persistence --------------------------------------------------------

    def to_dict(self) -> dict:
        return {
            "del": self.dels, "ins": self.inss, "sub": self.subs, "trans": self.trans,
            "unigrams": self.unigrams, "bigrams": self.bigrams,
            "edits_k": self.edits_k, "beta": self.beta, "alphabet": self.alphabet,
            "first_factor": self.first_factor, "split_share": self.split_share, "z_ref": self.z_ref,
            "rules": self.rules.to_dict(),
        }

    @classmethod
    def from_dict(cls, d: dict) -> "ChannelModel":
        return cls(d["del"], d["ins"], d["sub"], d["trans"], d["unigrams"], d["bigrams"],
                   list(d["edits_k"]), d["beta"], d["alphabet"], d.get("first_factor", 1.0), d.get("split_share", 0.01), d.get("z_ref", 0.0),
                   RuleTable.from_dict(d.get("rules")))


def train_channel(
    pairs: Iterable[tuple[str, str]],
    text_chars: Counter[str],
    text_bigrams: Counter[str],
    *,
    beta: float = 0.5,
    reference_words: Sequence[tuple[str, float]] = (),
    rule_words: Sequence[tuple[str, float]] = (),
    rule_discount: float = 1.0,
    rule_min_count: int = 2,
) -> ChannelModel:
    """Count edits in aligned pairs; scale text character counts to the pairs' size.

    Pairs are lower-cased; pairs more than 3 edits apart are skipped for
    counting (they are not typing errors in the sense of this model) but
    still counted in P(k edits).  With ``rule_words`` (running-text words
    and weights) multi-character rules are learned as well (see rules.py).
    """
    used: list[tuple[str, str]] = []
    dels: Counter[str] = Counter()
    inss: Counter[str] = Counter()
    subs: Counter[str] = Counter()
    trans: Counter[str] = Counter()
    k_counts = Counter()
    correct_chars = 0
    words = first_changed = splits = total_pairs = 0
    for typed, intended in pairs:
        typed, intended = typed.lower(), intended.lower()
        total_pairs += 1
        if typed == intended.replace(" ", "") and " " in intended:
            splits += 1
        if typed == intended or " " in typed or " " in intended:
            continue
        words += 1
        first_changed += typed[:1] != intended[:1]
        edits = align(typed, intended)
        if not edits:
            continue
        k_counts[min(len(edits), 3)] += 1
        if len(edits) > 3:
            continue
        correct_chars += len(intended)
        used.append((typed, intended))
        for kind, x, y in edits:
            target = {"del": dels, "ins": inss, "sub": subs, "trans": trans}[kind]
            target[x + y] += 1.0 / len(edits)
    total_text = sum(text_chars.values()) or 1
    scale = max(correct_chars, 1) / total_text
    unigrams = {c: n * scale for c, n in text_chars.items()}
    bigrams = {xy: n * scale for xy, n in text_bigrams.items()}
    total_k = sum(k_counts.values()) or 1
    edits_k = [max(k_counts[k] / total_k, 1e-4) for k in (1, 2, 3)]
    # Observed share of pairs with a changed first letter, against the share
    # expected if errors fell on every position alike (1 / mean word length).
    expected_first = words / correct_chars if correct_chars else 0.0
    first_factor = min(1.0, max(0.05, (first_changed / words) / expected_first)) if words and expected_first else 1.0
    split_share = max(splits / total_pairs, 1e-3) if total_pairs else 0.01
    model = ChannelModel(dict(dels), dict(inss), dict(subs), dict(trans), unigrams, bigrams, edits_k, beta,
                         first_factor=first_factor, split_share=split_share)
    if rule_words:
        model.rules = RuleTable.train(used, rule_words, scale, rule_discount, rule_min_count)
    if reference_words:
        weights = sum(w for _, w in reference_words) or 1.0
        model.z_ref = sum(model.total_rate(word) * w for word, w in reference_words) / weights
    return model


def text_char_counts(words: Iterable[tuple[str, float]]) -> tuple[Counter[str], Counter[str]]:
    """Character and character-pair counts of running text, from word frequencies."""
    chars: Counter[str] = Counter()
    pairs: Counter[str] = Counter()
    for word, weight in words:
        prev = START
        for ch in word:
            chars[ch] += weight
            pairs[prev + ch] += weight
            prev = ch
        chars[START] += weight
    return chars, pairs

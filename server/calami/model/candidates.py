"""Candidate generation: every lexicon key within OSA distance k (k <= 2).

Method: the deletion neighbourhood (Mor & Fraenkel 1982).  If two strings
are within k edits (substitution, insertion, deletion, adjacent
transposition), then deleting at most k characters from each yields a common
string.  The index maps every string obtained by deleting up to two
characters from a lexicon key to that key; a query deletes up to two
characters from the typed word and probes the index with each result.

Layout (compact, no Python object per entry): the delete strings are hashed
(CRC-32) into 2^b buckets; ``offsets`` (2^b + 1 entries) delimits each
bucket's run in ``ids``, the key ids packed in 3 bytes each (the lexicon has
fewer than 2^24 keys), and in ``tags``, 8 further bits of each entry's hash,
which skip most bucket-mates without touching their keys.  What remains —
rare tag collisions and the method's over-generation — is removed by
verifying each hit with the exact bit-parallel OSA distance, so the result
equals a brute-force scan of the lexicon.
"""

from __future__ import annotations

import threading
import zlib
from array import array
from typing import Sequence

from calami.model.distance import osa_distance, pattern_masks

MAX_DISTANCE = 2
MAX_QUERY_LENGTH = 40  # longer "words" are not looked up (minified data, hashes)
FAR_MIN_LENGTH = 6  # shorter words get no distance-3 search (see at_three)


def deletion_neighbourhood(word: str, depth: int = MAX_DISTANCE) -> set[str]:
    """All strings made by deleting up to ``depth`` characters (word included)."""
    level = {word}
    seen = {word}
    for _ in range(depth):
        nxt = set()
        for w in level:
            for i in range(len(w)):
                nxt.add(w[:i] + w[i + 1 :])
        nxt -= seen
        seen |= nxt
        level = nxt
    return seen


def _hash(s: str) -> int:
    return zlib.crc32(s.encode("utf-8"))


class CandidateIndex:
    """Deletion-neighbourhood index over the lexicon keys."""

    def __init__(self, keys: Sequence[str], bucket_bits: int, offsets: Sequence[int], ids: bytes, tags: bytes) -> None:
        if len(offsets) != (1 << bucket_bits) + 1 or len(ids) != 3 * offsets[-1] or len(tags) != offsets[-1]:
            raise ValueError("candidate index arrays are inconsistent")
        self.keys = keys
        self.bucket_bits = bucket_bits
        self.mask = (1 << bucket_bits) - 1
        self.offsets = offsets
        self.ids = ids
        self.tags = tags

    @classmethod
    def build(cls, keys: Sequence[str], bucket_bits: int | None = None) -> "CandidateIndex":
        """Index every key's deletion neighbourhood (build time: seconds for 10^5 keys)."""
        hashes: list[int] = []
        owners = array("I")
        for kid, key in enumerate(keys):
            if len(key) > MAX_QUERY_LENGTH:
                continue
            for s in deletion_neighbourhood(key):
                hashes.append(_hash(s))
                owners.append(kid)
        if bucket_bits is None:
            bucket_bits = max(4, (len(hashes) // 3).bit_length())
        mask = (1 << bucket_bits) - 1
        counts = array("I", bytes(4 * ((1 << bucket_bits) + 1)))
        for h in hashes:
            counts[(h & mask) + 1] += 1
        for b in range(1, len(counts)):
            counts[b] += counts[b - 1]
        offsets = array("I", counts)
        fill = array("I", counts)
        if len(keys) >= 1 << 24:
            raise ValueError("too many keys for 3-byte ids")
        ids = bytearray(3 * len(hashes))
        tags = bytearray(len(hashes))
        for h, kid in zip(hashes, owners):
            b = h & mask
            slot = fill[b]
            fill[b] = slot + 1
            ids[3 * slot : 3 * slot + 3] = kid.to_bytes(3, "little")
            tags[slot] = h >> 24
        return cls(keys, bucket_bits, offsets, bytes(ids), bytes(tags))

    def within(self, word: str, max_distance: int = MAX_DISTANCE) -> dict[int, int]:
        """Key id -> OSA distance, for every key within ``max_distance`` of ``word``."""
        if not word or len(word) > MAX_QUERY_LENGTH or max_distance > MAX_DISTANCE:
            return {}
        return self._verified(word, self._probe(deletion_neighbourhood(word, max_distance)), 0, max_distance)

    def at_three(self, word: str) -> dict[int, int]:
        """Some keys at OSA distance exactly 3: a fallback for words spelled far off.

        Probing with up to three deletions from the word (the index holds up
        to two from each key) finds a key when some string is both the word
        less at most three letters and the key less at most two.  On the
        train split of the misspelling sets that is 85 of the 136 corrections
        at distance 3; three substitutions are never found.  Not a complete
        search, by design: that would need a far larger index.  Words shorter
        than FAR_MIN_LENGTH (three edits would change half of them) and words
        outside ASCII (other scripts than the English lexicon's) get nothing.
        """
        if len(word) < FAR_MIN_LENGTH or len(word) > MAX_QUERY_LENGTH or not word.isascii():
            return {}
        return self._verified(word, self._probe(deletion_neighbourhood(word, MAX_DISTANCE + 1)), 3, 3)

    def _probe(self, strings) -> set[int]:
        """Ids of every key whose deletion neighbourhood may contain one of ``strings``."""
        self.wait()
        mask = self.mask
        offsets, ids, tags = self.offsets, self.ids, self.tags
        from_bytes = int.from_bytes
        hits: set[int] = set()
        for s in strings:
            h = _hash(s)
            b = h & mask
            tag = h >> 24
            lo, hi = offsets[b], offsets[b + 1]
            slot = tags.find(tag, lo, hi) if hi > lo else -1
            while slot >= 0:
                hits.add(from_bytes(ids[3 * slot : 3 * slot + 3], "little"))
                slot = tags.find(tag, slot + 1, hi)
        return hits

    def _verified(self, word: str, hits: set[int], lo: int, hi: int) -> dict[int, int]:
        """The hits whose exact OSA distance to ``word`` lies in [lo, hi]."""
        keys = self.keys
        n = len(word)
        masks = pattern_masks(word)
        found: dict[int, int] = {}
        for kid in hits:
            key = keys[kid]
            if abs(len(key) - n) > hi:
                continue
            d = osa_distance(word, key, masks)
            if lo <= d <= hi:
                found[kid] = d
        return found

    @classmethod
    def unpacking(cls, keys: Sequence[str], bucket_bits: int, unpack) -> "CandidateIndex":
        """An index whose arrays are decompressed on a background thread.

        ``unpack()`` returns (offsets, ids, tags).  zlib releases the GIL, so
        this overlaps with the rest of model loading; the first query waits
        for it if it is not done yet.
        """
        index = cls.__new__(cls)
        index.keys = keys
        index.bucket_bits = bucket_bits
        index.mask = (1 << bucket_bits) - 1
        index._error = None

        def work() -> None:
            try:
                offsets, ids, tags = unpack()
                if len(offsets) != (1 << bucket_bits) + 1 or len(ids) != 3 * offsets[-1] or len(tags) != offsets[-1]:
                    raise ValueError("candidate index arrays are inconsistent")
                index.offsets, index.ids, index.tags = offsets, ids, tags
            except Exception as exc:  # reported to the first caller
                index._error = exc

        index._loader = threading.Thread(target=work, name="calami-index", daemon=True)
        index._loader.start()
        return index

    def wait(self) -> None:
        """Block until the arrays are in memory; re-raise a failure to unpack them."""
        loader = getattr(self, "_loader", None)
        if loader is not None:
            loader.join()
            self._loader = None
            if self._error is not None:
                raise self._error

    def stats(self) -> dict[str, int]:
        self.wait()
        return {"entries": len(self.ids) // 3, "buckets": 1 << self.bucket_bits}

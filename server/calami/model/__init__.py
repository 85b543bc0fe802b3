"""The statistical model: lexicon, language model, error model, indexes.

Loaded once, read-only.  ``load()`` finds the shipped model unless told
otherwise; ``Model.from_parts`` builds one in memory (tests, the builder).
"""

from __future__ import annotations

import os
from array import array
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from calami.model import store
from calami.model_location import MODEL_FILENAME, default_model_path  # noqa: F401 - the model's public names
from calami.model.candidates import CandidateIndex
from calami.model.channel import ChannelModel
from calami.model.language import LanguageModel
from calami.model.lexicon import Lexicon
from calami.model.novel import NovelWordModel
from calami.text.tokens import BOS, CODE, EOS

SPECIAL_UNITS = 4  # language-model ids after the lexicon's keys: <s>, </s>, <unk>, <code>

@dataclass
class Params:
    """Decision constants tuned on held-out data (see models/README.md)."""

    alpha: float = 0.999  # P(no error) for a word that is in the lexicon
    alpha_confusable: float = 0.8  # P(no error) for members of known confusion sets
    realword_hint: float = 0.5  # posterior needed to flag a real word
    nonword_hint: float = 0.5
    confident: float = 0.95
    oov_log_prior: float = -2.0  # added to the novel-word model's log P(spelling)
    max_nonword_candidates: int = 60
    channel_weight: float = 1.0  # exponent on the error model against the language model
    # log factor for a non-word candidate that sounds like the typed word (same
    # sound key): pronunciation as a second error channel beside the letters.
    sound_log_bonus: float = 0.0

    def to_dict(self) -> dict[str, Any]:
        return dict(self.__dict__)

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> "Params":
        known = {k: v for k, v in d.items() if k in cls.__dataclass_fields__}
        return cls(**known)


@dataclass
class Model:
    lexicon: Lexicon
    lm: LanguageModel
    channel: ChannelModel
    candidates: CandidateIndex
    neighbours_start: array  # 'I', per key id: real-word neighbours within one edit
    neighbours: array  # 'I'
    sound_index: "SoundIndex | dict[str, tuple[int, ...]]"
    novel: NovelWordModel
    params: Params = field(default_factory=Params)
    header: dict[str, Any] = field(default_factory=dict)

    @property
    def bos(self) -> int:
        return len(self.lexicon)

    @property
    def eos(self) -> int:
        return len(self.lexicon) + 1

    @property
    def unk(self) -> int:
        return len(self.lexicon) + 2

    @property
    def code(self) -> int:
        """Inline code: a unit of its own ("set <code> and"), not <unk>."""
        return len(self.lexicon) + 3

    def lm_id(self, unit: str) -> int:
        """Language-model id of a lower-case word or special unit."""
        if unit == BOS:
            return self.bos
        if unit == EOS:
            return self.eos
        if unit == CODE:
            return self.code
        kid = self.lexicon.ids.get(unit)
        return self.unk if kid is None else kid

    def realword_neighbours(self, key_id: int) -> array:
        return self.neighbours[self.neighbours_start[key_id] : self.neighbours_start[key_id + 1]]

    # -- persistence -----------------------------------------------------------

    def to_payload(self) -> dict[str, Any]:
        self.candidates.wait()
        lm = self.lm
        index = dict(self.sound_index.items())
        sound_keys = sorted(index)
        sound_start = array("I", [0])
        sound_ids = array("I")
        for k in sound_keys:
            sound_ids.extend(index[k])
            sound_start.append(len(sound_ids))
        return {
            "lexicon": {
                "keys": store.pack_strings(self.lexicon.keys),
                "flags": store.pack_bytes(self.lexicon.flags),
                "cased": store.pack_strings(sorted(f for forms in self.lexicon.cased.values() for f in forms)),
            },
            "lm": {
                **{name: getattr(lm, name) for name in LanguageModel.SCALARS},
                **{name: store.pack_array(getattr(lm, name)) for name in LanguageModel.ARRAYS},
            },
            "channel": self.channel.to_dict(),
            "candidates": {
                "bucket_bits": self.candidates.bucket_bits,
                "offsets": store.pack_array(array("I", self.candidates.offsets)),
                "ids": store.pack_bytes(self.candidates.ids),
                "tags": store.pack_bytes(self.candidates.tags),
            },
            "realword": {"start": store.pack_array(self.neighbours_start), "ids": store.pack_array(self.neighbours)},
            "sound": {"keys": store.pack_strings(sound_keys), "start": store.pack_array(sound_start), "ids": store.pack_array(sound_ids)},
            "novel": self.novel.to_dict(),
            "params": self.params.to_dict(),
        }

    @classmethod
    def from_payload(cls, payload: dict[str, Any], header: dict[str, Any] | None = None) -> "Model":
        lx = payload["lexicon"]
        keys = store.unpack_strings(lx["keys"])
        lexicon = Lexicon(keys, store.unpack_bytes(lx["flags"]), store.unpack_strings(lx["cased"]))
        l = payload["lm"]
        lm = LanguageModel(
            **{name: l[name] for name in LanguageModel.SCALARS},
            **{name: store.unpack_array(l[name]) for name in LanguageModel.ARRAYS},
        )
        c = payload["candidates"]
        cand = CandidateIndex.unpacking(keys, c["bucket_bits"], lambda: (
            store.unpack_array(c["offsets"]), store.unpack_bytes(c["ids"]), store.unpack_bytes(c["tags"])))
        sound_index = SoundIndex(payload["sound"])
        rw = payload["realword"]
        if lm.vocab_size != len(keys) + SPECIAL_UNITS:
            raise ValueError("language model and lexicon disagree")
        return cls(
            lexicon=lexicon, lm=lm, channel=ChannelModel.from_dict(payload["channel"]), candidates=cand,
            neighbours_start=store.unpack_array(rw["start"]), neighbours=store.unpack_array(rw["ids"]),
            sound_index=sound_index, novel=NovelWordModel.from_dict(payload["novel"]), params=Params.from_dict(payload.get("params", {})), header=header or {},
        )

    def save(self, path: Path, header: dict[str, Any]) -> int:
        return store.write_model(path, header, self.to_payload())


class SoundIndex:
    """Sound key -> key ids, expanded from the stored arrays on first use.

    Only unknown words need it, so start-up does not pay for building it.
    """

    def __init__(self, stored: dict[str, Any]) -> None:
        self._stored: dict[str, Any] | None = stored
        self._index: dict[str, tuple[int, ...]] = {}

    def _expand(self) -> dict[str, tuple[int, ...]]:
        if self._stored is not None:
            keys = store.unpack_strings(self._stored["keys"])
            start = store.unpack_array(self._stored["start"])
            ids = store.unpack_array(self._stored["ids"])
            self._index = {k: tuple(ids[start[i] : start[i + 1]]) for i, k in enumerate(keys)}
            self._stored = None
        return self._index

    def get(self, key: str, default=()):
        return self._expand().get(key, default)

    def items(self):
        return self._expand().items()

    def __eq__(self, other: object) -> bool:
        return dict(self.items()) == dict(other.items()) if hasattr(other, "items") else NotImplemented


_CACHE: dict[Path, Model] = {}


def load(path: str | os.PathLike[str] | None = None) -> Model:
    """Load (once per process) and validate a model file; raises ModelError."""
    from calami.errors import ModelError

    p = Path(path).expanduser() if path else default_model_path()
    p = p.resolve()
    cached = _CACHE.get(p)
    if cached is not None:
        return cached
    given = "--model (or the modelPath setting)" if path else ("CALAMI_MODEL" if os.environ.get("CALAMI_MODEL") else None)
    if given is not None and not p.exists():
        # The user named this file: a typo in a path, not a broken installation.
        raise ModelError(f"model file not found at {p} (given by {given}); check the path, "
                         "or leave it out to use the model shipped with calami")
    header, payload = store.read_model(p)
    try:
        model = Model.from_payload(payload, header)
    except (KeyError, TypeError, ValueError) as exc:
        raise ModelError(f"model file {p} is corrupt or incomplete ({exc.__class__.__name__}: {exc})") from None
    _CACHE[p] = model
    return model

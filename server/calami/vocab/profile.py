"""The user's adaptive profile: words, accepted fixes and ignores that follow
the user across projects.

What is stored (and nothing else): words the user added; for each accepted
replacement the typed word, the chosen word, a count and a few neighbouring
words (capped in number and length); how often each word was ignored.  Never
document text.  The file lives in the user data folder (platformdirs) or in
``$CALAMI_PROFILE_DIR``, and is read and written only on this machine.

Several editors may run a server each.  Every change is kept as an operation;
saving takes the file lock, re-reads the file, replays the pending operations
on what is there and writes the result atomically, so concurrent servers add
up instead of overwriting each other.  A file that does not parse is moved
aside (``profile.msgpack.corrupt-<timestamp>``) and reported, never
overwritten; a folder we cannot write to leaves the profile in memory.
"""

from __future__ import annotations

import copy
import os
import time
from pathlib import Path
from typing import Any, Callable, Mapping

import msgpack

from calami.vocab.atomic import atomic_write_bytes, locked

SCHEMA = 1
FILE_NAME = "profile.msgpack"
MAX_CONTEXTS = 20  # neighbour pairs kept per accepted replacement
MAX_CONTEXT_CHARS = 40  # a "neighbouring word" longer than this is cut
MAX_WORD_CHARS = 100


class ProfileFormatError(ValueError):
    """The profile data does not have the expected shape."""


def profile_dir() -> Path:
    """Where the profile lives: $CALAMI_PROFILE_DIR, else the user data folder."""
    override = os.environ.get("CALAMI_PROFILE_DIR")
    if override:
        return Path(override)
    import platformdirs

    return Path(platformdirs.user_data_dir("calami", appauthor=False))


def empty() -> dict[str, Any]:
    return {"schema": SCHEMA, "words": [], "corrections": {}, "contexts": {}, "ignored": {}}


def validate(data: Any) -> dict[str, Any]:
    """Check the shape of profile data (from msgpack or JSON); return a clean copy."""
    if not isinstance(data, dict):
        raise ProfileFormatError("profile is not a map")
    schema = data.get("schema")
    if not isinstance(schema, int):
        raise ProfileFormatError("profile has no schema version")
    if schema > SCHEMA:
        raise ProfileFormatError(f"profile schema {schema} is newer than this calami understands ({SCHEMA})")
    out = empty()
    words = data.get("words", [])
    if not isinstance(words, list) or not all(isinstance(w, str) for w in words):
        raise ProfileFormatError("'words' must be a list of strings")
    out["words"] = sorted(set(words))
    corrections = data.get("corrections", {})
    if not isinstance(corrections, dict):
        raise ProfileFormatError("'corrections' must be a map")
    for typed, chosen in corrections.items():
        if not isinstance(typed, str) or not isinstance(chosen, dict):
            raise ProfileFormatError("'corrections' must map words to maps")
        for word, count in chosen.items():
            if not isinstance(word, str) or not isinstance(count, int) or count < 0:
                raise ProfileFormatError("correction counts must be non-negative integers")
        out["corrections"][typed] = dict(chosen)
    contexts = data.get("contexts", {})
    if not isinstance(contexts, dict):
        raise ProfileFormatError("'contexts' must be a map")
    for typed, by_chosen in contexts.items():
        if not isinstance(typed, str) or not isinstance(by_chosen, dict):
            raise ProfileFormatError("'contexts' must map words to maps")
        for chosen, rows in by_chosen.items():
            if not isinstance(rows, list) or not all(
                isinstance(r, list) and len(r) == 3 and isinstance(r[0], str) and isinstance(r[1], str)
                and isinstance(r[2], int) for r in rows
            ):
                raise ProfileFormatError("'contexts' rows must be [left, right, count]")
        out["contexts"][typed] = {c: [list(r) for r in rows] for c, rows in by_chosen.items()}
    ignored = data.get("ignored", {})
    if not isinstance(ignored, dict) or not all(
        isinstance(k, str) and isinstance(v, int) and v >= 0 for k, v in ignored.items()
    ):
        raise ProfileFormatError("'ignored' must map words to non-negative counts")
    out["ignored"] = dict(ignored)
    return out


def _clip(word: str, limit: int) -> str:
    return word[:limit]


def _fold(typed: str, chosen: str) -> tuple[str, str]:
    """Store a pair in lower case when the fix only follows the typed word's case."""
    low_t, low_c = typed.lower(), chosen.lower()
    if chosen in (low_c, low_c.capitalize(), low_c.upper()):
        return low_t, low_c
    return low_t, chosen  # a fix whose capitals matter (a name): keep them


def apply(state: dict[str, Any], op: tuple) -> None:
    """Replay one change on profile data (in place)."""
    kind = op[0]
    if kind == "reset":
        state.clear()
        state.update(empty())
    elif kind == "add-word":
        if op[1] not in state["words"]:
            state["words"] = sorted({*state["words"], op[1]})
    elif kind == "remove-word":
        state["words"] = [w for w in state["words"] if w != op[1]]
    elif kind == "ignore":
        word = op[1]
        state["ignored"][word] = state["ignored"].get(word, 0) + op[2]
    elif kind == "replacement":
        _, typed, chosen, left, right, count = op
        by_typed = state["corrections"].setdefault(typed, {})
        by_typed[chosen] = by_typed.get(chosen, 0) + count
        if left or right:
            rows = state["contexts"].setdefault(typed, {}).setdefault(chosen, [])
            for row in rows:
                if row[0] == left and row[1] == right:
                    row[2] += count
                    break
            else:
                rows.append([left, right, count])
            rows.sort(key=lambda r: -r[2])
            del rows[MAX_CONTEXTS:]
    elif kind == "merge":
        other = op[1]
        for word in other["words"]:
            apply(state, ("add-word", word))
        for typed, by_chosen in other["corrections"].items():
            for chosen, count in by_chosen.items():
                apply(state, ("replacement", typed, chosen, "", "", count))
        for typed, by_chosen in other["contexts"].items():
            for chosen, rows in by_chosen.items():
                dest = state["contexts"].setdefault(typed, {}).setdefault(chosen, [])
                for left, right, count in rows:
                    for row in dest:
                        if row[0] == left and row[1] == right:
                            row[2] += count
                            break
                    else:
                        dest.append([left, right, count])
                dest.sort(key=lambda r: -r[2])
                del dest[MAX_CONTEXTS:]
        for word, count in other["ignored"].items():
            apply(state, ("ignore", word, count))
    else:  # pragma: no cover - programming error
        raise ValueError(f"unknown profile operation {kind!r}")


class Profile:
    """The user's profile; implements the checker's Adaptation protocol."""

    def __init__(self, directory: Path | None = None, warn: Callable[[str], None] | None = None) -> None:
        self.directory = Path(directory) if directory is not None else profile_dir()
        self.path = self.directory / FILE_NAME
        self.on_warning = warn
        self.warnings: list[str] = []
        self.in_memory = False
        self._pending: list[tuple] = []
        self._state = empty()
        self._words: set[str] = set()
        self._lower_words: set[str] = set()
        self.reload()

    # -- the Adaptation protocol --------------------------------------------
    def accepts(self, word: str) -> bool:
        """A lower-case entry accepts any capitalisation; one with capitals only itself."""
        return word in self._words or word.lower() in self._lower_words

    def corrections(self, typed: str) -> Mapping[str, int]:
        return self._state["corrections"].get(typed.lower(), {})

    def ignored(self, word: str) -> int:
        return self._state["ignored"].get(word.lower(), 0)

    # -- reading ------------------------------------------------------------
    @property
    def words(self) -> list[str]:
        return list(self._state["words"])

    def contexts(self, typed: str, chosen: str) -> list[list[Any]]:
        t, c = _fold(typed, chosen)
        return copy.deepcopy(self._state["contexts"].get(t, {}).get(c, []))

    def snapshot(self) -> dict[str, Any]:
        """A deep copy of the profile data (for show/export)."""
        return copy.deepcopy(self._state)

    def reload(self) -> None:
        """Re-read the file (another server may have written), keeping pending changes."""
        state = self._read()
        for op in self._pending:
            apply(state, op)
        self._set_state(state)

    # -- changing -----------------------------------------------------------
    def add_word(self, word: str) -> None:
        self._change(("add-word", _checked_word(word)))

    def remove_word(self, word: str) -> None:
        self._change(("remove-word", _checked_word(word)))

    def ignore(self, word: str) -> None:
        self._change(("ignore", _checked_word(word).lower(), 1))

    def record_replacement(self, typed: str, chosen: str, left: str = "", right: str = "") -> None:
        """An accepted fix: raises that correction in later rankings."""
        t, c = _fold(_checked_word(typed), _checked_word(chosen))
        self._change(("replacement", t, c, _clip(left, MAX_CONTEXT_CHARS), _clip(right, MAX_CONTEXT_CHARS), 1))

    def merge(self, data: Any) -> None:
        """Add another profile's content (``calami profile import``)."""
        self._change(("merge", validate(data)))

    def reset(self) -> None:
        self._change(("reset",))

    # -- persistence --------------------------------------------------------
    def _change(self, op: tuple) -> None:
        self._pending.append(op)
        apply(self._state, op)
        self._set_state(self._state)
        self.save()

    def save(self) -> bool:
        """Merge pending changes into the file; False when only in memory."""
        if self.in_memory or not self._pending:
            return not self.in_memory
        try:
            self.directory.mkdir(parents=True, exist_ok=True)
            with locked(self.path):
                state = self._read()
                if self.in_memory:  # the file turned out newer than us
                    return False
                for op in self._pending:
                    apply(state, op)
                atomic_write_bytes(self.path, msgpack.packb(state, use_bin_type=True))
        except OSError as exc:
            self._go_in_memory(f"cannot write {self.path} ({exc.strerror or exc})")
            return False
        self._pending.clear()
        self._set_state(state)
        return True

    def _read(self) -> dict[str, Any]:
        try:
            raw = self.path.read_bytes()
        except FileNotFoundError:
            return empty()
        except OSError as exc:
            self._go_in_memory(f"cannot read {self.path} ({exc.strerror or exc})")
            return empty()
        try:
            data = msgpack.unpackb(raw, raw=False, strict_map_key=True)
            if isinstance(data, dict) and isinstance(data.get("schema"), int) and data["schema"] > SCHEMA:
                self._go_in_memory(
                    f"{self.path} was written by a newer calami (schema {data['schema']}); "
                    "leaving it untouched and keeping changes in memory"
                )
                return empty()
            return validate(data)
        except (ValueError, msgpack.UnpackException, TypeError) as exc:
            return self._move_aside(exc)

    def _move_aside(self, exc: Exception) -> dict[str, Any]:
        stamp = time.strftime("%Y%m%d-%H%M%S")
        target = self.path.with_name(f"{self.path.name}.corrupt-{stamp}")
        n = 1
        while target.exists():
            target = self.path.with_name(f"{self.path.name}.corrupt-{stamp}-{n}")
            n += 1
        try:
            os.replace(self.path, target)
        except OSError as err:
            self._go_in_memory(f"{self.path} is damaged ({exc}) and cannot be moved aside ({err})")
            return empty()
        self._warn(f"the profile {self.path} was damaged ({exc}); moved it to {target.name} and started a new one")
        return empty()

    def _go_in_memory(self, reason: str) -> None:
        if not self.in_memory:
            self.in_memory = True
            self._warn(f"{reason}; your profile changes are kept in memory only for this session")

    def _warn(self, message: str) -> None:
        self.warnings.append(message)
        if self.on_warning is not None:
            self.on_warning(message)

    def _set_state(self, state: dict[str, Any]) -> None:
        self._state = state
        self._words = set(state["words"])
        self._lower_words = {w for w in self._words if w == w.lower()}


def _checked_word(word: Any) -> str:
    if not isinstance(word, str) or not word.strip() or len(word) > MAX_WORD_CHARS or any(c.isspace() for c in word):
        raise ValueError(f"not a single word: {word!r}")
    return word


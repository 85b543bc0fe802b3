"""Project configuration and the project lexicon, found from any file in the project.

The config lives in ``calami.toml`` at the project root, or in a
``[tool.calami]`` table of ``pyproject.toml`` (``calami.toml`` wins).  The
project root is the nearest folder, from the starting point upwards, holding
``calami.toml``, a ``pyproject.toml`` with ``[tool.calami]``, the project
lexicon (``calami-lexicon.txt``, or its old name ``calami-words.txt``) or
``.git``.

A TOML syntax error raises ``ConfigError`` (nothing sensible can be read).
A bad *value* is recorded in ``config.errors`` as ``file:line: message`` and
replaced by its default, so an editor keeps working; ``calami check`` treats
any such error as fatal (exit 2) so CI does not run with a config it ignored.
Old names that still work (``ignore-patterns``, ``calami-words.txt``) are
recorded in ``config.warnings``: shown, never fatal.
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Mapping, Sequence

import regex

from calami.errors import CalamiError, ConfigError
from calami.findings import Thresholds
from calami.vocab import wordlist
from calami.vocab.globs import Glob, compile_glob
from calami.vocab.ignore import DEFAULT_TIMEOUT, IgnorePattern, compile_pattern, holes

CONFIG_NAME = "calami.toml"
PYPROJECT_NAME = "pyproject.toml"
DEFAULT_WORD_LIST = "calami-lexicon.txt"
# The project lexicon's old file name: still read when the new one is
# absent, so no team's list is lost, with a note asking to rename it.
LEGACY_WORD_LIST = "calami-words.txt"
VARIANTS = ("any", "en-US", "en-GB")


@dataclass
class ProjectConfig:
    """The settings of one project, each with its default."""

    variant: str = "any"
    include: list[str] = field(default_factory=list)
    exclude: list[str] = field(default_factory=list)
    word_lists: list[str] = field(default_factory=lambda: [DEFAULT_WORD_LIST])
    skip_patterns: list[str] = field(default_factory=list)
    check_strings: bool = False
    hint: float = Thresholds().hint
    confident: float = Thresholds().confident
    max_suggestions: int = 5
    path: Path | None = None  # the file the settings came from, if any
    errors: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)  # old names still read: shown, not fatal
    word_lists_given: bool = False  # word-lists was set in the file (not the default)
    skip_patterns_key: str = "skip-patterns"  # the key they were read from (errors name it)
    source: str = field(default="", repr=False)  # config text, to name lines in errors
    table_prefix: tuple[str, ...] = field(default=(), repr=False)  # ("tool", "calami") in pyproject

    @property
    def thresholds(self) -> Thresholds:
        return Thresholds(self.hint, self.confident)


class ProjectLexicon:
    """The project lexicon (the project's word lists), as an adaptation for the checker.

    Case rule: an entry in lower case accepts the word in any capitalisation;
    an entry with a capital letter accepts only that exact form.  A possessive
    ``'s`` (straight or typographic apostrophe) is ignored when looking up.
    """

    def __init__(self, entries: Sequence[str] = ()) -> None:
        self.exact: frozenset[str] = frozenset(e.replace("’", "'") for e in entries)
        self.folded: frozenset[str] = frozenset(e for e in self.exact if e == e.lower())

    def __len__(self) -> int:
        return len(self.exact)

    def __contains__(self, word: object) -> bool:
        return isinstance(word, str) and self.accepts(word)

    def accepts(self, word: str) -> bool:
        if not self.exact:
            return False  # most projects have no list: asked twice per word checked
        plain = word.replace("’", "'")
        forms = [plain]
        if plain.endswith("'s") or plain.endswith("'S"):
            forms.append(plain[:-2])
        elif plain.endswith("'"):
            forms.append(plain[:-1])
        return any(f in self.exact or f.lower() in self.folded for f in forms)

    def corrections(self, typed: str) -> Mapping[str, int]:
        return {}

    def ignored(self, word: str) -> int:
        return 0


# The name other modules used before the rename; same class.
ProjectWords = ProjectLexicon


class Project:
    """A project root with its config, lexicon files and skip patterns."""

    def __init__(self, root: Path) -> None:
        self.root = root
        self.config = ProjectConfig()
        self.words = ProjectLexicon()
        self.skip_patterns: list[IgnorePattern] = []
        self._include: list[Glob] = []
        self._exclude: list[Glob] = []
        self.reload()

    @property
    def word_list_path(self) -> Path:
        """The list that ``calami words add`` and the editor's quick fix edit."""
        return self.word_list_paths[0]

    @property
    def word_list_paths(self) -> list[Path]:
        if not self.config.word_lists_given:
            return default_lexicon_paths(self.root)
        return [self.root / p for p in self.config.word_lists] or [self.root / DEFAULT_WORD_LIST]

    def reload(self) -> None:
        """Read the config and word lists again (after an edit on disk)."""
        self.config = read_config(self.root)
        self.skip_patterns = []
        key = self.config.skip_patterns_key
        for index, source in enumerate(self.config.skip_patterns):
            origin = _origin(self.config, key, index)
            try:
                self.skip_patterns.append(compile_pattern(source, origin))
            except regex.error as exc:
                self.config.errors.append(f"{origin}: skip pattern {source!r} is not a valid regular expression: {exc}")
        self._include = [compile_glob(g) for g in self.config.include]
        self._exclude = [compile_glob(g) for g in self.config.exclude]
        entries: list[str] = []
        legacy = self.root / LEGACY_WORD_LIST
        if not self.config.word_lists_given and legacy in self.word_list_paths:
            merge = "move its words into" if len(self.word_list_paths) > 1 else "rename it to"
            self.config.warnings.append(
                f"{legacy}: '{LEGACY_WORD_LIST}' is the old name of the project lexicon; "
                f"it is still read, but please {merge} '{DEFAULT_WORD_LIST}'"
            )
        for number, path in enumerate(self.word_list_paths):
            if not path.exists():
                if self.config.word_lists_given:
                    self.config.errors.append(
                        f"{_origin(self.config, 'word-lists', number)}: word list {path} named in word-lists does not exist "
                        "(create it, an empty file will do, or remove it from word-lists)"
                    )
                continue
            try:
                parsed = wordlist.read(path)
            except CalamiError as exc:
                self.config.errors.append(str(exc))
                continue
            for bad in wordlist.problems(parsed):
                self.config.errors.append(f"{path}: entry {bad!r} contains whitespace and never matches")
            entries.extend(parsed.words)
        self.words = ProjectLexicon(entries)

    def ignore_holes(self, text: str, timeout: float = DEFAULT_TIMEOUT) -> tuple[list[tuple[int, int]], list[str]]:
        """Ranges the skip patterns cut out of ``text``, and timeout warnings."""
        return holes(text, self.skip_patterns, timeout)

    def selects(self, path: Path) -> bool:
        """True if a file found by walking a folder passes include/exclude."""
        return self.left_out(path) is None

    def left_out(self, path: Path) -> str | None:
        """Why a file found by walking a folder is not checked, or None if it is.

        The project's own word lists are data, not prose: never selected.
        """
        resolved = path.resolve()
        lexicons = [*self.word_list_paths, *(self.root / name for name in LEXICON_NAMES)]
        if any(resolved == p.resolve() for p in lexicons):
            return "a word list of the project lexicon"
        try:
            rel = resolved.relative_to(self.root.resolve()).as_posix()
        except ValueError:
            return None  # outside the project: its globs do not speak about it
        where = self.config.path.name if self.config.path else "the config"
        if self._include and not _matches_any(self._include, rel):
            return f"not matched by include in {where}"
        if _matches_any(self._exclude, rel):
            return f"matched by exclude in {where}"
        return None


def _matches_any(globs: Sequence[Glob], rel: str) -> bool:
    """A glob matching a folder selects everything inside it too."""
    parts = rel.split("/")
    for depth in range(1, len(parts) + 1):
        prefix = "/".join(parts[:depth])
        is_dir = depth < len(parts)
        if any(g.matches(prefix, is_dir) for g in globs):
            return True
    return False


def find_root(start: Path) -> Path:
    """The project root for a file or folder (``start`` itself if nothing marks one)."""
    here = start.resolve()
    if not here.is_dir():
        here = here.parent
    for folder in (here, *here.parents):
        if (folder / CONFIG_NAME).is_file() or any((folder / n).is_file() for n in LEXICON_NAMES) or (folder / ".git").exists():
            return folder
        pyproject = folder / PYPROJECT_NAME
        if pyproject.is_file() and _has_tool_table(pyproject):
            return folder
    return here


LEXICON_NAMES = (DEFAULT_WORD_LIST, LEGACY_WORD_LIST)


def default_lexicon_paths(root: Path) -> list[Path]:
    """The lexicon files when the config names none, the one to edit first.

    Only the old name present: it is read and edited (one list, not two).
    Both present: the new one is edited and the old one still read.
    """
    new, old = root / DEFAULT_WORD_LIST, root / LEGACY_WORD_LIST
    if not old.exists():
        return [new]
    return [new, old] if new.exists() else [old]


def _has_tool_table(pyproject: Path) -> bool:
    try:
        text = pyproject.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return False
    return re.search(r"^\s*\[\s*tool\s*\.\s*calami\s*[.\]]", text, re.MULTILINE) is not None


def load_project(start: Path) -> Project:
    """The project that ``start`` (a file or folder) belongs to; defaults if unconfigured."""
    return Project(find_root(Path(start)))


def add_words(path: Path, words: Sequence[str]) -> list[str]:
    """Add words to a word list (locked, atomic); returns the ones newly added."""
    return wordlist.add_words(path, words)


def remove_words(path: Path, words: Sequence[str]) -> list[str]:
    """Remove words from a word list (locked, atomic); returns the ones removed."""
    return wordlist.remove_words(path, words)


# ---------------------------------------------------------------- config file


def read_config(root: Path) -> ProjectConfig:
    """Settings for ``root``; ConfigError on a TOML syntax error, defaults if none."""
    config_file = root / CONFIG_NAME
    table_prefix: tuple[str, ...] = ()
    if config_file.is_file():
        data, text = _load_toml(config_file)
    else:
        config_file = root / PYPROJECT_NAME
        if not (config_file.is_file() and _has_tool_table(config_file)):
            return ProjectConfig()
        data, text = _load_toml(config_file)
        data = data.get("tool", {}).get("calami", {})
        table_prefix = ("tool", "calami")
    config = ProjectConfig(path=config_file, source=text, table_prefix=table_prefix)
    _apply(config, data)
    return config


def _load_toml(path: Path) -> tuple[dict[str, Any], str]:
    try:
        text = path.read_bytes().decode("utf-8")
    except UnicodeDecodeError as exc:
        line = path.read_bytes()[: exc.start].count(b"\n") + 1
        raise ConfigError(f"{path}:{line}: not UTF-8 text") from exc
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read: {exc.strerror or exc}") from exc
    try:
        return tomllib.loads(text), text
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        found = re.search(r"\(at line (\d+), column \d+\)", message)
        if found:
            line = found.group(1)
        else:  # "(at end of document)": the error is on the last line
            line = str(text.count("\n") + 1)
        message = re.sub(r"\s*\(at (?:line \d+, column \d+|end of document)\)", "", message)
        raise ConfigError(f"{path}:{line}: invalid TOML: {message}") from exc


_STRING_LISTS = {
    "include": "include", "exclude": "exclude", "word-lists": "word_lists",
    "skip-patterns": "skip_patterns", "ignore-patterns": "skip_patterns",
}
# Old key -> new key: still read, with a warning.
RENAMED_KEYS = {"ignore-patterns": "skip-patterns"}
KNOWN_KEYS = ("variant", "include", "exclude", "word-lists", "skip-patterns", "check-strings", "max-suggestions", "thresholds")


def _apply(config: ProjectConfig, data: Mapping[str, Any]) -> None:
    for old, new in RENAMED_KEYS.items():
        if old in data and new in data:
            _error(config, old, f"{old} is the old name of {new}; give only {new}")
        elif old in data:
            line = _key_line(config, old, "")
            config.warnings.append(f"{config.path}:{line}: '{old}' is the old name of '{new}'; it still works, but please rename it")
    config.word_lists_given = "word-lists" in data
    if "ignore-patterns" in data and "skip-patterns" not in data:
        config.skip_patterns_key = "ignore-patterns"
    for key, value in data.items():
        if key == "variant":
            if value in VARIANTS:
                config.variant = value
            else:
                _error(config, key, f"variant must be one of {', '.join(VARIANTS)}, not {value!r}")
        elif key in _STRING_LISTS:
            if isinstance(value, list) and all(isinstance(v, str) for v in value):
                setattr(config, _STRING_LISTS[key], list(value))
            else:
                _error(config, key, f"{key} must be a list of strings")
        elif key == "check-strings":
            if isinstance(value, bool):
                config.check_strings = value
            else:
                _error(config, key, "check-strings must be true or false")
        elif key == "max-suggestions":
            if isinstance(value, int) and not isinstance(value, bool) and 1 <= value <= 50:
                config.max_suggestions = value
            else:
                _error(config, key, "max-suggestions must be a whole number from 1 to 50")
        elif key == "thresholds":
            _apply_thresholds(config, value)
        else:
            _error(config, key, f"unknown setting {key!r}{_did_you_mean(key, (*KNOWN_KEYS, *RENAMED_KEYS))}")
    if not config.word_lists:
        _error(config, "word-lists", "word-lists must name at least one file")
        config.word_lists = [DEFAULT_WORD_LIST]


def _apply_thresholds(config: ProjectConfig, value: Any) -> None:
    if not isinstance(value, dict):
        _error(config, "thresholds", "thresholds must be a table with 'hint' and 'confident'")
        return
    hint, confident = config.hint, config.confident
    for key, number in value.items():
        if key not in ("hint", "confident"):
            hint_text = _did_you_mean(key, ("hint", "confident")) or " (expected 'hint' or 'confident')"
            _error(config, key, f"unknown threshold {key!r}{hint_text}", table="thresholds")
        elif isinstance(number, bool) or not isinstance(number, (int, float)) or not 0.0 < number <= 1.0:
            _error(config, key, f"thresholds.{key} must be a number in (0, 1]", table="thresholds")
        elif key == "hint":
            hint = float(number)
        else:
            confident = float(number)
    if hint > confident:
        _error(config, "hint", "thresholds.hint must not exceed thresholds.confident", table="thresholds")
        return
    config.hint, config.confident = hint, confident


def _did_you_mean(key: str, known: Sequence[str]) -> str:
    """A close known key for a typo ("varient" -> "variant"), or nothing."""
    import difflib

    close = difflib.get_close_matches(key.lower().replace("_", "-"), list(known), n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


def _error(config: ProjectConfig, key: str, message: str, table: str = "") -> None:
    line = _key_line(config, key, table)
    config.errors.append(f"{config.path}:{line}: {message}")


_STRING = re.compile(r"\"(?:[^\"\\]|\\.)*\"|'[^']*'")


def _origin(config: ProjectConfig, key: str, index: int) -> str:
    """``file:line`` of the index-th item of a list setting (the key's line if unsure)."""
    if config.path is None:
        return "(defaults)"
    line = _key_line(config, key, "")
    lines = config.source.splitlines()
    seen = 0
    for number in range(line - 1, len(lines)):
        content = lines[number]
        if number == line - 1:
            content = content.split("=", 1)[-1]
        strings = _STRING.findall(content)
        if seen + len(strings) > index:
            return f"{config.path}:{number + 1}"
        seen += len(strings)
        if "]" in _STRING.sub("", content).split("#", 1)[0]:
            break
    return f"{config.path}:{line}"


def _key_line(config: ProjectConfig, key: str, table: str) -> int:
    """1-based line where ``key`` is set inside the right table (best effort)."""
    text, prefix = config.source, config.table_prefix
    wanted = ".".join((*prefix, table)) if table else ".".join(prefix)
    current = ""
    header = re.compile(r"^\s*\[\s*([^\]]+?)\s*\]")
    assign = re.compile(r"^\s*[\"']?" + re.escape(key) + r"[\"']?\s*=")
    inline = re.compile(r"^\s*[\"']?" + re.escape(table) + r"[\"']?\s*=") if table else None
    fallback = 1
    for number, line in enumerate(text.splitlines(), start=1):
        found = header.match(line)
        if found:
            current = re.sub(r"[\s\"']", "", found.group(1))
            if current == wanted:
                fallback = number
            continue
        if current == wanted and assign.match(line):
            return number
        if inline is not None and current == ".".join(prefix) and inline.match(line):
            fallback = number
    return fallback

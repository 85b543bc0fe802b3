"""Editor settings (section "calami"): parsed, validated, defaulted.

Settings arrive as loose JSON from ``initializationOptions`` and
``workspace/configuration``.  Each bad value is reported (the server shows
the messages with ``window/showMessage``) and replaced by its default, so a
typo in a settings file never stops the hints.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace
from typing import Any, Mapping

from lsprotocol import types

from calami.findings import Thresholds
from calami.vocab.project import DEFAULT_WORD_LIST

SEVERITIES = {
    "error": types.DiagnosticSeverity.Error,
    "warning": types.DiagnosticSeverity.Warning,
    "information": types.DiagnosticSeverity.Information,
    "hint": types.DiagnosticSeverity.Hint,
}
VARIANTS = ("any", "en-US", "en-GB")


@dataclass(frozen=True)
class Settings:
    variant: str = "any"
    hint_threshold: float = 0.5
    confident_threshold: float = 0.95
    severity_nonword: str = "information"
    severity_realword: str = "hint"
    max_suggestions: int = 5
    check_strings: bool = False
    debounce_ms: int = 150
    model_path: str = ""
    word_list: str = DEFAULT_WORD_LIST

    @property
    def thresholds(self) -> Thresholds:
        return Thresholds(self.hint_threshold, self.confident_threshold)

    def severity(self, kind: str) -> types.DiagnosticSeverity:
        return SEVERITIES[self.severity_realword if kind == "realword" else self.severity_nonword]


# settings key (dotted, below "calami") -> field name
KEYS = {
    "variant": "variant",
    "hintThreshold": "hint_threshold",
    "confidentThreshold": "confident_threshold",
    "severity.nonword": "severity_nonword",
    "severity.realword": "severity_realword",
    "maxSuggestions": "max_suggestions",
    "checkStrings": "check_strings",
    "debounceMs": "debounce_ms",
    "modelPath": "model_path",
    "wordList": "word_list",
}


def _flatten(raw: Mapping[str, Any], prefix: str = "") -> dict[str, Any]:
    """{"severity": {"nonword": x}} and {"severity.nonword": x} mean the same."""
    flat: dict[str, Any] = {}
    for key, value in raw.items():
        name = f"{prefix}{key}"
        if isinstance(value, Mapping) and name not in KEYS:
            flat.update(_flatten(value, name + "."))
        else:
            flat[name] = value
    return flat


def _check(field: str, value: Any) -> str | None:
    """Why ``value`` is not acceptable for ``field`` (None when it is)."""
    if field == "variant":
        return None if value in VARIANTS else f"must be one of {', '.join(VARIANTS)}"
    if field in ("hint_threshold", "confident_threshold"):
        ok = isinstance(value, (int, float)) and not isinstance(value, bool) and 0.0 < value <= 1.0
        return None if ok else "must be a number above 0 and at most 1"
    if field.startswith("severity_"):
        return None if value in SEVERITIES else f"must be one of {', '.join(SEVERITIES)}"
    if field == "max_suggestions":
        ok = isinstance(value, int) and not isinstance(value, bool) and 1 <= value <= 50
        return None if ok else "must be a whole number from 1 to 50"
    if field == "check_strings":
        return None if isinstance(value, bool) else "must be true or false"
    if field == "debounce_ms":
        ok = isinstance(value, int) and not isinstance(value, bool) and 0 <= value <= 10_000
        return None if ok else "must be a whole number of milliseconds from 0 to 10000"
    if field in ("model_path", "word_list"):
        if not isinstance(value, str):
            return "must be a string"
        if field == "word_list" and (not value or value.startswith(("/", "~")) or ".." in value.replace("\\", "/").split("/")):
            return "must be a path inside the workspace folder"
        return None
    return "is not a calami setting"  # pragma: no cover - KEYS guards this


EDITOR_KEYS = frozenset({"serverPath", "serverArgs", "trace"})


def parse(raw: Any, base: Settings = Settings()) -> tuple[Settings, list[str]]:
    """Settings from a "calami" section; problems come back as messages."""
    if raw is None:
        return base, []
    if not isinstance(raw, Mapping):
        return base, [f"calami settings must be an object, got {type(raw).__name__}; using defaults"]
    flat = _flatten(raw)
    if "calami" in raw and isinstance(raw["calami"], Mapping):  # the whole settings tree was sent
        flat = _flatten(raw["calami"])
    changes: dict[str, Any] = {}
    problems: list[str] = []
    for key, value in flat.items():
        field = KEYS.get(key)
        if field is None:
            # The editor's own keys (how to start us, protocol tracing) are not ours to judge.
            if key.split(".")[0] not in EDITOR_KEYS:
                problems.append(f"unknown setting calami.{key} ignored")
            continue
        if value is None:
            continue
        why = _check(field, value)
        if why:
            problems.append(f"calami.{key} = {value!r} {why}; using {getattr(Settings(), field)!r}")
            continue
        changes[field] = float(value) if field.endswith("_threshold") else value
    settings = replace(base, **changes)
    if settings.hint_threshold > settings.confident_threshold:
        problems.append(
            f"calami.hintThreshold ({settings.hint_threshold}) is above calami.confidentThreshold "
            f"({settings.confident_threshold}); using {Settings.hint_threshold} and {Settings.confident_threshold}"
        )
        settings = replace(settings, hint_threshold=Settings.hint_threshold, confident_threshold=Settings.confident_threshold)
    return settings, problems


def with_project(settings: Settings, config: Any) -> Settings:
    """The repository's calami.toml wins for the keys it sets: it is the team's agreement."""
    if config is None:
        return settings
    defaults = type(config)() if _constructible(config) else None
    changes: dict[str, Any] = {}

    def project_value(attr: str) -> Any:
        value = getattr(config, attr, None)
        if defaults is not None and value == getattr(defaults, attr, None):
            return None  # not set in the file
        return value

    variant = project_value("variant")
    if variant in VARIANTS:
        changes["variant"] = variant
    check_strings = project_value("check_strings")
    if isinstance(check_strings, bool):
        changes["check_strings"] = check_strings
    max_suggestions = project_value("max_suggestions")
    if isinstance(max_suggestions, int) and max_suggestions >= 1:
        changes["max_suggestions"] = max_suggestions
    hint = project_value("hint")
    confident = project_value("confident")
    if isinstance(hint, float) and isinstance(confident, float) and 0 < hint <= confident <= 1:
        changes["hint_threshold"], changes["confident_threshold"] = hint, confident
    return replace(settings, **changes)


def _constructible(obj: Any) -> bool:
    try:
        type(obj)()
    except TypeError:
        return False
    return True


def field_names() -> list[str]:
    return [f.name for f in fields(Settings)]

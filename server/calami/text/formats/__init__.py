"""Prose extraction: document text of a given kind -> prose spans.

``extract(text, kind)`` dispatches to one extractor per kind; every span
holds exact code-point offsets into the original text.  ``detect_kind``
guesses the kind from a file path (extension, file name) and its first
line (shebang).  Extractor modules are imported lazily: the server only
pays for the kinds it sees.
"""

from __future__ import annotations

import importlib
import os
from typing import Callable

import regex

from calami.text.formats.textscan import ExtractOptions
from calami.text.spans import Span

__all__ = ["ExtractOptions", "KINDS", "detect_kind", "extract", "not_prose"]

# kind -> (module, language passed to a family extractor or None)
_REGISTRY: dict[str, tuple[str, str | None]] = {
    "markdown": ("markdown", None),
    "notebook": ("notebook", None),
    "rst": ("rst", None),
    "org": ("org", None),
    "asciidoc": ("asciidoc", None),
    "latex": ("latex", None),
    "plain": ("plain", None),
    "commit": ("commit", None),
    "html": ("html", None),
    "python": ("source_python", None),
    "javascript": ("source_clike", "javascript"),
    "typescript": ("source_clike", "typescript"),
    "rust": ("source_clike", "rust"),
    "go": ("source_clike", "go"),
    "c": ("source_clike", "c"),
    "cpp": ("source_clike", "cpp"),
    "java": ("source_clike", "java"),
    "css": ("source_clike", "css"),
    "ruby": ("source_ruby", None),
    "shell": ("source_hash", "shell"),
    "yaml": ("source_hash", "yaml"),
    "toml": ("source_hash", "toml"),
}

KINDS: list[str] = list(_REGISTRY)

_EXTENSIONS = {
    ".md": "markdown", ".markdown": "markdown", ".mdown": "markdown", ".mkd": "markdown", ".mdx": "markdown",
    ".ipynb": "notebook",
    ".rst": "rst", ".rest": "rst",
    ".org": "org",
    ".adoc": "asciidoc", ".asciidoc": "asciidoc", ".asc": "asciidoc",
    ".tex": "latex", ".sty": "latex", ".cls": "latex", ".ltx": "latex",
    ".txt": "plain", ".text": "plain",
    ".html": "html", ".htm": "html", ".xhtml": "html",
    ".py": "python", ".pyi": "python", ".pyw": "python",
    ".js": "javascript", ".mjs": "javascript", ".cjs": "javascript", ".jsx": "javascript",
    ".ts": "typescript", ".tsx": "typescript", ".mts": "typescript", ".cts": "typescript",
    ".rs": "rust",
    ".go": "go",
    ".c": "c", ".h": "c",
    ".cc": "cpp", ".cpp": "cpp", ".cxx": "cpp", ".c++": "cpp", ".hpp": "cpp", ".hh": "cpp", ".hxx": "cpp",
    ".ipp": "cpp", ".inl": "cpp",
    ".java": "java",
    ".css": "css",
    ".rb": "ruby", ".rake": "ruby", ".gemspec": "ruby",
    ".sh": "shell", ".bash": "shell", ".zsh": "shell", ".ksh": "shell", ".bats": "shell",
    ".yaml": "yaml", ".yml": "yaml",
    ".toml": "toml",
}
_FILE_NAMES = {
    "COMMIT_EDITMSG": "commit", "MERGE_MSG": "commit", "TAG_EDITMSG": "commit", "SQUASH_MSG": "commit",
    "EDIT_DESCRIPTION": "commit",
    "README": "plain", "AUTHORS": "plain", "NEWS": "plain",
    "Rakefile": "ruby", "Gemfile": "ruby",
    "Pipfile": "toml", "Cargo.lock": "toml", "poetry.lock": "toml",
    ".bashrc": "shell", ".bash_profile": "shell", ".profile": "shell", ".zshrc": "shell", ".bash_aliases": "shell",
    ".clang-format": "yaml",
}
# Files that look like text but whose words are not the project's prose:
# licence texts are copied verbatim (and archaic), dependency lists and
# build files hold names.  A folder walk skips them; naming one on the
# command line or opening it in an editor still checks it.
_NOT_PROSE = (
    (regex.compile(r"(?i)(?:(?:un)?licen[cs]e|copying|copyright|notice|patents)(?:[-_.][\w.-]*)?"), "licence or legal text"),
    (regex.compile(r"(?i)(?:.*[-_.])?(?:requirements|constraints)(?:[-_.].*)?"), "dependency list"),
    (regex.compile(r"(?i)cmakelists|robots|top_level|sources|dependency_links"), "build or packaging data"),
)


def not_prose(path: str) -> str | None:
    """Why a file that looks like text is not prose (a licence, a dependency list), or None."""
    name = os.path.basename(path.replace("\\", "/"))
    stem, ext = os.path.splitext(name)
    if ext.lower() not in ("", ".txt", ".md", ".rst", ".text", ".in"):
        return None
    for pattern, reason in _NOT_PROSE:
        if pattern.fullmatch(stem):
            return reason
    return None


_SHEBANG = regex.compile(r"#!\s*(?:\S*/)?(?:env\s+(?:-\S+\s+)*)?(?P<prog>[A-Za-z][\w.+-]*)")
_SHEBANG_PROGRAMS = {
    "sh": "shell", "bash": "shell", "zsh": "shell", "ksh": "shell", "dash": "shell", "ash": "shell",
    "node": "javascript", "nodejs": "javascript", "deno": "typescript", "bun": "javascript",
    "ts-node": "typescript", "tsx": "typescript", "ruby": "ruby",
}


def extract(text: str, kind: str, options: ExtractOptions | None = None) -> list[Span]:
    """Prose spans of ``text`` read as ``kind`` (one of KINDS)."""
    return _extractor(kind)(text, options)


def _extractor(kind: str) -> Callable[[str, ExtractOptions | None], list[Span]]:
    try:
        module_name, language = _REGISTRY[kind]
    except KeyError:
        raise ValueError(f"unknown document kind {kind!r}; known kinds: {', '.join(KINDS)}") from None
    module = importlib.import_module(f"calami.text.formats.{module_name}")
    if language is None:
        return module.extract  # type: ignore[no-any-return]
    return lambda text, options: module.extract(text, options, language=language)  # type: ignore[no-any-return]


def detect_kind(path: str, first_line: str = "") -> str | None:
    """The document kind of a file, or None when it is not one we read."""
    name = os.path.basename(path.replace("\\", "/"))
    if name in _FILE_NAMES:
        return _FILE_NAMES[name]
    if not_prose(name) is not None:
        return None
    stem, ext = os.path.splitext(name)
    kind = _EXTENSIONS.get(ext.lower())
    if kind is not None:
        return kind
    if first_line.startswith("#!"):
        m = _SHEBANG.match(first_line)
        if m:
            prog = m.group("prog")
            if prog.startswith("python"):
                return "python"
            return _SHEBANG_PROGRAMS.get(prog)
    if name.upper().startswith(("README", "CHANGELOG", "CHANGES", "CONTRIBUTING")) and not ext:
        return "plain"
    return None

"""Open documents: text kept in sync with the editor, and their prose spans.

The server keeps its own copy of each document (instead of pygls' workspace)
so it can validate every incremental change: a change with an impossible
range is refused as a whole, logged, and the previous text kept, rather than
silently corrupting the copy the findings are computed from.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any
from urllib.parse import unquote, urlparse

from lsprotocol import types

from calami.lsp.findings_cache import FindingsCache
from calami.lsp.positions import UTF16, PositionMap
from calami.text.formats import ExtractOptions, detect_kind, extract
from calami.text.spans import Span

# Prose checked per document.  A bigger document is checked up to here and
# the log says so: the server must answer quickly whatever it is sent.
MAX_CHECKED_CHARS = 500_000

# LSP language identifiers -> calami document kinds (the extractor's names).
LANGUAGE_KINDS = {
    "markdown": "markdown",
    "restructuredtext": "rst",
    "latex": "latex",
    "tex": "latex",
    "plaintext": "plain",
    "git-commit": "commit",
    "html": "html",
    "python": "python",
    "javascript": "javascript",
    "javascriptreact": "javascript",
    "typescript": "typescript",
    "typescriptreact": "typescript",
    "rust": "rust",
    "go": "go",
    "c": "c",
    "cpp": "cpp",
    "java": "java",
    "shellscript": "shell",
    "yaml": "yaml",
    "toml": "toml",
    "ruby": "ruby",
    "css": "css",
    "org": "org",
    "asciidoc": "asciidoc",
    # Names some editors use instead of the LSP identifiers.
    "rst": "rst",
    "plaintex": "latex",
    "text": "plain",
    "gitcommit": "commit",
    "sh": "shell",
    "bash": "shell",
    "zsh": "shell",
    "jsx": "javascript",
    "tsx": "typescript",
    "c++": "cpp",
}


class ChangeError(ValueError):
    """An incremental change that does not fit the document."""


def uri_to_path(uri: str) -> Path | None:
    """Filesystem path of a file: URI, None for other schemes (untitled:, ...)."""
    parsed = urlparse(uri)
    if parsed.scheme != "file":
        return None
    return Path(unquote(parsed.path))


def document_kind(language_id: str, uri: str, text: str = "") -> str:
    """The extractor kind: from the editor's language id, else from the file name."""
    kind = LANGUAGE_KINDS.get((language_id or "").lower())
    if kind:
        return kind
    path = uri_to_path(uri)
    first_line = text[: text.find("\n")] if "\n" in text[:200] else text[:200]
    return detect_kind(str(path) if path else uri, first_line) or "plain"


def prose_spans(text: str, kind: str, check_strings: bool = False) -> list[Span]:
    """Prose spans of ``text`` (already capped by the caller)."""
    return list(extract(text, kind, ExtractOptions(strings=check_strings)))


def document_spans(doc: "Document", text: str, check_strings: bool = False) -> list[Span]:
    """``prose_spans`` of a document snapshot; Markdown re-parses only the edited blocks."""
    if doc.kind != "markdown":
        return prose_spans(text, doc.kind, check_strings)
    from calami.text.formats.markdown_incremental import extract_state, update

    state = doc.extraction
    state = extract_state(text) if state is None else update(state, text)
    doc.extraction = state
    return list(state.spans)


@dataclass
class Document:
    uri: str
    language_id: str
    version: int
    text: str
    encoding: str = UTF16
    kind: str = "plain"
    ignored: set[str] = field(default_factory=set)  # "ignore in this document"
    cache: FindingsCache = field(default_factory=FindingsCache)
    # Lowest offset changed since diagnostics were last sent: wire diagnostics
    # of findings that end before it are still exact and are reused.
    dirty_from: int = 0
    wire: dict = field(default_factory=dict)
    # The last Markdown extraction (text, spans, parser checkpoints), reused
    # by the next one; touched only by the checking thread.
    extraction: Any = None
    # When the last change arrived (perf_counter), for the debug log's latency figure.
    changed_at: float = field(default_factory=time.perf_counter)
    _positions: PositionMap | None = None

    @property
    def positions(self) -> PositionMap:
        if self._positions is None or self._positions.text is not self.text:
            self._positions = PositionMap(self.text, self.encoding)
        return self._positions

    @property
    def path(self) -> Path | None:
        return uri_to_path(self.uri)

    @property
    def is_binary(self) -> bool:
        return "\x00" in self.text

    def apply(self, changes: list[types.TextDocumentContentChangeEvent], version: int) -> None:
        """Apply all changes of one didChange, or none of them (ChangeError)."""
        text = self.text
        dirty = self.dirty_from
        for change in changes:
            if isinstance(change, types.TextDocumentContentChangeWholeDocument) or getattr(change, "range", None) is None:
                text = change.text
                dirty = 0
                continue
            # The map of the current text is usually built already (by the last publish).
            positions = self.positions if text is self.text else PositionMap(text, self.encoding)
            rng = change.range
            try:
                start = positions.offset(rng.start)
                end = positions.offset(rng.end)
            except ValueError as exc:
                raise ChangeError(str(exc)) from None
            if end < start:
                raise ChangeError(
                    f"range end {rng.end.line}:{rng.end.character} is before start {rng.start.line}:{rng.start.character}"
                )
            text = text[:start] + change.text + text[end:]
            dirty = min(dirty, start)
        self.text = text
        self.version = version
        self.dirty_from = dirty
        self.changed_at = time.perf_counter()

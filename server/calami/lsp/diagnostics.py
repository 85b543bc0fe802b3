"""Findings -> LSP diagnostics, and when to compute them.

Typing fast must not queue work: each edit cancels the document's pending
check, waits ``debounceMs`` and then checks the newest text on one worker
thread (so the event loop keeps answering).  A check whose document moved on
stops at the next block and is never published: every result carries the
version it was computed for and is dropped if that is no longer current.
"""

from __future__ import annotations

import asyncio
import logging
import os
import sys
import time
from concurrent.futures import ThreadPoolExecutor
from typing import Any, Callable

from lsprotocol import types

from calami.findings import DIRECTIVE, NONWORD, Finding, Suggestion
from calami.lsp.documents import MAX_CHECKED_CHARS, Document, document_spans
from calami.lsp.findings_cache import Cancelled
from calami.lsp.settings import Settings
from calami.text import directives as file_directives
from calami.text.spans import subtract

log = logging.getLogger("calami.lsp")

SOURCE = "calami"
SWITCH_INTERVAL_S = 0.0005
# Pull reports' resultIds start with this, so an id from an earlier server run never matches.
_RUN_ID = os.urandom(4).hex()
CODES = {NONWORD: "calami.nonword", "realword": "calami.realword", DIRECTIVE: "calami.directive"}


def message(finding: Finding) -> str:
    """One line naming the word and the best fix (our own wording)."""
    best = finding.best
    if finding.kind == DIRECTIVE:
        return f"{finding.note}; write '{best}'" if best and best not in finding.note else finding.note
    if finding.kind == NONWORD:
        text = f"'{finding.word}' looks misspelt"
    else:
        text = f"'{finding.word}' is unlikely in this context"
    return f"{text}; best fix: '{best}'" if best else text


def severity(finding: Finding, settings: Settings) -> types.DiagnosticSeverity:
    """A directive calami cannot read is always a warning: it hides nothing until fixed."""
    if finding.kind == DIRECTIVE:
        return types.DiagnosticSeverity.Warning
    return settings.severity(finding.kind)


def to_diagnostic(finding: Finding, doc: Document, settings: Settings) -> types.Diagnostic:
    return types.Diagnostic(
        range=doc.positions.range(finding.start, finding.end),
        message=message(finding),
        severity=severity(finding, settings),
        code=CODES.get(finding.kind, f"calami.{finding.kind}"),
        source=SOURCE,
        data={
            "word": finding.word,
            "kind": finding.kind,
            "suggestions": [s.text for s in finding.suggestions[: settings.max_suggestions]],
            "left": finding.left,
            "right": finding.right,
        },
    )


def to_wire(finding: Finding, doc: Document, settings: Settings) -> dict[str, Any]:
    """The same diagnostic as LSP JSON: publishing thousands of findings per
    keystroke is dominated by building and unstructuring attrs objects."""
    start = doc.positions.position(finding.start)
    end = doc.positions.position(finding.end)
    return {
        "range": {"start": {"line": start.line, "character": start.character},
                  "end": {"line": end.line, "character": end.character}},
        "message": message(finding),
        "severity": int(severity(finding, settings)),
        "code": CODES.get(finding.kind, f"calami.{finding.kind}"),
        "source": SOURCE,
        "data": {
            "word": finding.word,
            "kind": finding.kind,
            "suggestions": [s.text for s in finding.suggestions[: settings.max_suggestions]],
            "left": finding.left,
            "right": finding.right,
        },
    }


def wire_diagnostics(doc: Document, findings: list[Finding], settings: Settings) -> list[dict[str, Any]]:
    """LSP JSON for all findings, reusing what the last publish sent where positions cannot have moved.

    Reused: findings before the first change since the last publish, and,
    when the changed text holds no line break before or after the edit,
    findings on the lines after the edited one (same line and column,
    offsets shifted by the edit's length change).
    """
    key_settings = (settings.severity_nonword, settings.severity_realword, settings.max_suggestions)
    old = doc.wire if doc.wire.get("settings") == key_settings else {}
    text = doc.text
    limit = doc.dirty_from
    after, delta = _unmoved_lines_from(old.get("text"), text)
    fresh: dict[Any, Any] = {"settings": key_settings, "text": text}
    out = []
    for f in findings:
        item = None
        if f.end < limit:
            item = old.get(f)
        elif f.start >= after:
            item = old.get(f.shifted(-delta) if delta else f)
        if item is None:
            item = to_wire(f, doc, settings)
        fresh[f] = item
        out.append(item)
    doc.wire = fresh
    doc.dirty_from = len(text) + 1
    return out


def _unmoved_lines_from(before: str | None, text: str) -> tuple[int, int]:
    """(offset from which every line kept its number and content, length change) between two texts.

    ``(len(text) + 1, 0)`` when unknown: the edit added or removed a line break.
    """
    none = (len(text) + 1, 0)
    if before is None or before == text:
        return none
    from calami.text.formats.markdown_incremental import common_prefix, common_suffix

    prefix = common_prefix(before, text)
    suffix = common_suffix(before, text, min(len(before), len(text)) - prefix)
    old_end, new_end = len(before) - suffix, len(text) - suffix
    if any(c in "\r\n" for c in before[prefix:old_end]) or any(c in "\r\n" for c in text[prefix:new_end]):
        return none
    if prefix and text[prefix - 1] == "\r":
        return none  # the edit may have joined or split a CRLF pair
    n = text.find("\n", new_end)
    r = text.find("\r", new_end, n if n >= 0 else len(text))
    breaks = r if r >= 0 else n
    if breaks < 0:
        return none
    return breaks + 1, len(text) - len(before)


def compute(doc: Document, text: str, version: int, checker: Any, settings: Settings, project: Any = None) -> list[Finding]:
    """Findings for one snapshot of a document (runs on the worker thread)."""
    if "\x00" in text:
        return []
    checked = text
    if len(text) > MAX_CHECKED_CHARS:
        checked = text[:MAX_CHECKED_CHARS]
    spans = document_spans(doc, checked, settings.check_strings)
    if project is not None and getattr(project, "skip_patterns", None):
        holes, warnings = project.ignore_holes(checked)
        for warning in warnings:
            log.warning("calami: %s", warning)
        spans = subtract(spans, holes)
    marks = file_directives.read(checked, doc.kind)
    spans = marks.narrow(spans)
    findings = doc.cache.findings(checked, spans, checker, cancelled=lambda: doc.version != version)
    findings = [f for f in findings if f.word not in doc.ignored and f.word.lower() not in doc.ignored]
    findings = file_directives.drop_known(findings, marks)
    if marks.problems:
        findings = sorted([*findings, *directive_findings(checked, marks)], key=lambda f: (f.start, f.end))
    return findings


def directive_findings(text: str, marks: file_directives.Directives) -> list[Finding]:
    """A directive calami could not read, as a finding of its own (shown as a diagnostic)."""
    out = []
    for problem in marks.problems:
        fixes = (Suggestion(problem.fix, 1.0),) if problem.fix else ()
        out.append(Finding(problem.start, problem.end, text[problem.start:problem.end], DIRECTIVE, 1.0, fixes,
                           note=problem.message))
    return out


class Scheduler:
    """Debounced, cancellable, version-checked diagnostics for open documents."""

    def __init__(
        self,
        checker_for: Callable[[Document], Any],
        settings_for: Callable[[Document], Settings],
        publish: Callable[[Document, list[dict[str, Any]]], None],
        project_for: Callable[[Document], Any] = lambda doc: None,
        ready: Callable[[Document], Any] | None = None,
    ) -> None:
        self.project_for = project_for
        self.ready = ready  # awaited before a check (the workspace scan's first wait)
        self.checker_for = checker_for
        self.settings_for = settings_for
        self.publish = publish
        self.executor = ThreadPoolExecutor(max_workers=1, thread_name_prefix="calami-check")
        # A message that arrives while the worker checks waits for the GIL up to
        # the switch interval (5 ms by default) before it is even read; an
        # editor's pull request always arrives then.
        sys.setswitchinterval(min(sys.getswitchinterval(), SWITCH_INTERVAL_S))
        self.pending: dict[str, asyncio.Task[Any]] = {}
        self.findings: dict[str, tuple[int, list[Finding]]] = {}
        # LSP JSON of the findings above, per version (what push sent, what pull answers).
        self.wire: dict[str, tuple[int, list[dict[str, Any]]]] = {}
        self._waiting: dict[str, asyncio.Task[Any]] = {}  # uri -> its pending check, while that still sleeps (debounce)
        self._reported: dict[str, tuple[str, list[dict[str, Any]]]] = {}  # uri -> (resultId, items)
        self._report_count = 0
        self._warned: set[tuple[str, str]] = set()

    def schedule(self, doc: Document, delay_ms: int | None = None) -> None:
        """Check ``doc`` after the debounce delay, replacing any pending check."""
        self.cancel(doc.uri)
        settings = self.settings_for(doc)
        delay = settings.debounce_ms if delay_ms is None else delay_ms
        self.pending[doc.uri] = asyncio.ensure_future(self._run(doc, delay / 1000.0, push=True))

    def cancel(self, uri: str) -> None:
        task = self.pending.pop(uri, None)
        if task is not None and not task.done():
            task.cancel()

    def forget(self, uri: str) -> None:
        self.cancel(uri)
        self.findings.pop(uri, None)
        self.wire.pop(uri, None)
        self._reported.pop(uri, None)

    def stale(self) -> None:
        """Words or settings changed: no stored result is current any more."""
        self.findings.clear()
        self.wire.clear()

    async def current(self, doc: Document) -> list[dict[str, Any]]:
        """LSP JSON diagnostics for the document's current version (pull requests).

        Joins the check the last edit scheduled instead of starting a second
        one, and skips what is left of its debounce: a pull means now.
        """
        while True:
            version = doc.version
            wired = self.wire.get(doc.uri)
            if wired and wired[0] == version:
                return wired[1]
            task = self.pending.get(doc.uri)
            if task is not None and not task.done():
                if self._waiting.get(doc.uri) is task:
                    self.schedule(doc, delay_ms=0)
                    task = self.pending[doc.uri]
                await asyncio.wait([task])  # a newer edit may cancel it: then go round again
                continue
            cached = self.findings.get(doc.uri)
            findings = cached[1] if cached and cached[0] == version else await self._check(doc)
            if findings is not None and doc.version == version:
                return self._wire(doc, findings)

    def result_id(self, doc: Document, items: list[dict[str, Any]]) -> str:
        """The pull report's ``resultId``: it changes only when the diagnostics do.

        So a client re-asking after an edit that changed no diagnostic gets an
        ``unchanged`` report (LSP 3.17) instead of the whole list again.
        """
        last = self._reported.get(doc.uri)
        if last is not None and (last[1] is items or last[1] == items):  # reused items compare by identity
            return last[0]
        self._report_count += 1
        result_id = f"{_RUN_ID}-{self._report_count}"
        self._reported[doc.uri] = (result_id, items)
        return result_id

    def _wire(self, doc: Document, findings: list[Finding]) -> list[dict[str, Any]]:
        items = wire_diagnostics(doc, findings, self.settings_for(doc))
        self.wire[doc.uri] = (doc.version, items)
        return items

    async def _run(self, doc: Document, delay: float, push: bool) -> None:
        try:
            if delay > 0:
                me = asyncio.current_task()
                self._waiting[doc.uri] = me
                try:
                    await asyncio.sleep(delay)
                finally:
                    if self._waiting.get(doc.uri) is me:  # a newer check may be waiting already
                        del self._waiting[doc.uri]
            started = time.perf_counter()
            findings = await self._check(doc)
            if findings is not None:
                items = self._wire(doc, findings)
                if push:
                    self.publish(doc, items)
                now = time.perf_counter()
                log.debug("calami: %s v%d: %d diagnostics in %.1f ms (%.1f ms since the change arrived)",
                          doc.uri, doc.version, len(findings), (now - started) * 1000, (now - doc.changed_at) * 1000)
        except asyncio.CancelledError:
            raise
        except Exception:  # keep serving; the traceback goes to stderr only
            log.exception("calami: checking %s failed", doc.uri)

    async def _check(self, doc: Document) -> list[Finding] | None:
        if self.ready is not None:
            await self.ready(doc)
        version, text = doc.version, doc.text
        self._warn_once(doc, text)
        checker = self.checker_for(doc)
        settings = self.settings_for(doc)
        project = self.project_for(doc)
        loop = asyncio.get_running_loop()
        try:
            findings = await loop.run_in_executor(self.executor, compute, doc, text, version, checker, settings, project)
        except Cancelled:
            return None
        if doc.version != version:
            return None  # an edit arrived meanwhile: never publish old findings
        self.findings[doc.uri] = (version, findings)
        return findings

    def _warn_once(self, doc: Document, text: str) -> None:
        if "\x00" in text:
            if (doc.uri, "binary") not in self._warned:
                self._warned.add((doc.uri, "binary"))
                log.warning("calami: %s contains NUL bytes (binary content); not checking it", doc.uri)
        elif len(text) > MAX_CHECKED_CHARS and (doc.uri, "large") not in self._warned:
            self._warned.add((doc.uri, "large"))
            log.warning(
                "calami: %s has %d characters; checking only the first %d to stay responsive",
                doc.uri, len(text), MAX_CHECKED_CHARS,
            )

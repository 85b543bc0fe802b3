"""Code actions for a finding, and the commands they run.

A replacement action carries both the text edit and a command: the editor
applies the edit, then runs ``calami.recordReplacement``, which is how the
profile learns which fixes this user accepts.  Commands validate every
argument and touch only the workspace's configured word list and the user's
profile.
"""

from __future__ import annotations

from typing import Any, Sequence

from lsprotocol import types

from calami.findings import DIRECTIVE, Finding
from calami.lsp.diagnostics import SOURCE, to_diagnostic
from calami.lsp.documents import Document
from calami.lsp.settings import Settings

RECORD_REPLACEMENT = "calami.recordReplacement"
ADD_PROJECT_WORD = "calami.addProjectWord"
REMOVE_PROJECT_WORD = "calami.removeProjectWord"
ADD_USER_WORD = "calami.addUserWord"
REMOVE_USER_WORD = "calami.removeUserWord"
IGNORE_WORD = "calami.ignoreWord"
RELOAD_CONFIGURATION = "calami.reloadConfiguration"

COMMANDS = (
    RECORD_REPLACEMENT, ADD_PROJECT_WORD, REMOVE_PROJECT_WORD, ADD_USER_WORD,
    REMOVE_USER_WORD, IGNORE_WORD, RELOAD_CONFIGURATION,
)

MAX_ARGUMENT_CHARS = 100

# Titles of the directive-writing quick fixes (tests import them from here).
SKIP_LINE_TITLE = "Skip this line (calami directive)"
ACCEPT_IN_FILE_TITLE = "Accept '{word}' in this file (calami directive)"
FIX_DIRECTIVE_TITLE = "Correct the directive to '{fix}'"


def add_to_lexicon_title(word: str) -> str:
    """The title of the action that adds ``word`` to the project lexicon (tests import it)."""
    return f"Add '{word}' to the project lexicon"


class ArgumentError(ValueError):
    """A command was called with arguments it cannot accept."""


def word_argument(value: Any, name: str) -> str:
    """A single word: a non-empty string without whitespace, of sane length."""
    if not isinstance(value, str):
        raise ArgumentError(f"{name} must be a string, got {type(value).__name__}")
    if not value or len(value) > MAX_ARGUMENT_CHARS or any(c.isspace() for c in value) or "\x00" in value:
        raise ArgumentError(f"{name} must be one word of at most {MAX_ARGUMENT_CHARS} characters")
    return value


def context_argument(value: Any, name: str) -> str:
    """A neighbouring word for the profile; empty when there was none."""
    if value is None or value == "":
        return ""
    return word_argument(value, name)


def check_arguments(args: Sequence[Any], count: int, command: str) -> None:
    if len(args) != count:
        raise ArgumentError(f"{command} takes {count} argument(s), got {len(args)}")


def findings_at(findings: Sequence[Finding], doc: Document, rng: types.Range) -> list[Finding]:
    start = doc.positions.offset(rng.start)
    end = doc.positions.offset(rng.end)
    return [f for f in findings if f.start <= end and start <= f.end]


def code_actions(
    doc: Document, findings: Sequence[Finding], rng: types.Range, settings: Settings, can_add_project_word: bool
) -> list[types.CodeAction]:
    """Actions for the findings under ``rng``: ranked fixes first, the best preferred."""
    from calami.lsp import directive_edits

    actions: list[types.CodeAction] = []
    marks = None
    for finding in findings_at(findings, doc, rng):
        diagnostic = to_diagnostic(finding, doc, settings)
        if finding.kind == DIRECTIVE:
            if finding.best:
                edit = types.WorkspaceEdit(changes={doc.uri: [types.TextEdit(diagnostic.range, finding.best)]})
                actions.append(types.CodeAction(title=FIX_DIRECTIVE_TITLE.format(fix=finding.best),
                                                kind=types.CodeActionKind.QuickFix, diagnostics=[diagnostic],
                                                edit=edit, is_preferred=True))
            continue
        for rank, suggestion in enumerate(finding.suggestions[: settings.max_suggestions]):
            edit = types.WorkspaceEdit(changes={doc.uri: [types.TextEdit(diagnostic.range, suggestion.text)]})
            actions.append(
                types.CodeAction(
                    title=f"Replace with '{suggestion.text}'",
                    kind=types.CodeActionKind.QuickFix,
                    diagnostics=[diagnostic],
                    edit=edit,
                    is_preferred=rank == 0,
                    command=types.Command(
                        title="Remember this fix",
                        command=RECORD_REPLACEMENT,
                        arguments=[finding.word, suggestion.text, finding.left, finding.right],
                    ),
                )
            )
        word = finding.word
        # Directives written into the file, after the fixes and before the word lists.
        if marks is None:
            marks = directive_edits.read(doc)
        for title, edit in ((SKIP_LINE_TITLE, directive_edits.skip_line(doc, finding)),
                            (ACCEPT_IN_FILE_TITLE.format(word=word), directive_edits.accept_in_file(doc, word, marks))):
            actions.append(types.CodeAction(title=title, kind=types.CodeActionKind.QuickFix, diagnostics=[diagnostic],
                                            edit=types.WorkspaceEdit(changes={doc.uri: [edit]})))
        if can_add_project_word:
            actions.append(_command_action(add_to_lexicon_title(word), ADD_PROJECT_WORD, [doc.uri, word], diagnostic))
        actions.append(_command_action(f"Add '{word}' to my words", ADD_USER_WORD, [word], diagnostic))
        actions.append(_command_action(f"Ignore '{word}' in this document", IGNORE_WORD, [doc.uri, word], diagnostic))
    return actions


def _command_action(title: str, command: str, arguments: list[Any], diagnostic: types.Diagnostic) -> types.CodeAction:
    return types.CodeAction(
        title=title,
        kind=types.CodeActionKind.QuickFix,
        diagnostics=[diagnostic],
        command=types.Command(title=title, command=command, arguments=arguments),
    )


def is_ours(diagnostic: types.Diagnostic) -> bool:
    return diagnostic.source == SOURCE

"""Workspace folders -> projects (config + word list) -> checkers.

Each workspace folder is its own project: its calami.toml / pyproject.toml
and word list apply to the documents below it, so a multi-root workspace
mixing an en-GB handbook and an en-US library checks each by its own rules.
A document outside every folder gets the project found from its own folder
(or none for untitled buffers).
"""

from __future__ import annotations

import logging
from pathlib import Path
from typing import Any, Callable, Sequence

from calami.lsp.settings import Settings, with_project

log = logging.getLogger("calami.lsp")

CheckerFactory = Callable[[Sequence[Any], Settings], Any]


def _read_words(path: Path) -> Any:
    from calami.vocab import wordlist
    from calami.vocab.project import ProjectWords

    try:
        return ProjectWords(wordlist.read(path).words)
    except Exception as exc:
        log.warning("calami: %s", exc)
        return ProjectWords()


def is_inside(path: Path, root: Path) -> bool:
    try:
        path.resolve().relative_to(root.resolve())
    except (ValueError, OSError):
        return False
    return True


class Projects:
    """Projects by root, the folder list, and one checker per (project, settings)."""

    def __init__(self, make_checker: CheckerFactory, user_adaptations: Sequence[Any] = ()) -> None:
        from calami.lsp.vocabulary import WorkspaceScans

        self.make_checker = make_checker
        # Each folder's own vocabulary (a cache model), learnt in the background.
        self.scans = WorkspaceScans(getattr(make_checker, "known_word_predicate", lambda: None))
        self.user_adaptations = list(user_adaptations)
        self.folders: list[Path] = []
        self._projects: dict[Path, Any] = {}
        self._checkers: dict[tuple[Path | None, Path | None, Settings], Any] = {}
        self.generation = 0  # bumped whenever words/config change: caches must go
        self.report: Callable[[str], None] = lambda message: log.warning("calami: %s", message)
        self._broken: set[Path] = set()  # roots whose config failed to parse, until reload
        self._roots: dict[Path, Path] = {}  # document folder -> project root (saves stat calls per keystroke)

    # -- folders --------------------------------------------------------------
    def set_folders(self, folders: Sequence[Path]) -> None:
        self.folders = sorted({Path(f) for f in folders}, key=lambda p: len(p.parts), reverse=True)
        self.invalidate()

    def folder_of(self, path: Path | None) -> Path | None:
        if path is None:
            return None
        for folder in self.folders:  # deepest first: nested folders win
            if is_inside(path, folder):
                return folder
        return None

    # -- projects -------------------------------------------------------------
    def project_for(self, path: Path | None) -> Any | None:
        """The project of a document path (None for untitled buffers).

        The root is found from the document's own folder, so a sub-project
        with its own calami.toml inside a workspace folder gets its own rules.
        """
        if path is None:
            return None
        from calami.vocab.project import Project, find_root

        root = self._roots.get(path.parent)
        if root is None:
            root = self._roots[path.parent] = find_root(path.parent)
        project = self._projects.get(root)
        if project is None and root not in self._broken:
            try:
                project = Project(root)
            except Exception as exc:  # a config error must not stop the hints
                self._broken.add(root)
                self.report(f"{exc}; using defaults until the file is fixed")
                return None
            for problem in (*project.config.errors, *project.config.warnings):
                self.report(problem)
            self._projects[root] = project
        return project

    def reload(self, changed: Path | None = None) -> None:
        """Re-read configs and word lists (all, or those of the project holding ``changed``)."""
        for root in list(self._projects) + list(self._broken):
            if changed is None or is_inside(changed, root):
                self._projects.pop(root, None)
                self._broken.discard(root)
        self.invalidate()

    def invalidate(self) -> None:
        self._checkers.clear()
        self._roots.clear()  # a new calami.toml may have made a new root
        self.generation += 1

    # -- checkers -------------------------------------------------------------
    def effective_settings(self, path: Path | None, settings: Settings) -> Settings:
        project = self.project_for(path)
        return with_project(settings, getattr(project, "config", None)) if project is not None else settings

    def checker_for(self, path: Path | None, settings: Settings) -> Any:
        project = self.project_for(path)
        effective = self.effective_settings(path, settings)
        root = Path(project.root) if project is not None else None
        key = (root, self.folder_of(path), effective)
        checker = self._checkers.get(key)
        if checker is None:
            adaptations = list(self.user_adaptations)
            if project is not None:
                adaptations.insert(0, project.words)
                extra = self._editor_word_list(project, settings)
                if extra is not None:
                    adaptations.insert(1, _read_words(extra))
            checker = self.make_checker(adaptations, effective)
            if hasattr(checker, "usage"):
                checker.usage = self.scans.vocabulary_for(path)
            self._checkers[key] = checker
        return checker

    @staticmethod
    def _editor_word_list(project: Any, settings: Settings) -> Path | None:
        """The calami.wordList setting, used when the project config names no list of its own.

        Either lexicon file name (new or old) as the setting means "the project's default".
        """
        from calami.vocab.project import LEXICON_NAMES

        if settings.word_list in LEXICON_NAMES or project.config.word_lists_given:
            return None
        return Path(project.root) / settings.word_list

    def word_list_for(self, path: Path | None, settings: Settings) -> Path:
        """The word list "add to the project lexicon" may edit: inside the project, never elsewhere."""
        project = self.project_for(path)
        if project is None:
            raise PermissionError("this document is not in a workspace folder, so it has no project lexicon")
        root = Path(project.root)
        target = self._editor_word_list(project, settings) or Path(project.word_list_path)
        if not target.is_absolute():
            target = root / target
        if not is_inside(target, root):  # resolve() follows symlinks out too
            raise PermissionError(f"the configured word list {target} is outside the project folder {root}")
        return target

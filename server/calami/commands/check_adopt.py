"""The options of ``calami check`` that help a team adopt it in an existing repository.

``--fix`` / ``--diff`` (``calami.fixes``), ``--baseline`` / ``--write-baseline``
(``calami.baseline``) and ``--changed`` / ``--staged`` (``calami.gitdiff``).
``commands/check.py`` calls in at three places: adding the options, planning
the documents of ``--changed``, and ``Adoption.process`` on every result,
which filters the findings and applies the fixes before they are reported.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Any, Sequence

from calami.errors import CalamiError

if TYPE_CHECKING:
    from calami.commands.check import Plan
    from calami.gitdiff import Changes


def add_arguments(parser: argparse.ArgumentParser) -> None:
    group = parser.add_argument_group("adopting calami in an existing repository")
    group.add_argument("--fix", action="store_true",
                       help="apply every confident fix in place (only the flagged words change); report what is left")
    group.add_argument("--diff", action="store_true",
                       help="print a unified diff of what --fix would change, without writing anything")
    group.add_argument("--changed", nargs="?", const="", default=None, metavar="REF",
                       help="check only lines added or changed since REF (default: the merge base with the "
                            "default branch); write --changed=REF when paths follow")
    group.add_argument("--staged", action="store_true",
                       help="check only lines staged in the git index (against HEAD, or REF with --changed)")
    group.add_argument("--baseline", metavar="FILE", help="report only findings not recorded in FILE")
    group.add_argument("--write-baseline", metavar="FILE",
                       help="record today's findings in FILE (they are then hidden by --baseline FILE)")


def validate(args: argparse.Namespace) -> None:
    """Combinations that cannot work are refused before anything is read."""
    if args.fix and args.diff:
        raise CalamiError("--fix and --diff exclude each other (--diff shows what --fix would do)")
    if args.diff and args.format != "text":
        raise CalamiError("--diff prints a diff; it cannot be combined with --format")
    if args.fix and "-" in args.paths:
        raise CalamiError("--fix cannot write standard input; use --diff to see the fixes")
    if args.fix and args.staged:
        raise CalamiError("--fix edits the working tree, --staged checks the index; use one of them")
    if args.write_baseline and (args.fix or args.diff or args.baseline):
        raise CalamiError("--write-baseline records findings; it cannot be combined with --fix, --diff or --baseline")
    scoped = args.changed is not None or args.staged
    if scoped and "-" in args.paths:
        raise CalamiError("--changed and --staged read files from git, not standard input")
    if not args.paths:
        if not scoped:
            raise CalamiError("give a file or folder to check ('-' for standard input), or --changed/--staged")
        args.paths = ["."]


def wants_digest(args: argparse.Namespace) -> bool:
    return bool(args.fix or args.diff)


# --------------------------------------------------------------- --changed


def plan_changed(args: argparse.Namespace) -> "tuple[Plan, Changes]":
    """Documents to check for --changed/--staged: changed files under the given paths, and their lines."""
    from calami import gitdiff
    from calami.commands.check import Plan, Task, _first_line
    from calami.text.formats import detect_kind
    from calami.vocab.project import load_project

    ref = args.changed or None
    cwd = Path.cwd()
    if ref is not None and Path(ref).exists():
        # "--changed docs" : a path, not a revision, unless git knows it as one.
        try:
            gitdiff.git(["rev-parse", "--verify", "-q", f"{ref}^{{commit}}"], cwd, "--changed")
        except gitdiff.GitError:
            args.paths = [ref] if args.paths == ["."] else [*args.paths, ref]
            ref = None
    changes = gitdiff.changed_lines(cwd, ref, args.staged)
    scopes = [Path(p).resolve() for p in args.paths]
    result = Plan()
    for raw in args.paths:
        if not Path(raw).exists():
            result.errors.append(f"{raw}: no such file or folder")
    projects: dict[Path, Any] = {}
    for path in sorted(changes.lines):
        if not any(path == s or s in path.parents for s in scopes) or not path.is_file():
            continue
        kind = args.kind or detect_kind(str(path), "") or detect_kind(str(path), _first_line(path))
        if kind is None:
            continue
        folder = path.parent
        project = projects.get(folder)
        if project is None:
            project = load_project(path)
            project = result.projects.setdefault(str(project.root), project)
            projects[folder] = project
        if not project.selects(path):
            continue
        display = _display(path, cwd)
        text = gitdiff.staged_text(changes.root, path) if changes.staged else None
        result.tasks.append(Task(display, str(path), str(project.root), kind, text))
    if getattr(args, "workspace", True):
        result.learn_from = _whole_tree(changes, scopes, result.tasks, args.kind)
    return result, changes


def _whole_tree(changes: Any, scopes: list[Path], checked: list[Any], kind: str | None) -> list[Any]:
    """Every tracked document under the scopes: the workspace vocabulary learns from all of them,
    so a changed line is judged as a full check would judge it.  ``git ls-files`` lists them
    faster than a walk; the kind comes from the name alone."""
    from calami import gitdiff
    from calami.commands.check import Task
    from calami.text.formats import detect_kind

    checked_files = {task.file: task for task in checked}
    roots = sorted({Path(task.root) for task in checked}, key=lambda r: len(r.parts), reverse=True)
    out = list(checked)
    if not roots:
        return out  # nothing to check, nothing to learn for
    listed = gitdiff.git(["ls-files", "-z"], changes.root, "--changed")
    for name in listed.split("\0"):
        if not name:
            continue
        path = changes.root / name
        if str(path) in checked_files or not any(path == s or s in path.parents for s in scopes):
            continue
        found_kind = kind or detect_kind(name, "")
        root = next((r for r in roots if r == path.parent or r in path.parents), None)
        if found_kind is not None and root is not None:  # only projects with a checked file need a vocabulary
            out.append(Task(name, str(path), str(root), found_kind))
    return out


def _display(path: Path, cwd: Path) -> str:
    try:
        return path.relative_to(cwd.resolve()).as_posix()
    except ValueError:
        return path.as_posix()


# --------------------------------------------------------------- per result


class Adoption:
    """Filters each document's findings (changed lines, baseline) and fixes what is confident."""

    def __init__(self, args: argparse.Namespace, changes: Any = None) -> None:
        from calami import baseline

        self.args = args
        self.changes = changes
        self.baseline = baseline.read(Path(args.baseline)) if args.baseline else None
        self.recorded = baseline.Baseline() if args.write_baseline else None
        self.fixed_words = 0
        self.fixed_files = 0
        self.refused: list[str] = []

    def process(self, task: Any, result: dict[str, Any], located: Sequence[Any], out: Any = None) -> list[Any]:
        """The findings left to report for one document (after the fixes, if any were made)."""
        from calami import baseline

        items = list(located)
        if self.changes is not None and task.file is not None:
            path = Path(task.file)
            items = [item for item in items if self.changes.covers(path, item.line)]
        name = baseline.relative_file(task.file, task.root, task.display)
        if self.baseline is not None:
            items = self.baseline.new_only(name, items, lambda i: i.finding.word, lambda i: i.context)
        if self.recorded is not None:
            for item in items:
                self.recorded.add(name, item.finding.word, item.context)
            return []  # recorded, hence accepted: nothing to report
        if self.args.fix or self.args.diff:
            items = self._fix(task, result, items, out or sys.stdout)
        return items

    def _fix(self, task: Any, result: dict[str, Any], items: list[Any], out: Any) -> list[Any]:
        from calami import fixes

        text = task.text
        if task.file is not None and text is None:
            try:
                _, text = fixes.read_checked(Path(task.file), result.get("digest", ""))
            except fixes.Refused as exc:
                self.refused.append(f"{task.display}: {exc}")
                return items
        if text is None:
            return items
        edits = fixes.edits_for(text, [i.finding for i in items])
        if not edits:
            return items
        applied = {(e.start, e.end) for e in edits}
        left = [i for i in items if (i.finding.start, i.finding.end) not in applied]
        if self.args.diff:
            out.write(fixes.unified_diff(task.display, text, fixes.apply(text, edits)))
            return left
        try:
            fixes.write_fixed(Path(task.file), result.get("digest", ""), edits)
        except fixes.Refused as exc:
            self.refused.append(f"{task.display}: {exc}")
            return items
        except OSError as exc:
            self.refused.append(f"{task.display}: cannot write the fixes: {exc.strerror or exc}; left as it was")
            return items
        self.fixed_words += len(edits)
        self.fixed_files += 1
        return left

    def finish(self, err: Any = None) -> bool:
        """Write the baseline, say what was fixed; True if something failed (exit 2)."""
        from calami import baseline

        err = err or sys.stderr
        for message in self.refused:
            print(f"calami: {message}", file=err)
        if self.args.fix:
            print(f"calami: fixed {self.fixed_words} word(s) in {self.fixed_files} file(s)", file=err)
        if self.recorded is not None:
            baseline.write(Path(self.args.write_baseline), self.recorded)
            print(f"calami: recorded {len(self.recorded)} finding(s) in {self.args.write_baseline}", file=err)
        return bool(self.refused)

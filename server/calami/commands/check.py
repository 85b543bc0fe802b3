"""``calami check PATH...``: check files, folders or standard input; report; exit 0/1/2.

Exit codes: 0 nothing found, 1 findings, 2 a usage, config or I/O error
(checking goes on past an unreadable file so one report covers everything,
but the run still ends with 2).  When nothing at all could be checked
because of such an error (or because the files named are not UTF-8), the
run is a failure: exit 2, and no report on stdout (no "No findings", no
empty JSON array) except a SARIF log, whose ``executionSuccessful`` says so.

Every file left out is counted in the summary by why (git-ignored, not a
kind we read, binary, ...); ``--verbose`` names each one.

With ``--jobs N`` the documents are shared among N worker processes, each
loading the model once.  Tasks and results cross the process boundary as
msgpack bytes, so none of our objects is pickled.
"""

from __future__ import annotations

import argparse
import os
import sys
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Iterator

VARIANTS = ("any", "en-US", "en-GB")
FORMATS = ("text", "json", "sarif")


def register(subparsers: "argparse._SubParsersAction[argparse.ArgumentParser]") -> None:
    parser = subparsers.add_parser(
        "check",
        help="check files, folders or standard input and report likely misspellings",
        description="Check the prose of files and folders (recursively, honouring .gitignore). "
        "Exit status: 0 nothing found, 1 findings, 2 usage, config or I/O error.",
    )
    parser.add_argument("paths", nargs="*", metavar="PATH", help="file or folder to check; '-' reads standard input")
    parser.add_argument("--kind", help="document kind for every file (default: from name, extension or shebang)")
    parser.add_argument("--format", choices=FORMATS, default="text", help="report format (default: text)")
    parser.add_argument("--variant", choices=VARIANTS, help="spelling variant (overrides the project config)")
    parser.add_argument("-j", "--jobs", type=int, default=1, metavar="N", help="worker processes (default: 1)")
    parser.add_argument("--color", choices=("auto", "always", "never"), default="auto", help="colour in the text report")
    parser.add_argument("--model", metavar="FILE", help="model file (default: the one shipped with calami)")
    parser.add_argument("--max-bytes", type=_byte_count, metavar="N", help="skip files larger than N bytes (default: 2 MiB)")
    parser.add_argument("-v", "--verbose", action="store_true", help="name every file left out, and why")
    parser.add_argument("--explain", action="store_true",
                        help="after each file, say why words were flagged and which the workspace's own use accepted")
    parser.add_argument("--no-workspace", dest="workspace", action="store_false",
                        help="do not learn the checked tree's own vocabulary (every unknown word judged alone)")
    from calami.commands import check_adopt

    check_adopt.add_arguments(parser)
    parser.set_defaults(run=run)


def _byte_count(value: str) -> int:
    """``--max-bytes``: a whole number of bytes, at least 1."""
    try:
        number = int(value)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{value!r} is not a whole number of bytes") from None
    if number < 1:
        raise argparse.ArgumentTypeError(f"must be at least 1 byte, not {number}")
    return number


# --------------------------------------------------------------- documents


@dataclass
class Task:
    """One document to check: where it came from and how to read it."""

    display: str  # path as shown in the report ("-" for standard input)
    file: str | None  # absolute path, or None when ``text`` is given
    root: str  # project root
    kind: str | None = None  # forced kind (--kind)
    text: str | None = None  # standard input
    digest: bool = False  # the result carries the SHA-256 of the bytes checked (--fix, --diff)

    def pack(self) -> dict[str, Any]:
        return {"display": self.display, "file": self.file, "root": self.root, "kind": self.kind, "text": self.text,
                "digest": self.digest}


@dataclass
class Plan:
    tasks: list[Task] = field(default_factory=list)
    errors: list[str] = field(default_factory=list)
    projects: dict[str, Any] = field(default_factory=dict)  # root -> Project
    skipped: list[tuple[str, str, str]] = field(default_factory=list)  # (path, category, reason) left out by the walk
    # Documents the workspace vocabulary learns from, when not only the checked ones (--changed).
    learn_from: list[Task] | None = None


def plan(paths: list[str], kind: str | None, stdin_text: Callable[[], str]) -> Plan:
    """Expand the command line into documents, loading each project once."""
    from calami.vocab.project import load_project
    from calami.walk import walk
    from calami.text.formats import detect_kind

    result = Plan()

    def project_for(start: Path):
        project = load_project(start)
        return result.projects.setdefault(str(project.root), project)

    for raw in paths:
        if raw == "-":
            project = project_for(Path.cwd())
            result.tasks.append(Task("-", None, str(project.root), kind, stdin_text()))
            continue
        path = Path(raw)
        if path.is_dir():
            project = project_for(path)
            skip = _skip_recorder(result, project, raw, path)
            for found in walk(path, project.selects, skip):
                found_kind = kind
                if found_kind is None:
                    # The name usually decides; only then read a line for a shebang.
                    found_kind = detect_kind(str(found), "") or detect_kind(str(found), _first_line(found))
                    if found_kind is None:
                        skip(found, *_why_not_read(found))
                        continue
                result.tasks.append(Task(_display(found, raw, path), str(found.resolve()), str(project.root), found_kind))
        elif path.is_file():
            project = project_for(path)
            result.tasks.append(Task(raw, str(path.resolve()), str(project.root), kind))
        elif path.exists():
            result.errors.append(f"{raw}: not a regular file or folder")
        else:
            result.errors.append(f"{raw}: no such file or folder")
    return result


def _skip_recorder(result: Plan, project: Any, raw: str, folder: Path) -> Callable[[Path, str, str], None]:
    """Records each path the walk of ``folder`` leaves out, as the user would type it."""
    from calami.walk import EXCLUDED

    def record(found: Path, category: str, reason: str) -> None:
        if category == EXCLUDED:
            reason = project.left_out(found) or reason
        result.skipped.append((_display(found, raw, folder), category, reason))

    return record


def _why_not_read(found: Path) -> tuple[str, str]:
    """(category, reason) for a file whose kind we do not read."""
    from calami.text.formats import not_prose
    from calami.walk import NOT_PROSE, NOT_READ

    why = not_prose(found.name)
    if why is not None:
        return NOT_PROSE, f"{why}, not prose; name it to check it anyway"
    ext = found.suffix.lower()
    return NOT_READ, f"calami does not read {ext} files" if ext else "no extension or shebang calami knows"


def _display(found: Path, raw: str, folder: Path) -> str:
    """The path as the user would type it: the argument joined with the part found under it."""
    rel = found.relative_to(folder.resolve())
    return Path(os.path.normpath(os.path.join(raw, rel))).as_posix()


def _first_line(path: Path) -> str:
    try:
        with open(path, "rb") as handle:
            return handle.readline(200).decode("utf-8", "replace").rstrip("\r\n")
    except OSError:
        return ""


# --------------------------------------------------------------- checking


class Worker:
    """Checks tasks with one model; builds one checker per project (cached)."""

    def __init__(self, make_checker: Callable[[Any, str | None], Any], variant: str | None, max_bytes: int | None,
                 explain: bool = False) -> None:
        self.make_checker = make_checker
        self.variant = variant
        self.max_bytes = max_bytes
        self.explain = explain
        self.projects: dict[str, Any] = {}
        self.checkers: dict[str, Any] = {}

    def project(self, root: str):
        if root not in self.projects:
            from calami.vocab.project import Project

            self.projects[root] = Project(Path(root))
        return self.projects[root]

    def checker(self, root: str):
        if root not in self.checkers:
            checker = self.make_checker(self.project(root), self.variant)
            if hasattr(checker, "usage") and root in _VOCABULARIES:
                checker.usage = _VOCABULARIES[root]
            self.checkers[root] = checker
        return self.checkers[root]

    def run(self, task: dict[str, Any]) -> dict[str, Any]:
        """Check one task; the result is plain data (see ``_unpack_result``)."""
        from calami.report import locate
        from calami.walk import DEFAULT_MAX_BYTES, Skipped, read_document
        from calami.text.formats import detect_kind

        out: dict[str, Any] = {
            "display": task["display"], "findings": [], "notes": [], "skipped": None, "skip_category": None,
            "error": None, "words": 0,
        }
        text = task["text"]
        if text is None:
            path = Path(task["file"])
            try:
                if task.get("digest"):
                    from calami.fixes import read_with_digest

                    read, out["digest"] = read_with_digest(path, self.max_bytes or DEFAULT_MAX_BYTES)
                else:
                    read = read_document(path, self.max_bytes or DEFAULT_MAX_BYTES)
            except OSError as exc:
                out["error"] = f"{task['display']}: cannot read: {exc.strerror or exc}"
                return out
            if isinstance(read, Skipped):
                out["skipped"], out["skip_category"] = read.reason, read.category
                return out
            text = read
        kind = task["kind"] or detect_kind(task["file"] or "-", text.split("\n", 1)[0]) or "plain"
        project = self.project(task["root"])
        checker = self.checker(task["root"])
        if hasattr(checker, "with_names") and is_credits_file(task["display"]):
            checker = checker.with_names()
        events: list[tuple[int, str, str, str]] = []
        if self.explain and hasattr(checker, "observer"):
            checker.observer = lambda at, word, rule, detail: events.append((at, word, rule, detail))
        stats: dict[str, int] = {}
        try:
            findings, notes = check_document(text, kind, project, checker, stats)
        finally:
            if self.explain and hasattr(checker, "observer"):
                checker.observer = None
        out["words"] = stats["words"]
        out["notes"] = [f"{task['display']}: {note}" for note in notes]
        if self.explain:
            from calami.report.explain import explain_events, explain_findings

            out["explained"] = explain_findings(findings, getattr(checker, "usage", None), text) + explain_events(text, events)
        for item in locate(task["display"], text, findings):
            f = item.finding
            out["findings"].append(
                [item.line, item.column, item.end_line, item.end_column, f.start, f.end, f.word, f.kind,
                 float(f.confidence), bool(f.confident), [[s.text, float(s.probability)] for s in f.suggestions],
                 item.context]
            )
        return out


_CREDITS = ("authors", "contributors", "credits", "thanks", "maintainers", "people", "acknowledgements", "acknowledgments")


def is_credits_file(name: str) -> bool:
    """AUTHORS, CONTRIBUTORS.md, THANKS.rst...: files that are lists of people."""
    stem = Path(name).name.lower().split(".", 1)[0]
    return stem in _CREDITS


def check_document(
    text: str, kind: str, project: Any, checker: Any, stats: dict[str, int] | None = None
) -> tuple[list[Any], list[str]]:
    """Findings in one document's prose, after the project's skip patterns and the file's
    directives (``text.directives``) cut theirs out and its known words are dropped.

    Words beside inline code are scored with a placeholder for the code as
    context (``text.formats.scoring_tokens``), as the model was trained.
    ``stats``, if given, receives ``words``: the prose words checked (every
    token but technical material, as the false-alarm benchmark counts them).
    """
    from calami.text import directives as file_directives
    from calami.text.formats import ExtractOptions, extract
    from calami.text.spans import subtract
    from calami.text.tokens import SKIP

    spans = extract(text, kind, ExtractOptions(strings=project.config.check_strings))
    holes, notes = project.ignore_holes(text)
    if holes:
        spans = subtract(spans, holes)
    marks = file_directives.read(text, kind)
    spans = marks.narrow(spans)
    notes = [*notes, *file_directives.problem_notes(text, marks)]
    score = getattr(checker, "check_sentence", None)
    if score is None:  # a checker with only the whole-text entry point (test doubles)
        if stats is not None:
            from calami.text.tokens import tokenize

            stats["words"] = sum(1 for t in tokenize(text, spans) if t.kind != SKIP)
        return file_directives.drop_known(checker.check(text, spans), marks), notes
    from calami.text.formats.scoring_tokens import scoring_tokens
    from calami.text.tokens import sentences

    findings = []
    words = 0
    for sentence in sentences(scoring_tokens(text, spans)):
        words += sum(1 for t in sentence if t.kind != SKIP)
        findings.extend(score(sentence))
    if stats is not None:
        stats["words"] = words
    return file_directives.drop_known(findings, marks), notes


def _unpack_result(result: dict[str, Any]):
    from calami.findings import Finding, Suggestion
    from calami.report import Located

    located = []
    for line, column, end_line, end_column, start, end, word, kind, confidence, confident, suggestions, context in result["findings"]:
        finding = Finding(start, end, word, kind, confidence, tuple(Suggestion(t, p) for t, p in suggestions), confident)
        located.append(Located(result["display"], line, column, end_line, end_column, finding, context))
    return located


def default_checker_factory(model_path: str | None) -> Callable[[Any, str | None], Any]:
    """Load the model once; return a function building a project's checker."""
    from calami.model import load

    return checker_factory_for(load(model_path))


def checker_factory_for(model: Any) -> Callable[[Any, str | None], Any]:
    """A function building a project's checker on an already loaded model."""
    from calami.checker import Checker

    def make(project: Any, variant: str | None) -> Any:
        config = project.config
        return Checker(
            model,
            adaptations=[project.words],
            variant=variant or config.variant,
            thresholds=config.thresholds,
            max_suggestions=config.max_suggestions,
        )

    make.known_word = model.lexicon.ids.__contains__  # type: ignore[attr-defined]
    return make


# Tests replace this to run the command against a fake checker (inherited by
# forked workers too).
CHECKER_FACTORY: Callable[[str | None], Callable[[Any, str | None], Any]] = default_checker_factory

_WORKER: Worker | None = None
# Project root -> the vocabulary learnt from the checked tree; filled before
# any worker starts, so forked workers inherit it.
_VOCABULARIES: dict[str, Any] = {}


def learn_workspaces(tasks: list[Task], known: Callable[[str], bool] | None, max_bytes: int | None) -> dict[str, Any]:
    """One vocabulary per project: its manifests and every checked document."""
    from calami.vocab.usage import WorkspaceVocabulary
    from calami.vocab.workspace_scan import learn_file, project_manifests
    from calami.walk import DEFAULT_MAX_BYTES, Skipped, read_document

    out: dict[str, Any] = {}
    for task in tasks:
        vocabulary = out.get(task.root)
        if vocabulary is None:
            vocabulary = out[task.root] = WorkspaceVocabulary(known)
            for manifest in project_manifests(Path(task.root)):
                learn_file(vocabulary, manifest)
        if task.text is not None:
            vocabulary.add_text("-", task.text, task.kind)
            continue
        try:
            read = read_document(Path(task.file), max_bytes or DEFAULT_MAX_BYTES)
        except OSError:
            continue  # reported when the file is checked
        if not isinstance(read, Skipped):
            learn_file(vocabulary, Path(task.file), read)
    return out


def _init_worker(model_path: str | None, variant: str | None, max_bytes: int | None, explain: bool) -> None:
    global _WORKER
    _WORKER = Worker(CHECKER_FACTORY(model_path), variant, max_bytes, explain)


def _work(packed: bytes) -> bytes:
    """[index, task] -> [index, result], as msgpack bytes."""
    import msgpack

    assert _WORKER is not None
    index, task = msgpack.unpackb(packed)
    return msgpack.packb([index, _WORKER.run(task)])


def _size(task: Task) -> int:
    if task.text is not None:
        return len(task.text)
    try:
        return os.path.getsize(task.file or "")
    except OSError:
        return 0


def _results(tasks: list[Task], args: argparse.Namespace, learn_from: list[Task] | None = None) -> Iterator[dict[str, Any]]:
    """Results in task order, from this process or from a pool."""
    jobs = max(1, min(args.jobs, len(tasks)))
    factory = CHECKER_FACTORY(args.model)  # loads the model here, so forked workers share it
    _VOCABULARIES.clear()
    if getattr(args, "workspace", True):
        learnt = tasks if learn_from is None else learn_from
        _VOCABULARIES.update(learn_workspaces(learnt, getattr(factory, "known_word", None), args.max_bytes))
    explain = getattr(args, "explain", False)
    if jobs == 1:
        worker = Worker(factory, args.variant, args.max_bytes, explain)
        for task in tasks:
            yield worker.run(task.pack())
        return
    import multiprocessing

    import msgpack

    method = "fork" if "fork" in multiprocessing.get_all_start_methods() else None
    context = multiprocessing.get_context(method)
    if method == "fork" and CHECKER_FACTORY is default_checker_factory:
        # The workers inherit the model loaded above, but its candidate index
        # unpacks on a thread, which a fork does not carry over: finish it first.
        from calami.model import load

        wait = getattr(load(args.model).candidates, "wait", None)
        if wait is not None:
            wait()
    # Largest documents first: in task order, one big file near the end kept
    # a worker busy long after the other had run dry.  Results still come out
    # in task order.
    order = sorted(range(len(tasks)), key=lambda i: -_size(tasks[i]))
    packed = [msgpack.packb([i, tasks[i].pack()]) for i in order]
    arrived: dict[int, Any] = {}
    following = 0
    with context.Pool(jobs, initializer=_init_worker, initargs=(args.model, args.variant, args.max_bytes, explain)) as pool:
        for data in pool.imap_unordered(_work, packed):
            index, result = msgpack.unpackb(data)
            arrived[index] = result
            while following in arrived:
                yield arrived.pop(following)
                following += 1


# --------------------------------------------------------------- the command


def run(args: argparse.Namespace) -> int:
    from calami.commands import check_adopt
    from calami.errors import CalamiError
    from calami.report import Summary
    from calami.report import json_array, sarif, text as text_report
    from calami.report.progress import Progress
    from calami.text.formats import KINDS

    if args.jobs < 1:
        raise CalamiError("--jobs must be at least 1")
    if args.kind is not None and args.kind not in KINDS:
        raise CalamiError(f"unknown kind {args.kind!r}; choose from {', '.join(sorted(KINDS))}")
    if args.paths.count("-") > 1:
        raise CalamiError("'-' (standard input) may be given only once")
    check_adopt.validate(args)

    changes = None
    if args.changed is not None or args.staged:
        work, changes = check_adopt.plan_changed(args)
    else:
        work = plan(args.paths, args.kind, lambda: sys.stdin.read())
    adoption = check_adopt.Adoption(args, changes)
    if check_adopt.wants_digest(args):
        for task in work.tasks:
            task.digest = True
    config_errors = [e for project in work.projects.values() for e in project.config.errors]
    if config_errors:
        for message in config_errors:
            print(f"calami: {message}", file=sys.stderr)
        return 2

    summary = Summary(notes=[], failed=bool(work.errors))
    for message in work.errors:
        print(f"calami: {message}", file=sys.stderr)
        summary.notes.append(message)
    for project in work.projects.values():
        for message in project.config.warnings:  # old names that still work
            print(f"calami: note: {message}", file=sys.stderr)
            summary.notes.append(message)
    for display, category, reason in work.skipped:
        summary.skip(category)
        if args.verbose:
            _note(None, f"{display}: skipped ({reason})", summary)
    colour = text_report.use_colour(sys.stdout, args.color)
    progress = Progress(len(work.tasks), sys.stderr)
    everything = []
    try:
        for done, result in enumerate(_results(work.tasks, args, work.learn_from), start=1):
            progress.update(done, result["display"])
            for note in result["notes"]:
                _note(progress, note, summary)
            if result["error"]:
                summary.failed = True
                progress.close()
                print(f"calami: {result['error']}", file=sys.stderr)
                summary.notes.append(result["error"])
                continue
            if result["skipped"]:
                summary.skip(result["skip_category"])
                _note(progress, f"{result['display']}: skipped ({result['skipped']})", summary)
                continue
            located = adoption.process(work.tasks[done - 1], result, _unpack_result(result))
            summary.count(located, result["words"])
            if args.format == "text" and not args.diff:
                if located:
                    progress.close()
                    text_report.write_document(sys.stdout, located, colour)
                if result.get("explained"):
                    progress.close()
                    from calami.report.explain import write_explained

                    write_explained(sys.stdout, result["display"], result["explained"])
            else:
                everything.extend(located)
    finally:
        progress.close()
    if adoption.finish():
        summary.failed = True

    if summary.nothing_checked_for_an_error():
        summary.failed = True
        if args.format != "sarif":  # a SARIF log can say the run failed; the others would only mislead
            return 2
    if args.diff:
        pass  # the diff is the report
    elif args.format == "json":
        sys.stdout.write(json_array.render(everything))
    elif args.format == "sarif":
        sys.stdout.write(sarif.render(everything, summary, Path.cwd()))
    else:
        sys.stdout.write(text_report.summary_line(summary) + "\n")
    sys.stdout.flush()
    if summary.failed:
        return 2
    return 1 if summary.findings else 0


def _note(progress: Any, message: str, summary: Any) -> None:
    if progress is not None:
        progress.close()
    print(f"calami: note: {message}", file=sys.stderr)
    summary.notes.append(message)

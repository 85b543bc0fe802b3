"""``calami profile show|export|import|reset``: the user's adaptive profile."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from calami.errors import CalamiError


def register(subparsers: Any) -> None:
    parser = subparsers.add_parser(
        "profile",
        help="show, export, import or reset your personal profile",
        description="Your profile holds the words you added, the fixes you accepted (with their neighbouring "
        "words) and how often you ignored a word. It never holds document text and never leaves this machine.",
    )
    actions = parser.add_subparsers(dest="profile_action", metavar="ACTION")
    show = actions.add_parser("show", help="summarise the profile and say where it is")
    show.add_argument("--json", action="store_true", help="print the whole profile as JSON")
    export = actions.add_parser("export", help="write the profile as JSON (to stdout or a file)")
    export.add_argument("file", nargs="?", help="output file (default: stdout)")
    imp = actions.add_parser("import", help="merge a JSON export into the profile (counts add up)")
    imp.add_argument("file", help="JSON file written by 'calami profile export' ('-' for stdin)")
    reset = actions.add_parser("reset", help="empty the profile")
    reset.add_argument("--yes", action="store_true", help="confirm: the profile's content is deleted")
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from calami.vocab.profile import Profile

    action = getattr(args, "profile_action", None)
    if action is None:
        raise CalamiError("say what to do: calami profile show|export|import|reset")
    profile = Profile(warn=lambda message: print(f"calami: warning: {message}", file=sys.stderr))
    if action == "show":
        return _show(profile, args.json)
    if action == "export":
        text = json.dumps(profile.snapshot(), indent=2, ensure_ascii=False, sort_keys=True) + "\n"
        if args.file:
            Path(args.file).write_text(text, encoding="utf-8")
        else:
            sys.stdout.write(text)
        return 0
    if action == "import":
        return _import(profile, args.file)
    if action == "reset":
        if not args.yes:
            raise CalamiError(f"this deletes everything in {profile.path}; run 'calami profile reset --yes' to confirm")
        profile.reset()
        _check_saved(profile)
        print(f"profile reset: {profile.path}")
        return 0
    raise CalamiError(f"unknown profile action {action!r}")  # pragma: no cover - argparse guards this


def _show(profile: Any, as_json: bool) -> int:
    data = profile.snapshot()
    if as_json:
        print(json.dumps(data, indent=2, ensure_ascii=False, sort_keys=True))
        return 0
    corrections = data["corrections"]
    pairs = sorted(((c, t, ch) for t, by in corrections.items() for ch, c in by.items()), reverse=True)
    print(f"profile: {profile.path}{' (missing: nothing recorded yet)' if not profile.path.exists() else ''}")
    print(f"schema: {data['schema']}")
    print(f"your words ({len(data['words'])}): {', '.join(data['words']) if data['words'] else '-'}")
    print(f"accepted fixes ({len(pairs)}):")
    for count, typed, chosen in pairs[:20]:
        print(f"  {typed} -> {chosen}  x{count}")
    if len(pairs) > 20:
        print(f"  ... and {len(pairs) - 20} more (calami profile show --json)")
    ignored = sorted(data["ignored"].items(), key=lambda kv: (-kv[1], kv[0]))
    print(f"ignored words ({len(ignored)}): {', '.join(f'{w} x{n}' for w, n in ignored[:20]) or '-'}")
    return 0


def _import(profile: Any, file: str) -> int:
    from calami.vocab.profile import ProfileFormatError

    try:
        raw = sys.stdin.read() if file == "-" else Path(file).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise CalamiError(f"cannot read {file}: {exc}") from None
    try:
        data = json.loads(raw)
    except json.JSONDecodeError as exc:
        raise CalamiError(f"{file}: not JSON ({exc.msg} at line {exc.lineno}, column {exc.colno})") from None
    try:
        profile.merge(data)
    except ProfileFormatError as exc:
        raise CalamiError(f"{file}: not a calami profile export: {exc}") from None
    _check_saved(profile)
    print(f"merged {file} into {profile.path}")
    return 0


def _check_saved(profile: Any) -> None:
    if profile.in_memory:
        raise CalamiError(f"could not write {profile.path}; nothing was changed on disk")

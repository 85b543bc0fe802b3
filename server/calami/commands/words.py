"""``calami lexicon add|remove|list``: edit the project lexicon from the shell.

By default the project's first word list (``word-lists`` in the config,
``calami-lexicon.txt`` at the project root otherwise, or the old
``calami-words.txt`` if only that exists) is edited; ``--file`` picks
another.  ``calami words`` is the command's old name and still works.  Edits keep comments, keep the list sorted and free of
duplicates, and are written atomically under a file lock.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

OLD_NAME = "words"


def register(subparsers: "argparse._SubParsersAction[argparse.ArgumentParser]") -> None:
    parser = subparsers.add_parser(
        "lexicon",
        aliases=[OLD_NAME],
        help="add, remove or list the words of the project lexicon",
        description="Edit the project lexicon: one word per line, '#' comments kept, sorted. "
        "An entry in lower case accepts any capitalisation; an entry with capitals accepts only that form.",
    )
    actions = parser.add_subparsers(dest="action", metavar="ACTION", required=True)
    for name, help_text in (("add", "add words to the list"), ("remove", "remove words from the list")):
        sub = actions.add_parser(name, help=help_text)
        sub.add_argument("words", nargs="+", metavar="WORD")
        sub.add_argument("--file", type=Path, metavar="PATH", help="word list to edit (default: the project's first)")
        sub.set_defaults(run=run)
    listing = actions.add_parser("list", help="print the words of the project's lists")
    listing.add_argument("--file", type=Path, metavar="PATH", help="word list to print (default: all of the project's)")
    listing.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from calami.errors import CalamiError
    from calami.vocab import wordlist
    from calami.vocab.project import load_project

    if getattr(args, "command", None) == OLD_NAME:
        print(f"calami: note: 'calami {OLD_NAME}' is now 'calami lexicon'; the old name still works", file=sys.stderr)
    project = None
    if args.file is None:
        project = load_project(Path.cwd())
    if args.action == "list":
        paths = [args.file] if args.file is not None else project.word_list_paths
        for path in paths:
            if args.file is not None and not path.exists():
                raise CalamiError(f"{path}: no such word list")
            for word in wordlist.read(path).words:
                print(word)
        return 0
    target = args.file if args.file is not None else project.word_list_path
    if args.action == "add":
        added = wordlist.add_words(target, args.words)
        known = sorted(set(w.strip() for w in args.words) - set(added), key=str.casefold)
        if added:
            print(f"Added to {target}: {' '.join(added)}")
        if known:
            print(f"Already in {target}: {' '.join(known)}")
        return 0
    removed = wordlist.remove_words(target, args.words)
    missing = sorted(set(w.strip() for w in args.words) - set(removed), key=str.casefold)
    if removed:
        print(f"Removed from {target}: {' '.join(removed)}")
    if missing:
        print(f"calami: not in {target}: {' '.join(missing)}", file=sys.stderr)
        return 1
    return 0

"""``deckward format [--check] PATH...``: the canonical layout of decks.

Formatting never changes what a deck means (``deckward.grammar.formatter``);
a file with syntax errors is left untouched and reported.  Exit status: 0 all
files are in the canonical layout (``--check``) or were laid out; 1 some file
is not in it (``--check``) or could not be laid out; 2 usage errors.
"""
from __future__ import annotations

import os
import sys

from deckward.grammar.build import build_deck
from deckward.grammar.wording import counted
from deckward.grammar.formatter import format_text


from .atomic_write import WriteRefused, read_snapshot, write_atomically
from .checking import UsageError, discover, projects_for

HELP = "lay out deck files canonically (aligned columns, one key per line, comments kept)"


def add_arguments(p) -> None:
    p.add_argument("paths", nargs="+", metavar="PATH", help="deck files or folders (searched for *.deck)")
    p.add_argument("--check", action="store_true",
                   help="write nothing; list the files that would change and exit 1 if there are any")


def run(args) -> int:
    skipped: list[str] = []
    projects = projects_for(None)
    files = discover(args.paths, projects, skipped)
    sys.stderr.write("".join(n + "\n" for n in skipped))
    changed = unchanged = failed = 0
    for path in files:
        try:
            snapshot = read_snapshot(path)
        except OSError as e:
            raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
        try:
            text = snapshot.data.decode("utf-8")
        except UnicodeDecodeError:
            sys.stderr.write(f"{path}: not formatted: the file is not valid UTF-8\n")
            failed += 1
            continue
        formatted = format_text(text)
        if formatted is None:
            _, findings, _ = build_deck(path, text)
            first = next((f for f in findings if f.rule == "syntax-error"), None)
            where = f"{first.span.line}:{first.span.column}: {first.message}" if first else "syntax error"
            sys.stderr.write(f"{path}:{where} (not formatted: fix the syntax error first)\n")
            failed += 1
            continue
        if formatted == text:
            unchanged += 1
            continue
        changed += 1
        if args.check:
            sys.stdout.write(f"{path}: not in the canonical layout\n")
            continue
        try:
            project = projects.for_path(path)
            if project.config_path is not None and not project.contains(path):
                raise WriteRefused(f"it is a link to {os.path.realpath(path)}, outside the workspace {project.root}")
            write_atomically(snapshot, formatted.encode("utf-8"))
        except WriteRefused as e:
            sys.stderr.write(f"{path}: not written: {e}\n")
            failed += 1
            changed -= 1
            continue
        sys.stdout.write(f"{path}: laid out anew\n")
    sys.stdout.write(_summary(changed, unchanged, failed, args.check) + "\n")
    if failed or (args.check and changed):
        return 1
    return 0


def _summary(changed: int, unchanged: int, failed: int, check: bool) -> str:
    """"2 files to lay out, 5 already canonical" (--check) or "2 files laid out anew, ..."."""
    parts = [f"{counted(changed, 'file')} {'to lay out' if check else 'laid out anew'}",
             f"{unchanged} already canonical"]
    if failed:
        parts.append(f"{failed} left as they were (see above)")
    return ", ".join(parts)

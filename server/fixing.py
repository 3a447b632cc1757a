"""``deckward check --fix / --fix-risky / --diff``: fix files, never damage one.

Each deck is read once as bytes, fixed on its own text with the shared fix
loop (``deckward.rules.fixes.apply``), re-checked through a ``Loader`` overlay so
that decks using an already fixed file see its new text, then either shown
as a unified diff (``--diff``: nothing is written) or written atomically.
A file that is not valid UTF-8, changed on disk meanwhile, is read-only, or
whose fixed text would not parse is refused with one line and left byte for
byte as it was.  The report that follows is a normal check of the files as
they are on disk afterwards, so the exit status counts what remains.
"""
from __future__ import annotations

import dataclasses
import difflib
import os
import sys

from deckward.grammar.build import build_deck
from deckward.grammar.resolve import Loader
from deckward.rules.fixes.apply import DAMAGE_RULES, fix_text, syntax_errors

from .atomic_write import Snapshot, WriteRefused, read_snapshot, write_atomically
from .checking import CheckResult, UsageError, check_paths, discover, projects_for


def unified_diff(path: str, before: str, after: str) -> str:
    """A diff that ``patch -p0`` applies from the current folder: keeps
    CRLF line endings and marks a last line without a newline."""
    lines = difflib.unified_diff(_lines(before), _lines(after), fromfile=path, tofile=path)
    out = []
    for line in lines:
        if line.endswith("\n"):
            out.append(line)
        else:
            out.append(line + "\n\\ No newline at end of file\n")
    return "".join(out)


def _lines(text: str) -> list[str]:
    """Lines as ``patch`` sees them: split at \\n only (``str.splitlines``
    would also split at form feeds and U+2028, which a deck may hold)."""
    parts = text.split("\n")
    lines = [p + "\n" for p in parts[:-1]]
    if parts[-1]:
        lines.append(parts[-1])
    return lines


def _plural(n: int, word: str, suffix: str = "es") -> str:
    return f"{n} {word}{suffix if n != 1 else ''}"


def _parses_no_worse(path: str, before: str, after: str) -> bool:
    """The fixed text has no more syntax errors than the original."""
    return syntax_errors(build_deck(path, after)[1], path) <= syntax_errors(build_deck(path, before)[1], path)


def run_fixes(args) -> tuple[CheckResult, str]:
    """Fix every deck named by ``args.paths``; return the final check and
    the diff text (``--diff``) to print before it."""
    dry = bool(args.diff)
    projects = projects_for(args.config, Loader())
    decks = _decks(args.paths, projects)
    users = _users_of(decks)
    notes: list[str] = []
    diffs: list[str] = []
    fixed_total = files_changed = 0
    for path, project in decks:
        outcome, diff = _fix_one(path, project, users, args, notes)
        if outcome is not None:
            fixed_total += outcome.count
            files_changed += 1
            diffs.append(diff)
    if dry:
        if fixed_total:
            notes.append(f"deckward: --diff: {_plural(fixed_total, 'fix')} would be applied to "
                         f"{_plural(files_changed, 'file', 's')}; nothing was written")
        fixed_total = 0
    result = check_paths(args.paths, config_path=args.config, probe=getattr(args, "probe", False))
    result.fixes_applied = fixed_total
    result.notes.extend(notes)
    if notes and getattr(args, "format", "text") != "text":
        sys.stderr.write("".join(n + "\n" for n in notes))  # formats without notes must not lose a refusal
    return result, "".join(diffs)


def _fix_one(path, project, users, args, notes: list[str]):
    """Fix one deck; returns (outcome, diff) when its fixed text was written
    (or, with --diff, would be), else (None, ""); adds notes for refusals."""
    key = os.path.abspath(path)
    try:
        snapshot = read_snapshot(path)
    except OSError as e:
        raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
    try:
        original = snapshot.data.decode("utf-8")
    except UnicodeDecodeError as e:
        notes.append(f"deckward: refused to fix {path}: it is not valid UTF-8 "
                     f"(byte 0x{snapshot.data[e.start]:02x} at offset {e.start})")
        return None, ""

    loader = project.loader

    def recheck(text: str):
        loader.overlay[key] = text
        found = project.analyse(path).findings
        for user, user_project in users.get(key, ()):
            # decks that use this file: consulted only to see whether a fix
            # would break them, never as something to fix here
            found.extend(dataclasses.replace(f, fixes=())
                         for f in user_project.analyse(user).findings
                         if f.rule in DAMAGE_RULES)
        return found

    outcome = fix_text(original, path, recheck, include_risky=bool(args.fix_risky))
    notes.extend(f"deckward: {path}: {s.describe()}" for s in outcome.skipped)
    if not outcome.settled:
        notes.append(f"deckward: {path}: stopped after {_plural(outcome.count, 'fix')}; "
                     "more fixes may apply (run again)")
    if outcome.text == original:
        loader.overlay.pop(key, None)
        return None, ""
    refusal = _outside(path, project.root) if not args.diff else None
    refusal = refusal or _refusal(snapshot, path, original, outcome.text, bool(args.diff))
    if refusal is not None:
        notes.append(f"deckward: refused to write {path}: {refusal}")
        loader.overlay.pop(key, None)  # later decks see the file as it is on disk
        loader.forget(path)
        return None, ""
    return outcome, unified_diff(path, original, outcome.text) if args.diff else ""


def _decks(paths, projects) -> list[tuple[str, object]]:
    """(deck, its project) for every deck to fix, once each."""
    out, seen = [], set()
    for given in paths:
        for path in discover([given], projects):
            key = os.path.abspath(path)
            if key not in seen:
                seen.add(key)
                out.append((path, projects.for_path(path, given)))
    return out


def _users_of(decks) -> dict[str, list[tuple[str, object]]]:
    """For each file, the checked decks that use it (directly or through
    another file), with their projects."""
    users: dict[str, list[tuple[str, object]]] = {}
    for path, project in decks:
        try:
            ws = project.resolve(path)
        except OSError as e:
            raise UsageError(f"{path}: cannot be read ({e.strerror or e})")
        for used in ws.files[1:]:
            users.setdefault(os.path.abspath(used.path), []).append((path, project))
    return users


def _outside(path: str, root: str):
    """Why ``path`` must not be written because it resolves outside the
    workspace (a symbolic link to a file elsewhere), else None."""
    from deckward.grammar.resolve import inside_root

    real = os.path.realpath(path)
    if inside_root(real, os.path.realpath(root)):
        return None
    return f"it is a link to {real}, outside the workspace {os.path.realpath(root)}"


def _refusal(snapshot: Snapshot, path: str, original: str, fixed: str, dry: bool):
    """Why the fixed text must not be written (None: write it; with
    ``dry`` nothing is written, only the checks that concern the text run)."""
    if not _parses_no_worse(path, original, fixed):
        return "the fixed text would not parse"
    if dry:
        return None
    try:
        data = fixed.encode("utf-8")
    except UnicodeEncodeError:
        return "the fixed text cannot be written as UTF-8"
    try:
        write_atomically(snapshot, data)
    except WriteRefused as e:
        return str(e)
    return None

"""The findings of a whole cached check in one file, served while nothing
they came from has changed.

A re-check of an unchanged repository through the per-deck entries of
``findings_cache`` still hashes every deck and reads, validates and decodes
one entry per deck.  After a check with a cache, its findings are also
written here, one file per project (root, configuration, probes, deckward
version), with the list of decks checked and, for every deck and every file
they use (``use``, .xyz geometries, including ones that did not exist), the
file's signature: size, modification and change times in nanoseconds, inode.
The next check of the same decks is served from this one file when every
signature is unchanged; otherwise (one file edited, a deck added) it goes
through the per-deck entries as before and writes a new summary.

Signatures are trusted only for files that had not changed for
``SETTLED_NS`` before the check began: a file written while a check runs, or
just before, can keep its timestamp through a quick second edit (file-system
clocks tick in milliseconds, FAT's in two seconds), so a summary that would
include such a file is not written at all.  The change time (``st_ctime``)
cannot be set back by a program, so an edit hidden by restoring the
modification time is still seen.

The file starts with the sha256 of the rest; a summary that does not match,
does not decode, or holds a finding of the wrong shape is ignored (the
per-deck entries then answer), never an error.
"""
from __future__ import annotations

import hashlib
import json
import os
import time
from typing import Optional

from deckward.grammar.findings import Finding
from deckward.grammar.safe_open import replace_file

from .findings_cache import BadEntry, _check_finding, code_fingerprint, finding_from_dict, finding_to_dict

FORMAT = 1
FOLDER = "summaries"
SETTLED_NS = 2_000_000_000  # two seconds: FAT's timestamp step (common practice, no source)
MAX_SUMMARY_BYTES = 256 * 1024 * 1024


def signature(path: str) -> Optional[list[int]]:
    """[size, mtime_ns, ctime_ns, inode] of the file ``path`` names (None:
    it does not exist or cannot be asked about)."""
    try:
        st = os.stat(path)
    except (OSError, ValueError):
        return None
    return [st.st_size, st.st_mtime_ns, st.st_ctime_ns, st.st_ino]


def summary_path(cache_dir: str, root: str, config_print: str, probe: bool) -> str:
    name = hashlib.sha256(json.dumps([FORMAT, code_fingerprint(), os.path.abspath(root), config_print,
                                      bool(probe)]).encode("utf-8", "surrogatepass")).hexdigest()[:32]
    return os.path.join(cache_dir, FOLDER, name + ".json")


def recall(path: str, tasks: list[tuple[str, str]]) -> Optional[list[list[Finding]]]:
    """The findings of each task (deck path, root), in order, when the
    summary at ``path`` is sound, was made for exactly these tasks, and no
    file it lists has changed; else None."""
    try:
        with open(path, "rb") as f:
            data = f.read(MAX_SUMMARY_BYTES + 1)
        if len(data) > MAX_SUMMARY_BYTES:
            return None
        checksum, _, body = data.partition(b"\n")
        if hashlib.sha256(body).hexdigest().encode() != checksum:
            return None
        summary = json.loads(body)
        if not (isinstance(summary, dict) and summary.get("format") == FORMAT):
            return None
        if summary.get("tasks") != [list(t) for t in tasks]:
            return None
        files = summary["files"]
        if not isinstance(files, list):
            return None
        for row in files:
            if not (isinstance(row, list) and len(row) == 2 and isinstance(row[0], str)):
                return None
            if signature(row[0]) != row[1]:
                return None
        per_task = summary["findings"]
        if not (isinstance(per_task, list) and len(per_task) == len(tasks)):
            return None
        out = []
        for i, rows in enumerate(per_task):
            if not isinstance(rows, list):
                return None
            for j, d in enumerate(rows):
                _check_finding(d, f"task {i} finding {j}")
            out.append([finding_from_dict(d) for d in rows])
    except (OSError, ValueError, KeyError, TypeError, IndexError, RecursionError, BadEntry):
        return None
    return out


def store(path: str, tasks: list[tuple[str, str]], findings: list[list[Finding]], files: list[str],
          started_ns: int) -> bool:
    """Write the summary of a check that began at ``started_ns`` (wall
    clock); False when it is not written (a file changed too recently to be
    trusted by its signature, or the cache cannot be written)."""
    rows = []
    seen: set[str] = set()
    for name in files:
        absolute = os.path.abspath(name)
        if absolute in seen:
            continue
        seen.add(absolute)
        sig = signature(absolute)
        if sig is not None and max(sig[1], sig[2]) >= started_ns - SETTLED_NS:
            return False
        rows.append([absolute, sig])
    body = json.dumps({"format": FORMAT, "tasks": [list(t) for t in tasks], "files": rows,
                       "findings": [[finding_to_dict(f) for f in per] for per in findings]},
                      ensure_ascii=False, separators=(",", ":")).encode("utf-8", "surrogatepass")
    try:
        replace_file(path, hashlib.sha256(body).hexdigest().encode() + b"\n" + body)
    except OSError:
        return False
    return True


class RunSummary:
    """The summary of one check of a project's decks (``tasks``: deck path
    and root, in order): ``recall`` before checking, ``store`` after, with the
    check's start time taken when the summary is made."""

    def __init__(self, cache_dir: str, tasks: list[tuple[str, str]], config_print: str, probe: bool) -> None:
        self.path = summary_path(cache_dir, tasks[0][1], config_print, probe)
        self.tasks = tasks
        self.started_ns = time.time_ns()

    def recall(self) -> Optional[list[list[Finding]]]:
        return recall(self.path, self.tasks)

    def store(self, findings: list[list[Finding]], depended_on: list[str]) -> bool:
        files = [p for p, _ in self.tasks] + list(depended_on)
        return store(self.path, self.tasks, findings, files, self.started_ns)

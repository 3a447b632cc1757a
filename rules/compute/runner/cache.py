"""Results cached per state, keyed by the content hash of its plan.

The key covers everything that determines a state's numbers (see
``plan.content_hash``: atoms, charge, spin, basis with added shells, method,
reference, frozen core, optimisation, frequencies) plus the PySCF version,
so editing one state of a deck recomputes that state only, and upgrading
PySCF recomputes everything.  Only finished states are stored: a failure
may be a time limit or memory, and the next run should try again.

Folder: ``$DECKWARD_CACHE_DIR/runs`` if set, else ``~/.cache/deckward/runs``;
PySCF's log of a state lives beside its result (``<key>.log``).  An entry is
served only when it has the exact shape of a result with finite numbers
(``cache_entry``); a folder that cannot be used is reported by ``check``
before anything runs, and a failed store (a full disk) becomes a note, never
a crash.
"""
from __future__ import annotations

import json
import os
from functools import lru_cache
from typing import Optional

from deckward.grammar.safe_open import replace_file

from . import cache_entry
from .plan import StatePlan, content_hash


class CacheUnusable(Exception):
    """The cache folder cannot hold results (the message says why)."""


def default_cache_dir() -> str:
    base = os.environ.get("DECKWARD_CACHE_DIR") or os.path.join(os.path.expanduser("~"), ".cache", "deckward")
    return os.path.join(base, "runs")


@lru_cache(maxsize=1)
def pyscf_version() -> str:
    """The installed PySCF version, read without importing PySCF."""
    from importlib import metadata

    try:
        return metadata.version("pyscf")
    except metadata.PackageNotFoundError:
        return "not installed"


class RunCache:
    """A folder of ``<key>.json`` results (``enabled=False``: never read or
    written, but log files still go to the folder)."""

    def __init__(self, folder: Optional[str] = None, enabled: bool = True) -> None:
        self.folder = folder or default_cache_dir()
        self.enabled = enabled
        self.notes: list[str] = []  # stores that failed, in words

    def check(self) -> None:
        """Raise CacheUnusable when the folder cannot be made or written."""
        if os.path.exists(self.folder) and not os.path.isdir(self.folder):
            raise CacheUnusable(f"the run cache {self.folder} is not a folder; remove it or choose another "
                                "with --cache-dir (or --no-cache)")
        try:
            os.makedirs(self.folder, exist_ok=True)
        except OSError as e:
            raise CacheUnusable(f"the run cache {self.folder} cannot be made ({e.strerror or e}); choose another "
                                "with --cache-dir")
        if not os.access(self.folder, os.W_OK | os.X_OK):
            raise CacheUnusable(f"the run cache {self.folder} cannot be written; choose another with --cache-dir")

    def key(self, plan: StatePlan) -> str:
        """The plan's content hash, extended by the exact basis shells the
        state gets (a changed library copy never answers from an old entry)."""
        import hashlib

        from .pyscf_build import BasisUnavailable, basis_digest

        try:
            digest = basis_digest(plan)
        except BasisUnavailable as e:
            digest = f"unavailable: {e}"
        base = content_hash(plan, pyscf_version())
        return hashlib.sha256(f"{base}:{digest}".encode("utf-8")).hexdigest()

    def log_path(self, key: str) -> Optional[str]:
        """Where the state's PySCF log goes (None: the folder cannot be made,
        the state runs without a log)."""
        try:
            os.makedirs(self.folder, exist_ok=True)
        except OSError:
            return None
        return os.path.join(self.folder, key + ".log")

    def get(self, key: str) -> Optional[dict]:
        if not self.enabled:
            return None
        path = os.path.join(self.folder, key + ".json")
        try:
            with open(path, encoding="utf-8") as f:
                data = json.load(f)
        except (OSError, ValueError, RecursionError):
            return None
        return data if cache_entry.problem(data) is None else None

    def put(self, key: str, result: dict) -> None:
        if not self.enabled or result.get("status") != "ok" or not cache_entry.finite_result(result):
            return
        data = json.dumps(dict(result, cached=False)).encode("utf-8")
        try:  # atomic: parallel runs never see half a file
            replace_file(os.path.join(self.folder, key + ".json"), data)
        except OSError as e:
            note = f"results were not stored in the run cache {self.folder}: {e.strerror or e}"
            if note not in self.notes:
                self.notes.append(note)

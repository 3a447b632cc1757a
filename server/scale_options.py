"""``--jobs``, ``--cache-dir`` and ``--no-cache``, shared by ``check`` and
``review``, and the numbers that decide when workers and the cache pay.

Kept apart from ``parallel_check`` and ``findings_cache`` so that checking
one deck imports neither (see docs/architecture.md, cold start).
"""
from __future__ import annotations

import os

IN_PROCESS_BELOW = 50  # decks; fewer than this are checked without workers
DEFAULT_CACHE_FROM = 2  # decks; one deck is checked faster than its cache entry is found


def default_jobs() -> int:
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


def add_scale_arguments(p) -> None:
    """``--jobs``, ``--cache-dir`` and ``--no-cache``."""
    group = p.add_argument_group("scale")
    group.add_argument("--jobs", "-j", type=_jobs_value, default=0, metavar="N",
                       help="worker processes (default: one per core; 1: no workers)")
    group.add_argument("--cache-dir", metavar="DIR",
                       help="findings cache folder (default: $DECKWARD_CACHE_DIR/findings or ~/.cache/deckward/findings; "
                            "used by default when more than one deck is checked)")
    group.add_argument("--no-cache", action="store_true",
                       help="clear the findings cache and check everything afresh (nothing is read or written)")


def _jobs_value(text: str) -> int:
    import argparse

    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"--jobs takes a whole number, not {text!r}")
    if n < 0:
        raise argparse.ArgumentTypeError("--jobs must be 0 (one per core) or more")
    return n


def default_cache_dir() -> str:
    """``$DECKWARD_CACHE_DIR/findings``, else ``~/.cache/deckward/findings``."""
    base = os.environ.get("DECKWARD_CACHE_DIR")
    if base:
        return os.path.join(base, "findings")
    return os.path.join(os.path.expanduser("~"), ".cache", "deckward", "findings")


def scale_options(args) -> dict:
    """Keyword arguments for ``check_paths`` from the parsed options.  A
    folder named with ``--cache-dir`` is always used; the default folder
    only from ``DEFAULT_CACHE_FROM`` decks on."""
    jobs = getattr(args, "jobs", 1)
    given = getattr(args, "cache_dir", None)
    folder = given or default_cache_dir()
    if getattr(args, "no_cache", False):
        from .findings_cache import FindingsCache

        FindingsCache(folder).clear()
        return {"jobs": jobs if jobs else default_jobs(), "cache_dir": None}
    return {"jobs": jobs if jobs else default_jobs(), "cache_dir": folder,
            "cache_from": 1 if given else DEFAULT_CACHE_FROM}

"""``deckward results [PATH...]``: what was computed for the decks under
PATH, from the results database (``deckward run`` records into it).

The latest row per deck and state plan (and per deck and derived name), or
every row with ``--all``.  Reading never changes the database.
"""
from __future__ import annotations

import os
import sys

from .checking import UsageError
from .results_view import database_path, open_database, render

HELP = "list the states and derived values recorded by earlier runs"


def add_arguments(p) -> None:
    p.add_argument("paths", nargs="*", metavar="PATH", help="deck files or folders (default: every deck)")
    p.add_argument("--format", default="table", choices=("table", "csv", "json"), help="output format (default: table)")
    p.add_argument("--all", action="store_true", help="every recorded row, not only the latest per plan")
    p.add_argument("--db", metavar="FILE",
                   help="results database (default: results.sqlite beside the run cache folder)")
    p.add_argument("--cache-dir", metavar="DIR", help="the cache folder the runs used (its results.sqlite)")


def run(args) -> int:
    for path in args.paths:
        if not os.path.exists(path):
            raise UsageError(f"{path}: no such file or folder")
    folder = os.path.join(args.cache_dir, "runs") if args.cache_dir else None
    if not args.db and not os.path.isfile(database_path(args, folder)):
        raise UsageError(f"{database_path(args, folder)}: no results database yet (`deckward run` records one)")
    with open_database(args, folder, readonly=True) as db:
        states = db.states(args.paths, history=args.all)
        derived = db.derived(args.paths, history=args.all)
    sys.stdout.write(render(states, derived, args.format))
    return 0

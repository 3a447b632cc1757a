"""``deckward review PATH... --out report.html``: a report on a batch of decks.

For a teacher or a group leader reading many set-ups at once: one
self-contained HTML file (or Markdown with ``--format markdown``) with a
table of the decks, the batch summarised by rule, and every finding with its
reason, the deck's lines and the suggested fix.  ``--probe`` adds the PySCF
probe numbers and a plot per deck.  The exit status is 0 once the report is
written, whatever it contains (use ``deckward check`` to gate on findings).
"""
from __future__ import annotations

import os
import sys

from .checking import UsageError, check_paths, projects_for
from .executor_options import add_executor_arguments, executor_from, probes_on
from .scale_options import add_scale_arguments, scale_options

HELP = "write a review report (HTML or Markdown) on a batch of decks"


def add_arguments(p) -> None:
    p.add_argument("paths", nargs="+", metavar="PATH", help="deck files or folders (searched for *.deck)")
    p.add_argument("--out", "-o", metavar="FILE", help="write the report to FILE (default: standard output)")
    p.add_argument("--format", default="html", choices=("html", "markdown"), help="report format (default: html)")
    p.add_argument("--title", default="Deck review", help="the report's title (default: Deck review)")
    p.add_argument("--config", metavar="FILE", help="configuration file (default: deckward.yaml at or above the path)")
    p.add_argument("--probe", action="store_true",
                   help="also run the PySCF probes and plot their numbers (slow: minutes, not milliseconds)")
    add_scale_arguments(p)
    add_executor_arguments(p)
    p.add_argument("--db", metavar="FILE",
                   help="results database whose recorded values the report shows (default: the one `deckward run` "
                        "records into, when it exists)")


def run(args) -> int:
    from .review_batch import build_review

    scale = scale_options(args)  # probes run in this process, whatever --jobs says
    projects = projects_for(args.config)
    config = projects.config_for(args.paths[0], args.paths[0])  # where a `cluster:` section is looked up
    with executor_from(args, config, max(1, args.jobs)) as executor, probes_on(executor):
        result = check_paths(args.paths, projects=projects, probe=args.probe, probe_progress=True, **scale)
    review = build_review(result, title=args.title, probed=args.probe)
    _attach_recorded(args, review)
    if args.format == "markdown":
        from .review_markdown import render_review_markdown

        text = render_review_markdown(review)
    else:
        from .review_html import render_review

        text = render_review(review)
    if args.out:
        try:
            folder = os.path.dirname(os.path.abspath(args.out))
            if not os.path.isdir(folder):
                raise UsageError(f"{args.out}: its folder does not exist")
            with open(args.out, "w", encoding="utf-8") as f:
                f.write(text)
        except OSError as e:
            raise UsageError(f"{args.out}: cannot be written ({e.strerror or e})")
        n = len(review.decks)
        sys.stderr.write(f"deckward: wrote the review of {n} deck{'s' * (n != 1)} to {args.out}\n")
    else:
        sys.stdout.write(text)
    return 0


def _attach_recorded(args, review) -> None:
    """Recorded derived values per deck, when there is a database to read."""
    from deckward.rules.compute.runner.results_db import DatabaseError, ResultsDB, default_db_path

    path = args.db or default_db_path()
    if not os.path.isfile(path):
        if args.db:
            raise UsageError(f"{args.db}: no such results database")
        return
    from .review_batch import attach_recorded

    try:
        with ResultsDB(path, readonly=True) as db:
            attach_recorded(review, db)
    except DatabaseError as e:
        raise UsageError(str(e)) from None

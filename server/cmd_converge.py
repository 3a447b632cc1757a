"""``deckward converge DECK``: the deck's derived quantities along a basis
ladder of its family, with a complete-basis estimate (see
``rules/compute/convergence.py`` for the ladders and the published extrapolations)."""
from __future__ import annotations

import json
import os
import sys

from .checking import UsageError

HELP = "compute a deck's derived quantities along a basis-set ladder, with a complete-basis estimate"


def add_arguments(p) -> None:
    p.add_argument("deck", metavar="DECK", help="the deck file")
    p.add_argument("--json", nargs="?", const="-", metavar="FILE",
                   help="write the numbers as JSON to FILE (standard output without FILE)")
    p.add_argument("--plot", metavar="FILE.svg", help="draw value against cardinal number, one line per quantity")
    p.add_argument("--cache-dir", metavar="DIR",
                   help="results cache (default: $DECKWARD_CACHE_DIR/runs or ~/.cache/deckward/runs)")
    p.add_argument("--jobs", "-j", type=int, metavar="N", help="run up to N states in parallel processes")
    p.add_argument("--quiet", "-q", action="store_true", help="no progress display on standard error")
    p.add_argument("--config", metavar="FILE", help="configuration file (default: deckward.yaml at or above the deck)")


def _fmt(v, digits=6):
    return "n/a" if v is None else f"{v:.{digits}f}"


def render(conv) -> str:
    from deckward.rules.knowledge import units
    from deckward.rules.compute.comparison import CAUTION
    from deckward.rules.compute.runner.results import CAUTION as RUN_CAUTION, _table

    names = [d.name for d in conv.steps[0].derived]
    unit_names = [d.unit for d in conv.steps[0].derived]
    header = ["basis", "X"] + [f"{n} [{u}]" for n, u in zip(names, unit_names)]
    rows = [[s.basis, str(s.cardinal)] + [_fmt(d.value) for d in s.derived] for s in conv.steps]
    rows.append(["complete basis", ""] + [_fmt(d.value) for d in conv.cbs])
    out = [f"deck {conv.deck}: basis ladder {conv.ladder.family}", "", _table(header, rows), ""]
    for d in conv.cbs:
        if d.reason:
            out.append(f"  {d.name}: no complete-basis value: {d.reason}")
    out.append(f"  complete basis: {conv.cbs_note}")
    cbs_ev = {d.name: units.from_hartree(d.value_hartree, "ev") for d in conv.cbs if d.value_hartree is not None}
    for name, e in conv.experiment.items():
        unc = f" +- {e.uncertainty_ev:g}" if e.uncertainty_ev is not None else ""
        line = f"  {name}: experiment {e.value_ev:.3f}{unc} eV ({e.source})"
        if name in cbs_ev:
            line += f"; complete basis minus experiment {cbs_ev[name] - e.value_ev:+.3f} eV"
        out.append(line)
    failed = [r for s in conv.steps for r in s.states if r["status"] != "ok"]
    for r in failed:
        out.append(f"  {r['name']}: {r['status']}: {r.get('reason')}")
    out += ["", "Caution: " + RUN_CAUTION + " " + CAUTION, ""]
    return "\n".join(out)


def run(args) -> int:
    from deckward.rules.compute.convergence import LadderError, converge
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.parallel import RunOptions
    from deckward.rules.compute.runner.progress import Progress

    from .checking import project_of
    from .run_gate import gate

    if not os.path.isfile(args.deck):
        raise UsageError(f"{args.deck}: no such deck file")
    if args.plot and not args.plot.endswith(".svg"):
        raise UsageError(f"{args.plot}: the plot is written as SVG (FILE.svg)")
    project = project_of(args.deck, args.config)
    config = project.config
    try:
        ws = project.resolve(args.deck)
    except OSError as e:
        raise UsageError(f"{args.deck}: cannot be read ({e.strerror or e})")
    refused = gate(ws, config, sys.stderr, what="converge")
    if refused is not None:
        return refused
    if not ws.derives:
        raise UsageError(f"nothing to converge: {args.deck} has no derive")
    cache = RunCache(os.path.join(args.cache_dir, "runs") if args.cache_dir else None)
    options = RunOptions(jobs=max(1, args.jobs or 1))
    progress = Progress(0, enabled=not args.quiet)
    try:
        conv = converge(ws, cache, options, progress=progress)
    except LadderError as e:
        raise UsageError(str(e))
    if args.json == "-":
        sys.stdout.write(json.dumps(conv.to_dict(), indent=2) + "\n")
    else:
        sys.stdout.write(render(conv))
        if args.json:
            _write(args.json, json.dumps(conv.to_dict(), indent=2) + "\n")
    if args.plot:
        from .convergence_plot import plot_svg

        _write(args.plot, plot_svg(conv))
    return 0 if conv.ok else 1


def _write(path: str, text: str) -> None:
    from .atomic_write import WriteRefused, write_new

    try:
        write_new(path, text.encode("utf-8"), overwrite=True)
    except WriteRefused as e:
        raise UsageError(f"{path}: not written: {e}")

"""``deckward new --goal ... FILE.xyz -o DECK``: write a first deck that
``deckward check`` accepts with no warning (see ``rules/fixes/deck_writer.py``
for what goes in it).  The deck is written atomically and never over an
existing file unless ``--force`` is given."""
from __future__ import annotations

import os
import sys

from .checking import UsageError

HELP = "write a first deck for an EA, IE or gap of the molecule in an .xyz file"


def add_arguments(p) -> None:
    from deckward.rules.fixes.deck_writer import DEFAULT_BASIS, DEFAULT_METHOD, GOALS, KINDS

    p.add_argument("xyz", metavar="FILE.xyz", help="the molecule's geometry (XYZ, angstrom)")
    p.add_argument("--goal", required=True, choices=GOALS, help="the quantity to compute")
    p.add_argument("--kind", default="vertical", choices=KINDS, help="vertical (default) or adiabatic")
    p.add_argument("--charge", type=int, default=0, help="charge of the molecule in the file (default 0)")
    p.add_argument("--multiplicity", type=int, required=True, help="its spin multiplicity 2S+1")
    p.add_argument("--method", default=DEFAULT_METHOD, help=f"method (default {DEFAULT_METHOD})")
    p.add_argument("--basis", default=DEFAULT_BASIS,
                   help=f"basis set (default {DEFAULT_BASIS}; augmented when an anion is involved)")
    p.add_argument("--output", "-o", required=True, metavar="DECK", help="the deck file to write")
    p.add_argument("--force", action="store_true", help="replace DECK if it exists")


def run(args) -> int:
    from deckward.grammar.xyz import parse_xyz
    from deckward.grammar.resolve import Loader
    from deckward.rules.fixes.deck_writer import DeckRequestError, write_deck

    from .atomic_write import WriteRefused, write_new

    if not args.output.endswith(".deck"):
        raise UsageError(f"{args.output}: a deck file name ends in .deck")
    try:
        text, bad = Loader().read_text(args.xyz)
    except OSError as e:
        raise UsageError(f"{args.xyz}: cannot be read ({e.strerror or e})")
    atoms, findings, _ = parse_xyz(args.xyz, text)
    findings = ([bad] if bad else []) + findings
    if findings:
        for f in findings:
            sys.stderr.write(f"{f.span.path}:{f.span.line}:{f.span.column}: {f.severity.value}: {f.rule}: {f.message}\n")
        raise UsageError(f"{args.xyz}: not a readable .xyz geometry")
    deck_dir = os.path.dirname(os.path.abspath(args.output))
    relative = os.path.relpath(os.path.abspath(args.xyz), deck_dir).replace(os.sep, "/")
    stem = os.path.splitext(os.path.basename(args.xyz))[0]
    try:
        deck = write_deck(args.goal, args.kind, args.charge, args.multiplicity, [a.symbol.value for a in atoms],
                          [a.xyz for a in atoms], relative, stem, args.method, args.basis)
    except DeckRequestError as e:
        raise UsageError(str(e))
    try:
        write_new(args.output, deck.encode("utf-8"), overwrite=args.force)
    except WriteRefused as e:
        raise UsageError(f"{args.output}: not written: {e}")
    sys.stderr.write(f"deckward: wrote {args.output}; check it with `deckward check {args.output}`\n")
    return 0

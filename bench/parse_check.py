"""Parsing and checking speed, as ratios measured in one run.

Prints, for a few thousand generated decks:
  - parse + resolve (deckward's model) / bare Lark parse of the same texts
  - full check (all static rules) / bare Lark parse
and the cold start of `deckward check one.deck` as a ratio to `python -c pass`.
Usage: python bench/parse_check.py [--decks N]
"""
from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from deck_generator import write_decks  # noqa: E402


def timed(fn) -> float:
    t = time.perf_counter()
    fn()
    return time.perf_counter() - t


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--decks", type=int, default=3000)
    ap.add_argument("--starts", type=int, default=7, help="repetitions of the cold-start measurement")
    args = ap.parse_args()

    from deckward.grammar.parser import clear_parse_cache, get_parser
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.engine import check_workspace
    from deckward.rules.registry import all_rules

    folder = tempfile.mkdtemp(prefix="deckward-bench-")
    paths = write_decks(folder, args.decks)
    texts = [open(p, encoding="utf-8").read() for p in paths]
    lark_parser = get_parser()
    all_rules()  # import the rule modules once, outside the timings

    bare = timed(lambda: [lark_parser.parse(t) for t in texts])

    def model(cold: bool):
        for p in paths:
            if cold:
                clear_parse_cache()
            resolve(p, Loader(), folder)

    def full(cold: bool):
        loader = Loader()
        for p in paths:
            if cold:
                clear_parse_cache()
            check_workspace(resolve(p, loader, folder))

    model_cold = timed(lambda: model(True))
    checked_cold = timed(lambda: full(True))
    clear_parse_cache()
    checked_warm = timed(lambda: full(False))
    print(f"{args.decks} decks, {sum(map(len, texts)) / 1e6:.2f} MB")
    print(f"bare Lark parse:                     {bare:8.2f} s  (1.00)")
    print(f"parse + resolve (model), cold:       {model_cold:8.2f} s  ({model_cold / bare:.2f} x bare parse)")
    print(f"full check (all rules), cold:        {checked_cold:8.2f} s  ({checked_cold / bare:.2f} x bare parse)")
    print(f"full check, statement parses shared: {checked_warm:8.2f} s  ({checked_warm / bare:.2f} x bare parse)")
    print("(cold: the remembered statement parses are cleared before every deck; shared: identical "
          "statements across decks are parsed once, as in one `deckward check` run)")

    one = paths[0]
    py = [timed(lambda: subprocess.run([sys.executable, "-c", "pass"], check=True)) for _ in range(args.starts)]
    dw = [timed(lambda: subprocess.run([sys.executable, "-m", "deckward", "check", one, "--no-cache", "--fail-on", "never"],
                                       check=True, capture_output=True)) for _ in range(args.starts)]
    p, d = statistics.median(py), statistics.median(dw)
    print(f"cold start `deckward check one.deck`: {d * 1000:.0f} ms median; python -c pass: {p * 1000:.0f} ms; "
          f"ratio {d / p:.1f}")


if __name__ == "__main__":
    main()

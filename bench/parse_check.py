"""Parsing and checking speed, as ratios measured in one run.

Prints, for a few thousand generated decks:
  - parse + resolve (deckward's model) / bare Lark parse of the same texts
  - full check (all static rules) / bare Lark parse
and the cold start of `deckward check one.deck` as a ratio to `python -c pass`
(a generated deck, and examples/cn_anion_tight_basis.deck with the examples'
deckward.yaml; goal: at most 4x), the two commands run alternately in one
run, caches warm (the first start, which writes them, is not counted).

Every ratio is given twice: by wall time and by CPU time.  On a shared
machine the CPU-time ratio is the steadier one (other processes stretch wall
time, not the CPU time this work needs).  The cold start is measured with
the sources compiled to bytecode first, as an installed package has them
(an environment with PYTHONDONTWRITEBYTECODE=1 would otherwise compile every
module on every start).
Usage: python bench/parse_check.py [--decks N] [--starts N] [--cold-start-only]
"""
from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from deck_generator import write_decks  # noqa: E402


def timed(fn) -> tuple[float, float]:
    """(wall seconds, CPU seconds of this process) of ``fn()``."""
    t, c = time.perf_counter(), time.process_time()
    fn()
    return time.perf_counter() - t, time.process_time() - c


def child_cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def timed_run(cmd, env=None) -> tuple[float, float]:
    """(wall seconds, CPU seconds) of one subprocess."""
    t, c = time.perf_counter(), child_cpu()
    subprocess.run(cmd, check=True, capture_output=True, env=env)
    return time.perf_counter() - t, child_cpu() - c


def ratio_line(label: str, value: tuple[float, float], base: tuple[float, float]) -> str:
    return (f"{label:38s} {value[0]:8.2f} s wall ({value[0] / base[0]:.2f} x), "
            f"{value[1]:8.2f} s CPU ({value[1] / base[1]:.2f} x)")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--decks", type=int, default=3000)
    ap.add_argument("--starts", type=int, default=20, help="repetitions of the cold-start measurement")
    ap.add_argument("--cold-start-only", action="store_true", help="measure only the cold start")
    args = ap.parse_args()
    if args.cold_start_only:
        folder = tempfile.mkdtemp(prefix="deckward-bench-")
        cold_start(write_decks(folder, 1)[0], args.starts)
        return

    from deckward.grammar.parser import clear_parse_cache, get_parser
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.engine.checker import check_workspace
    from deckward.rules.engine.registry import all_rules
    from deckward.server.checking import check_paths

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

    def full_cold():
        for p in paths:
            clear_parse_cache()
            check_workspace(resolve(p, Loader(), folder))

    def full_run():  # one `deckward check FOLDER --jobs 1` without the cache, as the command runs it
        check_paths([folder], jobs=1)

    model_cold = timed(lambda: model(True))
    checked_cold = timed(full_cold)
    clear_parse_cache()
    checked_warm = timed(full_run)
    print(f"{args.decks} decks, {sum(map(len, texts)) / 1e6:.2f} MB; load average {os.getloadavg()[0]:.1f}")
    print(ratio_line("bare Lark parse:", bare, bare))
    print(ratio_line("parse + resolve (model), cold:", model_cold, bare))
    print(ratio_line("full check (all rules), cold:", checked_cold, bare))
    print(ratio_line("full check as one `check` run:", checked_warm, bare))
    print("(cold: the remembered statement parses are cleared before every deck; one run: identical "
          "statements across decks are parsed once, as `deckward check FOLDER --jobs 1` does)")

    cold_start(paths[0], args.starts)


EXAMPLE = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "examples",
                       "cn_anion_tight_basis.deck")


def cold_start(one: str, starts: int) -> None:
    """`deckward check DECK` (text output) started as a user starts it,
    against `python -c pass` with the same interpreter, run alternately."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    bare = [sys.executable, "-c", "pass"]
    for label, deck in (("one.deck", one), ("examples/cn_anion_tight_basis.deck", EXAMPLE)):
        check = [sys.executable, "-m", "deckward", "check", deck, "--fail-on", "never"]
        for _ in range(2):  # write the bytecode and the caches (basis indexes, deckward.yaml) once
            subprocess.run(check, check=True, capture_output=True, env=env)
        py, dw = [], []
        for _ in range(starts):
            py.append(timed_run(bare, env))
            dw.append(timed_run(check, env))
        for how, pick in (("median", statistics.median), ("best", min)):
            p = (pick(x[0] for x in py), pick(x[1] for x in py))
            d = (pick(x[0] for x in dw), pick(x[1] for x in dw))
            print(f"cold start `deckward check {label}` ({how} of {starts}): {d[0] * 1000:.0f} ms wall, "
                  f"{d[1] * 1000:.0f} ms CPU; python -c pass: {p[0] * 1000:.1f} ms wall, {p[1] * 1000:.1f} ms CPU; "
                  f"ratio check / python -c pass {d[0] / p[0]:.2f} wall, {d[1] / p[1]:.2f} CPU (goal <= 4)")


if __name__ == "__main__":
    main()

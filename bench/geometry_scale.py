"""Geometry rules on pathological and very large geometries, as ratios.

Two generated decks (demo geometries, not chemistry):
  - a pile: N hydrogen atoms on one point (default 2,000);
  - a lattice: M carbon atoms 1.5 angstrom apart on a cubic grid (default
    100,000), every atom bonded, nothing too close.
For each: the bare Lark parse of the file, the full check (parse, build,
resolve, every static rule), the number of findings, and the check as a
ratio to the parse, by wall time and by CPU time.
Usage: python bench/geometry_scale.py [--pile N] [--lattice M]
"""
from __future__ import annotations

import argparse
import os
import tempfile
import time


def timed(fn):
    t, c = time.perf_counter(), time.process_time()
    value = fn()
    return time.perf_counter() - t, time.process_time() - c, value


def pile(n: int) -> str:
    return "geometry pile {\n" + "  H 0.0 0.0 0.0\n" * n + "}\n"


def lattice(m: int) -> str:
    side = round(m ** (1 / 3)) + 1
    lines = ["geometry lattice {"]
    for i in range(side):
        for j in range(side):
            for k in range(side):
                if len(lines) > m:
                    break
                lines.append(f"  C {1.5 * i:.4f} {1.5 * j:.4f} {1.5 * k:.4f}")
    return "\n".join(lines[: m + 1]) + "\n}\n"


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--pile", type=int, default=2000)
    ap.add_argument("--lattice", type=int, default=100_000)
    args = ap.parse_args()

    from deckward.grammar.parser import clear_parse_cache, get_parser
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.engine.checker import check_workspace
    from deckward.rules.engine.registry import all_rules

    lark_parser = get_parser()
    all_rules()
    folder = tempfile.mkdtemp(prefix="deckward-geometry-")
    print(f"load average {os.getloadavg()[0]:.1f}")
    for name, text in (("pile", pile(args.pile)), ("lattice", lattice(args.lattice))):
        path = os.path.join(folder, f"{name}.deck")
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
        wall_p, cpu_p, _ = timed(lambda: lark_parser.parse(text))
        clear_parse_cache()
        wall_c, cpu_c, findings = timed(lambda: check_workspace(resolve(path, Loader(), folder)))
        atoms = text.count("\n") - 2
        by_rule: dict[str, int] = {}
        for f in findings:
            by_rule[f.rule] = by_rule.get(f.rule, 0) + 1
        print(f"{name}: {atoms} atoms, {len(text) / 1e6:.2f} MB; {len(findings)} findings {by_rule}; "
              f"check / bare parse: {wall_c / wall_p:.2f} wall, {cpu_c / cpu_p:.2f} CPU")


if __name__ == "__main__":
    main()

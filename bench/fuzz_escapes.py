"""A long fuzz run: decks with NUL bytes, lone surrogates, non-finite and
400-digit numbers and deep nesting in every slot (``tests/odd_inputs.py``),
each checked as an editor buffer (and every tenth also as a file on disk).

Prints the number of inputs, the escapes (an exception, an internal-error
finding, a span outside the file; the goal is 0) grouped by message, and
the inputs per second.
Usage: python bench/fuzz_escapes.py [--inputs 100000] [--seed 16]
"""
from __future__ import annotations

import argparse
import collections
import os
import random
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests"))
from odd_inputs import escapes, random_deck  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--inputs", type=int, default=100_000)
    ap.add_argument("--seed", type=int, default=16)
    args = ap.parse_args()
    rng = random.Random(args.seed)
    found: collections.Counter = collections.Counter()
    examples: dict[str, str] = {}
    escaped = 0
    start = time.perf_counter()
    with tempfile.TemporaryDirectory(prefix="deckward-fuzz-") as folder:
        for i in range(args.inputs):
            text = random_deck(rng)
            problems = escapes(text, folder, modes=("buffer", "file") if i % 10 == 0 else ("buffer",))
            if problems:
                escaped += 1
                for p in problems:
                    found[p[:200]] += 1
                    examples.setdefault(p[:200], text)
            if (i + 1) % 10_000 == 0:
                print(f"  {i + 1} inputs, {escaped} escapes", flush=True)
    took = time.perf_counter() - start
    print(f"inputs: {args.inputs}")
    print(f"escapes: {escaped} (goal 0)")
    for message, count in found.most_common():
        print(f"  {count} x {message}")
        print(f"    example: {examples[message][:300]!r}")
    print(f"inputs per second: {args.inputs / took:.0f}")


if __name__ == "__main__":
    main()

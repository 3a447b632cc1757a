"""How much the runner adds over calling PySCF directly, for the same calculation.

Runs a small deck (water, HF and MP2 in cc-pVDZ) through ``run_workspace``
with the cache off and in this process, and the same two calculations with
PySCF directly, a few times each, and prints the ratio of the median times
(1.00 = no overhead).  PySCF is imported before either is timed.

    python bench/runner_overhead.py [--repeat N]
"""
from __future__ import annotations

import argparse
import os
import statistics
import tempfile
import time

DECK = """geometry w {
  O 0 0 0.1173
  H 0 0.7572 -0.4692
  H 0 -0.7572 -0.4692
}
level hf_dz { method = hf basis = cc-pvdz }
level mp2_dz { method = mp2 basis = cc-pvdz }
state a { geometry = w level = hf_dz }
state b { geometry = w level = mp2_dz }
derive diff = energy(b) - energy(a) in ev
"""


def direct() -> float:
    from pyscf import gto, mp, scf

    atom = "O 0 0 0.1173; H 0 0.7572 -0.4692; H 0 -0.7572 -0.4692"
    e1 = scf.RHF(gto.M(atom=atom, basis="cc-pvdz", verbose=0)).run().e_tot
    mf = scf.RHF(gto.M(atom=atom, basis="cc-pvdz", verbose=0)).run()
    return mp.MP2(mf).run().e_tot - e1


def through_runner(path: str, folder: str) -> float:
    from deckward.grammar.resolve import Loader, resolve
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.run import run_workspace

    ws = resolve(path, Loader(), folder)
    report = run_workspace(ws, RunCache(os.path.join(folder, "cache"), enabled=False))
    return report.derived[0].value_hartree


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()
    import pyscf  # noqa: F401  (import cost is not the runner's)

    with tempfile.TemporaryDirectory() as folder:
        path = os.path.join(folder, "bench.deck")
        with open(path, "w") as f:
            f.write(DECK)
        through_runner(path, folder), direct()  # warm up both paths
        t_direct, t_runner = [], []
        for _ in range(args.repeat):
            t0 = time.perf_counter()
            a = direct()
            t1 = time.perf_counter()
            b = through_runner(path, folder)
            t2 = time.perf_counter()
            t_direct.append(t1 - t0)
            t_runner.append(t2 - t1)
            assert abs(a - b) < 1e-8, (a, b)
    md, mr = statistics.median(t_direct), statistics.median(t_runner)
    print(f"PySCF direct: {md:.3f} s, through deckward run: {mr:.3f} s (median of {args.repeat})")
    print(f"runner overhead ratio: {mr / md:.2f}")


if __name__ == "__main__":
    main()

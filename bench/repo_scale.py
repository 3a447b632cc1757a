"""Repository-scale checking: parallel workers and the findings cache.

Generates a repository of decks (default 5,000; the acceptor-screening demo
decks of deck_generator.py, plus some that share geometries through `use`)
and measures in one run:

  - bare parse: read every file and run the bare Lark parse, one process;
  - cold check: `check_paths` with the default workers and an empty cache;
  - warm check: the same again, every deck served from the cache (the run
    summary, when the decks were written more than two seconds before);
  - one file changed: one deck edited, the rest from the cache;
  - --jobs 1 and --jobs 2 without the cache (speed-up = time 1 / time 2).

Each check time is printed as a ratio to the bare-parse time, and every
check's findings are compared with the --jobs 1 run (they must be equal).
On a shared machine wall-time speed-ups say more about the neighbours than
about --jobs, so the speed-up is also estimated from CPU times: the --jobs 1
CPU time over the parent's CPU time plus half the workers' (what two free
cores would take, with the work split evenly).
Usage: python bench/repo_scale.py [--decks N]
"""
from __future__ import annotations

import argparse
import os
import resource
import shutil
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from deck_generator import write_decks  # noqa: E402

SHARED = """# geometries shared by the decks of one screening round (demo structures)
geometry no2_shared {
  N 0.000000 0.000000 0.000000
  O 0.000000 1.098900 0.465300
  O 0.000000 -1.098900 0.465300
}
geometry cn_shared {
  C 0.000000 0.000000 0.000000
  N 0.000000 0.000000 1.171800
}
"""

USING = """# screening deck {i}: geometry from the shared file
use "../shared/geometries.deck"
level lv {{ method = {method}  basis = {basis}  reference = unrestricted }}
state neutral {{ geometry = {geo}  level = lv  charge = 0   multiplicity = {mult} }}
state anion   {{ geometry = {geo}  level = lv  charge = -1  multiplicity = {amult} }}
derive ea as electron_affinity = energy(neutral) - energy(anion) in ev
"""


def make_repo(folder: str, count: int) -> list[str]:
    with open(os.path.join(folder, "deckward.yaml"), "w", encoding="utf-8") as f:
        f.write("rules:\n  diffuse-linear-dependence: info\n")
    n_using = count // 20
    paths = write_decks(folder, count - n_using)
    os.makedirs(os.path.join(folder, "shared"))
    with open(os.path.join(folder, "shared", "geometries.deck"), "w", encoding="utf-8") as f:
        f.write(SHARED)
    os.makedirs(os.path.join(folder, "rounds"))
    for i in range(n_using):
        geo, mult, amult = (("no2_shared", 2, 1), ("cn_shared", 2, 1))[i % 2]
        method, basis = (("hf", "cc-pvdz"), ("mp2", "aug-cc-pvdz"), ("b3lyp", "6-31g*"))[i % 3]
        path = os.path.join(folder, "rounds", f"round{i:04d}.deck")
        with open(path, "w", encoding="utf-8") as f:
            f.write(USING.format(i=i, method=method, basis=basis, geo=geo, mult=mult, amult=amult))
        paths.append(path)
    return paths


def timed(fn):
    t = time.perf_counter()
    value = fn()
    return time.perf_counter() - t, value


def cpu_times() -> tuple[float, float]:
    """CPU seconds of this process and of its finished children."""
    me, kids = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
    return me.ru_utime + me.ru_stime, kids.ru_utime + kids.ru_stime


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--decks", type=int, default=5000)
    args = ap.parse_args()

    from deckward.grammar.parser import get_parser
    from deckward.rules.engine.registry import all_rules
    from deckward.server.checking import check_paths
    from deckward.server.parallel_check import default_jobs

    folder = tempfile.mkdtemp(prefix="deckward-repo-")
    cache = tempfile.mkdtemp(prefix="deckward-cache-")
    try:
        repo = os.path.join(folder, "repo")
        os.makedirs(repo)
        paths = make_repo(repo, args.decks)
        lark_parser = get_parser()
        all_rules()  # import the rule modules once, outside the timings

        def bare():
            for p in paths:
                with open(p, encoding="utf-8") as f:
                    lark_parser.parse(f.read())

        t_parse, _ = timed(bare)
        c0 = cpu_times()
        t_j1, r_j1 = timed(lambda: check_paths([repo], jobs=1))
        c1 = cpu_times()
        t_j2, r_j2 = timed(lambda: check_paths([repo], jobs=2))
        c2 = cpu_times()
        cpu_j1 = c1[0] - c0[0]
        cpu_parent, cpu_workers = c2[0] - c1[0], c2[1] - c1[1]
        t_cold, r_cold = timed(lambda: check_paths([repo], jobs=0, cache_dir=cache))
        t_warm, r_warm = timed(lambda: check_paths([repo], jobs=0, cache_dir=cache))
        with open(paths[0], "a", encoding="utf-8") as f:
            f.write("# edited\n")
        t_one, r_one = timed(lambda: check_paths([repo], jobs=0, cache_dir=cache))

        reference = r_j1.findings
        for name, r in (("--jobs 2", r_j2), ("cold", r_cold), ("warm", r_warm), ("one changed", r_one)):
            same = [f.to_dict() for f in r.findings] == [f.to_dict() for f in reference]
            if not same:
                sys.exit(f"findings of the {name} check differ from --jobs 1")
        s_warm, s_one = r_warm.stats, r_one.stats

        print(f"{len(r_j1.files)} deck files ({len(r_j1.findings)} findings), {default_jobs()} cores, "
              f"load average {os.getloadavg()[0]:.1f}")
        print(f"bare parse (read + Lark), 1 process:   {t_parse:7.2f} s  (1.00)")
        print(f"cold check, default jobs, empty cache: {t_cold:7.2f} s  ({t_cold / t_parse:.2f} x bare parse)")
        print(f"warm check, cache:                     {t_warm:7.2f} s  ({t_warm / t_parse:.3f} x bare parse; "
              f"{s_warm.cache_hits} hits, {s_warm.checked} checked"
              f"{', from the run summary' if s_warm.from_summary else ''})")
        print(f"one file changed, cache:               {t_one:7.2f} s  ({t_one / t_parse:.3f} x bare parse; "
              f"{s_one.cache_hits} hits, {s_one.checked} checked)")
        print(f"--jobs 1, no cache:                    {t_j1:7.2f} s  ({t_j1 / t_parse:.2f} x bare parse)")
        print(f"--jobs 2, no cache:                    {t_j2:7.2f} s  ({t_j2 / t_parse:.2f} x bare parse)")
        print(f"warm check / cold check:               {t_warm / t_cold:.3f}")
        print(f"speed-up --jobs 2 against --jobs 1:    {t_j1 / t_j2:.2f} wall; "
              f"{cpu_j1 / (cpu_parent + cpu_workers / 2):.2f} estimated from CPU times "
              f"({cpu_j1:.2f} s for --jobs 1; {cpu_parent:.2f} s parent + {cpu_workers:.2f} s workers for --jobs 2)")
        print("findings identical in every run: yes")
    finally:
        shutil.rmtree(folder, ignore_errors=True)
        shutil.rmtree(cache, ignore_errors=True)


if __name__ == "__main__":
    main()

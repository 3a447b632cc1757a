"""Calibrate and measure the diffuse criterion (rules/catalogue/basis/diffuse.py) against
computed electron affinities.

    python bench/diffuse_calibration.py                 # compute missing cases, then judge
    python bench/diffuse_calibration.py --quick         # six cases into a scratch file, ~1 minute
    python bench/diffuse_calibration.py --fresh         # recompute every case from scratch
    python bench/diffuse_calibration.py --no-compute --markdown tables.md --fit

The truth: for every (method, species, basis) case of
bench/diffuse_grid_compute.py, the diffuse error EA(basis) - EA(basis
doubly augmented).  A set is *adequate* when |error| <= 0.07 eV and
*inadequate* when |error| >= 0.14 eV (0.1 eV, the accuracy a careful
electron-affinity study aims for, divided and multiplied by sqrt 2); cases
in between are *borderline* and left out of the agreement, since the
criterion's own spread across basis families is about that size.

The verdict: what the rule anion-lacks-diffuse says for the anion, from the
library index (the rule's own data path), with the species' measured
electron affinity from rules/knowledge/reference_data.py and the method (Hartree-Fock
or MP2).  "Flagged" means a finding at any severity; "error" means the
severity the rule gives in electron-affinity work.

``--fit`` scans the calibrated factors n_l of rules/catalogue/basis/diffuse.py and prints
the agreement each value would give (how the constants were chosen).
"""
from __future__ import annotations

import argparse
import math
import os
import sys
from dataclasses import dataclass

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

import diffuse_grid_compute as grid  # noqa: E402

ADEQUATE_EV = 0.07
INADEQUATE_EV = 0.14


@dataclass
class Judged:
    method: str
    species: str
    basis: str
    error: float
    truth: str  # adequate | inadequate | borderline
    flagged: bool
    error_severity: bool
    limiting: str  # "p on Cl (1.21x)"
    binding: float | None


def truth_of(error: float) -> str:
    a = abs(error)
    if a <= ADEQUATE_EV:
        return "adequate"
    if a >= INADEQUATE_EV:
        return "inadequate"
    return "borderline"


def _species(sp: str):
    from deckward.rules.knowledge import reference_data

    rows = [t.split() for t in grid.SPECIES[sp][0].split(";")]
    return reference_data.identify([r[0] for r in rows], [tuple(float(x) for x in r[1:]) for r in rows])


def judge_case(method: str, sp: str, word: str, binding_known: bool = True, params=None):
    """(flagged, clearly inadequate, limiting text, binding) for one case, as the rule sees it."""
    from deckward.rules.knowledge import basis_library
    from deckward.rules.catalogue.basis import diffuse
    from deckward.rules.catalogue.basis.anion_lacks_diffuse import clearly_inadequate

    species = _species(sp) if binding_known else None
    binding = None
    if species is not None and species.electron_affinity is not None and species.anion_bound is not False:
        binding = species.electron_affinity.value_ev
    symbols = diffuse.carrier_symbols(grid.symbols_of(grid.SPECIES[sp][0]))
    flagged = definite = False
    worst = None
    for sym in symbols:
        data = basis_library.element_data(word, sym)
        if data is None:
            return None
        v = diffuse.verdict(sym, data.smallest_exponents, binding_ev=binding, correlated=(method == "mp2"))
        if v.is_diffuse:
            continue
        flagged = True
        definite = definite or clearly_inadequate(v)
        if worst is None or v.ratio > worst.ratio:
            worst = v
    limiting = "" if worst is None else f"{'spdf'[worst.limiting_l]} on {worst.symbol} ({worst.ratio:.2f}x)"
    return flagged, definite, limiting, binding


def judge_all(data: dict, binding_known: bool = True) -> list[Judged]:
    out = []
    for key, rec in sorted(data["cases"].items()):
        if rec.get("status") != "ok":
            continue
        method, sp, word = key.split("|")
        verdict = judge_case(method, sp, word, binding_known)
        if verdict is None:
            continue
        error = rec["ea_ev"] - rec["ea_completed_ev"]
        flagged, definite, limiting, binding = verdict
        out.append(Judged(method, sp, word, error, truth_of(error), flagged, flagged and definite, limiting, binding))
    return out


def summary(rows: list[Judged], method: str) -> dict:
    rows = [r for r in rows if r.method == method]
    decided = [r for r in rows if r.truth != "borderline"]
    adequate = [r for r in decided if r.truth == "adequate"]
    inadequate = [r for r in decided if r.truth == "inadequate"]
    agree = sum(1 for r in decided if r.flagged == (r.truth == "inadequate"))
    return {
        "cases": len(rows),
        "borderline": len(rows) - len(decided),
        "decided": len(decided),
        "agree": agree,
        "accuracy": agree / len(decided) if decided else math.nan,
        "adequate": len(adequate),
        "false_alarms": sum(1 for r in adequate if r.flagged),
        "false_errors": sum(1 for r in adequate if r.error_severity),
        "inadequate": len(inadequate),
        "misses": sum(1 for r in inadequate if not r.flagged),
        "inadequate_as_error": sum(1 for r in inadequate if r.error_severity),
        "borderline_errors": sum(1 for r in rows if r.truth == "borderline" and r.error_severity),
        "species": sorted({r.species for r in rows}),
        "bases": sorted({r.basis for r in rows}),
    }


def summary_lines(rows: list[Judged], label: str) -> list[str]:
    lines = []
    for method in ("hf", "mp2"):
        s = summary(rows, method)
        if not s["cases"]:
            continue
        fa = s["false_alarms"] / s["adequate"] if s["adequate"] else math.nan
        lines.append(
            f"- {label}, {method.upper()}: {s['cases']} cases ({len(s['species'])} species x {len(s['bases'])} sets), "
            f"{s['borderline']} borderline; agreement {s['accuracy']:.3f} ({s['agree']}/{s['decided']}); "
            f"adequate sets flagged {s['false_alarms']}/{s['adequate']} ({fa:.1%}), as errors {s['false_errors']}; "
            f"inadequate sets missed {s['misses']}/{s['inadequate']}, reported as errors {s['inadequate_as_error']}; "
            f"errors on borderline sets {s['borderline_errors']}"
        )
    return lines


def table(rows: list[Judged], method: str) -> str:
    lines = [
        "| species | basis | diffuse error (eV) | truth | rule | limiting |",
        "|---|---|---|---|---|---|",
    ]
    for r in rows:
        if r.method != method:
            continue
        rule = "error" if r.error_severity else ("warning" if r.flagged else "-")
        mark = "" if r.truth == "borderline" or r.flagged == (r.truth == "inadequate") else " **disagrees**"
        lines.append(f"| {r.species} | {r.basis} | {r.error:+.3f} | {r.truth} | {rule}{mark} | {r.limiting} |")
    return "\n".join(lines)


def disagreements(rows: list[Judged]) -> list[str]:
    out = []
    for r in rows:
        if r.truth == "borderline" or r.flagged == (r.truth == "inadequate"):
            continue
        kind = "false alarm" if r.truth == "adequate" else "miss"
        out.append(f"- {r.method.upper()} {r.species} {r.basis}: diffuse error {r.error:+.3f} eV, {kind} {r.limiting}")
    return out


def fit(data: dict) -> list[str]:
    """Agreement as each calibrated factor is varied alone (the others kept)."""
    from deckward.rules.catalogue.basis import diffuse

    lines = []
    scans = [("EFOLDS", 0, "hf", [2.4, 2.8, 3.0, 3.2, 3.4, 3.8, 4.4, 5.0, 6.0]),
             ("EFOLDS", 1, "hf", [5.0, 5.5, 6.0, 6.3, 6.5, 6.7, 6.9, 7.2, 7.6, 8.0]),
             ("POLARISATION_EFOLDS", 1, "mp2", [2.0, 2.5, 3.0, 3.2, 3.6, 4.0, 5.0]),
             ("POLARISATION_EFOLDS", 2, "mp2", [2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0, 6.0])]
    for table_name, l, method, values in scans:
        store = getattr(diffuse, table_name)
        saved = store[l]
        cells = []
        try:
            for value in values:
                store[l] = value
                s = summary(judge_all(data), method)
                cells.append(f"{value:g}: {s['accuracy']:.3f}, {s['false_alarms']}/{s['adequate']} FA, "
                             f"{s['misses']} missed")
        finally:
            store[l] = saved
        lines.append(f"- {table_name}[{l}] ({method.upper()}; kept {saved:g}): " + "; ".join(cells))
    return lines


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="six cases, computed into a scratch file")
    ap.add_argument("--fresh", action="store_true", help="ignore the stored grid and recompute every case")
    ap.add_argument("--no-compute", action="store_true", help="judge only the cases already stored")
    ap.add_argument("--grid", default=None, help="grid file (default bench/diffuse_grid.json)")
    ap.add_argument("--jobs", type=int, default=1)
    ap.add_argument("--markdown", default=None, help="write the tables to this file")
    ap.add_argument("--fit", action="store_true", help="scan the calibrated factors")
    args = ap.parse_args(argv)
    os.environ.setdefault("OMP_NUM_THREADS", "1")
    log = lambda s: print(s, flush=True)  # noqa: E731

    path = args.grid or (os.path.join(os.environ.get("TMPDIR", "/tmp"), "diffuse_grid_quick.json")
                         if args.quick else grid.GRID_FILE)
    if args.fresh and os.path.exists(path):
        path = path + ".fresh.json"
        if os.path.exists(path):
            os.remove(path)
    if not args.no_compute:
        grid.compute(grid.all_cases(args.quick), path, args.jobs, log)
    data = grid.load_grid(path)
    rows = judge_all(data)
    unknown = judge_all(data, binding_known=False)
    md = []
    for method in ("hf", "mp2"):
        if any(r.method == method for r in rows):
            md += [f"### {method.upper()} grid", "", table(rows, method), ""]
    lines = summary_lines(rows, "binding energy from the table")
    lines += summary_lines(unknown, "binding energy unknown (every species treated as not tabulated)")
    md += ["### Agreement", ""] + lines + [""]
    md += ["### Disagreements (binding energy from the table)", ""] + (disagreements(rows) or ["- none"]) + [""]
    if args.fit:
        md += ["### Factor scans", ""] + fit(data) + [""]
    for line in lines:
        log(line)
    for line in disagreements(rows):
        log(line)
    if args.fit:
        for line in fit(data):
            log(line)
    if args.markdown:
        with open(args.markdown, "w", encoding="utf-8") as fh:
            fh.write("\n".join(md) + "\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

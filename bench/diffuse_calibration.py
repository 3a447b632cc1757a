"""Calibrate the diffuse-function criterion of rules/diffuse.py against PySCF.

Run:  python bench/diffuse_calibration.py [--quick] [--markdown PATH] [--skip-scan]

Two measurements, both Hartree-Fock delta-SCF electron affinities
(EA = E(neutral) - E(anion), positive when the anion is bound; unrestricted
HF for open shells, restricted for closed shells):

1. Exponent scan (calibrates the free factor).  For each atom, start from
   cc-pVTZ, give it a complete reference diffuse layer in one angular
   momentum and a single added shell of exponent alpha in the other, and
   record the diffuse error EA(alpha) - EA(reference).  The largest alpha whose
   error stays within a tolerance is the measured alpha_max for that element
   and angular momentum; the ratio alpha_max / kappa_ref^2 is the free factor
   of the criterion (see docs/diffuse-criterion.md).

2. Basis-set grid (validates the criterion).  For atoms and small radicals in
   many library basis sets, the diffuse-specific error is
   EA(basis) - EA(basis + reference diffuse layers), where the reference
   layers are the two even-tempered diffuse s and p shells of a doubly
   augmented cc-pVTZ that are more diffuse than what the basis already has.
   This isolates what the criterion is about (reach of the s and p functions)
   from valence incompleteness, which is reported separately against a
   doubly augmented cc-pVTZ reference.  The criterion's verdict (exponents
   only) is then compared with "converged" (|diffuse error| < tolerance) and
   the confusion counts are printed for two tolerances.

Geometries are vertical (both states at one geometry): the target is basis
convergence, not agreement with experiment.  Bond lengths and angles are
from memory, close to experimental neutral-radical structures.
"""
from __future__ import annotations

import argparse
import math
import os
import time
from dataclasses import dataclass

HARTREE_EV = 27.211386245988  # CODATA 2018 (check-values.md section 1)
ANGULAR_LETTERS = "spdfghi"

# Species: name -> (atoms in Angstrom, neutral spin 2S, anion spin 2S).
# Geometries from memory (near experimental neutral structures).
_NO2_R, _NO2_ANGLE = 1.194, 134.1
_half = math.radians(_NO2_ANGLE / 2.0)
SPECIES: dict[str, tuple[str, int, int]] = {
    "C": ("C 0 0 0", 2, 3),
    "O": ("O 0 0 0", 2, 1),
    "F": ("F 0 0 0", 1, 0),
    "S": ("S 0 0 0", 2, 1),
    "Cl": ("Cl 0 0 0", 1, 0),
    "OH": ("O 0 0 0; H 0 0 0.970", 1, 0),
    "CN": ("C 0 0 0; N 0 0 1.172", 1, 0),
    "NO2": (
        "N 0 0 0; "
        f"O 0 {_NO2_R * math.sin(_half):.6f} {_NO2_R * math.cos(_half):.6f}; "
        f"O 0 {-_NO2_R * math.sin(_half):.6f} {_NO2_R * math.cos(_half):.6f}",
        1,
        0,
    ),
}

# Atoms for the exponent scan: symbol -> (neutral 2S, anion 2S).
SCAN_ATOMS: dict[str, tuple[int, int]] = {
    "C": (2, 3), "O": (2, 1), "F": (1, 0),
    "Si": (2, 3), "P": (3, 2), "S": (2, 1), "Cl": (1, 0),
}

GRID_BASES = [
    "sto-3g", "6-31g", "6-31g*", "6-31+g*", "6-311g*", "6-311+g*", "6-311++g**",
    "cc-pvdz", "aug-cc-pvdz", "cc-pvtz", "aug-cc-pvtz", "cc-pcvdz", "cc-pvqz",
    "def2-svp", "def2-svpd", "def2-tzvp", "def2-tzvpd", "def2-qzvp",
    "pcseg-1", "aug-pcseg-1", "pcseg-2", "ma-def2-svp",
    "jun-cc-pvtz",
]
QUICK_BASES = ["6-31g*", "6-31+g*", "cc-pvdz", "aug-cc-pvdz", "def2-svpd"]
QUICK_SPECIES = ["O", "Cl", "CN"]
SCAN_ALPHAS = [0.015, 0.02, 0.03, 0.04, 0.05, 0.065, 0.08, 0.10, 0.13, 0.17, 0.22, 0.30]
QUICK_SCAN_ATOMS = ["O"]
QUICK_SCAN_ALPHAS = [0.04, 0.065, 0.10, 0.17]
TOLERANCES_EV = (0.1, 0.2)


# ---------------------------------------------------------------- basis helpers

def load_shells(name: str, symbol: str):
    """Library shells for one element, or None when the library lacks them."""
    from pyscf import gto

    try:
        return gto.basis.load(name, symbol)
    except Exception:  # pyscf raises several kinds for unknown names/elements
        return None


def shell_exponents(shell) -> list[float]:
    prims = shell[2:] if isinstance(shell[1], int) else shell[1:]
    return [float(p[0]) for p in prims]


def smallest_exponents(shells, lmax: int = 3) -> list[list[float]]:
    """Ascending primitive exponents per angular momentum (the index shape)."""
    per_l: list[list[float]] = [[] for _ in range(lmax + 1)]
    for sh in shells:
        if sh[0] <= lmax:
            per_l[sh[0]].extend(shell_exponents(sh))
    return [sorted(set(v)) for v in per_l]


def reference_diffuse_layers(symbol: str) -> dict[int, list[float]]:
    """Two even-tempered diffuse s and p exponents of a doubly augmented cc-pVTZ.

    The aug- layer is the library's own; the second layer continues the
    geometric series (alpha_aug**2 / alpha_next), which is how doubly
    augmented correlation-consistent sets are built.
    """
    exps = smallest_exponents(load_shells("aug-cc-pvtz", symbol), lmax=1)
    layers = {}
    for l in (0, 1):
        a1, a2 = exps[l][0], exps[l][1]
        layers[l] = [a1, a1 * a1 / a2]
    return layers


def with_extra(shells, extra: dict[int, list[float]]):
    out = list(shells)
    for l, alphas in extra.items():
        for a in alphas:
            out.append([l, [a, 1.0]])
    return out


def completion_layers(shells, symbol: str) -> dict[int, list[float]]:
    """Reference diffuse s,p shells clearly more diffuse than the basis has.

    A reference exponent is added when it is below 0.7 times the basis's own
    smallest exponent of that angular momentum (closer ones would only add
    near-linear dependence).
    """
    own = smallest_exponents(shells, lmax=1)
    ref = reference_diffuse_layers(symbol)
    extra = {}
    for l in (0, 1):
        smallest = own[l][0] if own[l] else math.inf
        extra[l] = [a for a in ref[l] if a < 0.7 * smallest]
    return extra


# ------------------------------------------------------------------- SCF

@dataclass
class ScfResult:
    energy: float | None
    note: str


def run_scf(atom: str, basis, charge: int, spin: int) -> ScfResult:
    """HF energy with fallbacks; energy None when nothing converges."""
    from pyscf import gto, scf

    mol = gto.Mole()
    mol.atom = atom
    mol.basis = basis
    mol.charge = charge
    mol.spin = spin
    mol.verbose = 0
    mol.max_memory = 400
    mol.build()
    notes = []
    attempts = (
        ("plain", dict(level_shift=0.0, diis_start_cycle=1)),
        ("shift", dict(level_shift=0.3, diis_start_cycle=4)),
        ("newton", None),
    )
    best = None
    for label, opts in attempts:
        mf = scf.UHF(mol) if spin else scf.RHF(mol)
        mf.max_cycle = 150
        mf.conv_tol = 1e-9
        if opts is None:
            mf = mf.newton()
        else:
            mf.level_shift = opts["level_shift"]
            mf.diis_start_cycle = opts["diis_start_cycle"]
        try:
            mf.kernel()
        except Exception as exc:  # numerical failure: try the next strategy
            notes.append(f"{label}:{type(exc).__name__}")
            continue
        if not mf.converged:
            notes.append(f"{label}:not converged")
            continue
        if spin:
            # Follow internal instabilities to the lower UHF solution.
            for _ in range(3):
                try:
                    mo, _, stable, _ = mf.stability(return_status=True)
                except Exception as exc:  # e.g. Davidson breakdown near lindep
                    notes.append(f"stability:{type(exc).__name__}")
                    break
                if stable:
                    break
                dm = mf.make_rdm1(mo, mf.mo_occ)
                mf.kernel(dm0=dm)
                notes.append("unstable->reopt")
        best = mf.e_tot if mf.converged else None
        if best is not None:
            notes.append(label)
            break
    return ScfResult(best, ",".join(notes))


def electron_affinity(atom: str, basis, spins: tuple[int, int]) -> tuple[float | None, str]:
    neutral = run_scf(atom, basis, 0, spins[0])
    anion = run_scf(atom, basis, -1, spins[1])
    if neutral.energy is None or anion.energy is None:
        return None, f"neutral[{neutral.note}] anion[{anion.note}]"
    return (neutral.energy - anion.energy) * HARTREE_EV, ""


def basis_for(atom: str, name: str, extra_fn=None):
    """Per-element basis dict, None if the library lacks an element."""
    symbols = sorted({tok.split()[0] for tok in atom.split(";")})
    out = {}
    for sym in symbols:
        shells = load_shells(name, sym)
        if shells is None:
            return None
        out[sym] = extra_fn(shells, sym) if extra_fn else shells
    return out


# ---------------------------------------------------------------- the scan

def scan_atom(symbol: str, alphas: list[float]) -> dict:
    """Diffuse error of one added s (or p) shell of exponent alpha, per alpha."""
    spins = SCAN_ATOMS[symbol]
    atom = f"{symbol} 0 0 0"
    base = load_shells("cc-pvtz", symbol)
    ref_layers = reference_diffuse_layers(symbol)
    ea_ref, note = electron_affinity(atom, {symbol: with_extra(base, ref_layers)}, spins)
    result = {"ref": ea_ref, "errors": {0: {}, 1: {}}}
    if ea_ref is None:
        result["note"] = note
        return result
    for l in (0, 1):
        other = 1 - l
        for a in alphas:
            extra = {other: ref_layers[other], l: [a]}
            ea, _ = electron_affinity(atom, {symbol: with_extra(base, extra)}, spins)
            result["errors"][l][a] = None if ea is None else ea - ea_ref
    return result


def crossing(errors: dict[float, float | None], tol: float) -> float | None:
    """Largest exponent whose |error| stays within tol (the upper crossing).

    A single shell that is too diffuse also errs (it cannot bridge the
    valence region), so the curve has a minimum; the criterion is about
    the tight side.  Walk from the best exponent towards tighter ones and
    interpolate log-linearly where |error| first exceeds tol.  None when
    even the best exponent misses tol; the largest scanned exponent when
    none exceeds it.
    """
    pts = sorted((a, abs(e)) for a, e in errors.items() if e is not None)
    if not pts:
        return None
    best = min(range(len(pts)), key=lambda i: pts[i][1])
    if pts[best][1] > tol:
        return None
    for (a0, e0), (a1, e1) in zip(pts[best:], pts[best + 1:]):
        if e1 > tol:
            t = (tol - e0) / (e1 - e0)
            return math.exp(math.log(a0) + t * (math.log(a1) - math.log(a0)))
    return pts[-1][0]


def efolds(symbol: str, alpha_max: float) -> float:
    """The free factor n that would put threshold(symbol) exactly at alpha_max."""
    from deckward.rules.diffuse import DENSITY_EFOLDS, threshold

    return DENSITY_EFOLDS * threshold(symbol) / alpha_max


# ---------------------------------------------------------------- the grid

@dataclass
class GridRow:
    species: str
    basis: str
    ea: float | None
    ea_completed: float | None
    ea_reference: float | None
    diffuse_verdict: bool | None
    limiting: str
    note: str

    @property
    def diffuse_error(self) -> float | None:
        if self.ea is None or self.ea_completed is None:
            return None
        return self.ea - self.ea_completed

    @property
    def total_error(self) -> float | None:
        if self.ea is None or self.ea_reference is None:
            return None
        return self.ea - self.ea_reference


def criterion_for(atom: str, name: str):
    """Verdict of rules/diffuse.py for a species: every non-H atom must pass."""
    from deckward.rules.diffuse import verdict

    symbols = sorted({tok.split()[0] for tok in atom.split(";")} - {"H"})
    worst = None
    for sym in symbols:
        v = verdict(sym, smallest_exponents(load_shells(name, sym), lmax=1))
        if not v.is_diffuse:
            return False, v
        worst = v
    return True, worst


def grid(species: list[str], bases: list[str], log) -> list[GridRow]:
    refs = {}
    rows = []
    for sp in species:
        atom, s0, s1 = SPECIES[sp]
        ref_basis = basis_for(atom, "aug-cc-pvtz",
                              lambda sh, sym: with_extra(sh, {l: v[1:] for l, v in reference_diffuse_layers(sym).items()}))
        refs[sp], note = electron_affinity(atom, ref_basis, (s0, s1))
        log(f"  reference {sp}: {refs[sp]}  {note}")
        for name in bases:
            b = basis_for(atom, name)
            if b is None:
                continue
            t0 = time.time()
            ea, note1 = electron_affinity(atom, b, (s0, s1))
            bc = basis_for(atom, name, lambda sh, sym: with_extra(sh, completion_layers(sh, sym)))
            ea_c, note2 = electron_affinity(atom, bc, (s0, s1))
            ok, v = criterion_for(atom, name)
            limiting = "" if v is None or v.limiting_l is None else ANGULAR_LETTERS[v.limiting_l]
            row = GridRow(sp, name, ea, ea_c, refs[sp], ok, limiting, (note1 + " " + note2).strip())
            rows.append(row)
            log(f"  {sp:4s} {name:12s} EA={_fmt(ea)} completed={_fmt(ea_c)} "
                f"diffuse err={_fmt(row.diffuse_error)} pass={ok} ({time.time() - t0:.1f}s) {row.note}")
    return rows


def _fmt(x, nd=3):
    return "  n/a " if x is None else f"{x:+.{nd}f}"


def confusion(rows: list[GridRow], tol: float, which: str = "diffuse"):
    """Counts of (criterion says diffuse enough) vs (EA converged within tol)."""
    tp = fp = fn = tn = 0
    wrong = []
    for r in rows:
        err = r.diffuse_error if which == "diffuse" else r.total_error
        if err is None or r.diffuse_verdict is None:
            continue
        converged = abs(err) < tol
        if r.diffuse_verdict and converged:
            tp += 1
        elif r.diffuse_verdict and not converged:
            fp += 1
            wrong.append((r, "passes but not converged"))
        elif not r.diffuse_verdict and converged:
            fn += 1
            wrong.append((r, "fails but converged"))
        else:
            tn += 1
    n = tp + fp + fn + tn
    return dict(tp=tp, fp=fp, fn=fn, tn=tn, n=n, accuracy=(tp + tn) / n if n else float("nan")), wrong


# ------------------------------------------------------------------ output

def scan_markdown(scan: dict, tols) -> str:
    from deckward.rules.diffuse import threshold

    lines = ["| atom | l | EA ref (eV) | " + " | ".join(f"alpha_max @ {t} eV" for t in tols)
             + " | n implied @ " + str(tols[0]) + " eV | criterion threshold |",
             "|---|---|---|" + "---|" * len(tols) + "---|---|"]
    for sym, res in scan.items():
        for l in (0, 1):
            cells = []
            for t in tols:
                c = crossing(res["errors"][l], t) if res["ref"] is not None else None
                cells.append("n/a" if c is None else f"{c:.3f}")
            c0 = crossing(res["errors"][l], tols[0]) if res["ref"] is not None else None
            top = max(res["errors"][l]) if res["errors"][l] else None
            # n is meaningful only where the error actually crosses tol inside the scan
            cells.append("-" if c0 is None or c0 == top else f"{efolds(sym, c0):.2f}")
            lines.append(f"| {sym} | {ANGULAR_LETTERS[l]} | {_fmt(res['ref'])} | " + " | ".join(cells)
                         + f" | {threshold(sym):.3f} |")
    return "\n".join(lines)


def grid_markdown(rows: list[GridRow]) -> str:
    lines = ["| species | basis | EA (eV) | diffuse error (eV) | error vs reference (eV) | criterion | limiting |",
             "|---|---|---|---|---|---|---|"]
    for r in rows:
        verdict = "pass" if r.diffuse_verdict else "fail"
        lines.append(f"| {r.species} | {r.basis} | {_fmt(r.ea)} | {_fmt(r.diffuse_error)} | "
                     f"{_fmt(r.total_error)} | {verdict} | {r.limiting} |")
    return "\n".join(lines)


def confusion_markdown(rows: list[GridRow], tols) -> str:
    lines = ["| target | tolerance (eV) | pass & converged | pass & not converged | fail & converged | fail & not converged | accuracy |",
             "|---|---|---|---|---|---|---|"]
    for which in ("diffuse", "total"):
        for t in tols:
            c, _ = confusion(rows, t, which)
            lines.append(f"| {which} error | {t} | {c['tp']} | {c['fp']} | {c['fn']} | {c['tn']} | "
                         f"{c['accuracy']:.3f} ({c['tp'] + c['tn']}/{c['n']}) |")
    return "\n".join(lines)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="small subset (< 2 minutes on 2 cores)")
    ap.add_argument("--skip-scan", action="store_true", help="only the basis-set grid")
    ap.add_argument("--skip-grid", action="store_true", help="only the exponent scan")
    ap.add_argument("--markdown", default=None, help="write the Markdown tables to this file")
    ap.add_argument("--species", nargs="+", choices=sorted(SPECIES), help="grid species (default: all)")
    args = ap.parse_args(argv)

    os.environ.setdefault("OMP_NUM_THREADS", "2")
    log = lambda s: print(s, flush=True)  # noqa: E731
    t_start = time.time()
    md = []

    if not args.skip_scan:
        atoms = QUICK_SCAN_ATOMS if args.quick else list(SCAN_ATOMS)
        alphas = QUICK_SCAN_ALPHAS if args.quick else SCAN_ALPHAS
        log("== exponent scan (cc-pVTZ + one diffuse shell) ==")
        scan = {}
        for sym in atoms:
            scan[sym] = scan_atom(sym, alphas)
            res = scan[sym]
            log(f"{sym}: EA(ref) = {_fmt(res['ref'])} eV {res.get('note', '')}")
            for l in (0, 1):
                errs = " ".join(f"{a:g}:{_fmt(e)}" for a, e in sorted(res['errors'][l].items()))
                log(f"   {ANGULAR_LETTERS[l]}: {errs}")
        table = scan_markdown(scan, TOLERANCES_EV)
        log(table)
        md += ["### Exponent scan", "", table, ""]

    if not args.skip_grid:
        species = args.species or (QUICK_SPECIES if args.quick else list(SPECIES))
        bases = QUICK_BASES if args.quick else GRID_BASES
        log("== basis-set grid ==")
        rows = grid(species, bases, log)
        table = grid_markdown(rows)
        conf = confusion_markdown(rows, TOLERANCES_EV)
        log(table)
        log(conf)
        wrong_md = []
        for t in TOLERANCES_EV:
            _, wrong = confusion(rows, t, "diffuse")
            log(f"misclassified at {t} eV (diffuse error):")
            wrong_md.append(f"Misclassified at {t} eV (diffuse error):")
            wrong_md.append("")
            for r, why in wrong:
                line = f"{r.species} {r.basis}: diffuse error {_fmt(r.diffuse_error)} eV, {why}"
                log("   " + line)
                wrong_md.append("- " + line)
            wrong_md.append("")
        failed = [r for r in rows if r.diffuse_error is None]
        for r in failed:
            log(f"   SCF failure: {r.species} {r.basis}: {r.note}")
        md += ["### Basis-set grid", "", table, "", "### Confusion counts", "", conf, ""] + wrong_md

    log(f"total wall time {time.time() - t_start:.0f} s")
    if args.markdown:
        with open(args.markdown, "w", encoding="utf-8") as fh:
            fh.write("\n".join(md) + "\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

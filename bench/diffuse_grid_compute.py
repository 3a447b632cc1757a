"""The computed truth behind the diffuse criterion: delta-SCF electron
affinities in a library basis and in that basis doubly augmented.

    python bench/diffuse_grid_compute.py [--quick] [--jobs N] [--grid PATH]

Each case is (method, species, basis).  Four energies: neutral and anion in
the basis, and neutral and anion in the basis completed by two diffuse
layers per angular momentum (s, p, d on heavy atoms; s, p on hydrogen).  The
layers are those of a doubly augmented cc-pVTZ: the aug-cc-pVTZ exponent and
the next member of its geometric series (alpha_1^2 / alpha_2), the way
d-aug sets are built (Woon and Dunning 1994, from memory); a layer is added
only where it is more diffuse than 0.7 times the basis's own smallest
exponent of that angular momentum (a closer one adds near-linear dependence,
not reach).  The diffuse error of the case is EA(basis) - EA(completed).

Results are cached per case in a JSON file (bench/diffuse_grid.json, committed)
and written after every case, so an interrupted run resumes where it
stopped; ``bench/diffuse_calibration.py`` reads the file and judges the
criterion against it.  Basis data come from deckward's own library loader
(PySCF's copy, else the Basis Set Exchange's), the one the runner uses.

Hartree-Fock cases use density fitting (PySCF's even-tempered auxiliary
set), which shifts both states alike; MP2 cases (atoms and diatomics) use
exact integrals and frozen cores.  Geometries are vertical (both states at
one geometry) and from memory, close to the neutral radicals' structures:
the target is basis convergence, not agreement with experiment.
"""
from __future__ import annotations

import argparse
import json
import math
import os
import sys
import tempfile
import time

HARTREE_EV = 27.211386245988  # CODATA 2018 (check-values.md section 1)
GRID_FILE = os.path.join(os.path.dirname(os.path.abspath(__file__)), "diffuse_grid.json")
FORMAT = 2


def _bent(center: str, end: str, r: float, angle_deg: float, z0: float = 0.0) -> str:
    half = math.radians(angle_deg / 2.0)
    y, z = r * math.sin(half), r * math.cos(half)
    return f"{end} 0 {y:.6f} {z0 + z:.6f}; {end} 0 {-y:.6f} {z0 + z:.6f}"


def _methoxy() -> str:
    r_ch, angle = 1.10, math.radians(110.0)
    rows = ["C 0 0 0", "O 0 0 1.37"]
    for k in range(3):
        phi = 2 * math.pi * k / 3
        x = r_ch * math.sin(angle) * math.cos(phi)
        y = r_ch * math.sin(angle) * math.sin(phi)
        rows.append(f"H {x:.6f} {y:.6f} {r_ch * math.cos(angle):.6f}")
    return "; ".join(rows)


# name -> (atoms in angstrom, neutral 2S, anion 2S).  Geometries from memory.
SPECIES: dict[str, tuple[str, int, int]] = {
    "H": ("H 0 0 0", 1, 0),
    "C": ("C 0 0 0", 2, 3),
    "O": ("O 0 0 0", 2, 1),
    "F": ("F 0 0 0", 1, 0),
    "S": ("S 0 0 0", 2, 1),
    "Cl": ("Cl 0 0 0", 1, 0),
    "Br": ("Br 0 0 0", 1, 0),
    "OH": ("O 0 0 0; H 0 0 0.970", 1, 0),
    "SH": ("S 0 0 0; H 0 0 1.341", 1, 0),
    "CN": ("C 0 0 0; N 0 0 1.172", 1, 0),
    "O2": ("O 0 0 0; O 0 0 1.207", 2, 1),
    "NH2": ("N 0 0 0; " + _bent("N", "H", 1.024, 103.3), 1, 0),
    "C2H": ("C 0 0 0; C 0 0 1.217; H 0 0 -1.047", 1, 0),
    "NO2": ("N 0 0 0; " + _bent("N", "O", 1.194, 134.1), 1, 0),
    "HCO2": ("C 0 0 0; H 0 0 -1.11; " + _bent("C", "O", 1.25, 130.0), 1, 0),
    "CH3O": (_methoxy(), 1, 0),
}

HF_BASES = [
    "sto-3g", "6-31g", "6-31g*", "6-31+g*", "6-31++g**", "6-311g*", "6-311+g*", "6-311++g**",
    "cc-pvdz", "aug-cc-pvdz", "cc-pvtz", "aug-cc-pvtz", "jun-cc-pvtz", "may-cc-pvtz", "cc-pvqz",
    "def2-svp", "def2-svpd", "def2-tzvp", "def2-tzvpd", "def2-qzvp",
    "pcseg-1", "aug-pcseg-1", "pcseg-2", "aug-pcseg-2", "ma-def2-svp", "ma-def2-tzvp",
]
MP2_SPECIES = ["H", "C", "O", "F", "Cl", "OH", "SH", "CN"]
MP2_BASES = [
    "6-31+g*", "6-311++g**", "aug-cc-pvdz", "cc-pvtz", "aug-cc-pvtz", "jun-cc-pvtz", "may-cc-pvtz",
    "cc-pvqz", "def2-tzvp", "def2-tzvpd", "def2-qzvp", "pcseg-2", "aug-pcseg-1", "ma-def2-tzvp",
]
QUICK = [("hf", "O", "cc-pvdz"), ("hf", "O", "aug-cc-pvdz"), ("hf", "Cl", "def2-qzvp"),
         ("hf", "H", "6-31+g*"), ("hf", "CN", "def2-tzvp"), ("mp2", "F", "aug-cc-pvdz")]
# Large valence sets without augmentation that earlier versions of the
# criterion failed on strongly bound anions: computed right after the core.
PRIORITY = (
    [("hf", sp, b) for sp in ("Cl", "Br", "S", "SH") for b in ("def2-qzvp", "cc-pvqz", "pcseg-1")]
    + [("hf", sp, b) for sp in ("CN", "C2H") for b in ("def2-tzvp", "def2-qzvp", "pcseg-2")]
    + [("hf", sp, "pcseg-2") for sp in ("NO2", "O2", "HCO2")]
)
# A core of sets every species gets first (adequate and inadequate ones of
# each family), then PRIORITY, then the rest, each tier cheapest first.
CORE_BASES = ["6-31g*", "6-31+g*", "cc-pvdz", "aug-cc-pvdz", "def2-svp", "def2-svpd", "pcseg-1",
              "aug-pcseg-1", "ma-def2-svp", "6-311+g*", "cc-pvtz", "def2-tzvp", "jun-cc-pvtz"]


def _tier(case) -> int:
    if case[2] in CORE_BASES:
        return 0
    return 1 if case in PRIORITY else 2


REFERENCE_SET = "aug-cc-pvtz"
LAYER_GAP = 0.7  # a reference layer must be this much more diffuse (common practice, no source)


def case_key(method: str, species: str, basis: str) -> str:
    return f"{method}|{species}|{basis}"


def all_cases(quick: bool = False) -> list[tuple[str, str, str]]:
    if quick:
        return list(QUICK)
    out = [("hf", sp, b) for sp in SPECIES for b in HF_BASES]
    out += [("mp2", sp, b) for sp in MP2_SPECIES for b in MP2_BASES]
    return out


def symbols_of(atom: str) -> list[str]:
    return sorted({tok.split()[0] for tok in atom.split(";")})


def _shells(word: str, symbol: str):
    from deckward.rules.compute.runner.pyscf_build import BasisUnavailable, library_shells

    try:
        return library_shells(word, symbol)
    except BasisUnavailable:
        return None


def exponents_per_l(shells, lmax: int = 3) -> list[list[float]]:
    per_l: list[set] = [set() for _ in range(lmax + 1)]
    for sh in shells:
        rows = sh[2:] if isinstance(sh[1], int) else sh[1:]
        if sh[0] <= lmax:
            per_l[sh[0]].update(float(r[0]) for r in rows)
    return [sorted(v) for v in per_l]


def reference_layers(symbol: str) -> dict[int, list[float]]:
    """Two diffuse exponents per l of a doubly augmented cc-pVTZ (s, p, d; H: s, p)."""
    exps = exponents_per_l(_shells(REFERENCE_SET, symbol))
    top = 1 if symbol in ("H", "He") else 2
    return {l: [exps[l][0], exps[l][0] ** 2 / exps[l][1]] for l in range(top + 1)}


def completion(shells, symbol: str) -> dict[int, list[float]]:
    own = exponents_per_l(shells)
    out = {}
    for l, layer in reference_layers(symbol).items():
        smallest = own[l][0] if l < len(own) and own[l] else math.inf
        out[l] = [a for a in layer if a < LAYER_GAP * smallest]
    return out


def _scf(atom, basis, charge, spin, method):
    from pyscf import gto, mp, scf

    mol = gto.Mole()
    mol.atom, mol.basis, mol.charge, mol.spin = atom, basis, charge, spin
    mol.verbose, mol.max_memory = 0, 1500
    mol.build()
    notes = []
    for label, shift in (("plain", 0.0), ("shift", 0.3), ("newton", None)):
        mf = scf.UHF(mol) if spin else scf.RHF(mol)
        if method == "hf":
            mf = mf.density_fit()
        mf.max_cycle, mf.conv_tol = 150, 1e-9
        if shift is None:
            mf = mf.newton()
        else:
            mf.level_shift = shift
        try:
            mf.kernel()
        except Exception as exc:  # numerical trouble: try the next strategy
            notes.append(f"{label}:{type(exc).__name__}")
            continue
        if not mf.converged:
            notes.append(f"{label}:unconverged")
            continue
        if spin:
            for _ in range(2):  # follow internal instabilities to the lower UHF solution
                try:
                    mo, _, stable, _ = mf.stability(return_status=True)
                except Exception as exc:
                    notes.append(f"stability:{type(exc).__name__}")
                    break
                if stable:
                    break
                mf.kernel(dm0=mf.make_rdm1(mo, mf.mo_occ))
                notes.append("reopt")
        if not mf.converged:
            continue
        energy = mf.e_tot
        if method == "mp2":
            from pyscf.data import elements

            post = mp.MP2(mf, frozen=int(elements.chemcore(mol)) or None)
            post.kernel()
            energy = post.e_tot
        return energy, ",".join(notes + [label])
    return None, ",".join(notes)


def _ea(atom, basis, spins, method):
    e0, n0 = _scf(atom, basis, 0, spins[0], method)
    e1, n1 = _scf(atom, basis, -1, spins[1], method)
    if e0 is None or e1 is None:
        return None, f"neutral[{n0}] anion[{n1}]"
    return (e0 - e1) * HARTREE_EV, f"{n0}/{n1}"


def compute_case(case: tuple[str, str, str]) -> tuple[str, dict]:
    method, species, word = case
    atom, s0, s1 = SPECIES[species]
    t0 = time.time()
    basis, completed, smallest = {}, {}, {}
    for sym in symbols_of(atom):
        shells = _shells(word, sym)
        if shells is None:
            return case_key(*case), {"status": "no-basis", "note": f"{word} lacks {sym}"}
        extra = completion(shells, sym)
        basis[sym] = shells
        completed[sym] = list(shells) + [[l, [a, 1.0]] for l, al in extra.items() for a in al]
        smallest[sym] = [v[:3] for v in exponents_per_l(shells)]
    ea, note = _ea(atom, basis, (s0, s1), method)
    ea_c, note_c = _ea(atom, completed, (s0, s1), method)
    record = {
        "status": "ok" if ea is not None and ea_c is not None else "scf-failed",
        "ea_ev": ea, "ea_completed_ev": ea_c,
        "smallest_exponents": smallest,
        "note": f"{note} | {note_c}",
        "seconds": round(time.time() - t0, 1),
    }
    return case_key(*case), record


def _cost(case) -> float:
    method, species, word = case
    atom = SPECIES[species][0]
    n = 0
    for tok in atom.split(";"):
        shells = _shells(word, tok.split()[0])
        if shells is None:
            return 0.0
        n += sum((2 * sh[0] + 1) * (len(sh[2 if isinstance(sh[1], int) else 1]) - 1) for sh in shells)
    return (n + 8 * len(atom.split(";"))) ** 3 * (3.0 if method == "mp2" else 1.0)


def load_grid(path: str = GRID_FILE) -> dict:
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
    except (OSError, ValueError):
        return {"format": FORMAT, "cases": {}}
    return data if data.get("format") == FORMAT else {"format": FORMAT, "cases": {}}


def save_grid(data: dict, path: str = GRID_FILE) -> None:
    fd, tmp = tempfile.mkstemp(dir=os.path.dirname(path), prefix=".grid-", suffix=".json")
    with os.fdopen(fd, "w", encoding="utf-8") as fh:
        json.dump(data, fh, indent=1, sort_keys=True)
        fh.write("\n")
    os.replace(tmp, path)


def compute(cases, path: str = GRID_FILE, jobs: int = 1, log=print) -> dict:
    """Compute the cases not yet in the file at ``path``, saving after each."""
    data = load_grid(path)
    todo = [c for c in cases if case_key(*c) not in data["cases"]]
    todo.sort(key=lambda c: (_tier(c), _cost(c)))
    log(f"{len(cases) - len(todo)} cases cached, {len(todo)} to compute")
    if jobs > 1:
        import multiprocessing

        with multiprocessing.get_context("fork").Pool(jobs, maxtasksperchild=20) as pool:
            for key, record in pool.imap_unordered(compute_case, todo):
                data["cases"][key] = record
                save_grid(data, path)
                log(f"{key}: {record.get('ea_ev')} {record.get('ea_completed_ev')} {record.get('seconds')}s")
    else:
        for case in todo:
            key, record = compute_case(case)
            data["cases"][key] = record
            save_grid(data, path)
            log(f"{key}: {record.get('ea_ev')} {record.get('ea_completed_ev')} {record.get('seconds')}s")
    return data


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="six cases only")
    ap.add_argument("--jobs", type=int, default=1)
    ap.add_argument("--grid", default=GRID_FILE)
    args = ap.parse_args(argv)
    os.environ.setdefault("OMP_NUM_THREADS", "1")
    compute(all_cases(args.quick), args.grid, args.jobs, log=lambda s: print(s, flush=True))
    return 0


if __name__ == "__main__":
    sys.exit(main())

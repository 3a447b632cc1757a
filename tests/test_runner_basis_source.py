"""Basis data reach PySCF only from a library (PySCF's, else the Basis Set
Exchange's) or from the deck's own basis_set, never from a file that
happens to carry a basis set's name; the run cache keys on the exact shells.

PySCF's own loader (``pyscf.gto.basis.load``) reads any file whose path
equals the name it is given, so a file called ``sto3g`` in the working
folder would replace STO-3G.
"""
from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

pytest.importorskip("pyscf")

from deckward.rules.compute.runner import pyscf_build  # noqa: E402

H2 = """study "h2-check" { goal = energy }
geometry h2 {
  H 0 0 0
  H 0 0 0.7414
}
level hf_min { method = hf basis = sto-3g }
state ground { geometry = h2 level = hf_min charge = 0 multiplicity = 1 }
derive e = energy(ground)
"""

# A valid NWChem-format basis file named like the library set: one s
# function of exponent 0.5 on H (invented for the test).
POISON = "BASIS \"ao basis\" PRINT\nH    S\n      0.5000000              1.0000000\nEND\n"


def _pyscf_h2_sto3g() -> float:
    """HF/STO-3G energy of H2 at 0.7414 angstrom from PySCF itself, run in a
    folder that holds no basis files (the check value)."""
    from pyscf import gto, scf

    mol = gto.M(atom="H 0 0 0; H 0 0 0.7414", basis="sto-3g", verbose=0)
    return float(scf.RHF(mol).kernel())


def _run_cli(folder, cache) -> dict:
    env = dict(os.environ, DECKWARD_CACHE_DIR=str(cache), OMP_NUM_THREADS="1")
    out = folder / "out.json"
    proc = subprocess.run(
        [sys.executable, "-m", "deckward", "run", "h2.deck", "--quiet", "--json", str(out)],
        cwd=folder, env=env, capture_output=True, text=True, timeout=300,
    )
    assert proc.returncode == 0, proc.stderr
    return json.loads(out.read_text())


def _energy(report: dict) -> float:
    [state] = [s for s in report["states"] if s["name"] == "ground"]
    return state["energy"]


def test_a_file_named_like_the_basis_does_not_change_a_run(tmp_path):
    expected = _pyscf_h2_sto3g()
    # Szabo and Ostlund, Modern Quantum Chemistry, HF/STO-3G H2 at R = 1.4 bohr:
    # -1.117 Eh (from memory); 0.7414 angstrom is 1.401 bohr.
    assert expected == pytest.approx(-1.117, abs=1e-3)
    (tmp_path / "h2.deck").write_text(H2)
    (tmp_path / "sto3g").write_text(POISON)
    (tmp_path / "sto-3g").write_text(POISON)
    cache = tmp_path / "cache"
    assert _energy(_run_cli(tmp_path, cache)) == pytest.approx(expected, abs=1e-8)

    # The same cache read from a clean folder gives the same number, and a
    # poisoned folder asked again (from the cache) still does.
    clean = tmp_path / "clean"
    clean.mkdir()
    (clean / "h2.deck").write_text(H2)
    assert _energy(_run_cli(clean, cache)) == pytest.approx(expected, abs=1e-8)
    assert _energy(_run_cli(tmp_path, cache)) == pytest.approx(expected, abs=1e-8)


def test_library_shells_ignore_files_in_the_working_folder(tmp_path, monkeypatch):
    from pyscf import gto

    clean = pyscf_build.library_shells("sto-3g", "H")
    monkeypatch.chdir(tmp_path)
    (tmp_path / "sto3g").write_text(POISON)
    (tmp_path / "sto-3g").write_text(POISON)
    # PySCF's loader itself does read the file (the reason for our own loader):
    assert gto.basis.load("sto-3g", "H") != clean
    assert pyscf_build.library_shells("sto-3g", "H") == clean
    assert pyscf_build.library_shells("STO-3G", "H") == clean


def test_sets_pyscf_lacks_come_from_the_basis_set_exchange():
    bse = pytest.importorskip("basis_set_exchange")
    # jun-cc-pVTZ is published by the Basis Set Exchange as jun-cc-pV(T+d)Z
    # (Papajak and Truhlar); PySCF 2.x does not ship it.
    shells = pyscf_build.library_shells("jun-cc-pVTZ", "O")
    data = bse.get_basis("jun-cc-pV(T+d)Z", elements=["O"])
    exps = sorted({float(e) for sh in data["elements"]["8"]["electron_shells"] for e in sh["exponents"]})
    got = sorted({float(p[0]) for sh in shells for p in sh[1:]})
    assert got == exps


def test_a_missing_basis_set_exchange_is_one_clear_line(monkeypatch):
    monkeypatch.setitem(sys.modules, "basis_set_exchange", None)
    with pytest.raises(pyscf_build.BasisUnavailable) as err:
        pyscf_build.library_shells("jun-cc-pvtz", "O")
    assert str(err.value) == (
        "basis `jun-cc-pvtz` comes from the Basis Set Exchange, but the basis_set_exchange package "
        "is not installed (pip install basis_set_exchange)"
    )
    # PySCF's own sets need no such package
    assert pyscf_build.library_shells("cc-pvdz", "O")


def test_the_run_cache_key_covers_the_basis_content(monkeypatch):
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.plan import AtomPlan, ElementBasisPlan, StatePlan

    plan = StatePlan(
        name="ground", atoms=(AtomPlan("H", (0, 0, 0)), AtomPlan("H", (0, 0, 0.7414))), unit="angstrom",
        charge=0, spin=0, basis=(("H", ElementBasisPlan("sto3g")),), method="hf", kind="scf",
        family="hf", xc=None, reference="restricted",
    )
    cache = RunCache(enabled=False)
    before = cache.key(plan)
    real = pyscf_build.library_shells
    monkeypatch.setattr(pyscf_build, "library_shells", lambda w, s: [[0, [0.5, 1.0]]] + real(w, s)[1:])
    assert cache.key(plan) != before


def test_probes_and_runner_build_the_same_molecule_in_a_poisoned_folder(tmp_path, monkeypatch):
    # the probes build their molecules through the same build_mole
    from deckward.rules.compute.runner.plan import AtomPlan, ElementBasisPlan, StatePlan

    plan = StatePlan(
        name="ground", atoms=(AtomPlan("H", (0, 0, 0)), AtomPlan("H", (0, 0, 0.7414))), unit="angstrom",
        charge=0, spin=0, basis=(("H", ElementBasisPlan("sto3g")),), method="hf", kind="scf",
        family="hf", xc=None, reference="restricted",
    )
    clean = pyscf_build.build_mole(plan)
    monkeypatch.chdir(tmp_path)
    (tmp_path / "sto3g").write_text(POISON)
    poisoned = pyscf_build.build_mole(plan)
    assert poisoned._basis == clean._basis
    # STO-3G H: one contracted s of three primitives (Hehre, Stewart, Pople 1969)
    assert len(poisoned._basis["H"][0]) == 4

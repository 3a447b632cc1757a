"""Electron affinities and orbital facts through the runner, checked
against experiment (check-values section 2), the NIST CCCBDB worked numbers
(section 7) and facts of the trade."""
from __future__ import annotations

import os

import pytest

from runner_helpers import run_text

pytestmark = pytest.mark.pyscf  # computes with PySCF

SLOW = os.environ.get("DECKWARD_SLOW_TESTS") == "1"


def _ea_deck(geometry: str, method: str, basis: str, n_mult: int, a_mult: int) -> str:
    return (geometry + f"level lv {{ method = {method} basis = {basis} reference = unrestricted frozen_core = true }}\n"
            f"state neutral {{ geometry = g level = lv charge = 0 multiplicity = {n_mult} }}\n"
            f"state anion {{ geometry = g level = lv charge = -1 multiplicity = {a_mult} }}\n"
            "derive ea = energy(neutral) - energy(anion) in ev\n")


ATOM_F = "geometry g { F 0 0 0 }\n"
ATOM_CL = "geometry g { Cl 0 0 0 }\n"
ATOM_C = "geometry g { C 0 0 0 }\n"
ATOM_H = "geometry g { H 0 0 0 }\n"
OH = "geometry g {\n  O 0 0 0\n  H 0 0 0.9697\n}\n"  # r(OH) 0.9697 angstrom, experimental r_e [from memory]

# CCSD(T)/aug-cc-pVTZ with frozen core falls short of experiment because the
# triple-zeta set is incomplete: at MRSD-CI with the same family Kendall,
# Dunning, Harrison (J. Chem. Phys. 96, 6796 (1992); check-values section 7)
# are 0.06-0.08 eV below experiment for O and F.  Tolerance 0.15 eV, and the
# value must be below experiment.
CC_TOLERANCE_EV = 0.15


@pytest.mark.parametrize("geometry,n_mult,experiment", [
    # Worth its ~20 s (idle machine): the one end-to-end check of CCSD(T)
    # against a measured EA.  F: 3.4011898 eV, check-values section 2 [WPEA].
    (ATOM_F, 2, 3.4011898),
    pytest.param(ATOM_CL, 2, 3.612724, marks=pytest.mark.skipif(not SLOW, reason="set DECKWARD_SLOW_TESTS=1")),  # [LT]
    # OH: 1.8276487 eV, Goldfarb et al., J. Chem. Phys. 122, 014308 (2005); vertical at r_e, no ZPE (differs by ~0.01 eV).
    pytest.param(OH, 2, 1.8276487, marks=pytest.mark.skipif(not SLOW, reason="set DECKWARD_SLOW_TESTS=1")),
])
def test_ccsd_t_electron_affinity_against_experiment(tmp_path, geometry, n_mult, experiment):
    from deckward.rules.compute.runner.parallel import RunOptions

    report = run_text(tmp_path, _ea_deck(geometry, "ccsd(t)", "aug-cc-pvtz", n_mult, 1),
                      options=RunOptions(max_memory_mb=1500))
    ea = report.derived[0].value
    assert experiment - CC_TOLERANCE_EV < ea < experiment


@pytest.mark.parametrize("geometry,n_mult,a_mult,cccbdb", [
    # NIST CCCBDB (check-values section 7): EA(H) HF/aug-cc-pVTZ -0.331 eV,
    # EA(C) HF/aug-cc-pVTZ 0.453 eV (atoms: no ZPE).  Tolerance 0.01 eV: the
    # database rounds to 1 meV and may differ in SCF details.
    (ATOM_H, 2, 1, -0.331),
    (ATOM_C, 3, 4, 0.453),
])
def test_hf_delta_scf_ea_against_cccbdb_and_pyscf(tmp_path, geometry, n_mult, a_mult, cccbdb):
    from pyscf import gto, scf

    report = run_text(tmp_path, _ea_deck(geometry, "hf", "aug-cc-pvtz", n_mult, a_mult))
    assert report.derived[0].value == pytest.approx(cccbdb, abs=0.01)
    atom = geometry.split("{")[1].split("}")[0].strip()
    for name, charge, mult in (("neutral", 0, n_mult), ("anion", -1, a_mult)):
        mol = gto.M(atom=atom, basis="aug-cc-pvtz", charge=charge, spin=mult - 1, verbose=0)
        mf = scf.UHF(mol).run()
        assert report.state(name)["energy"] == pytest.approx(mf.e_tot, abs=1e-8)


def test_hf_delta_scf_ea_of_f_lacks_correlation(tmp_path):
    # Fact of the trade: Hartree-Fock lacks the correlation energy that binds
    # the extra electron, so its delta-SCF EA of F is far below 3.40 eV
    # (experiment, [WPEA]) yet positive.
    report = run_text(tmp_path, _ea_deck(ATOM_F, "hf", "aug-cc-pvdz", 2, 1))
    assert 0 < report.derived[0].value < 3.4011898 - 1.0


WATER = "geometry g {\n  O 0 0 0.1173\n  H 0 0.7572 -0.4692\n  H 0 -0.7572 -0.4692\n}\n"


def test_koopmans_ie_exceeds_delta_scf_for_closed_shell(tmp_path):
    # Fact of the trade (Szabo & Ostlund section 3.3, check-values section 6):
    # frozen orbitals overestimate the IE; the relaxed cation lies lower.
    deck = (WATER + "level lv { method = hf basis = cc-pvdz }\n"
            "state n { geometry = g level = lv }\nstate c { geometry = g level = lv charge = 1 multiplicity = 2 }\n"
            "derive ie_orb = -orbital(n, homo) in ev\nderive ie_delta = energy(c) - energy(n) in ev\n")
    d = {x.name: x.value for x in run_text(tmp_path, deck).derived}
    assert d["ie_orb"] > d["ie_delta"] > 0


def test_diffuse_functions_move_the_lumo_not_the_occupied_orbitals(tmp_path):
    # Fact of the trade (check-values section 6): virtual eigenvalues depend
    # on the basis and fall toward zero as diffuse functions are added;
    # occupied ones barely move.
    deck = (WATER + "level dz { method = hf basis = cc-pvdz }\nlevel adz { method = hf basis = aug-cc-pvdz }\n"
            "state a { geometry = g level = dz }\nstate b { geometry = g level = adz }\n"
            "derive homo_dz = orbital(a, homo)\nderive homo_adz = orbital(b, homo)\n"
            "derive lumo_dz = orbital(a, lumo)\nderive lumo_adz = orbital(b, lumo)\n")
    d = {x.name: x.value for x in run_text(tmp_path, deck).derived}
    assert 0 < d["lumo_adz"] < d["lumo_dz"]
    # "Far less": a factor of four at least (common practice, no source; water: 0.016 vs 0.15 Eh).
    assert abs(d["homo_adz"] - d["homo_dz"]) < 0.25 * abs(d["lumo_adz"] - d["lumo_dz"])

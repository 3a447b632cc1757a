"""The runner's SCF does PySCF's own work: the same energy and no more
iterations than PySCF's defaults called directly on the same molecule and
basis; where PySCF's DIIS does not converge, the second-order retry lands
on the solution Newton's method finds from PySCF's default guess."""
from __future__ import annotations

import re

import pytest

from runner_helpers import run_text

pytestmark = pytest.mark.pyscf  # computes with PySCF

# Geometries: CN as in examples/shared/acceptors.deck (1.1718 angstrom) and
# stretched to 1.20 angstrom, where PySCF 2.x's default UHF DIIS wanders
# (measured: not converged in 50 or in 200 cycles, 6-31G and cc-pVTZ).
CASES = {
    # name: (deck atoms, PySCF atoms, basis, charge, multiplicity)
    "o_atom": ("O 0 0 0", "O 0 0 0", "6-31g", 0, 3),
    "cn_radical": ("C 0 0 0\n  N 0 0 1.1718", "C 0 0 0; N 0 0 1.1718", "6-31g", 0, 2),
    "cn_stretched": ("C 0 0 0\n  N 0 0 1.20", "C 0 0 0; N 0 0 1.20", "6-31g", 0, 2),
}

# A few iterations of slack for counting from the log rather than from
# PySCF's own counter (common practice, no source).
CYCLE_MARGIN = 2


def _deck() -> str:
    parts = ["level hf_small { method = hf basis = 6-31g reference = unrestricted }"]
    for name, (atoms, _, _, charge, mult) in CASES.items():
        parts.append(f"geometry g_{name} {{\n  {atoms}\n}}")
        parts.append(f"state {name} {{ geometry = g_{name} level = hf_small charge = {charge} "
                     f"multiplicity = {mult} }}")
    return "\n".join(parts) + "\n"


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    return run_text(tmp_path_factory.mktemp("cycles"), _deck(), all_states=True)


def _direct(name: str, newton: bool = False):
    """PySCF's UHF with every default, called directly; returns (mf, iterations)."""
    from pyscf import gto, scf

    _, atom, basis, charge, mult = CASES[name]
    mol = gto.M(atom=atom, basis=basis, charge=charge, spin=mult - 1, verbose=0)
    mf = scf.UHF(mol)
    if newton:
        mf = mf.newton()
    count = [0]
    mf.callback = lambda env: count.__setitem__(0, count[0] + 1)
    mf.kernel()
    return mf, count[0]


def _runner_iterations(state: dict) -> int:
    """SCF iterations in the state's PySCF log: DIIS cycles plus the macro
    iterations of a second-order retry."""
    with open(state["log"], encoding="utf-8") as f:
        text = f.read()
    return len(re.findall(r"^cycle= ", text, re.M)) + len(re.findall(r"^macro= ", text, re.M))


@pytest.mark.parametrize("name", ["o_atom", "cn_radical"])
def test_energy_and_iterations_equal_pyscf_defaults(report, name):
    mf, iterations = _direct(name)
    assert mf.converged
    state = report.state(name)
    assert state["status"] == "ok"
    assert state["energy"] == pytest.approx(mf.e_tot, abs=1e-8)
    assert state["scf_energy"] == pytest.approx(mf.e_tot, abs=1e-8)
    assert state["notes"] == []
    assert _runner_iterations(state) <= iterations + CYCLE_MARGIN


def test_retry_after_pyscf_diis_fails_lands_on_newtons_solution(report):
    state = report.state("cn_stretched")
    assert state["status"] == "ok"
    mf, iterations = _direct("cn_stretched")
    if mf.converged:  # a PySCF whose DIIS converges here: the runner must equal it
        assert state["energy"] == pytest.approx(mf.e_tot, abs=1e-8)
        assert _runner_iterations(state) <= iterations + CYCLE_MARGIN
        return
    newton, newton_iterations = _direct("cn_stretched", newton=True)
    assert newton.converged
    assert state["energy"] == pytest.approx(newton.e_tot, abs=1e-8)
    assert state["notes"] == ["SCF converged only with a second-order (Newton) retry"]
    # The runner's iterations are PySCF's failed DIIS plus the retry, no more.
    assert _runner_iterations(state) <= iterations + newton_iterations + CYCLE_MARGIN

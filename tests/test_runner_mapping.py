"""Mapping decks to PySCF objects: every method family and reference,
custom basis sets, ghost atoms, frozen core, located errors."""
from __future__ import annotations

import pytest

from runner_helpers import workspace

from deckward.rules.compute.runner.mapping import MappingError, needed_states, plan_state
from deckward.rules.compute.runner.pyscf_build import build_correlated, build_mole, build_scf

pytestmark = pytest.mark.pyscf  # computes with PySCF

GEOM = "geometry oh {\n  O 0 0 0\n  H 0 0 0.97\n}\n"


def _plan(tmp_path, method, reference, charge=0, mult=2, extra_level="", basis="sto-3g"):
    text = (GEOM + f"level lv {{ method = {method} basis = {basis} reference = {reference} {extra_level} }}\n"
            f"state s {{ geometry = oh level = lv charge = {charge} multiplicity = {mult} }}\n")
    return plan_state(workspace(tmp_path, text), "s")


# (method word, reference) -> (mean-field class, post-HF class or None)
CASES = [
    ("hf", "unrestricted", "UHF", None),
    ("hf", "restricted_open", "ROHF", None),
    ("b3lyp", "unrestricted", "UKS", None),
    ("pbe0", "restricted_open", "ROKS", None),
    ("mp2", "unrestricted", "UHF", "UMP2"),
    ("ri-mp2", "unrestricted", "UHF", "DFUMP2"),
    ("ccsd", "unrestricted", "UHF", "UCCSD"),
    ("ccsd(t)", "unrestricted", "UHF", "UCCSD"),
    ("cisd", "unrestricted", "UHF", "UCISD"),
    ("b2plyp", "unrestricted", "UKS", "UMP2"),
]


@pytest.mark.parametrize("method,reference,mf_cls,post_cls", CASES)
def test_method_families_open_shell(tmp_path, method, reference, mf_cls, post_cls):
    plan = _plan(tmp_path, method, reference)
    mol = build_mole(plan)
    mf = build_scf(mol, plan)
    assert type(mf).__name__ == mf_cls
    if plan.family == "dft":
        from deckward.rules.knowledge import methods

        assert mf.xc == methods.lookup(method).pyscf_xc
    post = build_correlated(mf, plan)
    assert (type(post).__name__ if post is not None else None) == post_cls


@pytest.mark.parametrize("method,mf_cls,post_cls", [
    ("hf", "RHF", None), ("pbe", "RKS", None), ("mp2", "RHF", "RMP2"), ("ccsd", "RHF", "CCSD"),
    ("ri-mp2", "RHF", "DFRMP2"), ("cisd", "RHF", "RCISD"),
])
def test_method_families_closed_shell(tmp_path, method, mf_cls, post_cls):
    plan = _plan(tmp_path, method, "restricted", charge=-1, mult=1)
    mf = build_scf(build_mole(plan), plan)
    assert type(mf).__name__ == mf_cls
    post = build_correlated(mf, plan)
    assert (type(post).__name__ if post is not None else None) == post_cls


def test_frozen_core_uses_pyscf_chemical_core(tmp_path):
    from pyscf.data.elements import chemcore

    plan = _plan(tmp_path, "ccsd", "unrestricted", extra_level="frozen_core = true")
    mf = build_scf(build_mole(plan), plan)
    post = build_correlated(mf, plan)
    assert post.frozen == chemcore(mf.mol) == 1  # O 1s
    plan2 = _plan(tmp_path, "ccsd", "unrestricted")
    assert build_correlated(build_scf(build_mole(plan2), plan2), plan2).frozen is None


def test_custom_basis_set_from_map_and_added_shells(tmp_path):
    from pyscf import gto

    text = (GEOM + "basis_set mine {\n  from = { default: cc-pvdz, O: aug-cc-pvdz }\n  add O s 0.0273\n  add O p 0.0214\n}\n"
            "level lv { method = hf basis = mine }\n"
            "state s { geometry = oh level = lv charge = 0 multiplicity = 2 }\n")
    plan = plan_state(workspace(tmp_path, text), "s")
    mol = build_mole(plan)
    expected_o = gto.basis.load("aug-cc-pvdz", "O") + [[0, [0.0273, 1.0]], [1, [0.0214, 1.0]]]
    assert mol._basis["O"] == gto.format_basis({"O": expected_o})["O"]
    assert mol._basis["H"] == gto.format_basis({"H": "cc-pvdz"})["H"]
    # aug-cc-pVDZ on O is 23 functions, cc-pVDZ on H 5; the two shells add 1 + 3.
    assert mol.nao == 23 + 5 + 4


def test_ghost_atom_carries_basis_but_no_electrons(tmp_path):
    text = ("geometry g {\n  He 0 0 0\n  He 0 0 2.5 ghost\n}\n"
            "level lv { method = hf basis = cc-pvdz }\nstate s { geometry = g level = lv }\n")
    plan = plan_state(workspace(tmp_path, text), "s")
    mol = build_mole(plan)
    assert mol.nelectron == 2
    assert list(mol.atom_charges()) == [2, 0]
    assert mol.nao == 10  # cc-pVDZ He: 2s1p = 5 functions, twice


@pytest.mark.parametrize("level,state_extra,message,fires_at", [
    ("method = hf3 basis = sto-3g", "", "method `hf3` is not in the method table", "hf3"),
    ("method = hf basis = nosuchbasis", "", "basis `nosuchbasis` is neither a basis_set of the deck nor a library "
     "basis set", "nosuchbasis"),
    ("method = hf basis = sto-3g", "multiplicity = 1", "multiplicity 1 is impossible with 9 electrons", "1"),
    ("method = hf basis = sto-3g reference = restricted", "multiplicity = 2",
     "a restricted reference cannot describe multiplicity 2; use unrestricted or restricted_open", "restricted"),
])
def test_mapping_errors_are_located(tmp_path, level, state_extra, message, fires_at):
    text = GEOM + f"level lv {{ {level} }}\nstate s {{ geometry = oh level = lv {state_extra} }}\n"
    ws = workspace(tmp_path, text)
    with pytest.raises(MappingError) as e:
        plan_state(ws, "s")
    assert e.value.message.startswith(message)
    assert text[e.value.span.start:e.value.span.end] == fires_at


def test_functional_without_libxc_name_is_a_clear_error(tmp_path, monkeypatch):
    from deckward.rules.knowledge import methods

    real = methods.lookup

    def lookup(word):
        info = real(word)
        return info.__class__(**{**info.__dict__, "pyscf_xc": None}) if info and info.name == "pbe" else info

    monkeypatch.setattr(methods, "lookup", lookup)
    text = GEOM + "level lv { method = pbe basis = sto-3g }\nstate s { geometry = oh level = lv }\n"
    with pytest.raises(MappingError, match=r"method `pbe` has no PySCF/libxc functional name"):
        plan_state(workspace(tmp_path, text), "s")


def test_needed_states_follow_the_derives(tmp_path):
    text = (GEOM + "level lv { method = hf basis = sto-3g }\n"
            "state a { geometry = oh level = lv }\nstate b { geometry = oh level = lv charge = -1 }\n"
            "state unused { geometry = oh level = lv charge = 1 }\n"
            "derive ea = energy(a) - energy(b) in ev\n")
    ws = workspace(tmp_path, text)
    assert needed_states(ws) == ["a", "b"]
    assert needed_states(ws, all_states=True) == ["a", "b", "unused"]

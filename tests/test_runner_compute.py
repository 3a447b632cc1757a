"""Running decks: numbers equal PySCF's own, derived values in every unit,
orbitals, failed states, the cache, optimisation and frequencies, the CLI
and its JSON output."""
from __future__ import annotations

import json
import os

import pytest

from runner_helpers import run_text, write_deck

from deckward.rules.compute.runner.parallel import RunOptions

pytestmark = pytest.mark.pyscf  # computes with PySCF

OH = "geometry oh {\n  O 0 0 0\n  H 0 0 0.97\n}\n"
DECK = OH + """level hf_dz { method = hf basis = cc-pvdz reference = unrestricted }
state neutral { geometry = oh level = hf_dz charge = 0 multiplicity = 2 }
state anion { geometry = oh level = hf_dz charge = -1 multiplicity = 1 }
derive ea_h = energy(neutral) - energy(anion)
derive ea_ev = energy(neutral) - energy(anion) in ev
derive ea_kcal = energy(neutral) - energy(anion) in kcal/mol
derive ea_kj = energy(neutral) - energy(anion) in kj/mol
derive homo_b = orbital(neutral, homo, beta)
derive lumo_any = orbital(neutral, lumo)
derive homo1 = orbital(anion, homo-1)
"""


def _pyscf(atom, basis, charge, spin, cls):
    from pyscf import gto, scf

    mol = gto.M(atom=atom, basis=basis, charge=charge, spin=spin, verbose=0)
    return getattr(scf, cls)(mol).run()


@pytest.fixture(scope="module")
def oh_report(tmp_path_factory):
    return run_text(tmp_path_factory.mktemp("oh"), DECK)


def test_hf_energies_equal_pyscf_direct(oh_report):
    # The runner must add nothing to PySCF's numbers.
    n = _pyscf("O 0 0 0; H 0 0 0.97", "cc-pvdz", 0, 1, "UHF")
    a = _pyscf("O 0 0 0; H 0 0 0.97", "cc-pvdz", -1, 0, "RHF")
    assert oh_report.state("neutral")["energy"] == pytest.approx(n.e_tot, abs=1e-8)
    assert oh_report.state("anion")["energy"] == pytest.approx(a.e_tot, abs=1e-8)
    assert oh_report.state("neutral")["s2"] == pytest.approx(n.spin_square()[0], abs=1e-8)
    assert oh_report.state("neutral")["s2_expected"] == 0.75


def test_derived_values_in_each_unit_use_codata_2018(oh_report):
    d = {x.name: x for x in oh_report.derived}
    diff = oh_report.state("neutral")["energy"] - oh_report.state("anion")["energy"]
    assert d["ea_h"].value == diff and d["ea_h"].unit == "hartree"
    # CODATA 2018 [C18], check-values section 1:
    assert d["ea_ev"].value == pytest.approx(diff * 27.211386245988, rel=1e-12)  # E_h in eV
    assert d["ea_kj"].value == pytest.approx(diff * 2625.4996395, rel=1e-9)  # E_h N_A in kJ/mol
    assert d["ea_kcal"].value == pytest.approx(diff * 627.509474, rel=1e-6)  # E_h N_A / 4184 J
    assert d["ea_ev"].quantity == "electron_affinity"


def test_orbital_selection_matches_pyscf_orbitals(oh_report):
    import numpy as np

    # Orbital energies agree to the SCF's own precision (energy converged to
    # 1e-9 Eh: orbitals to about its square root; the pi pair is degenerate).
    n = _pyscf("O 0 0 0; H 0 0 0.97", "cc-pvdz", 0, 1, "UHF")
    a = _pyscf("O 0 0 0; H 0 0 0.97", "cc-pvdz", -1, 0, "RHF")
    d = {x.name: x.value for x in oh_report.derived}
    eb, ob = np.asarray(n.mo_energy[1]), np.asarray(n.mo_occ[1])
    assert d["homo_b"] == pytest.approx(eb[ob > 0].max(), abs=1e-5)
    lumos = np.concatenate([np.asarray(n.mo_energy[s])[np.asarray(n.mo_occ[s]) == 0] for s in (0, 1)])
    assert d["lumo_any"] == pytest.approx(lumos.min(), abs=1e-5)
    occ = np.sort(np.asarray(a.mo_energy)[np.asarray(a.mo_occ) > 0])
    assert d["homo1"] == pytest.approx(occ[-2], abs=1e-5)


def test_dft_mp2_and_ccsd_t_equal_pyscf_direct(tmp_path):
    from pyscf import cc, dft, gto, mp, scf
    from pyscf.data.elements import chemcore

    deck = ("geometry w {\n  O 0 0 0.1173\n  H 0 0.7572 -0.4692\n  H 0 -0.7572 -0.4692\n}\n"
            "level b3 { method = b3lyp basis = sto-3g }\n"
            "level m2 { method = mp2 basis = sto-3g frozen_core = true }\n"
            "level ct { method = ccsd(t) basis = sto-3g frozen_core = true }\n"
            "state d { geometry = w level = b3 }\nstate m { geometry = w level = m2 }\n"
            "state c { geometry = w level = ct }\n")
    report = run_text(tmp_path, deck, all_states=True)
    mol = gto.M(atom="O 0 0 0.1173; H 0 0.7572 -0.4692; H 0 -0.7572 -0.4692", basis="sto-3g", verbose=0)
    ks = dft.RKS(mol)
    ks.xc = "b3lyp"
    ks.run()
    hf = scf.RHF(mol).run()
    m2 = mp.MP2(hf, frozen=chemcore(mol)).run()
    c = cc.CCSD(hf, frozen=chemcore(mol)).run()
    assert report.state("d")["energy"] == pytest.approx(ks.e_tot, abs=1e-8)
    assert report.state("m")["energy"] == pytest.approx(m2.e_tot, abs=1e-8)
    assert report.state("c")["energy"] == pytest.approx(c.e_tot + c.ccsd_t(), abs=1e-8)
    assert report.state("m")["scf_energy"] == pytest.approx(hf.e_tot, abs=1e-8)


def test_failed_state_keeps_the_others_and_marks_derives(tmp_path):
    # A state that cannot be mapped (impossible multiplicity) and one stopped
    # at a time limit: the finished state stays, derives needing them are
    # not available, with the reason.
    deck = (OH + "level lv { method = hf basis = sto-3g }\nlevel big { method = ccsd(t) basis = aug-cc-pvtz }\n"
            "state good { geometry = oh level = lv charge = 0 multiplicity = 2 }\n"
            "state bad { geometry = oh level = lv charge = -1 multiplicity = 2 }\n"
            "state slow { geometry = oh level = big charge = -1 multiplicity = 1 }\n"
            "derive ea = energy(good) - energy(bad) in ev\n"
            "derive ea2 = energy(good) - energy(slow) in ev\n"
            "derive e = energy(good)\n")
    options = RunOptions(jobs=2, time_limit_s=3)
    report = run_text(tmp_path, deck, options=options)
    assert report.state("good")["status"] == "ok"
    assert report.state("bad")["status"] == "failed"
    assert report.state("bad")["reason"] == "multiplicity 2 is impossible with 10 electrons"
    assert report.state("slow")["status"] == "failed"
    assert report.state("slow")["reason"] == "stopped at the time limit of 3 s"
    d = {x.name: x for x in report.derived}
    assert not d["ea"].available and d["ea"].reason.startswith("state `bad` failed: multiplicity 2")
    assert not d["ea2"].available and "time limit" in d["ea2"].reason
    assert d["e"].available and not report.ok
    column = deck.splitlines()[7].index("multiplicity = 2") + len("multiplicity = ") + 1
    assert report.mapping_errors == [f"{os.path.join(str(tmp_path), 'deck.deck')}:8:{column}: multiplicity 2 is "
                                     "impossible with 10 electrons"]


def test_cache_recomputes_only_edited_states(tmp_path):
    deck = (OH + "level lv { method = hf basis = sto-3g }\n"
            "state a { geometry = oh level = lv charge = 0 multiplicity = 2 }\n"
            "state b { geometry = oh level = lv charge = -1 multiplicity = 1 }\n"
            "derive ea = energy(a) - energy(b) in ev\n")
    cache = tmp_path / "cache"
    first = run_text(tmp_path, deck, cache_dir=cache)
    assert [s["cached"] for s in first.states] == [False, False]
    second = run_text(tmp_path, deck, cache_dir=cache)
    assert [s["cached"] for s in second.states] == [True, True]
    assert second.derived[0].value == first.derived[0].value
    edited = deck.replace("charge = -1 multiplicity = 1", "charge = 1 multiplicity = 1")
    third = run_text(tmp_path, edited, cache_dir=cache)
    assert [s["cached"] for s in third.states] == [True, False]
    renamed = edited.replace("state a ", "state first ").replace("energy(a)", "energy(first)")
    assert [s["cached"] for s in run_text(tmp_path, renamed, cache_dir=cache).states] == [True, True]


def test_optimize_and_frequencies_match_pyscf(tmp_path):
    # H2 at HF/STO-3G: a two-atom optimisation is the cheapest real check.
    from pyscf import gto, scf
    from pyscf.hessian import thermo

    deck = ("geometry h2 {\n  H 0 0 0\n  H 0 0 0.80\n}\nlevel lv { method = hf basis = sto-3g }\n"
            "level cc { method = ccsd basis = sto-3g }\n"
            "state s { geometry = optimize(h2) level = lv frequencies = true }\n"
            "state c { geometry = h2 level = cc frequencies = true }\n")
    report = run_text(tmp_path, deck, all_states=True)
    s = report.state("s")
    (_, *a), (_, *b) = [g[:4] for g in s["optimized_geometry"]]
    r = sum((x - y) ** 2 for x, y in zip(a, b)) ** 0.5
    # HF/STO-3G H2 bond length 0.712 angstrom (1.346 bohr), Szabo & Ostlund
    # section 3.5.2 [from memory]; geomeTRIC converges to 1.8e-3 angstrom.
    assert r == pytest.approx(0.712, abs=3e-3)
    mol = gto.M(atom=[["H", (0, 0, 0)], ["H", (0, 0, r)]], basis="sto-3g", verbose=0)
    mf = scf.RHF(mol).run()
    freq = thermo.harmonic_analysis(mol, mf.Hessian().kernel())["freq_wavenumber"]
    assert s["frequencies_cm1"] == pytest.approx([float(freq[0].real)], abs=5.0)
    assert s["energy"] == pytest.approx(s["electronic_energy"] + s["zpe"], abs=1e-12)
    assert s["zpe"] == pytest.approx(0.5 * s["frequencies_cm1"][0] / 219474.6313632, rel=1e-3)  # CODATA 2018 E_h/hc
    c = report.state("c")
    assert c["zpe"] is None and c["energy"] == c["electronic_energy"]
    assert any("analytic Hessians for Hartree-Fock and density functionals only" in n for n in c["notes"])


def test_cli_run_prints_table_and_valid_json(tmp_path, capsys):
    import jsonschema

    from deckward.server.cli import main

    # sto-3g keeps the test fast; run refuses a deck with error findings, so
    # the anion rule is suppressed with its reason.
    deck = write_deck(tmp_path, "# allow-file: anion-lacks-diffuse -- a minimal basis keeps the test fast\n"
                      + OH + "level lv { method = hf basis = sto-3g }\n"
                      "state a { geometry = oh level = lv charge = 0 multiplicity = 2 }\n"
                      "state b { geometry = oh level = lv charge = -1 multiplicity = 1 }\n"
                      "derive ea = energy(a) - energy(b) in ev\n")
    out_json = tmp_path / "out.json"
    rc = main(["run", deck, "--json", str(out_json), "--cache-dir", str(tmp_path / "c"), "--quiet"])
    assert rc == 0
    text = capsys.readouterr().out
    assert "state  method/basis" in text and "converged" in text and "Caution: Computed values depend" in text
    (ea_row,) = [ln for ln in text.splitlines() if ln.startswith("ea ")]
    assert ea_row.split()[3] == "eV"  # the table prints the SI symbol; JSON keeps the deck's word
    data = json.loads(out_json.read_text())
    schema = json.loads(open(os.path.join(os.path.dirname(__file__), "..", "docs", "run-output.schema.json")).read())
    jsonschema.Draft202012Validator(schema).validate(data)
    assert data["pyscf_version"] == __import__("pyscf").__version__
    assert len(data["deck_hash"]) == 64 and data["derived"][0]["unit"] == "ev"
    bad = dict(data, states=[dict(data["states"][0], status="done")])
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.Draft202012Validator(schema).validate(bad)


def test_cli_run_refuses_a_deck_with_errors(tmp_path, capsys):
    from deckward.server.cli import main

    deck = write_deck(tmp_path, "state s { geometry = nowhere }\n")
    assert main(["run", deck, "--quiet", "--cache-dir", str(tmp_path)]) == 2
    assert "cannot be run" in capsys.readouterr().err


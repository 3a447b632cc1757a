"""Probes: findings and their numbers on decks where the answer is known,
each number equal to PySCF run directly in the test."""
from __future__ import annotations

import pytest

from runner_helpers import workspace, write_deck

from deckward.rules.engine.config import Config
from deckward.rules.compute.probes import PROBE_RULES, run_probes
from deckward.rules.compute.runner.cache import RunCache

pytestmark = pytest.mark.pyscf  # computes with PySCF

EV = 27.211386245988  # CODATA 2018 E_h in eV (check-values section 1)


def _probe(tmp_path, text, select=None, probe_cfg=None):
    ws = workspace(tmp_path, text)
    cfg = Config(probe=probe_cfg or {})
    found = run_probes(ws, cfg, RunCache(str(tmp_path / "cache")), select=select)
    return found, ws


def _uhf(atom, basis, charge, spin):
    from pyscf import gto, scf

    mol = gto.M(atom=atom, basis=basis, charge=charge, spin=spin, verbose=0)
    return (scf.UHF if spin else scf.RHF)(mol).run()


C_DECK = ("geometry c { C 0 0 0 }\nlevel lv { method = ccsd(t) basis = 6-31g* }\n"
          "state neutral { geometry = c level = lv charge = 0 multiplicity = 3 }\n"
          "state anion { geometry = c level = lv charge = -1 multiplicity = 4 }\n"
          "derive ea = energy(neutral) - energy(anion) in ev\n")


def test_rule_ids_match_the_catalogue():
    assert [r.id for r in PROBE_RULES] == ["probe-basis-sensitivity", "probe-unbound-anion",
                                            "probe-spin-contamination", "probe-koopmans-relaxation",
                                            "probe-overlap-conditioning"]


def test_basis_sensitivity_and_unbound_anion_on_carbon(tmp_path):
    # EA(C) at HF: negative with 6-31G*, positive with diffuse functions
    # (NIST CCCBDB, check-values section 7: -0.527 with 6-31G* (Cartesian d),
    # 0.453 with aug-cc-pVTZ); the numbers must equal PySCF's.
    found, ws = _probe(tmp_path, C_DECK, select={"probe-basis-sensitivity", "probe-unbound-anion"})
    by_rule = {f.rule: f for f in found}
    ev = lambda b: (_uhf("C", b, 0, 2).e_tot - _uhf("C", b, -1, 3).e_tot) * EV  # noqa: E731
    d0, d1 = ev("6-31g*"), ev("6-31+g*")
    assert d0 < 0 < d1
    sens = by_rule["probe-basis-sensitivity"]
    evidence = dict(sens.evidence)
    assert evidence["delta_scf_ev"] == pytest.approx(d0, abs=1e-5)
    assert evidence["delta_scf_augmented_ev"] == pytest.approx(d1, abs=1e-5)
    assert sens.message.startswith(f"delta-SCF EA at HF: {d0:+.2f} eV with 6-31g*, {d1:+.2f} eV with 6-31+g*: "
                                   "the basis decides the sign")
    assert ws.root.deck.text[sens.span.start:sens.span.end] == "ea"
    unbound = by_rule["probe-unbound-anion"]
    assert dict(unbound.evidence)["delta_scf_ev"] == pytest.approx(d0, abs=1e-5)
    assert "the delta-SCF EA is" in unbound.message and unbound.severity.value == "warning"


def test_bound_anion_in_augmented_basis_is_quiet(tmp_path):
    # F- is bound at HF with diffuse functions (EA(F) HF about 1.2 eV; fact of
    # the trade, from memory); the set is already augmented: no comparison.
    deck = ("geometry f { F 0 0 0 }\nlevel lv { method = hf basis = aug-cc-pvdz }\n"
            "state neutral { geometry = f level = lv charge = 0 multiplicity = 2 }\n"
            "state anion { geometry = f level = lv charge = -1 multiplicity = 1 }\n"
            "derive ea = energy(neutral) - energy(anion) in ev\n")
    found, _ = _probe(tmp_path, deck, select={"probe-basis-sensitivity", "probe-unbound-anion"})
    assert found == []


def test_spin_contamination_of_cn_but_not_oh(tmp_path):
    # UHF on the CN radical is the classic strongly contaminated case
    # (<S^2> well above 0.75; fact of the trade, from memory); OH is clean.
    deck = ("geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\ngeometry oh {\n  O 0 0 0\n  H 0 0 0.97\n}\n"
            "level lv { method = hf basis = cc-pvdz reference = unrestricted }\n"
            "state cn_rad { geometry = cn level = lv charge = 0 multiplicity = 2 }\n"
            "state oh_rad { geometry = oh level = lv charge = 0 multiplicity = 2 }\n")
    found, ws = _probe(tmp_path, deck, select={"probe-spin-contamination"})
    assert [ws.root.deck.text[f.span.start:f.span.end] for f in found] == ["cn_rad"]
    s2 = _uhf("C 0 0 0; N 0 0 1.1718", "cc-pvdz", 0, 1).spin_square()[0]
    assert dict(found[0].evidence)["s2"] == pytest.approx(s2, abs=1e-5)
    assert found[0].message.startswith(f"UHF/cc-pvdz <S^2> = {s2:.4f} for `cn_rad`, against S(S+1) = 0.7500")


def test_koopmans_relaxation_reports_both_numbers(tmp_path):
    deck = ("geometry w {\n  O 0 0 0.1173\n  H 0 0.7572 -0.4692\n  H 0 -0.7572 -0.4692\n}\n"
            "level lv { method = b3lyp basis = cc-pvdz }\nstate n { geometry = w level = lv }\n"
            "derive ie = -orbital(n, homo) in ev\n")
    found, _ = _probe(tmp_path, deck, select={"probe-koopmans-relaxation"})
    (f,) = found
    ev = dict(f.evidence)
    neutral = _uhf("O 0 0 0.1173; H 0 0.7572 -0.4692; H 0 -0.7572 -0.4692", "cc-pvdz", 0, 0)
    cation = _uhf("O 0 0 0.1173; H 0 0.7572 -0.4692; H 0 -0.7572 -0.4692", "cc-pvdz", 1, 1)
    assert ev["orbital_ie_ev"] == pytest.approx(-neutral.mo_energy[neutral.mo_occ > 0].max() * EV, abs=1e-4)
    assert ev["delta_scf_ie_ev"] == pytest.approx((cation.e_tot - neutral.e_tot) * EV, abs=1e-5)
    # Fact of the trade: Koopmans' IE exceeds the relaxed delta-SCF IE.
    assert ev["relaxation_ev"] > 0 and ev["cation_constructed"] is True
    assert f.severity.value == "info"


def test_overlap_conditioning_with_a_close_ghost_atom(tmp_path):
    import numpy as np
    from pyscf import gto

    deck = ("geometry he2 {\n  He 0 0 0\n  He 0 0 0.01 ghost\n}\ngeometry he {\n  He 0 0 0\n}\n"
            "level lv { method = hf basis = aug-cc-pvdz }\n"
            "state close { geometry = he2 level = lv }\nstate alone { geometry = he level = lv }\n")
    found, ws = _probe(tmp_path, deck, select={"probe-overlap-conditioning"})
    assert [ws.root.deck.text[f.span.start:f.span.end] for f in found] == ["close"]
    mol = gto.M(atom="He 0 0 0; ghost-He 0 0 0.01", basis={"He": "aug-cc-pvdz", "GHOST-He": "aug-cc-pvdz"}, verbose=0)
    smallest = float(np.linalg.eigvalsh(mol.intor("int1e_ovlp"))[0])
    assert smallest < 1e-6
    assert dict(found[0].evidence)["smallest_overlap_eigenvalue"] == pytest.approx(smallest, rel=1e-6)


def test_too_large_molecule_is_skipped_with_the_limit(tmp_path):
    # C in 6-31G* with spherical d: 3s2p1d = 3 + 6 + 5 = 14 functions.
    found, _ = _probe(tmp_path, C_DECK, select={"probe-unbound-anion"}, probe_cfg={"max_basis_functions": 10})
    (f,) = found
    assert f.severity.value == "info"
    assert f.message == ("probe skipped: 14 basis functions with 6-31g* exceed probe.max_basis_functions = 10 "
                         "(raise it in deckward.yaml to probe anyway)")


def test_probes_are_cached(tmp_path):
    _probe(tmp_path, C_DECK, select={"probe-unbound-anion"})
    cache = RunCache(str(tmp_path / "cache"))
    ws = workspace(tmp_path, C_DECK)
    from deckward.rules.compute.probes.common import ProbeContext

    ctx = ProbeContext(ws, Config(), cache)
    plans = [ctx.plan("neutral"), ctx.plan("anion")]
    assert all(cache.get(cache.key(p)) is not None for p in plans)


def test_check_probe_and_probe_command(tmp_path, monkeypatch, capsys):
    from deckward.server.checking import check_paths
    from deckward.server.cli import main

    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "c"))
    path = write_deck(tmp_path, C_DECK)
    result = check_paths([path], probe=True)
    assert {"probe-basis-sensitivity", "probe-unbound-anion"} <= {f.rule for f in result.findings}
    assert main(["probe", path]) == 1
    out = capsys.readouterr().out
    assert "warning: probe-basis-sensitivity: delta-SCF EA at HF:" in out


def test_basis_sensitivity_makes_up_the_missing_anion(tmp_path):
    # An EA read off the LUMO, with no anion in the deck: the probe computes
    # the anion itself (quartet C-, the lowest state) and shows the
    # delta-SCF numbers next to the orbital estimate, equal to PySCF's.
    deck = ("geometry c { C 0 0 0 }\nlevel lv { method = hf basis = 6-31g* }\n"
            "state neutral { geometry = c level = lv charge = 0 multiplicity = 3 }\n"
            "derive ea = -orbital(neutral, lumo) in ev\n")
    found, ws = _probe(tmp_path, deck, select={"probe-basis-sensitivity"})
    (f,) = found
    ev = lambda b: (_uhf("C", b, 0, 2).e_tot - _uhf("C", b, -1, 3).e_tot) * EV  # noqa: E731
    d0, d1 = ev("6-31g*"), ev("6-31+g*")
    evidence = dict(f.evidence)
    assert evidence["delta_scf_ev"] == pytest.approx(d0, abs=1e-5)
    assert evidence["delta_scf_augmented_ev"] == pytest.approx(d1, abs=1e-5)
    assert f.message.endswith("(the deck has no anion: the probe computed one at the same geometry, "
                              "multiplicity 4, the lower in energy of the two next to the neutral's)")
    assert ws.root.deck.text[f.span.start:f.span.end] == "ea"


LI_IE_DECK = ("geometry li { Li 0 0 0 }\nlevel lv { method = hf basis = cc-pvdz }\n"
              "state neutral { geometry = li level = lv charge = 0 multiplicity = 2 }\n"
              "state cation { geometry = li level = lv charge = 1 multiplicity = 1 }\n"
              "derive ie = energy(cation) - energy(neutral) in ev\n"
              "derive ie_koopmans = -orbital(neutral, homo) in ev\n")


def _li_numbers(basis):
    neutral, cation = _uhf("Li", basis, 0, 1), _uhf("Li", basis, 1, 0)
    delta = (cation.e_tot - neutral.e_tot) * EV
    orbital = -max(neutral.mo_energy[0][neutral.mo_occ[0] > 0].max(),
                   neutral.mo_energy[1][neutral.mo_occ[1] > 0].max()) * EV
    return delta, orbital


def test_orbital_derive_uses_the_decks_own_cation_and_reports_once(tmp_path):
    # Li: a deck with `state cation` and an orbital IE beside the delta-SCF
    # IE.  The probes use the deck's cation (nothing made up) and report the
    # two derives' shared numbers once, at the first derive, naming the other.
    found, ws = _probe(tmp_path, LI_IE_DECK, select={"probe-koopmans-relaxation", "probe-basis-sensitivity"},
                       probe_cfg={"threshold_ev": 0.0})
    assert sorted(f.rule for f in found) == ["probe-basis-sensitivity", "probe-koopmans-relaxation"]
    assert {ws.root.deck.text[f.span.start:f.span.end] for f in found} == {"ie"}
    by_rule = {f.rule: f for f in found}
    d0, o0 = _li_numbers("cc-pvdz")
    d1, o1 = _li_numbers("aug-cc-pvdz")
    sens = by_rule["probe-basis-sensitivity"]
    assert sens.message == (f"delta-SCF IE at HF (also `ie_koopmans`): {d0:+.2f} eV with cc-pvdz, {d1:+.2f} eV with "
                            f"aug-cc-pvdz: it moves by {abs(d1 - d0):.2f} eV (threshold 0 eV); orbital estimate "
                            f"-e(HOMO): {o0:+.2f} eV -> {o1:+.2f} eV")
    assert "the deck has no cation" not in sens.message
    koop = by_rule["probe-koopmans-relaxation"]
    assert koop.message == (f"IE at HF/cc-pvdz (also `ie_koopmans`): orbital energy -e(HOMO) {o0:.2f} eV, "
                            f"delta-SCF {d0:.2f} eV: relaxation (orbital minus delta-SCF) {o0 - d0:+.2f} eV")
    evidence = dict(koop.evidence)
    assert evidence["relaxation_ev"] == pytest.approx(o0 - d0, abs=1e-5)
    assert evidence["cation_constructed"] is False


def test_koopmans_relaxation_has_one_sign_in_message_and_report_table(tmp_path):
    # The relaxation printed in the message and in the review's evidence
    # table is the same signed number (orbital minus delta-SCF); for the F
    # atom at HF it is positive (Koopmans' IE too large without relaxation:
    # Szabo & Ostlund section 3.3, from memory) and about an eV or more.
    from deckward.server.review_batch import evidence_rows

    deck = ("geometry f { F 0 0 0 }\nlevel lv { method = hf basis = cc-pvdz }\n"
            "state neutral { geometry = f level = lv charge = 0 multiplicity = 2 }\n"
            "state cation { geometry = f level = lv charge = 1 multiplicity = 3 }\n"
            "derive ie = energy(cation) - energy(neutral) in ev\n")
    found, _ = _probe(tmp_path, deck, select={"probe-koopmans-relaxation"})
    (f,) = found
    neutral, cation = _uhf("F", "cc-pvdz", 0, 1), _uhf("F", "cc-pvdz", 1, 2)
    delta = (cation.e_tot - neutral.e_tot) * EV
    orbital = -max(neutral.mo_energy[s][neutral.mo_occ[s] > 0].max() for s in (0, 1)) * EV
    assert orbital - delta > 0.5
    in_message = f.message.rsplit("relaxation (orbital minus delta-SCF) ", 1)[1].removesuffix(" eV")
    in_table = dict(evidence_rows(f))["relaxation (eV)"]
    assert in_message == f"{orbital - delta:+.2f}"
    assert in_table == f"{orbital - delta:.3f}"

"""Computed against measured: the experimental value, its uncertainty and
source, and the deviation beside each derived EA or IE in `run` (table and
JSON), from the reference table or from the deck's own reference clause."""
from __future__ import annotations

import json
import os

import pytest

from runner_helpers import workspace, write_deck

from deckward.rules.compute import comparison
from deckward.server.cli import main

EV = 27.211386245988  # CODATA 2018 E_h in eV (check-values section 1)
F_EA = 3.4011898  # eV, +- 0.0000024 (check-values section 2, [WPEA])

F_DECK = ("geometry f { F 0 0 0 }\nlevel lv { method = hf basis = aug-cc-pvdz }\n"
          "state neutral { geometry = f level = lv charge = 0 multiplicity = 2 }\n"
          "state anion { geometry = f level = lv charge = -1 multiplicity = 1 }\n"
          "derive ea as electron_affinity = energy(neutral) - energy(anion) in ev\n")


@pytest.mark.pyscf
def test_run_json_shows_the_experimental_ea_of_fluorine(tmp_path, capsys):
    import jsonschema
    from pyscf import gto, scf

    deck = write_deck(tmp_path, F_DECK)
    out = tmp_path / "out.json"
    assert main(["run", deck, "--quiet", "--cache-dir", str(tmp_path / "c"), "--json", str(out)]) == 0
    data = json.loads(out.read_text())
    schema = json.loads(open(os.path.join(os.path.dirname(__file__), "..", "docs", "run-output.schema.json")).read())
    jsonschema.Draft202012Validator(schema).validate(data)
    (ea,) = data["derived"]
    neutral = scf.UHF(gto.M(atom="F", basis="aug-cc-pvdz", spin=1, verbose=0)).run()
    anion = scf.RHF(gto.M(atom="F", basis="aug-cc-pvdz", charge=-1, verbose=0)).run()
    computed = (neutral.e_tot - anion.e_tot) * EV
    exp = ea["experiment"]
    assert exp["value_ev"] == pytest.approx(F_EA, abs=1e-7)
    assert exp["uncertainty_ev"] == pytest.approx(2.4e-6)
    assert exp["origin"] == "table" and exp["species"] == "F" and exp["source"]
    assert exp["deviation_ev"] == pytest.approx(computed - F_EA, abs=1e-5)
    assert exp["caution"] == comparison.CAUTION
    text = capsys.readouterr().out
    line = next(ln for ln in text.splitlines() if ln.startswith("ea "))
    assert line.split()[-2:] == ["3.401", f"{computed - F_EA:.3f}"]
    assert f"  ea: experiment 3.401 +- 2.4e-06 eV (reference table: {exp['source']}); computed minus experiment " \
           f"{computed - F_EA:+.3f} eV" in text
    assert "  " + comparison.CAUTION in text


def test_the_decks_own_reference_overrides_the_table(tmp_path):
    # 328.2 kJ/mol = 3.4016 eV (1 eV = 96.485332 kJ/mol, check-values section 1).
    ws = workspace(tmp_path, F_DECK.replace(" in ev\n", ' in ev reference 328.2 +- 0.5 kj/mol "our own measurement"\n'))
    (derive,) = ws.derives
    found = comparison.compare_derive(ws, derive, 1.0)
    assert found.measured.origin == "deck" and found.measured.source == "our own measurement"
    assert found.measured.value_ev == pytest.approx(328.2 / 96.485332, rel=1e-8)
    assert found.measured.uncertainty_ev == pytest.approx(0.5 / 96.485332, rel=1e-8)
    assert found.deviation_ev == pytest.approx(1.0 - 328.2 / 96.485332, rel=1e-8)


def test_reference_clause_errors_and_layout(tmp_path):
    from deckward.grammar.formatter import format_text
    from rule_harness import check_text

    bad = F_DECK.replace(" in ev\n", ' in ev reference 3.4 evv "x"\n')
    found = [(f.rule, f.message) for f in check_text(bad)[0] if f.rule == "invalid-value"]
    assert found == [("invalid-value", "`evv` is not an energy unit (units: hartree, ev, kcal/mol, kj/mol); "
                                       "did you mean `ev`?")]
    empty = F_DECK.replace(" in ev\n", ' in ev reference 3.4 ev ""\n')
    assert [f.message for f in check_text(empty)[0] if f.rule == "invalid-value"] == [
        "a reference value names its source (who measured it, where)"]
    written = F_DECK.replace(" in ev\n", ' in ev\n  reference 3.4011898 +- 0.0000024 ev "table"\n')
    assert format_text(written).splitlines()[-1] == (
        'derive ea as electron_affinity = energy(neutral) - energy(anion) in ev reference 3.4011898 +- 0.0000024 ev '
        '"table"')


def test_plain_data_comparison_for_stored_results():
    # NO2: EA 2.273 +- 0.005 eV (Ervin, Ho, Lineberger 1988, check-values section 2).
    found = comparison.compare_value("electron_affinity", 2.0, ["N", "O", "O"],
                                     [(0, 0, 0), (0, 1.0989, 0.4653), (0, -1.0989, 0.4653)], kind="vertical")
    assert found.measured.value_ev == pytest.approx(2.273) and found.measured.uncertainty_ev == pytest.approx(0.005)
    assert found.deviation_ev == pytest.approx(2.0 - 2.273)
    assert found.note == comparison.VERTICAL_NOTE
    assert comparison.compare_value("electron_affinity", 2.0, ["Xe", "Xe", "Xe"]) is None
    assert comparison.compare_value("fundamental_gap", 2.0, ["N", "O", "O"]) is None


@pytest.mark.pyscf
def test_review_shows_experiment_beside_probe_numbers_with_the_caution(tmp_path, monkeypatch):
    # F EA with cc-pvdz: the basis-sensitivity probe fires (HF delta-SCF EA
    # changes sign with diffuse functions; check-values section 7 shows the
    # same for C), and its evidence carries the tabulated EA of F.
    import xml.etree.ElementTree as ET

    from deckward.server.review_batch import build_review
    from deckward.server.review_html import render_review
    from deckward.server.checking import check_paths

    monkeypatch.setenv("DECKWARD_CACHE_DIR", str(tmp_path / "c"))
    deck = write_deck(tmp_path, F_DECK.replace("aug-cc-pvdz", "cc-pvdz"))
    result = check_paths([deck], probe=True)
    (sens,) = [f for f in result.findings if f.rule == "probe-basis-sensitivity"]
    evidence = dict(sens.evidence)
    assert evidence["experimental_ev"] == pytest.approx(F_EA, abs=1e-6)
    assert evidence["deviation_from_experiment_ev"] == pytest.approx(evidence["delta_scf_ev"] - F_EA, abs=2e-6)
    html = render_review(build_review(result, probed=True))
    ET.fromstring(html)
    assert "experimental (eV)</th><td class=\"num\">3.401</td>" in html
    assert comparison.CAUTION in html
    assert "(experiment +3.40 eV)" in html  # the plot's text alternative marks it too


def test_recorded_value_is_compared_from_its_deck(tmp_path):
    deck = write_deck(tmp_path, F_DECK)
    found = comparison.compare_recorded(deck, "ea", 1.2 / EV)
    assert found["value_ev"] == pytest.approx(F_EA, abs=1e-7)
    assert found["deviation_ev"] == pytest.approx(1.2 - F_EA, abs=1e-6)
    assert comparison.compare_recorded(deck, "nope", 0.1) is None
    assert comparison.compare_recorded(str(tmp_path / "gone.deck"), "ea", 0.1) is None

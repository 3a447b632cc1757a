"""`deckward converge`: the derives along the deck's basis ladder, each
step equal to PySCF run directly, a complete-basis estimate by the
published two-point formulas, the measured value beside it, and a plot."""
from __future__ import annotations

import json
import math

import pytest

from runner_helpers import write_deck

from deckward.rules.compute.convergence import LadderError, ladder_for
from deckward.server.cli import main

EV = 27.211386245988  # CODATA 2018 E_h in eV (check-values section 1)
F_DECK = ("geometry f { F 0 0 0 }\nlevel lv { method = hf basis = aug-cc-pvdz }\n"
          "state neutral { geometry = f level = lv charge = 0 multiplicity = 2 }\n"
          "state anion { geometry = f level = lv charge = -1 multiplicity = 1 }\n"
          "derive ea as electron_affinity = energy(neutral) - energy(anion) in ev\n"
          "# allow: virtual-eigenvalue-as-ea -- shown beside the delta-SCF value to watch it drift\n"
          "derive ea_lumo as electron_affinity = -orbital(neutral, lumo) in ev\n")


def test_ladders_of_the_families():
    assert ladder_for("aug-cc-pVDZ").words == ("aug-cc-pvdz", "aug-cc-pvtz", "aug-cc-pvqz")
    assert ladder_for("cc-pvtz").words == ("cc-pvdz", "cc-pvtz", "cc-pvqz")
    assert ladder_for("pcseg-2").words == ("pcseg-1", "pcseg-2", "pcseg-3")
    assert ladder_for("def2-svpd").words == ("def2-svpd", "def2-tzvpd", "def2-qzvpd")
    with pytest.raises(LadderError, match="basis `6-31g\\*` belongs to no ladder"):
        ladder_for("6-31g*")


@pytest.mark.pyscf
def test_converge_json_on_the_fluorine_ea_deck(tmp_path, capsys):
    from pyscf import gto, scf

    deck = write_deck(tmp_path, F_DECK)
    svg = tmp_path / "ladder.svg"
    rc = main(["converge", deck, "--json", "--quiet", "--cache-dir", str(tmp_path / "c"), "--plot", str(svg)])
    assert rc == 0
    data = json.loads(capsys.readouterr().out)
    assert [(s["basis"], s["cardinal"]) for s in data["steps"]] == [
        ("aug-cc-pvdz", 2), ("aug-cc-pvtz", 3), ("aug-cc-pvqz", 4)]
    scf_energies = {}
    for step in data["steps"]:
        neutral = scf.UHF(gto.M(atom="F", basis=step["basis"], spin=1, verbose=0)).run()
        anion = scf.RHF(gto.M(atom="F", basis=step["basis"], charge=-1, verbose=0)).run()
        scf_energies[step["cardinal"]] = (neutral.e_tot, anion.e_tot)
        values = {d["name"]: d["value"] for d in step["derived"]}
        assert values["ea"] == pytest.approx((neutral.e_tot - anion.e_tot) * EV, abs=1e-5)
        lumo = min(neutral.mo_energy[s][neutral.mo_occ[s] == 0].min() for s in (0, 1))
        assert values["ea_lumo"] == pytest.approx(-lumo * EV, abs=1e-4)
    # Karton & Martin 2006 two-point SCF limit from X = 3, 4, written out here.
    f = {x: (x + 1) * math.exp(-9 * math.sqrt(x)) for x in (3, 4)}
    limit = [(scf_energies[4][i] * f[3] - scf_energies[3][i] * f[4]) / (f[3] - f[4]) for i in (0, 1)]
    cbs = {d["name"]: d for d in data["complete_basis"]["derived"]}
    assert cbs["ea"]["value"] == pytest.approx((limit[0] - limit[1]) * EV, abs=1e-5)
    assert cbs["ea_lumo"]["value"] is None
    assert cbs["ea_lumo"]["reason"] == "orbital energies have no complete-basis estimate"
    assert data["complete_basis"]["from"] == ["aug-cc-pvtz", "aug-cc-pvqz"]
    assert "Karton" in data["complete_basis"]["method"] and "Helgaker" in data["complete_basis"]["method"]
    # F EA 3.4011898 eV (check-values section 2).
    assert data["experiment"]["ea"]["value_ev"] == pytest.approx(3.4011898, abs=1e-7)
    text = svg.read_text()
    assert text.lstrip().startswith("<?xml") and "experiment 3.401 eV" in text and "CBS" in text


@pytest.mark.pyscf
def test_converge_text_and_refusals(tmp_path, capsys):
    deck = write_deck(tmp_path, F_DECK)
    assert main(["converge", deck, "--quiet", "--cache-dir", str(tmp_path / "c")]) == 0
    out = capsys.readouterr().out
    assert out.splitlines()[0] == f"deck {deck}: basis ladder aug-cc-pVXZ"
    assert "complete basis minus experiment" in out and "Caution:" in out
    other = write_deck(tmp_path, F_DECK.replace("aug-cc-pvdz", "6-31+g*"), "p.deck")
    assert main(["converge", other, "--quiet"]) == 2
    assert "belongs to no ladder deckward knows" in capsys.readouterr().err

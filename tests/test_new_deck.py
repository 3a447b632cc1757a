"""`deckward new`: the deck it writes checks with no warning, has every
state the quantity needs with the ground-state multiplicities, and is never
written over an existing file without --force."""
from __future__ import annotations

import pytest

from runner_helpers import write_deck

from deckward.server.checking import check_paths
from deckward.server.cli import main

# NO2 geometry of the demo set (examples/shared/acceptors.deck).
NO2_XYZ = "3\nnitrogen dioxide\nN 0.0 0.0 0.0\nO 0.0 1.0989 0.4653\nO 0.0 -1.0989 0.4653\n"


def _new(tmp_path, xyz_text, *options, name="mol.xyz", out="new.deck"):
    write_deck(tmp_path, xyz_text, name)
    deck = str(tmp_path / out)
    rc = main(["new", str(tmp_path / name), "-o", deck, *options])
    return rc, deck


def _counts(deck):
    result = check_paths([deck])
    return result.counts(), [f.rule for f in result.active]


def test_no2_electron_affinity_deck_checks_clean_and_has_the_anion(tmp_path):
    # NO2 is a doublet, NO2- a singlet (Herzberg 1966, via the reference
    # table); an anion needs diffuse functions (Kendall et al. 1992).
    rc, deck = _new(tmp_path, NO2_XYZ, "--goal", "electron_affinity", "--multiplicity", "2", name="no2.xyz")
    assert rc == 0
    text = open(deck, encoding="utf-8").read()
    assert text.splitlines()[3:] == [
        'study "no2-electron-affinity" {',
        "  goal = electron_affinity",
        "  kind = vertical",
        "}",
        "",
        'geometry no2 { file = "no2.xyz" }',
        "",
        "level hf_aug_cc_pvdz {",
        "  method = hf",
        "  basis  = aug-cc-pvdz",
        "}",
        "",
        "state neutral { geometry = no2  level = hf_aug_cc_pvdz  charge = 0  multiplicity = 2  reference = unrestricted }",
        "state anion   { geometry = no2  level = hf_aug_cc_pvdz  charge = -1  multiplicity = 1  reference = restricted }",
        "",
        "derive ea as electron_affinity = energy(neutral) - energy(anion) in ev",
    ]
    assert "check against experiment" in text.splitlines()[1]
    assert _counts(deck) == ({"error": 0, "warning": 0, "info": 0}, [])


@pytest.mark.parametrize("goal", ["electron_affinity", "ionization_energy", "fundamental_gap"])
@pytest.mark.parametrize("kind", ["vertical", "adiabatic"])
def test_every_goal_and_kind_checks_without_warning(tmp_path, goal, kind):
    rc, deck = _new(tmp_path, NO2_XYZ, "--goal", goal, "--kind", kind, "--multiplicity", "2")
    assert rc == 0
    counts, rules = _counts(deck)
    assert counts["error"] == 0 and counts["warning"] == 0, rules
    text = open(deck, encoding="utf-8").read()
    assert ("optimize(mol)" in text) == (kind == "adiabatic")


def test_ion_multiplicities_follow_the_ground_state(tmp_path):
    # C- is a quartet (4S; Rienstra-Kiracofe et al., Chem. Rev. 102, 231
    # (2002)); H2O+ a doublet; a closed-shell IE deck keeps the plain basis.
    rc, deck = _new(tmp_path, "1\n\nC 0 0 0\n", "--goal", "electron_affinity", "--multiplicity", "3")
    assert "state anion   { geometry = mol  level = hf_aug_cc_pvdz  charge = -1  multiplicity = 4  " \
           "reference = unrestricted }" in open(deck).read()
    water = "3\n\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0 -0.7572 -0.4692\n"
    rc, deck = _new(tmp_path, water, "--goal", "ionization_energy", "--multiplicity", "1", "--force")
    text = open(deck).read()
    assert "state cation  { geometry = mol  level = hf_cc_pvdz  charge = 1  multiplicity = 2  " \
           "reference = unrestricted }" in text
    assert "derive ie as ionization_energy = energy(cation) - energy(neutral) in ev" in text
    assert _counts(deck)[0]["warning"] == 0


def test_gap_deck_has_three_states_and_the_conventional_sign(tmp_path):
    rc, deck = _new(tmp_path, "1\n\nF 0 0 0\n", "--goal", "fundamental_gap", "--multiplicity", "2")
    text = open(deck).read()
    assert [ln.split()[1] for ln in text.splitlines() if ln.startswith("state ")] == ["neutral", "cation", "anion"]
    assert "derive gap as fundamental_gap = energy(cation) + energy(anion) - 2 * energy(neutral) in ev" in text


def test_never_overwrites_without_force_and_refuses_impossible_requests(tmp_path, capsys):
    existing = write_deck(tmp_path, "# mine\n", "new.deck")
    rc, _ = _new(tmp_path, NO2_XYZ, "--goal", "electron_affinity", "--multiplicity", "2")
    assert rc == 2
    assert capsys.readouterr().err == f"deckward: error: {existing}: not written: it exists (use --force to replace it)\n"
    assert open(existing).read() == "# mine\n"
    rc, _ = _new(tmp_path, NO2_XYZ, "--goal", "electron_affinity", "--multiplicity", "2", "--force")
    assert rc == 0 and "state anion" in open(existing).read()
    rc, _ = _new(tmp_path, NO2_XYZ, "--goal", "electron_affinity", "--multiplicity", "1", out="x.deck")
    assert rc == 2
    assert capsys.readouterr().err.endswith(
        "deckward: error: multiplicity 1 is impossible with 23 electrons (charge +0); 2 is the lowest possible\n")
    assert not (tmp_path / "x.deck").exists()
    rc, _ = _new(tmp_path, "2\n\nO 0 0 0\n", "--goal", "electron_affinity", "--multiplicity", "2", out="y.deck")
    assert rc == 2 and "not a readable .xyz geometry" in capsys.readouterr().err
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []  # no temporary file left

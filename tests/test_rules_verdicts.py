"""Rules that judge a deck against measured facts and the physics of gaps and
frequencies: unbound-anion, multiplicity-not-ground-state,
orbital-gap-as-fundamental-gap, frequencies-not-stationary, and the
counterpoise reading of disconnected-fragments.

Facts of the trade behind the expectations (sources beside each use):
- N2, CO2 and H2O bind no extra electron in the gas phase (N2: NIST CCCBDB,
  G4 EA -1.98 eV, check-value sheet; CO2: Compton, Reinhardt, Cooper,
  J. Chem. Phys. 63, 3821 (1975), from memory; H2O: Simons, J. Phys. Chem. A
  112, 6401 (2008), from memory); CN and O2 do (Bradforth et al. 1993,
  3.862 eV; Ervin et al. 2003, 0.448 eV).
- Ground states: O2 X 3Sigma_g- (Huber & Herzberg 1979, from memory); C 3P
  and C- 4S, O 3P (NIST ASD ground terms, from memory); NO- 3Sigma- (Huber &
  Herzberg, from memory).
- The Kohn-Sham gap misses the derivative discontinuity (Perdew & Levy,
  Phys. Rev. Lett. 51, 1884 (1983); Sham & Schlueter, ibid. 1888, from
  memory); Hartree-Fock orbital gaps are Koopmans' IE - EA.
- Harmonic frequencies need a stationary point of the level (Wilson, Decius,
  Cross, Molecular Vibrations (1955), from memory).
Geometries are demo structures of the acceptor-screening scenario.
"""
from deckward.rules.catalogue._examples import NO2_GEOMETRY as NO2
from deckward.rules.fixes.edits import apply_edits
from rule_harness import check_text, covered

N2 = "geometry n2 {\n  N 0 0 0\n  N 0 0 1.0977\n}\n"
O2 = "geometry o2 {\n  O 0 0 0\n  O 0 0 1.2075\n}\n"
CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
WATER = "geometry water {\n  O 0 0 0\n  H 0 0.7572 0.5859\n  H 0 -0.7572 0.5859\n}\n"
HF = "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"


def state(name, geometry, charge, multiplicity, extra=""):
    return (
        f"state {name} {{ geometry = {geometry} level = hf_adz charge = {charge} "
        f"multiplicity = {multiplicity}{extra} }}\n"
    )


def run(text, rule, **kw):
    findings, _ = check_text(text, select={rule}, **kw)
    return [(f.span.line, f.span.column, covered(f, text), f.message) for f in findings if f.rule == rule]


def first_fix(text, rule, n=0):
    findings, _ = check_text(text, select={rule})
    mine = [f for f in findings if f.rule == rule]
    return apply_edits(text, mine[0].fixes[n].edits)


# --- unbound-anion ----------------------------------------------------------------

N2_PAIR = N2 + HF + state("neutral", "n2", 0, 1) + state("anion", "n2", -1, 2)


def test_unbound_anion_message_and_position():
    text = N2_PAIR + "derive ea = energy(neutral) - energy(anion) in ev\n"
    assert run(text, "unbound-anion") == [
        (8, 8, "ea",
         "`ea` is the electron affinity of `n2`, but dinitrogen (N2) has no bound gas-phase anion (NIST "
         "Computational Chemistry Comparison and Benchmark Database, NIST SRD 101, Release 22 (2022); N2- is a "
         "shape resonance about 2.3 eV above the neutral): a finite basis confines the extra electron, so the "
         "number belongs to the basis and tends towards zero as diffuse functions are added; report the anion "
         "as unbound, or compute the resonance with a method for temporary anions"),
    ]


def test_unbound_anion_speaks_alone_on_an_orbital_estimate():
    # Water: one mistake (no bound anion), so the LUMO and missing-anion rules stay quiet.
    text = WATER + HF + state("neutral", "water", 0, 1) + "derive ea = -orbital(neutral, lumo) in ev\n"
    assert [f[2] for f in run(text, "unbound-anion")] == ["ea"]
    assert "water (H2O) has no bound gas-phase anion" in run(text, "unbound-anion")[0][3]
    assert run(text, "virtual-eigenvalue-as-ea") == []
    assert run(text, "missing-ion-state") == []
    b3 = text.replace("method = hf", "method = b3lyp")
    assert run(b3, "dft-eigenvalue-as-ie-or-ea") == []


def test_bound_anions_are_silent():
    for geometry, name, mult_neutral in ((CN, "cn", 2), (O2, "o2", 3)):
        text = geometry + HF + state("neutral", name, 0, mult_neutral) + state("anion", name, -1, 1 if name == "cn" else 2)
        assert run(text + "derive ea = energy(neutral) - energy(anion) in ev\n", "unbound-anion") == []


def test_goal_without_derive_reports_once_per_species():
    text = 'study "screen" { goal = electron_affinity }\n' + N2_PAIR
    assert [(f[0], f[2]) for f in run(text, "unbound-anion")] == [(7, "neutral")]
    # A goal of another kind says nothing about anions.
    assert run(text.replace("electron_affinity", "energy"), "unbound-anion") == []


def test_electron_affinity_of_a_cation_is_not_the_anion_case():
    # E(N2) - E(N2+) read as an EA of N2+ (i.e. the IE of N2 backwards) is about N2+, not N2-.
    text = N2 + HF + state("neutral", "n2", 0, 1) + state("cation", "n2", 1, 2)
    assert run(text + "derive ea as electron_affinity = energy(cation) - energy(neutral)\n", "unbound-anion") == []


def test_carbon_dioxide_isomer_free_and_bent():
    # CO2 bent (as the metastable anion is) is still CO2: recognition reads bonds, not angles.
    bent = "geometry co2 {\n  C 0 0 0\n  O 0 1.05 0.6\n  O 0 -1.05 0.6\n}\n"
    text = bent + HF + state("neutral", "co2", 0, 1) + state("anion", "co2", -1, 2)
    found = run(text + "derive ea = energy(neutral) - energy(anion)\n", "unbound-anion")
    assert [f[2] for f in found] == ["ea"]
    assert "carbon dioxide (CO2)" in found[0][3] and "from memory" not in found[0][3]


# --- multiplicity-not-ground-state ------------------------------------------------


def test_singlet_dioxygen():
    text = O2 + HF + state("neutral", "o2", 0, 1)
    assert run(text, "multiplicity-not-ground-state") == [
        (6, 72, "1",
         "state `neutral` is dioxygen (O2, charge 0) computed as a singlet, but its ground state is a triplet "
         "(multiplicity 3; K. P. Huber, G. Herzberg, Molecular Spectra and Molecular Structure IV: Constants of "
         "Diatomic Molecules (Van Nostrand 1979)): this is an excited state, and energies built on it are off by "
         "the excitation energy; set multiplicity = 3, or mark the excited state as intended (study goal "
         "excitation_energy)"),
    ]
    assert first_fix(text, "multiplicity-not-ground-state") == O2 + HF + state("neutral", "o2", 0, 3)


def test_carbon_atom_and_its_anion():
    carbon = "geometry c { C 0 0 0 }\n"
    text = carbon + HF + state("atom", "c", 0, 1) + state("anion", "c", -1, 2)
    found = run(text, "multiplicity-not-ground-state")
    assert [f[3].split(":")[0] for f in found] == [
        "state `atom` is carbon atom (C, charge 0) computed as a singlet, but its ground state is a triplet "
        "(multiplicity 3; A. Kramida, Yu. Ralchenko, J. Reader and NIST ASD Team, NIST Atomic Spectra Database, "
        "physics.nist.gov/asd)",
        "state `anion` is carbon atom (C, charge -1) computed as a doublet, but its ground state is a quartet "
        "(multiplicity 4; A. Kramida, Yu. Ralchenko, J. Reader and NIST ASD Team, NIST Atomic Spectra Database, "
        "physics.nist.gov/asd)",
    ]
    good = carbon + HF + state("atom", "c", 0, 3) + state("anion", "c", -1, 4)
    assert run(good, "multiplicity-not-ground-state") == []


def test_nitric_oxide_anion_is_a_triplet():
    no = "geometry no {\n  N 0 0 0\n  O 0 0 1.1508\n}\n"
    text = no + HF + state("radical", "no", 0, 2) + state("anion", "no", -1, 1)
    assert [f[2] for f in run(text, "multiplicity-not-ground-state")] == ["1"]


def test_deliberate_excited_states_are_silent():
    singlet = state("delta", "o2", 0, 1)
    triplet = state("ground", "o2", 0, 3)
    # Both spin states side by side: a singlet-triplet gap.
    assert run(O2 + HF + triplet + singlet + "derive st = energy(delta) - energy(ground)\n",
               "multiplicity-not-ground-state") == []
    # An excitation-energy derive, or the study goal.
    excitation = "derive t as excitation_energy = energy(delta) - energy(other)\n"
    other = state("other", "o2", 1, 2)
    assert run(O2 + HF + singlet + other + excitation, "multiplicity-not-ground-state") == []
    study = 'study "o2" { goal = excitation_energy }\n'
    assert run(study + O2 + HF + singlet, "multiplicity-not-ground-state") == []


def test_unset_multiplicity_is_the_lowest_and_gets_one():
    text = O2 + HF + "state neutral { geometry = o2 level = hf_adz charge = 0 }\n"
    found = run(text, "multiplicity-not-ground-state")
    assert [(f[2], "(the lowest multiplicity, as none is set)" in f[3]) for f in found] == [("neutral", True)]
    assert first_fix(text, "multiplicity-not-ground-state") == (
        O2 + HF + "state neutral { geometry = o2 level = hf_adz charge = 0 multiplicity = 3 }\n"
    )


def test_impossible_multiplicity_is_left_to_the_electron_count_rule():
    text = O2 + HF + state("neutral", "o2", 0, 2)
    assert run(text, "multiplicity-not-ground-state") == []
    assert [f[2] for f in run(text, "charge-multiplicity-mismatch")] == ["2"]


def test_untabulated_species_and_dissociated_atoms_are_silent():
    far = "geometry oo {\n  O 0 0 0\n  O 0 0 3.0\n}\n"
    assert run(far + HF + state("pair", "oo", 0, 1), "multiplicity-not-ground-state") == []
    hno = "geometry hno {\n  N 0 0 0\n  O 0 0 1.21\n  H 0 1.0 -0.3\n}\n"  # not in the table
    assert run(hno + HF + state("neutral", "hno", 0, 3), "multiplicity-not-ground-state") == []
    # Ozone is a closed-shell singlet (Herzberg 1966, from memory): its singlet is the ground state.
    ozone = "geometry o3 {\n  O 0 0 0\n  O 0 1.09 0.67\n  O 0 -1.09 0.67\n}\n"
    assert run(ozone + HF + state("neutral", "o3", 0, 1), "multiplicity-not-ground-state") == []
    assert [f[2] for f in run(ozone + HF + state("neutral", "o3", 0, 3), "multiplicity-not-ground-state")] == ["3"]


# --- orbital-gap-as-fundamental-gap -----------------------------------------------


def _no2_levels(method):
    return NO2 + f"level lv {{ method = {method} basis = aug-cc-pvdz reference = unrestricted }}\n"


def test_kohn_sham_gap_message():
    text = _no2_levels("pbe") + (
        "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 }\n"
        "derive gap = orbital(neutral, lumo) - orbital(neutral, homo) in ev\n"
    )
    assert run(text, "orbital-gap-as-fundamental-gap") == [
        (8, 14, "orbital(neutral, lumo) - orbital(neutral, homo)",
         "the fundamental gap `gap` is the orbital gap LUMO - HOMO of `neutral` at pbe/aug-cc-pvdz: a Kohn-Sham "
         "gap of pbe misses the derivative discontinuity (even the exact functional's orbital gap falls short of "
         "IE - EA), and common functionals underestimate the fundamental gap by one to several eV; compute "
         "IE - EA = E(cation) + E(anion) - 2 E(neutral)"),
    ]


def test_gap_fix_adds_both_ion_states():
    neutral = "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 }\n"
    text = _no2_levels("pbe") + neutral + "derive gap = orbital(neutral, lumo) - orbital(neutral, homo) in ev\n"
    assert first_fix(text, "orbital-gap-as-fundamental-gap") == _no2_levels("pbe") + neutral + (
        "state cation { geometry = no2 level = lv charge = 1 multiplicity = 1 }\n"
        "state anion { geometry = no2 level = lv charge = -1 multiplicity = 1 }\n"
        "derive gap = energy(cation) + energy(anion) - 2 * energy(neutral) in ev\n"
    )


def test_hartree_fock_and_correlated_gap_reasons():
    tail = (
        "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 }\n"
        "derive g as fundamental_gap = orbital(neutral, lumo) - orbital(neutral, homo)\n"
    )
    hf = run(_no2_levels("hf") + tail, "orbital-gap-as-fundamental-gap")[0][3]
    assert "Koopmans' IE minus Koopmans' EA" in hf and "far too large" in hf and "derivative" not in hf
    mp2 = run(_no2_levels("mp2") + tail, "orbital-gap-as-fundamental-gap")[0][3]
    assert "mp2 reports the orbital energies of its Hartree-Fock reference" in mp2


def test_gap_silent_cases():
    neutral = "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 }\n"
    head = _no2_levels("pbe") + neutral
    orbital_gap = "derive gap = orbital(neutral, lumo) - orbital(neutral, homo) in ev\n"
    # In an excitation study a derive named gap is the optical gap, which orbital gaps approximate...
    assert run('study "x" { goal = excitation_energy }\n' + head + orbital_gap, "orbital-gap-as-fundamental-gap") == []
    # ...unless it says it is the fundamental gap.
    labelled = orbital_gap.replace("derive gap =", "derive gap as fundamental_gap =")
    assert len(run('study "x" { goal = excitation_energy }\n' + head + labelled, "orbital-gap-as-fundamental-gap")) == 1
    # A derive named otherwise without a goal is no fundamental gap.
    assert run(head + orbital_gap.replace("derive gap", "derive split"), "orbital-gap-as-fundamental-gap") == []


# --- frequencies-not-stationary ---------------------------------------------------


def test_frequencies_at_a_fixed_geometry():
    text = CN + HF + state("radical", "cn", 0, 2, " frequencies = true")
    assert run(text, "frequencies-not-stationary") == [
        (6, 28, "cn",
         "state `radical` asks for frequencies = true at the fixed geometry `cn`, which is not optimised at "
         "hf/aug-cc-pvdz: harmonic frequencies and the zero-point energy need a stationary point of the state's "
         "own level; use optimize(cn) (or, if these coordinates were optimised at exactly this level, say so "
         "with an allow comment)"),
    ]
    assert first_fix(text, "frequencies-not-stationary", 1) == CN + HF + state("radical", "cn", 0, 2)


def test_frequencies_silent_cases():
    assert run(CN + HF + state("radical", "optimize(cn)", 0, 2, " frequencies = true"), "frequencies-not-stationary") == []
    assert run(CN + HF + state("radical", "cn", 0, 2, " frequencies = false"), "frequencies-not-stationary") == []
    atom = "geometry f { F 0 0 0 }\n"
    assert run(atom + HF + state("atom", "f", 0, 2, " frequencies = true"), "frequencies-not-stationary") == []


def test_adiabatic_study_speaks_through_adiabatic_without_relaxation():
    text = (
        'study "cn" { goal = electron_affinity kind = adiabatic }\n' + CN + HF
        + state("radical", "cn", 0, 2, " frequencies = true")
        + state("anion", "optimize(cn)", -1, 1, " frequencies = true")
        + "derive ea = energy(radical) - energy(anion)\n"
    )
    assert run(text, "frequencies-not-stationary") == []
    assert [f[2] for f in run(text, "adiabatic-without-relaxation")] == ["cn"]


# --- disconnected-fragments and counterpoise --------------------------------------

COMPLEX = "geometry dimer {\n  C 0 0 0\n  N 0 0 1.1718\n  O 0 0 4.5\n  H 0 0.7572 5.0859\n  H 0 -0.7572 5.0859\n}\n"
CN_IN_DIMER_BASIS = (
    "geometry cn_cp {\n  C 0 0 0\n  N 0 0 1.1718\n"
    "  O 0 0 4.5 ghost\n  H 0 0.7572 5.0859 ghost\n  H 0 -0.7572 5.0859 ghost\n}\n"
)


def test_counterpoise_complex_is_quiet():
    assert [f[2] for f in run(COMPLEX, "disconnected-fragments")] == ["dimer"]
    assert run(COMPLEX + CN_IN_DIMER_BASIS, "disconnected-fragments") == []
    # Ghost atoms elsewhere that do not sit on the complex's atoms are no counterpoise set-up.
    moved = CN_IN_DIMER_BASIS.replace("O 0 0 4.5 ghost", "O 0 0 6.5 ghost").replace("5.0859 ghost", "7.0859 ghost")
    assert [f[2] for f in run(COMPLEX + moved, "disconnected-fragments")] == ["dimer"]


def test_counterpoise_geometries_in_a_used_file():
    text = 'use "cp.deck"\n' + COMPLEX
    assert run(text, "disconnected-fragments", files={"cp.deck": CN_IN_DIMER_BASIS}) == []


# --- unknown-method: recognised methods and suggestion quality ---------------------


def test_casscf_is_recognised_and_gets_no_bad_suggestion():
    text = CN + "level mr { method = casscf basis = cc-pvdz }\n"
    findings, _ = check_text(text, select={"unknown-method"})
    [f] = findings
    assert f.message == (
        "`casscf` in level `mr` is a multiconfigurational method (complete active space SCF), which deckward "
        "recognises but cannot judge or run: the rules about orbital energies, correlation and basis size stay "
        "silent about it, and `deckward run` cannot compute it"
    )
    assert f.severity.value == "info" and f.fixes == ()
    for word in ("CASPT2", "nevpt2", "EOM-IP-CCSD", "g0w0"):
        [g] = check_text(CN + f"level mr {{ method = {word} basis = cc-pvdz }}\n", select={"unknown-method"})[0]
        assert "did you mean" not in g.message and "recognises but cannot judge or run" in g.message


def test_did_you_mean_needs_a_word_of_similar_length():
    from deckward.rules.knowledge import methods

    assert methods.closest("casscf") == []
    assert methods.closest("casscff") == []  # "scf" is a shared tail, not a typo
    assert methods.closest("b3lpy")[0] == "b3lyp"
    assert methods.closest("ccsd(t") == ["ccsd(t)", "ccsd", "cisd"]


# --- probe-unbound-anion: what the message blames ----------------------------------
# The HOMO and delta-SCF numbers below are inputs for the wording only (demo numbers);
# the species facts are the reference table's (EA(O) 1.46111297 eV, electron affinity
# data page; N2 unbound, NIST CCCBDB).


def test_probe_blames_correlation_for_oxygen_in_a_diffuse_basis():
    from deckward.rules.compute.probes.unbound_anion import verdict
    from deckward.rules.knowledge.reference_data import by_key

    text = verdict("anion", "aug-cc-pvdz", homo_ev=-1.2, delta_ev=-0.5, species=by_key("O"), diffuse_basis=True)
    assert text == (
        "at HF/aug-cc-pvdz `anion` lies above the neutral: the delta-SCF EA is -0.50 eV (the anion lies higher), "
        "although its HOMO energy, -1.20 eV, is below zero; oxygen atom (O) has a bound anion (measured EA "
        "1.46111297 +- 0.00000009 eV, Electron affinity (data page), Wikipedia, compiling the primary photodetachment "
        "measurements) and this basis already has diffuse functions, so the likelier cause is Hartree-Fock's "
        "missing correlation, which underbinds anions (O- and OH- are the classic cases): the deck's correlated "
        "method may well bind it"
    )
    assert "not bound" not in text  # the HOMO is negative: the orbital is bound


def test_probe_wording_for_a_positive_homo_and_an_unbound_species():
    from deckward.rules.compute.probes.unbound_anion import verdict
    from deckward.rules.knowledge.reference_data import by_key

    text = verdict("anion", "cc-pvdz", homo_ev=0.8, delta_ev=-2.0, species=by_key("N2"), diffuse_basis=False)
    assert text.startswith(
        "at HF/cc-pvdz the extra electron of `anion` is not bound: its HOMO energy is +0.80 eV (above zero) and "
        "the delta-SCF EA is -2.00 eV (the anion lies higher); dinitrogen (N2) has no bound gas-phase anion"
    )
    assert verdict("anion", "aug-cc-pvdz", homo_ev=-3.0, delta_ev=3.0, species=by_key("F"), diffuse_basis=True) is None
    unknown = verdict("anion", "cc-pvdz", homo_ev=0.1, delta_ev=0.2, species=None, diffuse_basis=False)
    assert "either the anion is not bound" in unknown
    tight = verdict("anion", "6-31g*", homo_ev=-0.5, delta_ev=-0.5, species=by_key("C"), diffuse_basis=False)
    assert "both the missing correlation and this basis's missing diffuse functions" in tight

"""Ion-state rules: which derives they read as IE/EA, where they fire and
what they say.  Facts of the trade behind the expectations:

- IE = E(cation) - E(neutral), EA = E(neutral) - E(anion), both positive
  when bound (Rienstra-Kiracofe et al., Chem. Rev. 102, 231 (2002); NIST
  WebBook gas-phase ion energetics).
- -e(HOMO) of Hartree-Fock is Koopmans' frozen-orbital IE (Koopmans,
  Physica 1, 104 (1934)); correlated wavefunction methods report the orbital
  energies of their Hartree-Fock reference.
- Kohn-Sham orbital energies of common functionals are no IE/EA (Janak,
  Phys. Rev. B 18, 7165 (1978); Salzner and Baer, J. Chem. Phys. 131,
  231101 (2009)).
- An atom has no structure to relax and no vibrations (no zero-point energy),
  so its vertical and adiabatic values coincide.

Geometries are demo structures of the project's acceptor-fragment scenario.
"""
from rule_harness import check_text, covered

CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
NO2 = (
    "geometry no2 {\n"
    "  N  0.000000  0.000000  0.000000\n"
    "  O  0.000000  1.098900  0.465300\n"
    "  O  0.000000 -1.098900  0.465300\n"
    "}\n"
)
HF_ADZ = "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
RADICAL = "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
ANION = "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
CN_EA = 'study "cn" { goal = electron_affinity }\n'


def run(text, rule, **kw):
    findings, _ = check_text(text, select={rule}, **kw)
    return [(f.span.line, f.span.column, covered(f, text), f.message) for f in findings if f.rule == rule]


def fixes_of(text, rule):
    findings, _ = check_text(text, select={rule})
    return [fx for f in findings if f.rule == rule for fx in f.fixes]


# --- missing-ion-state -----------------------------------------------------------


def test_missing_anion_for_lumo_derive():
    text = CN + HF_ADZ + RADICAL + "derive ea_eig = -orbital(radical, lumo) in ev\n"
    assert run(text, "missing-ion-state") == [
        (7, 8, "ea_eig",
         "the electron affinity `ea_eig` needs an anion of `radical` (charge -1, geometry `cn`), and no state "
         "has charge -1 at that geometry: an electron affinity is E(neutral) - E(anion), which needs both states"),
    ]


def test_missing_cation_named_from_goal_when_no_derive():
    # Formaldehyde: 16 electrons, closed shell; the cation is a doublet.
    text = (
        'study "h2co" { goal = ionization_energy }\n'
        "geometry h2co {\n  C 0 0 -0.5297\n  O 0 0 0.6742\n  H 0 0.9347 -1.1190\n  H 0 -0.9347 -1.1190\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
        "state neutral { geometry = h2co level = hf_adz charge = 0 multiplicity = 1 }\n"
    )
    assert run(text, "missing-ion-state") == [
        (9, 7, "neutral",
         "the study's goal is the ionization energy, but `neutral` (charge 0, geometry `h2co`) has no cation "
         "(charge +1) at that geometry: an ionization energy is E(cation) - E(neutral), which needs both states"),
    ]


def test_one_finding_for_two_derives_needing_the_same_anion():
    text = CN + HF_ADZ + RADICAL + (
        "derive ea_eig = -orbital(radical, lumo) in ev\n"
        "derive ea_beta = -orbital(radical, lumo, beta) in ev\n"
    )
    found = run(text, "missing-ion-state")
    assert [f[:3] for f in found] == [(7, 8, "ea_eig")]
    assert found[0][3].startswith("the electron affinity `ea_eig`, `ea_beta` needs an anion of `radical`")


def test_ion_at_another_geometry_does_not_count():
    other = "geometry cn_long {\n  C 0 0 0\n  N 0 0 1.25\n}\n"
    text = CN + other + HF_ADZ + RADICAL + (
        "state anion { geometry = cn_long level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea_eig = -orbital(radical, lumo) in ev\n"
    )
    assert [f[2] for f in run(text, "missing-ion-state")] == ["ea_eig"]


def test_ion_present_or_wrong_direction_only():
    # With the anion present the derive is only an estimate (other rules say so).
    assert run(CN + HF_ADZ + RADICAL + ANION + "derive ea_eig = -orbital(radical, lumo)\n", "missing-ion-state") == []
    # A cation does not serve an electron affinity taken from the LUMO.
    cation = "state cation { geometry = cn level = hf_adz charge = 1 multiplicity = 1 }\n"
    text = CN + HF_ADZ + RADICAL + cation + "derive ea_eig = -orbital(radical, lumo)\n"
    assert [f[2] for f in run(text, "missing-ion-state")] == ["ea_eig"]


def test_energy_differences_are_left_to_other_rules():
    text = CN + HF_ADZ + RADICAL + ANION + "derive ea = energy(radical) - energy(anion) in ev\n"
    assert run(CN_EA + text, "missing-ion-state") == []


def test_gap_in_an_ea_study_is_not_an_electron_affinity():
    text = CN_EA + CN + HF_ADZ + RADICAL + ANION + (
        "derive gap = orbital(radical, lumo) - orbital(radical, homo) in ev\n"
    )
    assert run(text, "missing-ion-state") == []
    assert run(text, "virtual-eigenvalue-as-ea") == []


def test_unknown_element_still_reported_without_fix():
    text = "geometry xx {\n  Xq 0 0 0\n  N 0 0 1.2\n}\n" + HF_ADZ + (
        "state radical { geometry = xx level = hf_adz charge = 0 multiplicity = 2 }\n"
        "derive ea_eig = -orbital(radical, lumo)\n"
    )
    assert [f[2] for f in run(text, "missing-ion-state")] == ["ea_eig"]
    assert fixes_of(text, "missing-ion-state") == []


def test_neutral_in_a_used_file_gets_no_cross_file_fix():
    shared = CN + HF_ADZ + RADICAL
    text = 'use "shared.deck"\nderive ea_eig = -orbital(radical, lumo) in ev\n'
    assert [f[:3] for f in run(text, "missing-ion-state", files={"shared.deck": shared})] == [(2, 8, "ea_eig")]
    findings, _ = check_text(text, select={"missing-ion-state"}, files={"shared.deck": shared})
    assert [f.fixes for f in findings] == [()]


# --- virtual-eigenvalue-as-ea ----------------------------------------------------------


def test_virtual_eigenvalue_message_and_position():
    text = NO2 + HF_ADZ + (
        "state neutral { geometry = no2 level = hf_adz charge = 0 multiplicity = 2 }\n"
        "derive ea = -orbital(neutral, lumo+1, alpha) * 27.211386245988 in ev\n"
    )
    assert run(text, "virtual-eigenvalue-as-ea") == [
        (8, 14, "orbital(neutral, lumo+1, alpha)",
         "the electron affinity `ea` is the negative alpha LUMO+1 energy of `neutral` at hf/aug-cc-pvdz: this "
         "is Koopmans' estimate with the neutral's frozen orbitals: no relaxation and no correlation, which here "
         "add up instead of cancelling (both make it too small), and it drifts with the basis set; compute "
         "E(neutral) - E(anion) (the deck has no anion of `neutral` yet)"),
    ]


def test_homo_of_the_anion_is_not_a_virtual_eigenvalue():
    text = CN + HF_ADZ + RADICAL + ANION + "derive ea = -orbital(anion, homo) in ev\n"
    assert run(text, "virtual-eigenvalue-as-ea") == []
    assert run(text, "missing-ion-state") == []


def test_lumo_as_ionization_energy_is_not_this_rule():
    text = CN + HF_ADZ + RADICAL + "derive ie = -orbital(radical, lumo) in ev\n"
    assert run(text, "virtual-eigenvalue-as-ea") == []


# --- koopmans-ip ----------------------------------------------------------------------


def _no2_with(level: str, derive: str) -> str:
    return NO2 + level + (
        "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 }\n"
        "state cation { geometry = no2 level = lv charge = 1 multiplicity = 1 }\n"
    ) + derive


def test_koopmans_hf():
    text = _no2_with("level lv { method = HF basis = cc-pvtz }\n", "derive ip = -orbital(neutral, homo) in ev\n")
    assert run(text, "koopmans-ip") == [
        (9, 14, "orbital(neutral, homo)",
         "the ionization energy `ip` is the negative HOMO energy of `neutral` at HF/cc-pvtz (Koopmans' theorem): "
         "frozen orbitals, no relaxation of the cation and no correlation; such values are usually too large, "
         "with errors that cancel only in part"),
    ]


def test_koopmans_correlated_level_reports_reference_orbitals():
    text = _no2_with("level lv { method = mp2 basis = cc-pvtz }\n", "derive ie = -orbital(neutral, homo-1)\n")
    (found,) = run(text, "koopmans-ip")
    assert found[3].startswith(
        "the ionization energy `ie` is the negative HOMO-1 energy of `neutral` at mp2/cc-pvtz, whose orbital "
        "energies are those of its Hartree-Fock reference (Koopmans' theorem; the mp2 correlation never enters "
        "the number): "
    )


def test_koopmans_silent_for_dft_unknown_method_and_energy_difference():
    for level in ("level lv { method = b3lyp basis = cc-pvtz }\n", "level lv { method = nonesuch basis = cc-pvtz }\n"):
        assert run(_no2_with(level, "derive ie = -orbital(neutral, homo)\n"), "koopmans-ip") == []
    hf = "level lv { method = hf basis = cc-pvtz }\n"
    assert run(_no2_with(hf, "derive ie = energy(cation) - energy(neutral)\n"), "koopmans-ip") == []
    # +e(HOMO) is not Koopmans' IE (it is its negative); the sign is somebody else's question.
    assert run(_no2_with(hf, "derive ie = orbital(neutral, homo)\n"), "koopmans-ip") == []


# --- dft-eigenvalue-as-ie-or-ea ----------------------------------------------------------


def test_dft_lumo_as_ea_is_one_finding_with_kohn_sham_reasons():
    # One mistake, one finding: virtual-eigenvalue-as-ea speaks, with the Kohn-Sham argument
    # (derivative discontinuity: Perdew & Levy, Phys. Rev. Lett. 51, 1884 (1983), from memory),
    # not the Hartree-Fock one.
    text = _no2_with("level lv { method = pbe0 basis = aug-cc-pvdz }\n", "derive ea = -orbital(neutral, lumo) in ev\n")
    assert run(text, "dft-eigenvalue-as-ie-or-ea") == []
    assert run(text, "virtual-eigenvalue-as-ea") == [
        (9, 14, "orbital(neutral, lumo)",
         "the electron affinity `ea` is the negative LUMO energy of `neutral` at pbe0/aug-cc-pvdz: a Kohn-Sham "
         "virtual energy of pbe0 is not an electron affinity: even the exact functional puts -e(LUMO) above the "
         "EA by the derivative discontinuity, common functionals make it typically too large by an amount that "
         "depends on the functional, and it drifts with the basis set; compute E(neutral) - E(anion) (the deck "
         "has no anion of `neutral` yet)"),
    ]
    assert "too small" not in run(text, "virtual-eigenvalue-as-ea")[0][3]


def test_dft_anion_homo_as_ea_keeps_its_own_finding():
    text = NO2 + "level lv { method = b3lyp basis = aug-cc-pvdz }\n" + (
        "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = no2 level = lv charge = -1 multiplicity = 1 }\n"
        "derive ea = -orbital(anion, homo) in ev\n"
    )
    found = run(text, "dft-eigenvalue-as-ie-or-ea")
    assert [f[2] for f in found] == ["orbital(anion, homo)"]
    assert "self-interaction" in found[0][3]
    assert run(text, "virtual-eigenvalue-as-ea") == []


def test_dft_range_separated_ie_and_hf_silent():
    text = _no2_with("level lv { method = wB97X-D basis = aug-cc-pvdz }\n", "derive ie = -orbital(neutral, homo)\n")
    assert [f[3].split(":")[0] for f in run(text, "dft-eigenvalue-as-ie-or-ea")] == [
        "the ionization energy `ie` is the negative HOMO energy of `neutral` at wB97X-D/aug-cc-pvdz"
    ]
    hf = _no2_with("level lv { method = hf basis = aug-cc-pvdz }\n", "derive ie = -orbital(neutral, homo)\n")
    assert run(hf, "dft-eigenvalue-as-ie-or-ea") == []


def test_dft_state_override_counts():
    text = NO2 + "level lv { method = hf basis = aug-cc-pvdz }\n" + (
        "state neutral { geometry = no2 level = lv charge = 0 multiplicity = 2 method = blyp }\n"
        "derive ie = -orbital(neutral, homo)\n"
    )
    assert [f[2] for f in run(text, "dft-eigenvalue-as-ie-or-ea")] == ["orbital(neutral, homo)"]
    assert run(text, "koopmans-ip") == []


# --- sign conventions and charge steps ----------------------------------------------------


def test_ea_sign_inside_negation():
    text = CN + HF_ADZ + RADICAL + ANION + "derive ea = -(energy(radical) - energy(anion)) in ev\n"
    assert run(text, "ea-sign-convention") == [
        (8, 15, "energy(radical) - energy(anion)",
         "the electron affinity `ea` is energy(anion) - energy(radical), with `anion` (charge -1) first: by "
         "convention EA = E(neutral) - E(anion), positive when the anion is bound"),
    ]


def test_ie_sign_message():
    cation = "state cation { geometry = cn level = hf_adz charge = 1 multiplicity = 1 }\n"
    text = CN + HF_ADZ + RADICAL + cation + "derive ie = energy(radical) - energy(cation)\n"
    assert run(text, "ie-sign-convention") == [
        (8, 13, "energy(radical) - energy(cation)",
         "the ionization energy `ie` is energy(radical) - energy(cation), with `cation` (charge +1) subtracted: "
         "by convention IE = E(cation) - E(neutral), positive for a bound electron"),
    ]
    assert run(text, "ea-sign-convention") == []
    assert run(text, "charge-step-mismatch") == []


def test_sign_rules_silent_on_conventional_forms_and_other_quantities():
    text = CN + HF_ADZ + RADICAL + ANION + (
        "derive ea = energy(radical) - energy(anion)\n"
        "derive reaction = energy(anion) - energy(radical)\n"
    )
    assert run(text, "ea-sign-convention") == []
    assert run(text, "charge-step-mismatch") == []


def test_charge_step_equal_charges():
    triplet = "state triplet { geometry = cn level = hf_adz charge = 0 multiplicity = 4 }\n"
    text = CN + HF_ADZ + RADICAL + triplet + "derive ie as ionization_energy = energy(triplet) - energy(radical)\n"
    findings, _ = check_text(text, select={"charge-step-mismatch"})
    (f,) = findings
    assert (f.span.line, f.span.column, covered(f, text)) == (8, 34, "energy(triplet) - energy(radical)")
    assert f.message == (
        "the ionization energy `ie` is energy(triplet) - energy(radical), but `triplet` has charge 0 and "
        "`radical` charge 0: an ionization energy removes exactly one electron, so the first state's charge "
        "must be one higher than the second's"
    )
    assert [(r.span.line, r.message) for r in f.related] == [
        (7, "`triplet` has charge 0"), (6, "`radical` has charge 0"),
    ]


def test_charge_step_double_ionization():
    dication = "state dication { geometry = cn level = hf_adz charge = 2 multiplicity = 2 }\n"
    text = CN + HF_ADZ + RADICAL + dication + "derive ie = energy(dication) - energy(radical)\n"
    assert [f[2] for f in run(text, "charge-step-mismatch")] == ["energy(dication) - energy(radical)"]
    assert run(text, "ie-sign-convention") == []


# --- level-mismatch -------------------------------------------------------------------


def _pair(level_lines: str, radical: str, anion: str) -> str:
    return CN + level_lines + radical + anion + "derive ea = energy(radical) - energy(anion) in ev\n"


def test_level_mismatch_different_level_points_at_level_word():
    levels = HF_ADZ + "level mp2_dz { method = mp2 basis = cc-pvdz frozen_core = true }\n"
    text = _pair(levels, RADICAL, "state anion { geometry = cn level = mp2_dz charge = -1 multiplicity = 1 }\n")
    assert run(text, "level-mismatch") == [
        (8, 37, "mp2_dz",
         "the energy difference `ea` combines `anion` at mp2/cc-pvdz with frozen core and `radical` at "
         "hf/aug-cc-pvdz (method mp2 vs hf; basis cc-pvdz vs aug-cc-pvdz; frozen_core true vs false): errors "
         "cancel in a difference only when both states are computed the same way"),
    ]


def test_level_mismatch_negatives_a_careful_chemist_expects():
    # Only the reference differs: open- and closed-shell states need different ones.
    ref_only = _pair(HF_ADZ, RADICAL, "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 reference = restricted }\n")
    assert run(ref_only, "level-mismatch") == []
    # Method aliases and letter case: `scf` is Hartree-Fock; basis words compare like PySCF compares them.
    other = "level scf_adz { method = SCF basis = AUG-cc-pVDZ frozen_core = false }\n"
    aliases = _pair(HF_ADZ + other, RADICAL, "state anion { geometry = cn level = scf_adz charge = -1 multiplicity = 1 }\n")
    assert run(aliases, "level-mismatch") == []
    # A per-element map that gives every atom the same set is the same basis.
    mapped = _pair(HF_ADZ, RADICAL, "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 "
                   "basis = { C: aug-cc-pvdz, default: aug-cc-pvdz } }\n")
    assert run(mapped, "level-mismatch") == []


def test_level_mismatch_per_element_difference_and_three_states():
    anion = "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 basis = { default: aug-cc-pvdz, N: cc-pvdz } }\n"
    text = _pair(HF_ADZ, RADICAL, anion)
    (found,) = run(text, "level-mismatch")
    assert found[2] == "{ default: aug-cc-pvdz, N: cc-pvdz }"
    assert "(basis { default: aug-cc-pvdz, N: cc-pvdz } vs aug-cc-pvdz)" in found[3]
    # A gap from three states: each compared with the first.
    cation = "state cation { geometry = cn level = hf_adz charge = 1 multiplicity = 1 frozen_core = true }\n"
    gap = CN + HF_ADZ + RADICAL + ANION + cation + (
        "derive gap = energy(cation) + energy(anion) - 2 * energy(radical)\n"
    )
    # The first state written (the cation) sets the level; the others are compared with it.
    assert [f[:3] for f in run(gap, "level-mismatch")] == [(6, 39, "hf_adz"), (7, 37, "hf_adz")]


# --- vertical / adiabatic / experiment -----------------------------------------------------


def _study(kind: str, compare: str = "") -> str:
    extra = f" compare = {compare}" if compare else ""
    return f'study "cn" {{ goal = electron_affinity kind = {kind}{extra} }}\n'


CN_LONG = "geometry cn_anion {\n  C 0 0 0\n  N 0 0 1.1765\n}\n"


def test_vertical_geometry_mismatch_message():
    text = _study("vertical") + CN + CN_LONG + HF_ADZ + RADICAL + (
        "state anion { geometry = cn_anion level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    )
    assert run(text, "vertical-geometry-mismatch") == [
        (12, 26, "cn_anion",
         "the study asks for vertical energies, but in `ea` `radical` is at geometry `cn` and `anion` at "
         "`cn_anion`: a vertical electron affinity keeps the nuclei where they are"),
    ]


def test_vertical_with_both_states_relaxed_separately_has_no_fix():
    text = _study("vertical") + CN + HF_ADZ + (
        "state radical { geometry = optimize(cn) level = hf_adz charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = optimize(cn) level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = energy(radical) - energy(anion) in ev\n"
    )
    assert run(text, "vertical-geometry-mismatch") == [
        (8, 26, "optimize(cn)",
         "the study asks for vertical energies, but `radical` and `anion` in `ea` are each relaxed with "
         "`optimize(cn)`: they end at different structures and the difference is adiabatic; a vertical electron "
         "affinity takes both states at one fixed geometry"),
    ]
    assert fixes_of(text, "vertical-geometry-mismatch") == []


def test_vertical_silent_for_same_geometry_reaction_energies_and_adiabatic_studies():
    same = _study("vertical") + CN + HF_ADZ + RADICAL + ANION + "derive ea = energy(radical) - energy(anion)\n"
    assert run(same, "vertical-geometry-mismatch") == []
    reaction = _study("vertical") + CN + CN_LONG + HF_ADZ + RADICAL + (
        "state anion { geometry = cn_anion level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive strain as reaction_energy = energy(radical) - energy(anion)\n"
    )
    assert run(reaction, "vertical-geometry-mismatch") == []
    adiabatic = reaction.replace("vertical", "adiabatic").replace(" as reaction_energy", "").replace("strain", "ea")
    assert run(adiabatic, "vertical-geometry-mismatch") == []


def test_adiabatic_without_relaxation_fires_per_state_once():
    text = _study("adiabatic") + CN + HF_ADZ + RADICAL + ANION + (
        "derive ea = energy(radical) - energy(anion) in ev\n"
        "derive ea_kj = energy(radical) - energy(anion) in kj/mol\n"
    )
    assert run(text, "adiabatic-without-relaxation") == [
        (7, 28, "cn",
         "the study asks for adiabatic energies, but `radical` stays at the fixed geometry `cn` in `ea`: an "
         "adiabatic electron affinity takes each state at its own relaxed structure"),
        (8, 26, "cn",
         "the study asks for adiabatic energies, but `anion` stays at the fixed geometry `cn` in `ea`: an "
         "adiabatic electron affinity takes each state at its own relaxed structure"),
    ]


def test_single_atom_needs_no_relaxation_nor_zero_point_energy():
    # Oxygen atom EA (1.46111297 eV, [WPEA]): both adiabatic and 0-0 without any relaxation.
    atom = "geometry o {\n  O 0 0 0\n}\n"
    text = _study("adiabatic", "experiment") + atom + HF_ADZ + (
        "state neutral { geometry = o level = hf_adz charge = 0 multiplicity = 3 }\n"
        "state anion { geometry = o level = hf_adz charge = -1 multiplicity = 2 }\n"
        "derive ea = energy(neutral) - energy(anion) in ev\n"
    )
    assert run(text, "adiabatic-without-relaxation") == []
    assert run(text, "experiment-needs-adiabatic") == []
    assert run(text.replace("adiabatic", "vertical"), "experiment-needs-adiabatic") == []


def test_ghost_atoms_do_not_make_a_molecule():
    atom = "geometry o_cp {\n  O 0 0 0\n  H 0 0 1.0 ghost\n}\n"
    text = _study("adiabatic") + atom + HF_ADZ + (
        "state neutral { geometry = o_cp level = hf_adz charge = 0 multiplicity = 3 }\n"
        "state anion { geometry = o_cp level = hf_adz charge = -1 multiplicity = 2 }\n"
        "derive ea = energy(neutral) - energy(anion)\n"
    )
    assert run(text, "adiabatic-without-relaxation") == []


def test_experiment_vertical_ea_fires_at_kind():
    text = _study("vertical", "experiment") + CN + HF_ADZ + RADICAL + ANION + "derive ea = energy(radical) - energy(anion)\n"
    assert run(text, "experiment-needs-adiabatic") == [
        (1, 46, "vertical",
         "the study compares with experiment but asks for vertical electron affinities: photodetachment "
         "experiments measure the adiabatic electron affinity (relaxed neutral and anion, 0-0 transition); use "
         "kind = adiabatic with frequencies = true on both states"),
    ]
    # Vertical ionization energies are not this rule's business; nor is a comparison with theory.
    ie_study = text.replace("electron_affinity", "ionization_energy").replace("derive ea =", "derive vie =")
    cation = "state cation { geometry = cn level = hf_adz charge = 1 multiplicity = 1 }\n"
    ie_study = ie_study.replace("derive vie = energy(radical) - energy(anion)", cation.strip() + "\nderive vie = energy(cation) - energy(radical)")
    assert run(ie_study, "experiment-needs-adiabatic") == []
    assert run(text.replace("experiment", "theory"), "experiment-needs-adiabatic") == []


def test_experiment_adiabatic_without_frequencies():
    radical = "state radical { geometry = optimize(cn) level = hf_adz charge = 0 multiplicity = 2 frequencies = true }\n"
    anion = "state anion { geometry = optimize(cn) level = hf_adz charge = -1 multiplicity = 1 frequencies = false }\n"
    text = _study("adiabatic", "experiment") + CN + HF_ADZ + radical + anion + "derive ea = energy(radical) - energy(anion)\n"
    assert run(text, "experiment-needs-adiabatic") == [
        (8, 97, "false",
         "the study compares adiabatic energies with experiment, but `anion` in `ea` has no frequencies = true: "
         "adiabatic measured values are 0-0 transitions, which include the zero-point energy of each state, and "
         "that needs a frequency calculation"),
    ]

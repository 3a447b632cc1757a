"""Fixes of the ion-state rules: exact output text, the result parses, the
finding is gone, applying again changes nothing; CRLF files stay CRLF and
comments survive.

Facts of the trade the expected texts rely on:
- IE = E(cation) - E(neutral), EA = E(neutral) - E(anion) (Rienstra-Kiracofe
  et al., Chem. Rev. 102, 231 (2002)).
- Electron counts: CN 13 (doublet), CN- 14 (singlet); H2CO 16 (singlet),
  H2CO+ 15 (doublet); O2 16 (ground state triplet), O2- 17 (doublet).
  The lowest multiplicity consistent with N electrons is 1 for even N and 2
  for odd N.
- An open-shell state cannot use a restricted (closed-shell) reference
  (Szabo and Ostlund, Modern Quantum Chemistry, section 3.8, from memory).
"""
from deckward.rules.fixes.edits import apply_edits
from rule_harness import check_text

PARSE_RULES = {
    "syntax-error", "unknown-key", "duplicate-key", "invalid-value", "undefined-name", "duplicate-name", "missing-setting",
}

CN = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
HF_ADZ = "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"
RADICAL = "state radical { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n"
ANION = "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
CATION = "state cation { geometry = cn level = hf_adz charge = 1 multiplicity = 1 }\n"


def first_fix(text, rule):
    findings, _ = check_text(text, select={rule})
    mine = [f for f in findings if f.rule == rule]
    assert mine and mine[0].fixes, f"{rule} offers no fix"
    return mine[0].fixes[0]


def assert_fix(text, rule, expected, risky=True, also_clean=()):
    fx = first_fix(text, rule)
    assert fx.applicability.value == ("risky" if risky else "safe")
    out = apply_edits(text, fx.edits)
    assert out == expected
    after, _ = check_text(out, select=PARSE_RULES | {rule} | set(also_clean))
    assert [(f.rule, f.message) for f in after] == []
    # Applying again: nothing left to offer that would change the text.
    again, _ = check_text(out, select={rule})
    for f in again:
        for g in f.fixes:
            assert apply_edits(out, g.edits) == out
    return out


# --- missing-ion-state ----------------------------------------------------------------

H2CO_MULTI = '''study "h2co" { goal = ionization_energy }
geometry h2co {
  C  0.0000  0.0000 -0.5297
  O  0.0000  0.0000  0.6742
  H  0.0000  0.9347 -1.1190
  H  0.0000 -0.9347 -1.1190
}
level hf_adz {
  method    = hf
  basis     = aug-cc-pvdz
  reference = restricted
}
# the closed-shell molecule
state neutral {
  geometry     = optimize(h2co)   # start from the guess
  level        = hf_adz
  charge       = 0
  multiplicity = 1
  basis        = { default: aug-cc-pvdz, H: cc-pvdz }
  frequencies  = true
}

derive ie = -orbital(neutral, homo) in ev   # Koopmans first
'''

H2CO_MULTI_FIXED = '''study "h2co" { goal = ionization_energy }
geometry h2co {
  C  0.0000  0.0000 -0.5297
  O  0.0000  0.0000  0.6742
  H  0.0000  0.9347 -1.1190
  H  0.0000 -0.9347 -1.1190
}
level hf_adz {
  method    = hf
  basis     = aug-cc-pvdz
  reference = restricted
}
# the closed-shell molecule
state neutral {
  geometry     = optimize(h2co)   # start from the guess
  level        = hf_adz
  charge       = 0
  multiplicity = 1
  basis        = { default: aug-cc-pvdz, H: cc-pvdz }
  frequencies  = true
}

state cation {
  geometry     = optimize(h2co)
  level        = hf_adz
  charge       = 1
  multiplicity = 2
  basis        = { default: aug-cc-pvdz, H: cc-pvdz }
  frequencies  = true
  reference    = unrestricted
}

derive ie = energy(cation) - energy(neutral) in ev   # Koopmans first
'''


def test_missing_cation_multi_line_block_keeps_layout_comments_and_level():
    assert_fix(H2CO_MULTI, "missing-ion-state", H2CO_MULTI_FIXED,
               also_clean=("restricted-open-shell", "charge-multiplicity-mismatch", "level-mismatch"))


def test_missing_cation_crlf_stays_crlf():
    out = assert_fix(H2CO_MULTI.replace("\n", "\r\n"), "missing-ion-state", H2CO_MULTI_FIXED.replace("\n", "\r\n"))
    assert "\n" not in out.replace("\r\n", "")


def test_missing_ion_one_line_neutral_without_charge_or_multiplicity():
    text = CN + HF_ADZ + "state radical { geometry = cn level = hf_adz }\nderive ea_eig = -orbital(radical, lumo)\n"
    assert_fix(text, "missing-ion-state", CN + HF_ADZ + (
        "state radical { geometry = cn level = hf_adz }\n"
        "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea_eig = energy(radical) - energy(anion)\n"
    ))


def test_missing_ion_name_taken_and_scaled_expression():
    taken = "geometry anion {\n  C 0 0 0\n  N 0 0 1.2\n}\n"
    text = CN + taken + HF_ADZ + RADICAL + "derive ea = -orbital(radical, lumo) * 27.211386245988 in ev\n"
    assert_fix(text, "missing-ion-state", CN + taken + HF_ADZ + RADICAL + (
        "state radical_anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea = (energy(radical) - energy(radical_anion)) * 27.211386245988 in ev\n"
    ))


def test_missing_ion_rewrites_every_derive_that_needs_it():
    text = CN + HF_ADZ + RADICAL + (
        "derive ea_eig = -orbital(radical, lumo) in ev\n"
        "derive ea_beta = -orbital(radical, lumo, beta) in kj/mol\n"
    )
    assert_fix(text, "missing-ion-state", CN + HF_ADZ + RADICAL + ANION + (
        "derive ea_eig = energy(radical) - energy(anion) in ev\n"
        "derive ea_beta = energy(radical) - energy(anion) in kj/mol\n"
    ))


def test_open_shell_ion_keeps_the_neutrals_restricted_open_reference():
    # O2 triplet -> O2- doublet; the level says restricted, the neutral overrides it.
    o2 = "geometry o2 {\n  O 0 0 0\n  O 0 0 1.2075\n}\n"
    level = "level hf_adz { method = hf basis = aug-cc-pvdz reference = restricted }\n"
    neutral = "state neutral { geometry = o2 level = hf_adz charge = 0 multiplicity = 3 reference = restricted_open }\n"
    text = 'study "o2" { goal = electron_affinity }\n' + o2 + level + neutral
    assert_fix(text, "missing-ion-state", text + (
        "state anion { geometry = o2 level = hf_adz charge = -1 multiplicity = 2 reference = restricted_open }\n"
    ), also_clean=("restricted-open-shell", "charge-multiplicity-mismatch"))


def test_closed_shell_ion_drops_the_neutrals_unrestricted_override():
    level = "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
    radical = "state radical { geometry = cn level = hf_adz reference = unrestricted charge = 0 multiplicity = 2 }\n"
    text = CN + level + radical + "derive ea_eig = -orbital(radical, lumo)\n"
    assert_fix(text, "missing-ion-state", CN + level + radical + (
        "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }\n"
        "derive ea_eig = energy(radical) - energy(anion)\n"
    ))


def test_goal_only_fix_inserts_the_state_and_nothing_else():
    text = 'study "cn" { goal = electron_affinity }\n' + CN + HF_ADZ + RADICAL + "# more to come\n"
    assert_fix(text, "missing-ion-state",
               'study "cn" { goal = electron_affinity }\n' + CN + HF_ADZ + RADICAL + ANION + "# more to come\n")


# --- orbital-energy derives rewritten as differences -------------------------------------


def test_virtual_eigenvalue_rewrite_with_existing_anion():
    text = CN + HF_ADZ + RADICAL + ANION + "derive ea = -orbital(radical, lumo) in ev  # first guess\n"
    assert_fix(text, "virtual-eigenvalue-as-ea",
               CN + HF_ADZ + RADICAL + ANION + "derive ea = energy(radical) - energy(anion) in ev  # first guess\n")


def test_virtual_eigenvalue_adds_the_anion_when_missing():
    text = CN + HF_ADZ + RADICAL + "derive ea = -orbital(radical, lumo) in ev\n"
    assert_fix(text, "virtual-eigenvalue-as-ea",
               CN + HF_ADZ + RADICAL + ANION + "derive ea = energy(radical) - energy(anion) in ev\n",
               also_clean=("missing-ion-state",))


def test_koopmans_rewrite_and_no_fix_without_cation():
    text = CN + HF_ADZ + RADICAL + CATION + "derive ie = -orbital(radical, homo) in ev\n"
    assert_fix(text, "koopmans-ip",
               CN + HF_ADZ + RADICAL + CATION + "derive ie = energy(cation) - energy(radical) in ev\n")
    lonely = CN + HF_ADZ + RADICAL + "derive ie = -orbital(radical, homo) in ev\n"
    findings, _ = check_text(lonely, select={"koopmans-ip"})
    assert [f.fixes for f in findings] == [()]


def test_dft_anion_homo_rewritten_with_its_neutral():
    level = "level b3 { method = b3lyp basis = aug-cc-pvdz }\n"
    states = (
        "state radical { geometry = cn level = b3 charge = 0 multiplicity = 2 }\n"
        "state anion { geometry = cn level = b3 charge = -1 multiplicity = 1 }\n"
    )
    text = CN + level + states + "derive ea = -orbital(anion, homo) in ev\n"
    assert_fix(text, "dft-eigenvalue-as-ie-or-ea",
               CN + level + states + "derive ea = energy(radical) - energy(anion) in ev\n")


# --- sign conventions ----------------------------------------------------------------


def test_ea_swap_keeps_crlf_comment_and_spacing():
    text = (CN + HF_ADZ + RADICAL + ANION + "derive ea = energy( anion )  -  energy(radical) in ev   # as printed\n").replace("\n", "\r\n")
    expected = (CN + HF_ADZ + RADICAL + ANION + "derive ea = energy(radical)  -  energy( anion ) in ev   # as printed\n").replace("\n", "\r\n")
    assert_fix(text, "ea-sign-convention", expected, risky=False)


def test_ie_swap_inside_parentheses_and_scaling():
    text = CN + HF_ADZ + RADICAL + CATION + "derive ie = 27.211386245988 * (energy(radical) - energy(cation))\n"
    assert_fix(text, "ie-sign-convention",
               CN + HF_ADZ + RADICAL + CATION + "derive ie = 27.211386245988 * (energy(cation) - energy(radical))\n",
               risky=False)


# --- level-mismatch ---------------------------------------------------------------------

LEVELS = (
    "level cc_atz { method = ccsd(t) basis = aug-cc-pvtz frozen_core = true }\n"
    "level mp2_adz { method = mp2 basis = aug-cc-pvdz }\n"
)
ANION_MULTI = '''state anion {
  geometry     = cn
  level        = mp2_adz
  charge       = -1
  multiplicity = 1
  method       = ccsd   # cheaper
  reference    = restricted
}
'''
EA = "derive ea = energy(radical) - energy(anion) in ev\n"


def test_level_mismatch_multi_line_state_keeps_comment_and_reference():
    radical = "state radical { geometry = cn level = cc_atz charge = 0 multiplicity = 2 }\n"
    fixed = ANION_MULTI.replace("mp2_adz", "cc_atz").replace("  method       = ccsd   # cheaper\n", "  # cheaper\n")
    assert_fix(CN + LEVELS + radical + ANION_MULTI + EA, "level-mismatch", CN + LEVELS + radical + fixed + EA)
    assert_fix((CN + LEVELS + radical + ANION_MULTI + EA).replace("\n", "\r\n"), "level-mismatch",
               (CN + LEVELS + radical + fixed + EA).replace("\n", "\r\n"))


def test_level_mismatch_copies_the_first_states_override():
    radical = "state radical { geometry = cn level = cc_atz charge = 0 multiplicity = 2 basis = aug-cc-pvqz }\n"
    fixed = ANION_MULTI.replace("mp2_adz", "cc_atz").replace("  method       = ccsd   # cheaper\n", "  # cheaper\n")
    fixed = fixed.replace("  reference    = restricted\n", "  reference    = restricted\n  basis        = aug-cc-pvqz\n")
    assert_fix(CN + LEVELS + radical + ANION_MULTI + EA, "level-mismatch", CN + LEVELS + radical + fixed + EA)


def test_level_mismatch_first_state_without_level():
    radical = "state radical { geometry = cn method = hf basis = aug-cc-pvdz charge = 0 multiplicity = 2 }\n"
    anion = "state anion { geometry = cn level = mp2_adz charge = -1 multiplicity = 1 }\n"
    assert_fix(CN + LEVELS + radical + anion + EA, "level-mismatch", CN + LEVELS + radical + (
        "state anion { geometry = cn charge = -1 multiplicity = 1 method = hf basis = aug-cc-pvdz }\n"
    ) + EA)


# --- geometry fixes -----------------------------------------------------------------------


def test_vertical_fix_uses_first_geometry():
    cn_anion = "geometry cn_anion {\n  C 0 0 0\n  N 0 0 1.1765\n}\n"
    head = 'study "cn" { goal = electron_affinity kind = vertical }\n' + CN + cn_anion + HF_ADZ + RADICAL
    text = head + "state anion { geometry = cn_anion level = hf_adz charge = -1 multiplicity = 1 }  # longer bond\n" + EA
    assert_fix(text, "vertical-geometry-mismatch",
               head + "state anion { geometry = cn level = hf_adz charge = -1 multiplicity = 1 }  # longer bond\n" + EA)


def test_adiabatic_fix_wraps_in_optimize_crlf():
    head = 'study "cn" { goal = electron_affinity kind = adiabatic }\n' + CN + HF_ADZ
    radical = "state radical { geometry = optimize(cn) level = hf_adz charge = 0 multiplicity = 2 }\n"
    text = (head + radical + ANION + EA).replace("\n", "\r\n")
    expected = (head + radical + ANION.replace("= cn ", "= optimize(cn) ") + EA).replace("\n", "\r\n")
    assert_fix(text, "adiabatic-without-relaxation", expected)

"""Every example of the deck-language specification parses and resolves with
no error findings (the examples are written out here as fixtures)."""
import pytest

from deckward.grammar.findings import Severity
from rule_harness import check_text

STUDY = '''
study "acceptor-fragments-ea" {
  goal    = electron_affinity    # ionization_energy | electron_affinity |
                                 # fundamental_gap | excitation_energy | energy
  kind    = vertical             # vertical | adiabatic
  compare = experiment           # experiment | theory | none
  note    = "screening set, first pass"
}
'''

GEOMETRY = '''
geometry no2 {
  units = angstrom        # angstrom (default) | bohr
  N   0.000000   0.000000   0.000000
  O   0.000000   1.098900   0.465300
  O   0.000000  -1.098900   0.465300
}
'''

BASIS_SET = '''
basis_set acc_diffuse {
  from = { default: cc-pvdz, O: aug-cc-pvdz }
  add O s 0.0273          # element, angular momentum (s p d f g), exponent
  add O p 0.0214
}
'''

LEVEL = '''
level ccsdt_atz {
  method      = ccsd(t)
  basis       = aug-cc-pvtz     # a library word, a basis_set name, or a map as in `from`
  reference   = unrestricted    # restricted | unrestricted | restricted_open
  frozen_core = true            # true | false
}
'''

STATES = '''
state neutral {
  geometry     = no2                  # a geometry name, or optimize(NAME)
  level        = ccsdt_atz
  charge       = 0
  multiplicity = 2
}

state anion {
  geometry     = no2
  level        = ccsdt_atz
  charge       = -1
  multiplicity = 1
  reference    = restricted           # any level key may be overridden per state
}
'''

DERIVES = '''
derive ea as electron_affinity = energy(neutral) - energy(anion) in ev
derive ea_eig = -orbital(neutral, lumo) in ev
'''

COMPLETE = '''
# Vertical electron affinity of nitrogen dioxide, delta-method at CCSD(T).
study "acceptor-no2" {
  goal = electron_affinity
  kind = vertical
}

geometry no2 {
  units = angstrom
  N   0.000000   0.000000   0.000000
  O   0.000000   1.098900   0.465300
  O   0.000000  -1.098900   0.465300
}

level cc_tz {
  method      = ccsd(t)
  basis       = aug-cc-pvtz
  reference   = unrestricted
  frozen_core = true
}

state neutral { geometry = no2  level = cc_tz  charge = 0   multiplicity = 2 }
state anion   { geometry = no2  level = cc_tz  charge = -1  multiplicity = 1 }

derive ea as electron_affinity = energy(neutral) - energy(anion) in ev
'''

SUPPRESSION = '''
geometry no2 {
  N   0.000000   0.000000   0.000000
  O   0.000000   1.098900   0.465300
  O   0.000000  -1.098900   0.465300
}
level cc_tz { method = ccsd(t) basis = aug-cc-pvtz reference = unrestricted }
state neutral { geometry = no2  level = cc_tz  charge = 0   multiplicity = 2 }
derive ea_eig = -orbital(neutral, lumo)   # allow: virtual-eigenvalue-as-ea -- reason in words
'''

SPEC_DECKS = {
    "study+geometry+level+states+derives": STUDY + GEOMETRY + LEVEL + STATES + DERIVES,
    "basis_set": GEOMETRY + BASIS_SET,
    "complete": COMPLETE,
    "suppression": SUPPRESSION,
}


@pytest.mark.parametrize("name", sorted(SPEC_DECKS))
def test_spec_example_has_no_errors(name):
    findings, ws = check_text(SPEC_DECKS[name])
    errors = [(f.rule, f.span.line, f.message) for f in findings if f.severity is Severity.ERROR]
    assert errors == []


def test_complete_example_model():
    _, ws = check_text(COMPLETE)
    assert ws.study.goal.value == "electron_affinity"
    assert ws.study.kind.value == "vertical"
    no2 = ws.geometry("no2")
    assert [a.symbol.value for a in no2.atoms] == ["N", "O", "O"]
    assert no2.atoms[2].xyz == (0.0, -1.0989, 0.4653)
    neutral, anion = ws.states["neutral"], ws.states["anion"]
    assert (neutral.charge, neutral.multiplicity, anion.charge, anion.multiplicity) == (0, 2, -1, 1)
    assert anion.level.name.value == "cc_tz"
    assert anion.settings.method.value == "ccsd(t)"
    assert anion.settings.basis.default.value == "aug-cc-pvtz"
    assert anion.settings.frozen_core.value is True
    (ea,) = ws.derives
    assert ws.quantity_of(ea) == "electron_affinity"
    assert ea.unit_name == "ev"


def test_state_override_applies_only_to_that_state():
    _, ws = check_text(GEOMETRY + LEVEL + STATES)
    assert ws.states["neutral"].reference == "unrestricted"
    assert ws.states["anion"].reference == "restricted"
    assert ws.states["anion"].settings.basis.default.value == "aug-cc-pvtz"


def test_basis_set_map_and_shells():
    _, ws = check_text(GEOMETRY + BASIS_SET)
    bs = ws.basis_set("acc_diffuse")
    assert bs.source.default.value == "cc-pvdz"
    assert bs.source.word_for("o").value == "aug-cc-pvdz"
    assert bs.source.word_for("N").value == "cc-pvdz"
    assert [(s.element.value, s.letter.value, s.l, s.exponent.value) for s in bs.shells] == [
        ("O", "s", 0, 0.0273),
        ("O", "p", 1, 0.0214),
    ]


def test_keywords_and_symbols_are_case_insensitive():
    text = 'GEOMETRY cl2 { UNITS = BOHR\n CL 0 0 0\n cl 0 0 3.76 GHOST }\nLevel l { METHOD = HF basis = CC-PVDZ REFERENCE = Unrestricted }\n'
    findings, ws = check_text(text)
    assert [f for f in findings if f.severity is Severity.ERROR] == []
    g = ws.geometry("cl2")
    assert g.unit == "bohr" and g.atoms[1].ghost and not g.atoms[0].ghost
    assert ws.level("l").settings.reference.value == "unrestricted"


def test_quoted_basis_name_and_optimize():
    text = (GEOMETRY + 'level l { method = b3lyp basis = "6-311++g(2d,p)" }\n'
            'state s { geometry = optimize( no2 ) level = l charge = 0 multiplicity = 2 frequencies = true }\n')
    findings, ws = check_text(text)
    assert [f for f in findings if f.severity is Severity.ERROR] == []
    s = ws.states["s"]
    assert s.optimize and s.geometry.name.value == "no2"
    assert s.settings.basis.default.value == "6-311++g(2d,p)"
    assert s.state.frequencies.value is True


@pytest.mark.parametrize(
    "expr, quantity",
    [
        ("derive ip = energy(a) - energy(b)", "ionization_energy"),
        ("derive vie_1 = energy(a) - energy(b)", "ionization_energy"),
        ("derive ionization_no2 = energy(a) - energy(b)", "ionization_energy"),
        ("derive ea_eig = -orbital(a, lumo)", "electron_affinity"),
        ("derive affinity = energy(a) - energy(b)", "electron_affinity"),
        ("derive gap_ks = orbital(a, lumo) - orbital(a, homo)", "fundamental_gap"),
        ("derive total = energy(a)", "energy"),  # from the study goal
        ("derive ea as reaction_energy = energy(a) - energy(b)", "reaction_energy"),
    ],
)
def test_quantity_inference(expr, quantity):
    text = ('study { goal = energy }\ngeometry g { H 0 0 0 }\nlevel l { method = hf basis = sto-3g }\n'
            'state a { geometry = g level = l charge = 0 multiplicity = 2 }\n'
            'state b { geometry = g level = l charge = 1 multiplicity = 1 }\n' + expr + "\n")
    _, ws = check_text(text)
    (d,) = ws.derives
    assert ws.quantity_of(d) == quantity


def test_orbital_arguments():
    text = ('geometry g { H 0 0 0 }\nlevel l { method = hf basis = sto-3g }\n'
            'state a { geometry = g level = l charge = 0 multiplicity = 2 }\n'
            'derive x = orbital(a, homo-2, beta) - orbital(a, LUMO+1)\n')
    _, ws = check_text(text)
    (d,) = ws.derives
    left, right = d.expr.left, d.expr.right
    assert (left.orbital.value, left.offset, left.spin.value) == ("homo", -2, "beta")
    assert (right.orbital.value, right.offset, right.spin) == ("lumo", 1, None)

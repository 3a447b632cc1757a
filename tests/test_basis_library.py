"""Basis library index, checked against PySCF and the Basis Set Exchange."""

import gzip
import json
import subprocess
import sys
import warnings

import pytest

from deckward.rules.knowledge import basis_library as bl
from build_data_script import build_data

pyscf_basis = pytest.importorskip("pyscf.gto.basis")
from pyscf import gto  # noqa: E402
from pyscf.data.elements import ELEMENTS  # noqa: E402
from pyscf.lib.exceptions import BasisNotFoundError  # noqa: E402

SAMPLE = [
    "sto-3g", "3-21g", "6-31g*", "6-31+g*", "6-311++g**", "cc-pvdz", "aug-cc-pvtz",
    "cc-pcvtz", "cc-pwcvdz", "aug-cc-pwcvtz", "def2-svp", "def2-svpd", "def2-tzvppd",
    "pcseg-1", "aug-pcseg-2", "iglo3", "minao", "ano", "lanl2dz", "gth-dzvp", "cc-pvdz-jkfit",
    "dyall_v2z",
]


@pytest.fixture
def pyscf_library_only(monkeypatch):
    """PySCF's own loader with its basis_set_exchange fallback switched off."""
    from pyscf.gto.basis import bse

    monkeypatch.setattr(bse, "basis_set_exchange", None)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield


def pyscf_covers(word, symbol):
    try:
        return bool(pyscf_basis.load(word, symbol))
    except (BasisNotFoundError, KeyError, FileNotFoundError):
        return False


@pytest.mark.parametrize(
    "word", ["6-31+G*", "Aug-CC-pVTZ", "def2_SVP", "cc pvdz", "6-311++G(2df,2pd)", "weigend+etb"]
)
def test_normalize_is_pyscfs(word):
    assert bl.normalize(word) == pyscf_basis._format_basis_name(word)


def bse_covers(word) -> set[str]:
    """Elements the Basis Set Exchange's set of this name covers (PySCF falls
    back to it for elements its own copy lacks, and so does the runner)."""
    bse = pytest.importorskip("basis_set_exchange")
    from basis_set_exchange import lut

    for meta in bse.get_metadata().values():
        names = [meta["display_name"]] + list(meta.get("other_names") or [])
        if any(bl.normalize(n) == bl.normalize(word) for n in names):
            version = meta["versions"][meta["latest_version"]]
            return {lut.element_sym_from_Z(int(z), True) for z in version["elements"]}
    return set()


@pytest.mark.parametrize("word", SAMPLE)
def test_coverage_agrees_with_pyscf(word, pyscf_library_only):
    info = bl.lookup(word)
    pyscf_set = {s for s in ELEMENTS[1:87] if pyscf_covers(word, s)}
    expected = pyscf_set | (bse_covers(word) & set(ELEMENTS[1:87]))
    assert {s for s in info.elements if s in ELEMENTS[1:87]} == expected


@pytest.mark.parametrize(
    "word,present,absent",
    [
        # absences read from PySCF's bundled files and the Basis Set Exchange;
        # the test re-asks PySCF (cc-pwCVDZ's B-Ar come from the Basis Set Exchange)
        ("iglo3", ["H", "C", "F", "Cl"], ["O", "N"]),
        ("cc-pwcvdz", ["Ga", "Br"], ["H", "He"]),
        ("6-31g*", ["H", "O", "Cl", "Br"], ["I", "Xe"]),
        ("sto-3g", ["H", "O", "I"], ["Rn"]),
        ("def2-svp", ["H", "O", "I"], ["Fr"]),
    ],
)
def test_presence_and_absence(word, present, absent, pyscf_library_only):
    info = bl.lookup(word)
    for s in present:
        assert s in info.elements and pyscf_covers(word, s), s
        assert bl.element_data(word, s) is not None
    for s in absent:
        assert s not in info.elements and not pyscf_covers(word, s), s
        assert bl.element_data(word, s) is None


@pytest.mark.parametrize(
    "word", ["6-31g(d)", "6-31g(d,p)", "6-31+g(d,p)", "6-311++g(2df,2pd)", "6-311g(3df,3pd)", "6-31++G(2D,2P)"]
)
def test_pople_suffixes_agree_with_pyscf(word, pyscf_library_only):
    info = bl.lookup(word)
    assert info is not None and info.family == "pople"
    for s in ("H", "C", "O", "Cl", "Br"):
        assert (s in info.elements) == pyscf_covers(word, s), s
        if s in info.elements:
            check_against_pyscf_molecule(word, s)


@pytest.mark.parametrize("word", ["6-31g(x)", "6-31g(d,p", "6-31g(d)(p)", "3-21g(d)", "7-31g(d)"])
def test_invalid_pople_suffixes(word):
    assert bl.lookup(word) is None


def check_against_pyscf_molecule(word, symbol):
    """Shell counts and exponents from a PySCF molecule of one atom."""
    z = ELEMENTS.index(symbol)
    mol = gto.M(atom=f"{symbol} 0 0 0", basis=word, spin=z % 2, verbose=0)
    data = bl.element_data(word, symbol)
    counts = [0] * len(data.functions_per_l)
    exps = [set() for _ in counts]
    for b in range(mol.nbas):
        l = mol.bas_angular(b)
        counts[l] += mol.bas_nctr(b)
        exps[l].update(float(e) for e in mol.bas_exp(b))
    assert tuple(counts) == data.functions_per_l
    for l, e in enumerate(exps):
        assert data.smallest_exponents[l] == pytest.approx(sorted(e)[:3], rel=1e-9)


@pytest.mark.parametrize(
    "word,symbol", [("cc-pvdz", "O"), ("aug-cc-pvdz", "Cl"), ("6-311++g**", "H"), ("def2-tzvp", "S")]
)
def test_element_data_matches_a_pyscf_molecule(word, symbol):
    check_against_pyscf_molecule(word, symbol)


def test_cc_pvdz_oxygen_is_3s2p1d():
    # Dunning, J. Chem. Phys. 90, 1007 (1989): cc-pVDZ for B-Ne is [3s2p1d]
    assert bl.element_data("cc-pVDZ", "o").functions_per_l == (3, 2, 1)


# Smallest O s and p exponents, check-values.md section 5 (read from the
# Basis Set Exchange, basis_set_exchange package 0.12), with the digits given.
CHECK_VALUES_O = {
    "6-31g*": (0.27, 0.27),
    "6-31+g*": (0.0845, 0.0845),
    "cc-pvdz": (0.302, 0.275),
    "aug-cc-pvdz": (0.079, 0.069),
    "def2-svp": (0.255, 0.276),
    "def2-svpd": (0.077, 0.069),
}
BSE_NAMES = {
    "6-31g*": "6-31G*", "6-31+g*": "6-31+G*", "cc-pvdz": "cc-pVDZ",
    "aug-cc-pvdz": "aug-cc-pVDZ", "def2-svp": "def2-SVP", "def2-svpd": "def2-SVPD",
}


@pytest.mark.parametrize("word", sorted(CHECK_VALUES_O))
def test_smallest_oxygen_exponents_match_check_values(word):
    data = bl.element_data(word, "O")
    for l, value in enumerate(CHECK_VALUES_O[word]):
        decimals = len(repr(value).split(".")[1])
        assert abs(data.smallest_exponents[l][0] - value) <= 0.5 * 10**-decimals + 1e-12, l


@pytest.mark.parametrize("word", sorted(BSE_NAMES))
def test_smallest_oxygen_exponents_match_basis_set_exchange(word):
    bse = pytest.importorskip("basis_set_exchange")
    data = bse.get_basis(BSE_NAMES[word], elements=[8])
    per_l: dict[int, set] = {}
    for shell in data["elements"]["8"]["electron_shells"]:
        ls = shell["angular_momentum"]
        ls = ls if len(ls) > 1 else ls * len(shell["coefficients"])
        for l in set(ls):
            per_l.setdefault(l, set()).update(float(e) for e in shell["exponents"])
    ours = bl.element_data(word, "O")
    for l in (0, 1):
        assert ours.smallest_exponents[l][0] == pytest.approx(min(per_l[l]), rel=1e-6)


@pytest.mark.parametrize(
    "word,zeta,family,core_valence",
    [
        ("sto-3g", "minimal", "sto", False),
        ("minao", "minimal", "minao", False),
        ("3-21g", "double", "pople", False),
        ("6-31g*", "double", "pople", False),
        ("6-31++g**", "double", "pople", False),
        ("6-311+g*", "triple", "pople", False),
        ("cc-pvdz", "double", "cc", False),
        ("aug-cc-pvtz", "triple", "aug-cc", False),
        ("cc-pvqz", "quadruple", "cc", False),
        ("cc-pv5z", "quintuple", "cc", False),
        ("cc-pcvtz", "triple", "cc", True),
        ("aug-cc-pwcvqz", "quadruple", "aug-cc", True),
        ("def2-svp", "double", "def2", False),
        ("def2-svpd", "double", "def2", False),
        ("def2-tzvpp", "triple", "def2", False),
        ("def2-qzvpd", "quadruple", "def2", False),
        ("pcseg-1", "double", "pcseg", False),
        ("aug-pcseg-2", "triple", "aug-pcseg", False),
        ("cc-pvdz-jkfit", "unknown", "auxiliary", False),
    ],
)
def test_classification(word, zeta, family, core_valence):
    # zeta levels as the sets' authors name them (facts of the trade)
    info = bl.lookup(word)
    assert (info.zeta, info.family, info.core_valence) == (zeta, family, core_valence)


def test_zeta_counted_from_data_where_the_name_is_silent():
    info = bl.lookup("tzv")  # Ahlrichs TZV: O [5s3p]
    assert info.zeta == "triple" and info.zeta_source == "data"


def test_lookup_spellings_and_aliases():
    assert bl.lookup("6-31G**").name == "6-31g**"
    assert bl.lookup("631gss").name == "6-31g**"
    assert bl.lookup("AUG-CC-PVDZ").name == "aug-cc-pvdz"
    assert bl.lookup("anorcc").name == "ano"
    assert bl.lookup("not-a-basis") is None
    assert "631+gs" in bl.lookup("6-31+g*").aliases


def test_closest():
    assert bl.closest("aug-cc-pvdzz")[0] == "aug-cc-pvdz"
    assert bl.closest("def2svpp")[0] == "def2-svp"
    assert bl.closest("") == []


def test_all_names_are_accepted():
    names = bl.all_names()
    assert {"cc-pvdz", "6-31+g*", "6-311++g(2df,2pd)", "def2-tzvpd", "sto-3g"} <= set(names)
    assert all(bl.lookup(n) is not None for n in names)


def test_covering():
    names = bl.covering({"O", "Cl", "h"})
    assert "cc-pvdz" in names and "6-31+g*" in names
    assert "iglo3" not in names  # no O
    assert "cc-pvdz-jkfit" not in names  # auxiliary left out by default
    assert "cc-pvdz-jkfit" in bl.covering({"O"}, include_auxiliary=True)


def test_ecp_presence():
    assert bl.element_data("def2-tzvp", "I").has_ecp
    assert not bl.element_data("def2-tzvp", "Cl").has_ecp
    assert bl.element_data("lanl2dz", "Br").has_ecp


def test_stored_index_matches_installed_pyscf():
    import pyscf

    with gzip.open(build_data.BASIS_INDEX_FILE, "rt") as fh:
        stored = json.load(fh)
    version_note = (
        f"index built with PySCF {stored['pyscf_version']}, installed PySCF {pyscf.__version__}"
        + ("" if stored["pyscf_version"] == pyscf.__version__ else " (VERSIONS DIFFER)")
        + ": run `python bench/build_data.py` to regenerate"
    )
    headers, records = build_data.basis_entries(only=set(SAMPLE))
    assert set(headers) == set(SAMPLE), version_note
    for name in SAMPLE:
        assert stored["bases"][name] == headers[name], f"{name}: {version_note}"
        assert json.loads(stored["records"][name]) == json.loads(
            json.dumps(records[name])
        ), f"{name}: {version_note}"


def test_every_pyscf_alias_is_a_word(pyscf_library_only):
    # Every ALIAS key that PySCF's normalisation can produce and that yields
    # orbital functions is indexed; the keys left out give PySCF no orbital
    # shells for any element (effective-core-potential-only files).
    words = set(json.loads(gzip.open(build_data.BASIS_INDEX_FILE).read())["words"])
    missing = [
        key
        for key in list(pyscf_basis.ALIAS) + list(pyscf_basis.GTH_ALIAS)
        if pyscf_basis._format_basis_name(key) == key and key not in words
    ]
    assert len(missing) < 30, missing
    for key in missing:
        assert not any(pyscf_covers(key, s) for s in ELEMENTS[1:87]), key


def test_typing_path_never_imports_pyscf():
    code = (
        "import sys, deckward.rules.knowledge.basis_library as b, deckward.rules.knowledge.basis_families as f, "
        "deckward.rules.knowledge.elements as e, deckward.rules.knowledge.methods as m, deckward.rules.knowledge.units as u\n"
        "b.lookup('cc-pvdz'); b.element_data('6-311++g(2df,2pd)', 'O'); b.closest('ccpvdzz')\n"
        "f.augmented_counterpart('6-31g*'); e.lookup('Cl'); m.lookup('b3lyp')\n"
        "assert 'pyscf' not in sys.modules, 'pyscf was imported'\n"
    )
    subprocess.run([sys.executable, "-c", code], check=True)


# ------------------------------------------------ the Basis Set Exchange index

BSE_SAMPLE = ["aug-cc-pCVTZ", "jun-cc-pV(T+d)Z", "may-cc-pV(T+d)Z", "d-aug-cc-pVTZ", "6-31G*", "def2-TZVP",
              "pcseg-2", "ANO-RCC-VTZP"]


def test_stored_bse_index_matches_installed_basis_set_exchange():
    bse = pytest.importorskip("basis_set_exchange")
    with gzip.open(build_data.BSE_INDEX_FILE, "rt") as fh:
        stored = json.load(fh)
    note = (f"index built with basis_set_exchange {stored['bse_version']}, installed {bse.version()}: "
            "run `python bench/build_data.py` to regenerate")
    fresh = build_data.build_bse_index(only={n.lower() for n in BSE_SAMPLE})
    assert set(fresh["bases"]) == set(BSE_SAMPLE), note
    for name in BSE_SAMPLE:
        assert stored["bases"][name] == fresh["bases"][name], f"{name}: {note}"
        assert stored["records"][name] == fresh["records"][name], f"{name}: {note}"
    # every set the package publishes with orbital functions is indexed
    published = {m["display_name"] for m in bse.get_metadata().values()}
    assert len(published - set(stored["bases"])) < 15, published - set(stored["bases"])


@pytest.mark.parametrize(
    "word, name",
    [
        ("aug-cc-pCVTZ", "aug-cc-pCVTZ"),
        ("jun-cc-pVTZ", "jun-cc-pV(T+d)Z"),
        ("may-cc-pVTZ", "may-cc-pV(T+d)Z"),
        ("d-aug-cc-pVTZ", "d-aug-cc-pVTZ"),
        ("D-AUG-CC-PVTZ", "d-aug-cc-pVTZ"),
    ],
)
def test_sets_pyscf_lacks_are_found_in_the_basis_set_exchange(word, name):
    info = bl.lookup(word)
    assert info is not None and info.name == name and info.source == "bse"
    assert info.zeta == "triple" and not info.auxiliary
    # aug-cc-pCVTZ has no H (no core to correlate); d-aug-cc-pVTZ is published for H-Ne only
    assert {"C", "N", "O", "F"} <= info.elements


def test_bse_records_agree_with_the_package():
    bse = pytest.importorskip("basis_set_exchange")
    # aug-cc-pCVTZ on O: 7s6p4d2f... smallest s and p are the aug- layer, as
    # published by the Basis Set Exchange (Woon and Dunning 1995 core-valence set).
    data = bse.get_basis("aug-cc-pCVTZ", elements=[8])["elements"]["8"]["electron_shells"]
    smallest_p = min(float(e) for sh in data if 1 in sh["angular_momentum"] for e in sh["exponents"])
    o = bl.element_data("aug-cc-pcvtz", "o")
    assert o.smallest_exponents[1][0] == smallest_p
    assert o.functions_per_l[:2] == (
        sum(len(sh["coefficients"]) for sh in data if sh["angular_momentum"] == [0]),
        sum(len(sh["coefficients"]) for sh in data if sh["angular_momentum"] == [1]),
    )


def test_pyscf_copy_wins_for_a_word_both_libraries_know():
    assert bl.lookup("cc-pvtz").source == "pyscf"
    assert bl.lookup("6-311++G(2df,2pd)").source == "pyscf"
    assert bl.bse_name("cc-pvtz") is None
    assert bl.bse_name("jun-cc-pvtz") == "jun-cc-pV(T+d)Z"


def test_names_neither_library_knows_stay_unknown():
    assert bl.lookup("aug-cc-pvxyz") is None
    assert bl.lookup("cc-pvtzz") is None
    # did-you-mean draws on both libraries
    assert "d-aug-cc-pVTZ" in bl.closest("d-aug-cc-pvtzz")
    assert bl.closest("cc-pvtzz")[0] == "cc-pvtz"


def test_bse_lookup_imports_neither_library():
    code = (
        "import sys, deckward.rules.knowledge.basis_library as b\n"
        "assert b.lookup('jun-cc-pvtz').source == 'bse'; b.element_data('aug-cc-pcvtz', 'O'); b.closest('daugccpvtzz')\n"
        "assert 'pyscf' not in sys.modules and 'basis_set_exchange' not in sys.modules\n"
    )
    subprocess.run([sys.executable, "-c", code], check=True)


EA_DECK = """study "acceptor-cn" {{ goal = electron_affinity }}
geometry cn {{
  C 0 0 0
  N 0 0 1.1718
}}
level hf_x {{ method = hf basis = {basis} reference = unrestricted }}
state radical {{ geometry = cn level = hf_x charge = 0 multiplicity = 2 }}
state anion {{ geometry = cn level = hf_x charge = -1 multiplicity = 1 }}
derive ea as electron_affinity = energy(radical) - energy(anion) in ev
"""


@pytest.mark.parametrize("basis", ["aug-cc-pCVTZ", "jun-cc-pVTZ", "may-cc-pVTZ", "d-aug-cc-pVTZ"])
def test_check_knows_published_sets_pyscf_does_not_ship(basis):
    from rule_harness import check_text

    findings, _ = check_text(EA_DECK.format(basis=basis))
    assert [f for f in findings if f.rule in ("unknown-basis", "basis-missing-element")] == []


def test_check_still_reports_a_name_no_library_knows():
    from rule_harness import check_text

    findings, _ = check_text(EA_DECK.format(basis="aug-cc-pvxyz"))
    [f] = [f for f in findings if f.rule == "unknown-basis"]
    assert f.severity.value == "error"

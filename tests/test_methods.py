"""Method table, checked against PySCF's libxc interface."""

import pytest

from deckward.rules.knowledge import methods

libxc = pytest.importorskip("pyscf.dft.libxc")

DFT = [m for m in methods.METHODS if m.family == "dft"]


@pytest.mark.parametrize("method", DFT, ids=lambda m: m.name)
def test_every_xc_string_is_accepted_by_pyscf(method):
    libxc.parse_xc(method.pyscf_xc)  # raises on an unknown functional


@pytest.mark.parametrize("method", DFT, ids=lambda m: m.name)
def test_dft_class_agrees_with_libxc(method):
    xc = method.pyscf_xc
    hybrid = libxc.is_hybrid_xc(xc)
    omega = libxc.rsh_coeff(xc)[0] if hybrid else 0.0
    kind = libxc.xc_type(xc)
    expected = {
        "lda": (kind == "LDA" and not hybrid),
        "gga": (kind == "GGA" and not hybrid),
        "meta-gga": (kind == "MGGA" and not hybrid),
        "hybrid": (hybrid and omega == 0.0),
        "range-separated": (hybrid and omega != 0.0),
        # B2PLYP's SCF part is a global hybrid with 53 % HF exchange
        # (Grimme, J. Chem. Phys. 124, 034108 (2006))
        "double-hybrid": (hybrid and omega == 0.0 and libxc.hybrid_coeff(xc) == pytest.approx(0.53)),
    }
    assert expected[method.dft_class], (method.name, kind, hybrid, omega)


def test_hf_reference_fraction_of_known_hybrids():
    # B3LYP 20 %, PBE0 25 % exact exchange (defining papers; facts of the trade)
    assert libxc.hybrid_coeff(methods.lookup("b3lyp").pyscf_xc) == pytest.approx(0.20)
    assert libxc.hybrid_coeff(methods.lookup("PBE0").pyscf_xc) == pytest.approx(0.25)


@pytest.mark.parametrize(
    "word,name",
    [("CAM-B3LYP", "cam-b3lyp"), ("camb3lyp", "cam-b3lyp"), ("wB97X_D", "wb97x-d"),
     ("CCSD(T)", "ccsd(t)"), ("scf", "hf"), ("HF", "hf"), ("M06-2X", "m06-2x"),
     ("lda", "svwn"), ("df-mp2", "ri-mp2")],
)
def test_lookup_is_case_and_dash_insensitive(word, name):
    assert methods.lookup(word).name == name


def test_unknown_words():
    assert methods.lookup("b3lpy") is None
    assert methods.lookup("ccsdt") is None  # full triples is not CCSD(T)
    assert methods.closest("b3lpy")[0] == "b3lyp"
    assert methods.closest("ccsd(t") == ["ccsd(t)", "ccsd", "cisd"]
    assert methods.closest("") == []


def test_families_and_flags():
    hf, mp2, cc, b3lyp, wb97x = (methods.lookup(w) for w in ("hf", "mp2", "ccsd(t)", "b3lyp", "wb97x"))
    assert (hf.family, hf.correlated, hf.eigenvalues_approximate_ie) == ("hf", False, True)
    assert (mp2.family, mp2.correlated) == ("mp2", True)
    assert (cc.family, cc.correlated, cc.pyscf_kind) == ("cc", True, "ccsd(t)")
    assert (b3lyp.family, b3lyp.correlated, b3lyp.eigenvalues_approximate_ie) == ("dft", False, False)
    assert wb97x.dft_class == "range-separated" and not wb97x.eigenvalues_approximate_ie
    assert methods.lookup("b2plyp").pyscf_kind == "dft+mp2"


def test_all_names_cover_every_alias_once():
    names = methods.all_names()
    assert len(names) == len(set(names))
    for word in names:
        assert methods.lookup(word) is not None
    assert {"hf", "b3lyp", "ccsd(t)", "mp2", "pbe0"} <= set(names)

"""Family counterparts: both members exist and the augmented one is more diffuse."""

import pytest

from deckward.rules.knowledge import basis_families, basis_library

AUG_PAIRS = sorted(basis_families.AUGMENTED.items())
TZ_PAIRS = sorted(basis_families.TRIPLE_ZETA.items())


@pytest.mark.parametrize("pair", AUG_PAIRS + TZ_PAIRS, ids=lambda p: f"{p[0]}->{p[1]}")
def test_both_members_are_in_the_library(pair):
    for word in pair:
        info = basis_library.lookup(word)
        assert info is not None, word
        assert info.name == word  # tables are written in canonical spelling


@pytest.mark.parametrize("pair", AUG_PAIRS, ids=lambda p: f"{p[0]}->{p[1]}")
def test_augmented_counterpart_is_more_diffuse(pair):
    # "More diffuse": the smallest s and p exponents shrink by at least a
    # factor of 2 (common practice, no source; check-values.md section 5 shows
    # factors of about 3-4 for O in the BSE data).
    # Sets without O or Cl (effective-core-potential and heavy-element sets)
    # are checked on the lightest non-hydrogen element both cover.
    plain, augmented = pair
    shared = basis_library.lookup(plain).elements & basis_library.lookup(augmented).elements
    assert shared, "the pair has no element in common"
    symbols = [s for s in ("O", "Cl") if s in shared]
    if not symbols:
        from deckward.rules.knowledge import elements

        symbols = [min((s for s in shared if s not in ("H", "He")), key=lambda s: elements.lookup(s).z)]
    checked = 0
    for symbol in symbols:
        a = basis_library.element_data(plain, symbol)
        b = basis_library.element_data(augmented, symbol)
        if a is None or b is None:
            continue
        for l in (0, 1):
            assert b.smallest_exponents[l][0] * 2 <= a.smallest_exponents[l][0], (symbol, l)
        checked += 1
    assert checked == len(symbols)


@pytest.mark.parametrize("plain,augmented", AUG_PAIRS)
def test_augmented_counterpart_function(plain, augmented):
    assert basis_families.augmented_counterpart(plain) == augmented


@pytest.mark.parametrize(
    "word,expected",
    [("cc-pVDZ", "aug-cc-pvdz"), ("6-31G*", "6-31+g*"), ("631gs", "6-31+g*"),
     ("def2-SVP", "def2-svpd"), ("def2_tzvpp", "def2-tzvppd"), ("pcseg-1", "aug-pcseg-1"),
     ("cc-pwcvtz", "aug-cc-pwcvtz"), ("cc-pwcvdz", None), ("sto-3g", None), ("aug-cc-pvdz", None),
     ("cc-pcvdz", None), ("no-such-set", None)],
)
def test_augmented_examples(word, expected):
    assert basis_families.augmented_counterpart(word) == expected


@pytest.mark.parametrize(
    "word,expected",
    [("cc-pvdz", "cc-pvtz"), ("AUG-CC-PVDZ", "aug-cc-pvtz"), ("def2-svp", "def2-tzvp"),
     ("6-31g*", "6-311g*"), ("pcseg-1", "pcseg-2"), ("cc-pvtz", None), ("sto-3g", None)],
)
def test_triple_zeta_examples(word, expected):
    assert basis_families.triple_zeta_counterpart(word) == expected


@pytest.mark.parametrize("pair", TZ_PAIRS, ids=lambda p: f"{p[0]}->{p[1]}")
def test_triple_zeta_counterpart_is_triple_zeta(pair):
    assert basis_library.lookup(pair[1]).zeta == "triple"
    assert basis_library.lookup(pair[0]).zeta in ("minimal", "double")

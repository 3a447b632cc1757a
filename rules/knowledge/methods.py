"""The method table: what a method word in a deck means.

Each entry says which family a method belongs to, whether it adds
wavefunction correlation on top of Hartree-Fock, for density functionals
their rung (LDA, GGA, meta-GGA, hybrid, range-separated, double hybrid) and
the exchange-correlation string PySCF's libxc interface accepts, and how the
runner builds it (``pyscf_kind``).

``eigenvalues_approximate_ie`` answers: is -(HOMO energy) of this method a
recognised approximation to the ionization energy?

- Hartree-Fock: yes, by Koopmans' theorem (T. Koopmans, Physica 1, 104
  (1934)): frozen orbitals, no relaxation and no correlation.
- Correlated wavefunction methods (MP2, CCSD, CCSD(T), CISD): their orbital
  energies are those of the Hartree-Fock reference, so the same Koopmans
  reading applies (and nothing better).
- Density functionals: no.  Only the exact functional has -e(HOMO) = IE
  (Janak, Phys. Rev. B 18, 7165 (1978)); common LDA, GGA, hybrid and
  range-separated functionals give HOMO energies well above -IE (Salzner
  and Baer, J. Chem. Phys. 131, 231101 (2009)).  A range-separated
  functional approaches the condition only when its range parameter is
  tuned for the molecule at hand, which a generic name like wb97x does not
  promise; none of the entries here is such a tuned functional.

Words are matched case-insensitively, ignoring '-', '_' and spaces
(``cam-b3lyp`` = ``CAM_B3LYP`` = ``camb3lyp``), the way basis words are.
"""

from __future__ import annotations

from functools import lru_cache

from deckward.grammar.records import record


@record(frozen=True)
class MethodInfo:
    """One method of the table (see the module docstring for the fields)."""

    name: str
    aliases: tuple[str, ...]
    family: str  # 'hf' | 'dft' | 'mp2' | 'cc' | 'ci'
    correlated: bool  # post-Hartree-Fock wavefunction correlation
    dft_class: str | None  # 'lda' | 'gga' | 'meta-gga' | 'hybrid' | 'range-separated' | 'double-hybrid'
    eigenvalues_approximate_ie: bool
    pyscf_xc: str | None  # libxc / PySCF xc string for density functionals
    pyscf_kind: str  # how the runner builds it: 'scf' | 'dft' | 'dft+mp2' | 'mp2' | 'df-mp2' | 'ccsd' | 'ccsd(t)' | 'cisd'


def _hf(name, *aliases):
    return MethodInfo(name, aliases, "hf", False, None, True, None, "scf")


def _dft(name, dft_class, xc, *aliases):
    return MethodInfo(name, aliases, "dft", False, dft_class, False, xc, "dft")


def _wf(name, family, kind, *aliases):
    return MethodInfo(name, aliases, family, True, None, True, None, kind)


METHODS: tuple[MethodInfo, ...] = (
    _hf("hf", "scf"),
    # Local density approximation
    _dft("svwn", "lda", "lda,vwn", "lda", "lsda"),
    # Generalised gradient approximation
    _dft("pbe", "gga", "pbe"),
    _dft("revpbe", "gga", "revpbe"),
    _dft("blyp", "gga", "b88,lyp"),
    _dft("bp86", "gga", "b88,p86"),
    _dft("pw91", "gga", "pw91,pw91"),
    _dft("b97-d", "gga", "b97-d"),
    # meta-GGA
    _dft("tpss", "meta-gga", "tpss"),
    _dft("scan", "meta-gga", "scan"),
    _dft("r2scan", "meta-gga", "r2scan"),
    _dft("m06-l", "meta-gga", "m06l"),
    _dft("b97m-v", "meta-gga", "b97m_v"),
    # Global hybrids
    _dft("b3lyp", "hybrid", "b3lyp"),
    _dft("pbe0", "hybrid", "pbe0", "pbeh", "pbe1pbe"),
    _dft("b3pw91", "hybrid", "b3pw91"),
    _dft("x3lyp", "hybrid", "x3lyp"),
    _dft("m06", "hybrid", "m06"),
    _dft("m06-2x", "hybrid", "m062x"),
    _dft("tpssh", "hybrid", "tpssh"),
    _dft("scan0", "hybrid", "scan0"),
    _dft("bhandhlyp", "hybrid", "bhandhlyp"),
    _dft("pw6b95", "hybrid", "pw6b95"),
    _dft("mn15", "hybrid", "mn15"),
    # Range-separated hybrids (fixed, untuned range parameter)
    _dft("cam-b3lyp", "range-separated", "camb3lyp"),
    _dft("wb97x", "range-separated", "wb97x", "omegab97x"),
    _dft("wb97x-d", "range-separated", "wb97x_d", "omegab97xd"),
    _dft("wb97x-v", "range-separated", "wb97x_v"),
    _dft("wb97m-v", "range-separated", "wb97m_v"),
    _dft("lc-wpbe", "range-separated", "lcwpbe"),
    _dft("hse06", "range-separated", "hse06"),
    # Double hybrid: B2PLYP (Grimme, J. Chem. Phys. 124, 034108 (2006)):
    # 53 % HF exchange, 47 % B88, 73 % LYP, plus 27 % of an MP2 correlation
    # computed from the Kohn-Sham orbitals, which the runner adds.
    MethodInfo(
        "b2plyp",
        (),
        "dft",
        False,
        "double-hybrid",
        False,
        "0.53*HF + 0.47*B88, 0.73*LYP",
        "dft+mp2",
    ),
    # Wavefunction correlation on a Hartree-Fock reference
    _wf("mp2", "mp2", "mp2"),
    _wf("ri-mp2", "mp2", "df-mp2", "df-mp2"),
    _wf("ccsd", "cc", "ccsd"),
    _wf("ccsd(t)", "cc", "ccsd(t)"),
    _wf("cisd", "ci", "cisd"),
)


# Methods of the trade that deckward recognises but does not judge or run:
# their inputs (an active space, a target-state count, a self-energy) are
# not part of the deck language, so no rule can reason about them and the
# runner cannot build them.  Each maps to what it is, for the message.
RECOGNISED_ONLY: dict[str, str] = {
    "casscf": "a multiconfigurational method (complete active space SCF)",
    "rasscf": "a multiconfigurational method (restricted active space SCF)",
    "mcscf": "a multiconfigurational SCF method",
    "casci": "a multiconfigurational method (complete active space CI)",
    "caspt2": "a multireference perturbation theory (CASPT2)",
    "nevpt2": "a multireference perturbation theory (NEVPT2)",
    "mrci": "a multireference configuration interaction",
    "mrci+q": "a multireference configuration interaction (with the Davidson correction)",
    "dmrg": "a density-matrix renormalisation group method",
    "ccsdt": "coupled cluster with full triples (CCSDT)",
    "ccsdt(q)": "coupled cluster with full triples and perturbative quadruples",
    "eom-ccsd": "an equation-of-motion coupled-cluster method",
    "eom-ip-ccsd": "an equation-of-motion coupled-cluster method for ionised states",
    "eom-ea-ccsd": "an equation-of-motion coupled-cluster method for electron-attached states",
    "cc2": "an approximate coupled-cluster method for excited states",
    "adc(2)": "an algebraic-diagrammatic construction for excited or ionised states",
    "cis": "configuration interaction with single excitations (excited states)",
    "tddft": "time-dependent density functional theory (excited states)",
    "gw": "a Green's-function (GW) method for quasiparticle energies",
    "g0w0": "a Green's-function (GW) method for quasiparticle energies",
    "ovgf": "an outer-valence Green's-function method for ionization energies",
}


def _norm(word: str) -> str:
    return word.strip().lower().replace("-", "").replace("_", "").replace(" ", "")


@lru_cache(maxsize=1)
def _by_word() -> dict[str, MethodInfo]:
    table: dict[str, MethodInfo] = {}
    for method in METHODS:
        for word in (method.name, *method.aliases):
            key = _norm(word)
            if key in table and table[key] is not method:
                raise ValueError(f"method word {word!r} names two methods")
            table[key] = method
    return table


def lookup(word: str) -> MethodInfo | None:
    """The method a word names (case, '-', '_' and spaces ignored), or None."""
    return _by_word().get(_norm(word))


def all_names() -> list[str]:
    """Every method name and alias, for completion."""
    names = set()
    for method in METHODS:
        names.add(method.name)
        names.update(method.aliases)
    return sorted(names)


def recognised_only(word: str) -> str | None:
    """What a method deckward recognises but cannot judge or run is (see
    ``RECOGNISED_ONLY``), or None."""
    return {_norm(k): v for k, v in RECOGNISED_ONLY.items()}.get(_norm(word))


def closest(word: str, n: int = 3) -> list[str]:
    """Method names most like ``word`` (did-you-mean), best first.

    A method deckward recognises but does not run gets no suggestion (casscf
    is no misspelt hf), and a candidate must be about as long as the word: a
    shared tail like ``scf`` is no typo of ``casscf`` (common practice, no
    source: a typo changes a letter or two)."""
    from deckward.grammar.suggest import closest as nearest

    key = _norm(word)
    if not key or n <= 0 or recognised_only(word) is not None:
        return []
    table = _by_word()
    out: list[str] = []
    for hit in nearest(key, table, n=4 * n, key=_norm):
        if abs(len(hit) - len(key)) > max(1, len(key) // 3):
            continue
        name = table[hit].name
        if name not in out:
            out.append(name)
        if len(out) == n:
            break
    return out

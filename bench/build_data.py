"""Regenerate the chemistry data files from the installed PySCF.

    python bench/build_data.py            # rewrite the data files in this checkout
    python bench/build_data.py --check    # exit 1 if they are stale

The typing path (parser and static rules) must never import PySCF, which
costs about half a second.  So the facts it needs -- element symbols and
covalent radii, and what every library basis set yields for every element --
are read once from PySCF here and stored as package data:

- ``rules/knowledge/data/elements.json``: symbol, atomic number, name and covalent
  radius (angstrom) per element.
- ``rules/knowledge/data/basis_index.json.gz``: every basis name PySCF's bundled basis
  library accepts, with per element the number of contracted shells per
  angular momentum, the three smallest primitive exponents per angular
  momentum, and whether an effective core potential comes with it.

- ``rules/knowledge/data/basis_index_bse.json.gz``: the same records for every basis
  set the Basis Set Exchange publishes (the basis_set_exchange package, a
  dependency of deckward), read from that package's own data.  A word PySCF
  ships is answered from PySCF's index (its copy is what the runner uses);
  the rest from this one.

This script is the only place (besides probes and the runner) that imports
PySCF, and it does so inside functions.  It writes into the checkout it
lies in (``rules/knowledge/data/``); it is not part of the installed package.
"""

from __future__ import annotations

import argparse
import contextlib
import gzip
import json
import os
import sys
import warnings
from pathlib import Path

DATA_DIR = Path(__file__).resolve().parent.parent / "rules" / "knowledge" / "data"
ELEMENTS_FILE = DATA_DIR / "elements.json"
BASIS_INDEX_FILE = DATA_DIR / "basis_index.json.gz"
BSE_INDEX_FILE = DATA_DIR / "basis_index_bse.json.gz"

FORMAT_VERSION = 1
N_SMALLEST = 3

# Pople polarisation tokens PySCF understands inside parentheses, e.g.
# 6-311++g(2df,2pd): each token names a file <base>-polarization-<token>.dat.
POPLE_POLARIZATION_TOKENS = ("d", "f", "p", "2d", "3d", "2p", "3p")

# Reference atom for deriving the zeta level from the data: oxygen is covered
# by nearly every orbital basis and its p shells are all valence shells.
ZETA_REFERENCE_ATOM = "O"


# ---------------------------------------------------------------- elements


def build_elements() -> dict:
    """Element table from pyscf.data: symbol, Z, name, covalent radius (A).

    PySCF stores the covalent radii of Cordero et al., Dalton Trans. 2008,
    2832 in bohr (``radii.COVALENT = 1/BOHR * [values in angstrom]``), so
    they are converted back with PySCF's own BOHR and rounded to the two
    decimals the paper gives.  Elements past curium have no radius there.
    """
    import pyscf
    from pyscf.data import elements, radii
    from pyscf.lib.parameters import BOHR

    rows = []
    for z, symbol in enumerate(elements.ELEMENTS):
        if z == 0:
            continue  # ghost placeholder, handled by the deck language
        radius = None
        if z < len(radii.COVALENT):
            radius = round(float(radii.COVALENT[z]) * BOHR, 4)
        rows.append(
            {
                "symbol": symbol,
                "z": z,
                "name": elements.ATOMIC_NAMES[z],
                "covalent_radius": radius,
            }
        )
    return {
        "format": FORMAT_VERSION,
        "source": "pyscf.data.elements and pyscf.data.radii.COVALENT "
        "(Cordero et al., Dalton Trans. 2008, 2832)",
        "pyscf_version": pyscf.__version__,
        "elements": rows,
    }


# ---------------------------------------------------------------- basis sets


def normalize(word: str) -> str:
    """PySCF's basis-name normalisation (pyscf.gto.basis._format_basis_name)."""
    return word.lower().replace("-", "").replace("_", "").replace(" ", "")


@contextlib.contextmanager
def _pyscf_library_only():
    """Switch off PySCF's fallback to basis_set_exchange while loading."""
    from pyscf.gto.basis import bse

    saved = bse.basis_set_exchange
    bse.basis_set_exchange = None
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            yield
    finally:
        bse.basis_set_exchange = saved


def _shell_primitives(shell):
    """(l, exponents, number of contracted functions) of one PySCF shell."""
    l = shell[0]
    rows = shell[2:] if isinstance(shell[1], int) else shell[1:]
    exponents = [float(r[0]) for r in rows]
    n_contracted = len(rows[0]) - 1 if rows else 0
    return l, exponents, n_contracted


def element_record(shells, has_ecp: bool) -> list:
    """Compact per-element record: [functions per l, smallest exps per l, ecp]."""
    if not shells:
        return None
    lmax = max(s[0] for s in shells)
    counts = [0] * (lmax + 1)
    exps = [set() for _ in range(lmax + 1)]
    for shell in shells:
        l, exponents, n = _shell_primitives(shell)
        counts[l] += n
        exps[l].update(exponents)
    smallest = [sorted(e)[:N_SMALLEST] for e in exps]
    return [counts, smallest, 1 if has_ecp else 0]


def _targets():
    """Map of library target (file or module) -> ALIAS keys reaching it.

    Keys that PySCF's own normalisation can never produce (for instance one
    containing an underscore) are left out: no user word reaches them.
    """
    from pyscf.gto.basis import ALIAS, GTH_ALIAS

    targets: dict = {}
    for table, kind in ((ALIAS, "alias"), (GTH_ALIAS, "gth")):
        for key, target in table.items():
            if normalize(key) != key:
                continue
            tkey = (kind, target if isinstance(target, str) else tuple(target))
            targets.setdefault(tkey, []).append(key)
    return targets


def _canonical_name(kind, target, keys) -> str:
    """A readable lower-case name for a target, derived from its file name."""
    first = target[-1] if isinstance(target, tuple) else target
    stem = os.path.basename(first)
    if "." in stem and not stem.endswith(".dat"):
        stem = stem.rsplit(".", 1)[1]  # python module path like dyall-basis.dyall_2zp
    stem = stem[:-4] if stem.endswith(".dat") else stem
    name = stem.lower()
    if first.startswith("pople-basis"):
        if name.endswith("gss"):
            name = name[:-2] + "**"
        elif name.endswith("gs"):
            name = name[:-1] + "*"
    if normalize(name) in keys:
        return name
    return keys[0]


def _load_shells(kind, target, symbol):
    from pyscf.gto.basis import _BASIS_DIR, _GTH_BASIS_DIR, parse_cp2k, parse_nwchem
    from pyscf.gto import basis as pyscf_basis
    import importlib

    if kind == "gth":
        return parse_cp2k.load(os.path.join(_GTH_BASIS_DIR, target), symbol)
    if isinstance(target, tuple):
        shells = []
        for f in target:
            shells += parse_nwchem.load(os.path.join(_BASIS_DIR, f), symbol)
        return shells
    if "dat" in target:
        return parse_nwchem.load(os.path.join(_BASIS_DIR, target), symbol)
    mod = importlib.import_module("." + target, pyscf_basis.__name__)
    return getattr(mod, symbol)


def _has_ecp(kind, target, symbol) -> bool:
    from pyscf.gto.basis import _BASIS_DIR, parse_nwchem_ecp

    if kind == "gth":
        return True  # GTH sets are valence-only, built for GTH pseudopotentials
    files = target if isinstance(target, tuple) else (target,)
    for f in files:
        if "dat" not in f:
            continue
        try:
            if parse_nwchem_ecp.load(os.path.join(_BASIS_DIR, f), symbol):
                return True
        except Exception:  # noqa: BLE001 - a file without an ECP section
            pass
    return False


def _element_records(kind, target) -> dict:
    from pyscf.data.elements import ELEMENTS

    records = {}
    for symbol in ELEMENTS[1:]:
        try:
            shells = _load_shells(kind, target, symbol)
        except Exception:  # noqa: BLE001 - element absent from this set
            continue
        record = element_record(shells, _has_ecp(kind, target, symbol))
        if record is not None:
            records[symbol] = record
    return records


# ------------------------------------------------- names: family and zeta

_AUX_MARKERS = ("jkfit", "jfit", "cfit", "xfit", "mp2fit", "optri", "fit", "ri")


def is_auxiliary(name: str) -> bool:
    """Density-fitting / resolution-of-identity sets, not orbital bases."""
    n = normalize(name)
    if n in ("weigend", "weigend+etb", "demon", "ahlrichs"):
        return True
    return any(n.endswith(m) for m in _AUX_MARKERS)


def family_of(name: str) -> str:
    """Family label from the name (the family is a naming fact)."""
    n = name.lower()
    if is_auxiliary(n):
        return "auxiliary"
    prefixes = (
        ("ccecp", "ccecp"),
        ("crystal-", "crystal"),
        ("heavy-aug-cc", "aug-cc"),
        ("d-aug-cc", "aug-cc"),
        ("t-aug-cc", "aug-cc"),
        ("jul-cc", "calendar-cc"),
        ("jun-cc", "calendar-cc"),
        ("may-cc", "calendar-cc"),
        ("apr-cc", "calendar-cc"),
        ("mar-cc", "calendar-cc"),
        ("aug-cc-", "aug-cc"),
        ("cc-", "cc"),
        ("ma-def2", "ma-def2"),
        ("def2", "def2"),
        ("aug-pcseg", "aug-pcseg"),
        ("pcseg", "pcseg"),
        ("aug-pc-", "aug-pc"),
        ("pc-", "pc"),
        ("sto-", "sto"),
        ("gth", "gth"),
        ("dyall", "dyall"),
        ("ano", "ano"),
        ("roos", "ano"),
        ("bfd", "bfd"),
        ("lanl", "lanl"),
        ("stuttgart", "stuttgart"),
        ("crenb", "crenb"),
        ("sbkjc", "sbkjc"),
        ("ecpds", "ecp-only"),
        ("pob-", "pob"),
        ("sap", "sap"),
        ("sarc", "sarc"),
        ("dzvp", "dgauss"),
        ("iglo", "iglo"),
        ("faegre", "faegre"),
        ("minao", "minao"),
    )
    for prefix, fam in prefixes:
        if n.startswith(prefix):
            return fam
    if n[:1].isdigit():
        return "pople"
    if "vszp" in n:
        return "vszp"
    if n in ("tzv",):
        return "ahlrichs"
    if n in ("dz", "dzp", "tzp", "qzp", "adzp", "atzp", "aqzp", "dzp_dunning") or n.endswith(
        "-dkh"
    ):
        return "xzp"
    return "other"


def core_valence_of(name: str) -> bool:
    """cc-pCVXZ and cc-pwCVXZ (and their aug- forms) correlate the core."""
    n = normalize(name)
    return "ccpcv" in n or "ccpwcv" in n


_ZETA_WORDS = {1: "minimal", 2: "double", 3: "triple", 4: "quadruple", 5: "quintuple"}
_LETTER_ZETA = {"d": 2, "t": 3, "q": 4, "5": 5, "6": 5}


def zeta_from_name(name: str) -> str:
    """Zeta level read from naming conventions; used only as a cross-check."""
    import re

    n = normalize(name).replace("(", "").replace("+d)", "")  # cc-pV(T+d)Z reads as cc-pVTZ
    if is_auxiliary(n):
        return "unknown"
    if n.startswith(("sto", "minao")) or n.endswith("szv") or "szvmolopt" in n:
        return "minimal"
    if n.startswith("6311"):
        return "triple"
    if re.match(r"^(321|431|631)", n):
        return "double"
    m = re.search(r"pc(?:seg)?(\d)$", n)
    if m:
        return _ZETA_WORDS[{0: 2, 1: 2, 2: 3, 3: 4, 4: 5}[int(m.group(1))]]
    m = re.search(r"(?:pv|pcv|pwcv|bfdv|ccpv)([dtq56])z", n)
    if m:
        return _ZETA_WORDS[_LETTER_ZETA[m.group(1)]]
    m = re.search(r"([234])z", n)
    if m and n.startswith("dyall"):
        return _ZETA_WORDS[int(m.group(1))]
    if "svp" in n or "sv(p)" in n:
        return "double"
    for prefix, level in (("dz", 2), ("tz", 3), ("qz", 4)):
        if re.search(prefix + r"v?\d?p?", n.replace("def2", "").replace("madef2", "")) and (
            n.startswith(prefix) or prefix in n
        ):
            return _ZETA_WORDS[level]
    return "unknown"


def augmentation_layers_by_name(name: str) -> int:
    """Diffuse layers a name declares on heavy atoms (aug- 1, d-aug 2, + 1, ...).

    Only used to leave augmenting shells out of the zeta count: a diffuse
    shell cannot be told from a valence shell by its exponent alone, since
    the outer valence exponents of large sets (pc-4: O p 0.066) fall where
    the diffuse ones of small sets lie (aug-cc-pVDZ: O p 0.069).
    """
    n = normalize(name)
    if "taug" in n:
        return 3
    if "daug" in n:
        return 2
    if "aug" in n or n.startswith(("jul", "jun", "may", "apr", "mar")) or n.startswith(
        ("madef2", "adzp", "atzp", "aqzp", "dyallav", "dyallacv", "dyallaae", "roos")
    ):
        return 1  # roos-dz/tz are the "Roos augmented" ANO sets (file header)
    if n[:1].isdigit() and "+" in n:
        return 1
    if n.startswith("def2") and n.endswith("d"):
        return 1
    return 0


def zeta_from_data(shells_o, name: str, core_valence: bool) -> str:
    """Zeta level from the valence p shells of the reference atom (oxygen).

    Oxygen's p shells are all valence shells, so their count is the number
    of functions per valence p orbital: 1 minimal, 2 double, 3 triple, ...
    (5 stands for quintuple or larger).  Augmenting diffuse layers (as the
    name declares them) are not counted.  Core-valence sets (cc-pCVXZ,
    cc-pwCVXZ) add X-1 tight p shells to the X valence ones (Woon and
    Dunning, J. Chem. Phys. 103, 4572 (1995)), so there the valence count is
    (n + 1) / 2.  Returns 'unknown' when the set has no oxygen or lists only
    uncontracted primitives (then the count says nothing about zeta).
    """
    if not shells_o:
        return "unknown"
    p_shells = [_shell_primitives(s) for s in shells_o if s[0] == 1]
    if not p_shells:
        return "unknown"
    if all(len(exps) == 1 for _, exps, _n in p_shells) and len(p_shells) > 5:
        return "unknown"  # a primitive (uncontracted) set
    n_p = sum(n for _, _e, n in p_shells)
    valence = n_p - augmentation_layers_by_name(name)
    if core_valence:
        valence = (valence + 1) // 2
    if valence < 1:
        return "unknown"
    return _ZETA_WORDS[min(valence, 5)]


def choose_zeta(by_data: str, by_name: str, auxiliary: bool) -> tuple[str, str]:
    """Pick the zeta level and say where it came from.

    The count from the data decides whenever the name carries no level (ano,
    iglo3, tzv, ...) or agrees with it.  Where a family's published name
    states a level and the count disagrees, the name wins: the disagreements
    in PySCF's library are sets whose p count is inflated by functions the
    name does not declare (a diffuse p in Stuttgart RLC oxygen, general
    contractions in pc-3, the larger-than-named cc-pVXZ-F12-nZ sets), so the
    count would mislead there.  ``python bench/build_data.py``
    lists every such disagreement.
    """
    if auxiliary:
        return "unknown", "auxiliary"
    if by_data == "unknown":
        return by_name, "name"
    if by_name in ("unknown", by_data):
        return by_data, "data"
    return by_name, "name (data disagrees)"


# ----------------------------------------------------------- the index


def basis_header(name: str, aliases: list, shells_o, elements: list, aux: bool) -> dict:
    """The stored header of one basis set: names, family, zeta (with where
    the level came from), core-valence and auxiliary flags, elements."""
    cv = core_valence_of(name)
    by_name = zeta_from_name(name)
    by_data = "unknown" if aux else zeta_from_data(shells_o, name, cv)
    zeta, zeta_source = choose_zeta(by_data, by_name, aux)
    return {
        "aliases": aliases,
        "family": family_of(name),
        "zeta": zeta,
        "zeta_source": zeta_source,
        "zeta_by_name": by_name,
        "zeta_by_data": by_data,
        "core_valence": cv,
        "auxiliary": aux,
        "elements": elements,
    }


def basis_entries(only: set[str] | None = None) -> tuple[dict, dict]:
    """Headers and element records for every library basis (or only some).

    ``only`` is a set of canonical names; the build of a sample is what the
    test uses to check the stored index against the installed PySCF.
    """
    headers: dict = {}
    records: dict = {}
    with _pyscf_library_only():
        for (kind, target), keys in _targets().items():
            name = _canonical_name(kind, target, keys)
            if only is not None and name not in only:
                continue
            recs = _element_records(kind, target)
            try:
                shells_o = _load_shells(kind, target, ZETA_REFERENCE_ATOM)
            except Exception:  # noqa: BLE001 - no oxygen in this set
                shells_o = None
            if not recs:
                continue
            aliases = sorted(set(keys) | {name})
            headers[name] = basis_header(name, aliases, shells_o, sorted(recs, key=_z_of), is_auxiliary(name))
            records[name] = recs
    return headers, records


def pople_polarization_entries() -> dict:
    """Records of the polarisation files behind 6-31g(d,p)-style names."""
    from pyscf.gto.basis import _BASIS_DIR, parse_nwchem
    from pyscf.data.elements import ELEMENTS

    out: dict = {}
    pople_dir = os.path.join(_BASIS_DIR, "pople-basis")
    for prefix in ("6-31G", "6-311G", "3-21G"):
        for token in POPLE_POLARIZATION_TOKENS:
            path = os.path.join(pople_dir, f"{prefix}-polarization-{token}.dat")
            if not os.path.isfile(path):
                continue
            recs = {}
            with _pyscf_library_only():
                for symbol in ELEMENTS[1:]:
                    try:
                        shells = parse_nwchem.load(path, symbol)
                    except Exception:  # noqa: BLE001 - element absent
                        continue
                    rec = element_record(shells, False)
                    if rec is not None:
                        recs[symbol] = rec
            out.setdefault(prefix.lower(), {})[token] = recs
    return out


def _z_of(symbol: str) -> int:
    from pyscf.data.elements import NUC

    return NUC[symbol]


def build_basis_index() -> dict:
    """The whole index as stored (before gzip).

    Per-basis element records are stored as JSON *strings* inside the outer
    document, so that reading the index parses only the small headers; one
    basis's records are parsed when first asked for.
    """
    import pyscf

    headers, records = basis_entries()
    words = {}
    for name in sorted(headers):
        for alias in headers[name]["aliases"]:
            words.setdefault(normalize(alias), name)
    pol = pople_polarization_entries()
    return {
        "format": FORMAT_VERSION,
        "source": "pyscf.gto.basis ALIAS and GTH_ALIAS tables and their data files "
        "(basis_set_exchange fallback switched off)",
        "pyscf_version": pyscf.__version__,
        "normalisation": "lower case; remove '-', '_' and ' ' (as pyscf.gto.basis)",
        "words": words,
        "bases": headers,
        "records": {name: _dump(records[name]) for name in sorted(records)},
        "pople_polarization": {
            prefix: {token: _dump(recs) for token, recs in sorted(tokens.items())}
            for prefix, tokens in sorted(pol.items())
        },
    }


# ------------------------------------------------ the Basis Set Exchange


def bse_element_record(element: dict) -> list | None:
    """[functions per l, smallest exps per l, ecp] from one BSE element entry.

    A shell listing several angular momenta (Pople "SP") gives each of them
    one function per coefficient row, as PySCF's converter does."""
    shells = element.get("electron_shells") or []
    if not shells:
        return None
    lmax = max(max(sh["angular_momentum"]) for sh in shells)
    counts = [0] * (lmax + 1)
    exps: list[set] = [set() for _ in range(lmax + 1)]
    for sh in shells:
        moments = sh["angular_momentum"]
        values = {float(e) for e in sh["exponents"]}
        for i, l in enumerate(moments):
            counts[l] += len(sh["coefficients"]) if len(moments) == 1 else 1
            exps[l].update(values)
            if len(moments) > 1 and i >= len(sh["coefficients"]):
                break
    smallest = [sorted(e)[:N_SMALLEST] for e in exps]
    return [counts, smallest, 1 if element.get("ecp_potentials") else 0]


def _bse_shells_o(element: dict) -> list:
    """Oxygen's shells in PySCF's list shape, for the zeta count."""
    out = []
    for sh in element.get("electron_shells") or []:
        moments = sh["angular_momentum"]
        rows = list(zip(*([sh["exponents"]] + sh["coefficients"])))
        if len(moments) == 1:
            out.append([moments[0]] + [[float(x) for x in r] for r in rows])
        else:
            for k, l in enumerate(moments):
                out.append([l] + [[float(r[0]), float(r[k + 1])] for r in rows])
    return out


def _bse_plain_aliases(names: list[str]) -> dict[str, str]:
    """Plain names of the calendar sets the BSE publishes only as (X+d):
    jun-cc-pVTZ -> jun-cc-pV(T+d)Z.  Papajak and Truhlar built the calendar
    sets on aug-cc-pV(X+d)Z, so the two names are one set (identical for
    H-Ne; the (X+d) form adds the tight d of Al-Ar)."""
    import re

    have = {normalize(n) for n in names}
    out = {}
    for name in names:
        m = re.fullmatch(r"(jul|jun|may|apr|mar)-cc-pv\(([dtq5])\+d\)z", name.lower())
        if m:
            plain = f"{m.group(1)}-cc-pv{m.group(2)}z"
            if normalize(plain) not in have:
                out[plain] = name
    return out


def build_bse_index(only: set[str] | None = None) -> dict:
    """Every Basis Set Exchange set: headers and per-element records."""
    import basis_set_exchange as bse
    from basis_set_exchange import lut

    metadata = bse.get_metadata()
    names = sorted(meta["display_name"] for meta in metadata.values())
    aliases = _bse_plain_aliases(names)
    headers, records, words = {}, {}, {}
    for key in sorted(metadata):
        meta = metadata[key]
        name = meta["display_name"]
        if only is not None and name.lower() not in only:
            continue
        data = bse.get_basis(name)
        recs = {}
        shells_o = None
        for z, element in data["elements"].items():
            record = bse_element_record(element)
            if record is None:
                continue
            symbol = lut.element_sym_from_Z(int(z), True)
            recs[symbol] = record
            if symbol == ZETA_REFERENCE_ATOM:
                shells_o = _bse_shells_o(element)
        if not recs:
            continue  # ECP-only entries carry no orbital basis
        aux = meta["role"] != "orbital" or is_auxiliary(name)
        own = sorted({name} | set(meta.get("other_names") or []) | {a for a, t in aliases.items() if t == name})
        elements = sorted(recs, key=lambda s: lut.element_Z_from_sym(s))
        headers[name] = basis_header(name, own, shells_o, elements, aux)
        records[name] = recs
        for alias in own:
            words.setdefault(normalize(alias), name)
    return {
        "format": FORMAT_VERSION,
        "source": "basis_set_exchange package data (get_metadata, get_basis)",
        "bse_version": bse.version(),
        "normalisation": "lower case; remove '-', '_' and ' ' (as pyscf.gto.basis)",
        "words": words,
        "bases": headers,
        "records": {name: _dump(records[name]) for name in sorted(records)},
    }


def _dump(obj) -> str:
    return json.dumps(obj, separators=(",", ":"), sort_keys=True)


def _write_json_gz(path: Path, obj) -> None:
    raw = json.dumps(obj, separators=(",", ":"), sort_keys=True).encode()
    # mtime=0 keeps the file byte-identical between regenerations.
    with open(path, "wb") as fh, gzip.GzipFile(fileobj=fh, mode="wb", mtime=0) as gz:
        gz.write(raw)


def _elements_text(data: dict) -> str:
    return json.dumps(data, indent=1, sort_keys=True) + "\n"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="python bench/build_data.py",
        description="Regenerate deckward's element and basis-set data from PySCF.",
    )
    parser.add_argument(
        "--check", action="store_true", help="only report whether the stored files are current"
    )
    args = parser.parse_args(argv)

    elements_text = _elements_text(build_elements())
    index = build_basis_index()
    bse_index = build_bse_index()
    if args.check:
        stale = []
        if not ELEMENTS_FILE.exists() or ELEMENTS_FILE.read_text() != elements_text:
            stale.append(str(ELEMENTS_FILE))
        for path, built in ((BASIS_INDEX_FILE, index), (BSE_INDEX_FILE, bse_index)):
            stored = None
            if path.exists():
                with gzip.open(path, "rt") as fh:
                    stored = json.load(fh)
            if stored != json.loads(_dump(built)):
                stale.append(str(path))
        for path in stale:
            print(f"stale: {path}")
        return 1 if stale else 0

    ELEMENTS_FILE.write_text(elements_text)
    _write_json_gz(BASIS_INDEX_FILE, index)
    _write_json_gz(BSE_INDEX_FILE, bse_index)
    mismatched = [
        (n, h["zeta_by_data"], h["zeta_by_name"])
        for n, h in index["bases"].items()
        if h["zeta_source"] == "name (data disagrees)"
    ]
    print(
        f"wrote {ELEMENTS_FILE} and {BASIS_INDEX_FILE} "
        f"({len(index['bases'])} basis sets, {len(index['words'])} words, "
        f"{BASIS_INDEX_FILE.stat().st_size} bytes) and {BSE_INDEX_FILE} "
        f"({len(bse_index['bases'])} sets, {BSE_INDEX_FILE.stat().st_size} bytes)"
    )
    for name, by_data, by_name in mismatched:
        print(f"zeta cross-check: {name}: data says {by_data}, name says {by_name} (name kept)")
    return 0


if __name__ == "__main__":
    sys.exit(main())

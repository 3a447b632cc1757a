"""Computed against measured: the experimental value beside a derived
electron affinity or ionization energy.

The measured value comes from the deck itself when its derive says
``reference VALUE [+- U] UNIT "source"``, otherwise from the reference table
(``rules/knowledge/reference_data.py``) for the species the derive's geometry makes
up.  The deviation is computed minus measured, in eV.  Tabulated values are
adiabatic (0-0 band); a vertical derive is compared all the same, with a
note that the two differ by the geometry relaxation.  Every comparison
carries the caution: a deviation reflects the method and the basis set, and
the numbers are for expert judgement.

``compare_value`` works on plain data (a quantity, a value in eV, the
atoms), so a results store can compare without a deck model.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Optional, Sequence

from deckward.grammar import model as m

from deckward.rules.knowledge import deck_facts, reference_data, units
from deckward.rules.knowledge.geometry import scale_to_angstrom

CAUTION = ("A deviation from experiment reflects the method and the basis set (and vertical against "
           "adiabatic, zero-point energy); the numbers are for expert judgement, not a verdict.")
QUANTITIES = ("electron_affinity", "ionization_energy")
VERTICAL_NOTE = ("the measured value is adiabatic; a vertical value differs from it by the relaxation of the "
                 "geometry")


@dataclass(frozen=True)
class Measured:
    value_ev: float
    uncertainty_ev: Optional[float]
    source: str
    origin: str  # "deck" (the derive's own reference clause) | "table" (rules/knowledge/reference_data.py)
    species: Optional[str] = None  # the table's species key


@dataclass(frozen=True)
class Comparison:
    computed_ev: float
    measured: Measured
    note: str = ""

    @property
    def deviation_ev(self) -> float:
        return self.computed_ev - self.measured.value_ev

    def to_dict(self) -> dict:
        return {
            "value_ev": self.measured.value_ev,
            "uncertainty_ev": self.measured.uncertainty_ev,
            "source": self.measured.source,
            "origin": self.measured.origin,
            "species": self.measured.species,
            "computed_ev": round(self.computed_ev, 6),
            "deviation_ev": round(self.deviation_ev, 6),
            "note": self.note,
            "caution": CAUTION,
        }


def from_deck(ref: m.MeasuredReference) -> Measured:
    to_ev = lambda v: units.from_hartree(units.to_hartree(v, ref.unit.value), "ev")  # noqa: E731
    unc = None if ref.uncertainty is None else abs(to_ev(ref.uncertainty))
    return Measured(to_ev(ref.value), unc, ref.source.value, "deck")


def from_table(quantity: str, symbols: Sequence[str],
               coordinates_angstrom: Optional[Sequence[tuple[float, float, float]]]) -> Optional[Measured]:
    if quantity not in QUANTITIES or not symbols:
        return None
    species = reference_data.identify(list(symbols), list(coordinates_angstrom) if coordinates_angstrom else None)
    if species is None:
        return None
    value = species.electron_affinity if quantity == "electron_affinity" else species.ionization_energy
    if value is None:
        return None
    return Measured(value.value_ev, value.uncertainty_ev, value.source, "table", species.key)


def compare_value(quantity: Optional[str], value_ev: Optional[float], symbols: Sequence[str],
                  coordinates_angstrom: Optional[Sequence[tuple[float, float, float]]] = None,
                  own: Optional[Measured] = None, kind: Optional[str] = None) -> Optional[Comparison]:
    """The comparison of one computed EA or IE (eV) with its measured value:
    ``own`` (the deck's) when given, else the table's; None when neither."""
    if value_ev is None:
        return None
    measured = own or from_table(quantity or "", symbols, coordinates_angstrom)
    if measured is None:
        return None
    note = VERTICAL_NOTE if kind == "vertical" and measured.origin == "table" else ""
    return Comparison(value_ev, measured, note)


def derive_atoms(ws, derive: m.Derive):
    """(symbols, angstrom coordinates) of the real atoms of the first state
    of ``derive`` that has a geometry (every state of an EA or IE shares
    its neutral parent's atoms)."""
    for name in deck_facts.states_of(derive):
        rs = ws.states.get(name)
        if rs is None or rs.geometry is None or not rs.geometry.atoms:
            continue
        scale = scale_to_angstrom(rs.geometry.unit)
        real = [a for a in rs.geometry.atoms if not a.ghost]
        return [a.symbol.value for a in real], [tuple(c * scale for c in a.xyz) for a in real]
    return [], []


def measured_for(ws, derive: m.Derive) -> Optional[Measured]:
    """The measured value a derive is compared with, before computing."""
    if derive.reference is not None:
        return from_deck(derive.reference)
    symbols, coords = derive_atoms(ws, derive)
    return from_table(ws.quantity_of(derive) or "", symbols, coords)


def compare_derive(ws, derive: m.Derive, value_ev: Optional[float]) -> Optional[Comparison]:
    """The comparison of a computed derive (eV) in its workspace."""
    quantity = ws.quantity_of(derive)
    own = from_deck(derive.reference) if derive.reference is not None else None
    if own is None and quantity not in QUANTITIES:
        return None
    symbols, coords = derive_atoms(ws, derive)
    study = ws.study
    kind = study.kind.value if study is not None and study.kind is not None else None
    return compare_value(quantity, value_ev, symbols, coords, own, kind)


def attach_comparisons(ws, derived: list) -> None:
    """Set ``experiment`` (a dict, or None) on each evaluated derive
    (``runner.derive_eval.DerivedValue``) of the workspace, in order."""
    for derive, value in zip(ws.derives, derived):
        value_ev = None if value.value_hartree is None else units.from_hartree(value.value_hartree, "ev")
        found = compare_derive(ws, derive, value_ev)
        if found is None and value_ev is None:  # not computed: still say what it would be compared with
            measured = measured_for(ws, derive) if ws.quantity_of(derive) in QUANTITIES or derive.reference else None
            value.experiment = None if measured is None else {
                "value_ev": measured.value_ev, "uncertainty_ev": measured.uncertainty_ev, "source": measured.source,
                "origin": measured.origin, "species": measured.species, "computed_ev": None, "deviation_ev": None,
                "note": "", "caution": CAUTION}
            continue
        value.experiment = None if found is None else found.to_dict()


def comparison_lines(derived: list) -> list[str]:
    """Text lines naming each comparison's source and note, then the caution
    (empty when nothing was compared)."""
    lines = []
    for d in derived:
        e = getattr(d, "experiment", None)
        if not e:
            continue
        unc = f" +- {e['uncertainty_ev']:g}" if e.get("uncertainty_ev") is not None else ""
        origin = "given in the deck" if e["origin"] == "deck" else "reference table"
        text = f"{d.name}: experiment {e['value_ev']:.3f}{unc} eV ({origin}: {e['source']})"
        if e.get("deviation_ev") is not None:
            text += f"; computed minus experiment {e['deviation_ev']:+.3f} eV"
        if e.get("note"):
            text += f"; {e['note']}"
        lines.append(text)
    if lines:
        lines.append(CAUTION)
    return lines


def compare_recorded(deck_path: str, derive_name: str, value_hartree: Optional[float]) -> Optional[dict]:
    """The comparison of a recorded derived value (a results-store row:
    deck path, derive name, value in hartree) as the dict `run --json`
    gives under ``experiment``; None when the deck can no longer be read,
    has no such derive, or there is nothing to compare with."""
    from deckward.rules.engine.project import Projects

    try:
        ws = Projects().for_path(deck_path).resolve(deck_path)
    except OSError:
        return None
    derive = next((d for d in ws.derives if d.name.value == derive_name), None)
    if derive is None or value_hartree is None:
        return None
    found = compare_derive(ws, derive, units.from_hartree(value_hartree, "ev"))
    return None if found is None else found.to_dict()

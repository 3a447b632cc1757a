"""What the reference table says about the states of a deck.

Rules that judge a state against measured facts (is its anion bound, is its
multiplicity the ground state's) and rules that must stay quiet when such a
judgement is the more specific one ask the same questions; the answers live
here so that they agree.  Species come from ``reference_data.identify`` on
the state's geometry (ghost atoms left out), so every state on a CN geometry
belongs to the species CN whatever its charge.
"""
from __future__ import annotations

from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.records import record
from deckward.grammar.resolve import ResolvedState, Workspace

from deckward.rules.knowledge import reference_data
from deckward.rules.knowledge.geometry import per_geometry
from .derives import EA, IonDerive
from deckward.rules.knowledge.reference_data import Species


_SPECIES: dict = {}  # remembered per geometry: every state and several rules ask


def species_of(rs: ResolvedState) -> Optional[Species]:
    """The tabulated neutral species of a state's geometry, or None."""
    if rs.geometry is None:
        return None
    return per_geometry(_SPECIES, rs.geometry, reference_data.identify_geometry)


def _states_of(ws: Workspace, derive: m.Derive) -> list[ResolvedState]:
    out = []
    for node in m.walk(derive.expr):
        if isinstance(node, (m.EnergyOf, m.OrbitalOf)):
            rs = ws.states.get(node.state.value)
            if rs is not None and all(o is not rs for o in out):
                out.append(rs)
    return out


@record(frozen=True)
class UnboundAnion:
    """An electron affinity, or an anion, of a species whose anion is not bound."""

    species: Species
    state: ResolvedState  # the deck's state of that species (neutral or anion)


def unbound_anion_in(ws: Workspace, d: IonDerive) -> Optional[UnboundAnion]:
    """The species without a bound anion whose electron affinity ``d``
    reports: its anion (charge -1) enters the derive, or, with no anion in
    it, the LUMO of its neutral does.  The electron affinity of a cation
    (the neutral's ionization energy read backwards) is no such case."""
    if d.quantity != EA:
        return None
    states = _states_of(ws, d.derive)
    anions = [rs for rs in states if rs.charge == -1]
    if anions:
        candidates = anions
    elif all(rs.charge == 0 for rs in states):
        lumo_states = {o.state.value for _, o in d.form.orbitals if o.orbital.value == "lumo"}
        candidates = [rs for rs in states if rs.name in lumo_states]
    else:
        candidates = []
    for rs in candidates:
        sp = species_of(rs)
        if sp is not None and sp.anion_bound is False:
            return UnboundAnion(sp, rs)
    return None


def anion_is_unbound(rs: ResolvedState) -> bool:
    """True when ``rs`` (charge 0 or -1) belongs to a species whose anion is not bound."""
    if rs.charge not in (0, -1):
        return False
    sp = species_of(rs)
    return sp is not None and sp.anion_bound is False

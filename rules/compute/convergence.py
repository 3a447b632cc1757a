"""Basis-set convergence of a deck's derived quantities (``deckward converge``).

Every state the derives need is recomputed along a ladder of the deck's
basis family (cc-pVXZ or aug-cc-pVXZ, X = D, T, Q; pcseg-n or aug-pcseg-n,
n = 1, 2, 3; def2-SVP(D), -TZVP(D), -QZVP(D)), through the runner and its
cache, and every derive is evaluated at each step, so a delta-SCF value and
an orbital estimate can be watched side by side (the lowest virtual drifts
toward zero as diffuse functions are added; occupied orbitals settle).

The complete-basis estimate uses the two largest steps X-1, X (cardinal
numbers: D = 2, T = 3, Q = 4; pcseg-n counts as n + 1, def2 SVP/TZVP/QZVP
as 2/3/4):

- Hartree-Fock (SCF) energies: E(X) = E_CBS + A (X + 1) exp(-9 sqrt(X)),
  A. Karton, J. M. L. Martin, Theor. Chem. Acc. 115, 330 (2006);
- correlation energies: E(X) = E_CBS + B X^-3, T. Helgaker, W. Klopper,
  H. Koch, J. Noga, J. Chem. Phys. 106, 9639 (1997).

Both were fitted to correlation-consistent sets; applied to pcseg-n and
def2 they are an estimate only (said in the output).  Orbital energies get
no complete-basis estimate: a virtual eigenvalue has no limit that means an
affinity.  PySCF is imported by the runner only.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Optional

from deckward.rules.knowledge import basis_library, units

KARTON_MARTIN = "A. Karton, J. M. L. Martin, Theor. Chem. Acc. 115, 330 (2006): E(X) = E_CBS + A (X+1) exp(-9 sqrt(X))"
HELGAKER = "T. Helgaker, W. Klopper, H. Koch, J. Noga, J. Chem. Phys. 106, 9639 (1997): E(X) = E_CBS + B X^-3"


class LadderError(ValueError):
    """The deck's basis has no ladder here (the message says why)."""


@dataclass(frozen=True)
class Ladder:
    family: str  # for messages: "aug-cc-pVXZ"
    words: tuple[str, ...]
    cardinals: tuple[int, ...]
    correlation_consistent: bool


_CC = re.compile(r"^(aug-)?cc-pv([dtq56])z$")
_PCSEG = re.compile(r"^(aug-)?pcseg-([0-4])$")
_DEF2 = re.compile(r"^def2-(svp|tzvp|qzvp)(d?)$")


def ladder_for(word: str) -> Ladder:
    """The default ladder of the family a library basis word belongs to."""
    low = word.lower()
    if (mt := _CC.match(low)):
        aug = mt.group(1) or ""
        return Ladder(f"{aug}cc-pVXZ", tuple(f"{aug}cc-pv{x}z" for x in "dtq"), (2, 3, 4), True)
    if (mt := _PCSEG.match(low)):
        aug = mt.group(1) or ""
        return Ladder(f"{aug}pcseg-n", tuple(f"{aug}pcseg-{n}" for n in (1, 2, 3)), (2, 3, 4), False)
    if (mt := _DEF2.match(low)):
        d = mt.group(2)
        return Ladder(f"def2-XVP{d.upper()}", tuple(f"def2-{z}{d}" for z in ("svp", "tzvp", "qzvp")), (2, 3, 4), False)
    raise LadderError(f"basis `{word}` belongs to no ladder deckward knows (cc-pVXZ, aug-cc-pVXZ, pcseg-n, "
                      "aug-pcseg-n, def2-SVP/TZVP/QZVP with or without D)")


def karton_martin(x1: int, e1: float, x2: int, e2: float) -> float:
    f1, f2 = (x1 + 1) * math.exp(-9 * math.sqrt(x1)), (x2 + 1) * math.exp(-9 * math.sqrt(x2))
    return (e2 * f1 - e1 * f2) / (f1 - f2)


def helgaker(x1: int, e1: float, x2: int, e2: float) -> float:
    return (x2 ** 3 * e2 - x1 ** 3 * e1) / (x2 ** 3 - x1 ** 3)


@dataclass
class Step:
    basis: str
    cardinal: int
    derived: list  # runner.derive_eval.DerivedValue
    states: list[dict]


@dataclass
class Convergence:
    deck: str
    ladder: Ladder
    steps: list[Step] = field(default_factory=list)
    cbs: list = field(default_factory=list)  # DerivedValue (orbital derives: not available, with the reason)
    cbs_note: str = ""
    experiment: dict = field(default_factory=dict)  # derive name -> comparison.Measured

    @property
    def ok(self) -> bool:
        return all(s["status"] == "ok" for st in self.steps for s in st.states)

    def to_dict(self) -> dict:
        from .comparison import CAUTION

        def value(d):
            return {"name": d.name, "quantity": d.quantity, "unit": d.unit, "value": d.value,
                    "value_ev": None if d.value_hartree is None else units.from_hartree(d.value_hartree, "ev"),
                    "reason": d.reason}

        return {
            "format": "deckward-converge/1",
            "deck": self.deck,
            "family": self.ladder.family,
            "steps": [{"basis": s.basis, "cardinal": s.cardinal, "derived": [value(d) for d in s.derived],
                       "states": [{"name": r["name"], "status": r["status"], "energy": r.get("energy"),
                                   "scf_energy": r.get("scf_energy"), "correlation_energy": r.get("correlation_energy"),
                                   "n_basis": r.get("n_basis"), "cached": r.get("cached", False)}
                                  for r in s.states]}
                      for s in self.steps],
            "complete_basis": {"method": self.cbs_note, "from": [s.basis for s in self.steps[-2:]],
                               "derived": [value(d) for d in self.cbs]},
            "experiment": {n: {"value_ev": e.value_ev, "uncertainty_ev": e.uncertainty_ev, "source": e.source,
                               "origin": e.origin} for n, e in self.experiment.items()},
            "caution": CAUTION,
        }


def deck_basis_word(ws, names: list[str]) -> str:
    """The one library word every needed state uses (a ladder swaps it)."""
    words = set()
    for name in names:
        spec = ws.states[name].settings.basis
        if spec is None or spec.per_element or spec.default is None or ws.basis_set(spec.default.value) is not None:
            raise LadderError(f"state `{name}` does not use one library basis for every element, so there is no "
                              "ladder to climb")
        words.add(basis_library.lookup(spec.default.value).name if basis_library.lookup(spec.default.value)
                  else spec.default.value)
    if len(words) != 1:
        raise LadderError(f"the states use different basis sets ({', '.join(sorted(words))}); a ladder needs one")
    return words.pop()


def converge(ws, cache=None, options=None, ladder: Optional[Ladder] = None, progress=None) -> Convergence:
    """Compute the ladder; raises LadderError when the deck has none."""
    from .comparison import measured_for
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.derive_eval import evaluate
    from deckward.rules.compute.runner.mapping import needed_states, plan_state
    from deckward.rules.compute.runner.parallel import execute
    from deckward.rules.compute.runner.plan import ElementBasisPlan

    cache = cache or RunCache()
    names = needed_states(ws)
    ladder = ladder or ladder_for(deck_basis_word(ws, names))
    base = [plan_state(ws, n) for n in names]
    out = Convergence(ws.path, ladder)
    for word, x in zip(ladder.words, ladder.cardinals):
        plans = [p.with_changes(basis=tuple((sym, ElementBasisPlan(basis_library.normalize(word), ())) for sym, _ in p.basis),
                                basis_label=word, name=f"{p.name} ({word})") for p in base]
        if progress is not None:
            progress.grow(len(plans))
        results = execute(plans, cache, options, progress)
        by_state = {n: results[p.name] for n, p in zip(names, plans)}
        out.steps.append(Step(word, x, [evaluate(d, by_state, ws.quantity_of(d)) for d in ws.derives],
                              list(by_state.values())))
    out.cbs, out.cbs_note = _complete_basis(ws, out, names, evaluate)
    for d in ws.derives:
        measured = measured_for(ws, d)
        if measured is not None:
            out.experiment[d.name.value] = measured
    return out


def _complete_basis(ws, conv: Convergence, names: list[str], evaluate):
    (lo, hi) = conv.steps[-2:]
    note = (f"two-point extrapolation from {lo.basis} and {hi.basis}: SCF energies by {KARTON_MARTIN}; "
            f"correlation energies by {HELGAKER}")
    if not conv.ladder.correlation_consistent:
        note += f"; both were fitted to correlation-consistent sets, so for {conv.ladder.family} this is an estimate only"
    results = {}
    for name, a, b in zip(names, lo.states, hi.states):
        if a["status"] != "ok" or b["status"] != "ok":
            results[name] = dict(b, status="failed", reason=f"state `{name}` failed at one of the two largest steps")
            continue
        scf = karton_martin(lo.cardinal, a["scf_energy"], hi.cardinal, b["scf_energy"])
        corr = 0.0
        if b.get("correlation_energy") is not None and a.get("correlation_energy") is not None:
            corr = helgaker(lo.cardinal, a["correlation_energy"], hi.cardinal, b["correlation_energy"])
        zpe = b.get("zpe") or 0.0
        results[name] = {"status": "ok", "energy": scf + corr + zpe, "orbitals": None}
    values = []
    for d in ws.derives:
        v = evaluate(d, results, ws.quantity_of(d))
        if v.reason and "no orbital energies" in v.reason:
            v.reason = "orbital energies have no complete-basis estimate"
        values.append(v)
    return values, note

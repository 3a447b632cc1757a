"""What every probe needs: Hartree-Fock results of a deck's states (cached
like runs), limits from ``deckward.yaml`` and the ion pairs behind EA/IE
derives.

A probe recomputes a state at the Hartree-Fock level with the deck's own
geometry (the starting geometry when the state says optimize(...)), charge,
multiplicity, reference and basis.  HF results go through the runner's
cache and executor, so a probe never repeats a calculation a run or an
earlier probe has done, and each calculation stops at ``probe.time_limit_s``.
"""
from __future__ import annotations

import os
from dataclasses import dataclass, replace
from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Finding, RuleInfo, Severity, Span
from deckward.grammar.resolve import Workspace

from deckward.rules.knowledge import basis_families, deck_facts, units
from deckward.rules.engine.config import Config
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the runner is imported when a probe runs, not when rules are listed
    from deckward.rules.compute.runner.cache import RunCache
    from deckward.rules.compute.runner.plan import StatePlan

DEFAULT_MAX_BASIS_FUNCTIONS = 300
DEFAULT_TIME_LIMIT_S = 120.0
DEFAULT_THRESHOLD_EV = 0.1  # catalogue: "say 0.1 eV" (common practice, no source)


@dataclass(frozen=True)
class ProbeSettings:
    max_basis_functions: int = DEFAULT_MAX_BASIS_FUNCTIONS
    time_limit_s: float = DEFAULT_TIME_LIMIT_S
    threshold_ev: float = DEFAULT_THRESHOLD_EV

    @classmethod
    def from_config(cls, config: Optional[Config]) -> "ProbeSettings":
        p = config.probe if config is not None else {}
        # the configuration admits only finite positive numbers; a Config made
        # in code may still hold inf, which means "no bound"
        size = p.get("max_basis_functions", DEFAULT_MAX_BASIS_FUNCTIONS)
        return cls(int(size) if size != float("inf") else 10**9,
                   float(p.get("time_limit_s", DEFAULT_TIME_LIMIT_S)),
                   float(p.get("threshold_ev", DEFAULT_THRESHOLD_EV)))


class ProbeSkipped(Exception):
    """A calculation a probe needs was not done (too large, failed)."""


def hf_plan(plan: StatePlan) -> StatePlan:
    """The same state at the Hartree-Fock level, at its starting geometry."""
    return plan.with_changes(method="hf", kind="scf", family="hf", xc=None, frozen_core=False, optimize=False,
                             frequencies=False)


def augmented_plan(plan: StatePlan) -> Optional[StatePlan]:
    """The plan with every library set replaced by its augmented
    counterpart (added shells kept); None when no set has one."""
    from deckward.rules.knowledge import basis_library
    from deckward.rules.compute.runner.plan import ElementBasisPlan

    changed = False
    basis = []
    labels = []
    for symbol, eb in plan.basis:
        aug = basis_families.augmented_counterpart(eb.library) if eb.library else None
        if aug is not None:
            changed = True
            eb = ElementBasisPlan(basis_library.normalize(aug), eb.shells)
        basis.append((symbol, eb))
        label = aug or (basis_library.lookup(eb.library).name if eb.library and basis_library.lookup(eb.library) else eb.library)
        if label and label not in labels:
            labels.append(label)
    if not changed:
        return None
    return plan.with_changes(basis=tuple(basis), basis_label=", ".join(labels))


def partner_plans(plan: StatePlan, extra_electrons: int) -> list[StatePlan]:
    """The state with ``extra_electrons`` more electrons, in each spin state
    one step from the plan's (2S +- 1, open shells unrestricted): which is
    lower is not known before computing (C- is a quartet, NO2- a singlet)."""
    out = []
    for spin in (plan.spin - 1, plan.spin + 1):
        if spin < 0:
            continue
        reference = "restricted" if spin == 0 else "unrestricted"
        out.append(plan.with_changes(
            charge=plan.charge - extra_electrons, spin=spin, reference=reference,
            name=f"{plan.name}{'+' if extra_electrons < 0 else '-'}{abs(extra_electrons)}e(2S={spin})"))
    return out


@dataclass(frozen=True)
class IonPair:
    """The two states behind an EA or IE derive: ``low`` has one electron
    fewer than ``high``; EA = E(low) - E(high) (neutral minus anion) and
    IE = E(low) - E(high) (cation minus neutral) alike."""

    derive: m.Derive
    quantity: str  # electron_affinity | ionization_energy
    low: StatePlan
    high: StatePlan
    constructed: Optional[str]  # 'low' or 'high' when the probe made that state up
    also: tuple[str, ...] = ()  # other derives of the same quantity on the same two states

    def also_note(self) -> str:
        """`` (also `ea_eig`)`` when other derives share these numbers."""
        if not self.also:
            return ""
        return " (also " + ", ".join(f"`{n}`" for n in self.also) + ")"


def _electrons(plan: StatePlan) -> int:
    from deckward.rules.knowledge import elements

    return sum(elements.lookup(a.symbol).z for a in plan.atoms if not a.ghost) - plan.charge


class ProbeContext:
    """Shared state of one ``run_probes`` call."""

    def __init__(self, ws: Workspace, config: Optional[Config] = None, cache: Optional[RunCache] = None,
                 progress=None) -> None:
        from deckward.rules.compute.runner.cache import RunCache

        self.ws = ws
        self.progress = progress  # a runner Progress shared by the command (None: no display)
        self.config = config
        self.settings = ProbeSettings.from_config(config)
        self.cache = cache or RunCache()
        self._results: dict[str, dict] = {}
        self._sizes: dict[str, int] = {}
        self._plans: dict[str, Optional[StatePlan]] = {}

    # -- plans ---------------------------------------------------------------
    def plan(self, name: str) -> Optional[StatePlan]:
        """The HF plan of a deck state; None when it cannot be mapped (the
        static rules report why)."""
        from deckward.rules.compute.runner.mapping import MappingError, plan_state

        if name not in self._plans:
            try:
                self._plans[name] = hf_plan(plan_state(self.ws, name))
            except (MappingError, KeyError):
                self._plans[name] = None
        return self._plans[name]

    def state_span(self, name: str) -> Span:
        rs = self.ws.states.get(name)
        return rs.state.name.span if rs is not None else self.ws.root.index.span(0, 0)

    # -- calculations ----------------------------------------------------------
    def n_basis(self, plan: StatePlan) -> int:
        key = self.cache.key(plan)
        if key not in self._sizes:
            from deckward.rules.compute.runner.cost import n_basis

            n = n_basis(plan)  # from the basis index: a 10,000-atom deck is never built to be refused
            if n is None:
                from deckward.rules.compute.runner.pyscf_build import build_mole

                n = int(build_mole(plan).nao)
            self._sizes[key] = n
        return self._sizes[key]

    def too_large(self, plan: StatePlan) -> Optional[str]:
        n = self.n_basis(plan)
        limit = self.settings.max_basis_functions
        if n > limit:
            return (f"{n} basis functions with {plan.basis_label} exceed probe.max_basis_functions = {limit} "
                    "(raise it in deckward.yaml to probe anyway)")
        return None

    def hf(self, plan: StatePlan) -> dict:
        """The HF result of a plan; ProbeSkipped when too large or failed."""
        from deckward.rules.compute.runner.parallel import RunOptions, execute

        key = self.cache.key(plan)
        if key not in self._results:
            reason = self.too_large(plan)
            if reason is not None:
                raise ProbeSkipped(reason)
            from deckward.rules.compute.runner.executors import probe_executor

            options = RunOptions(jobs=1, time_limit_s=self.settings.time_limit_s, executor=probe_executor())
            shown = plan.with_changes(name=f"{os.path.basename(self.ws.path)}: HF/{plan.basis_label} {plan.name}")
            if self.progress is not None:
                self.progress.grow()
            self._results[key] = execute([shown], self.cache, options, self.progress)[shown.name]
        result = self._results[key]
        if result["status"] != "ok":
            raise ProbeSkipped(f"HF/{plan.basis_label} for `{plan.name}` {result['status']}: {result['reason']}")
        return result

    # -- derives -----------------------------------------------------------------
    def ion_pairs(self, quantities=("electron_affinity", "ionization_energy"),
                  construct: bool = False) -> list[IonPair]:
        """EA/IE derives as pairs of states, one pair per distinct pair of
        calculations (further derives on the same two states are named in
        ``also``, so a probe reports each number once).  An energy
        difference gives both states; with ``construct``, an orbital-only
        derive takes its partner (the cation of an IE, the anion of an EA)
        from the deck when a state on the same geometry has the right
        electron count, and makes one up only when none does."""
        pairs: list[IonPair] = []
        seen: dict[tuple, int] = {}

        def add(pair: IonPair) -> None:
            key = (pair.quantity, self.cache.key(pair.low), self.cache.key(pair.high))
            if key in seen:
                first = pairs[seen[key]]
                pairs[seen[key]] = replace(first, also=first.also + (pair.derive.name.value,))
                return
            seen[key] = len(pairs)
            pairs.append(pair)

        for d in self.ws.derives:
            q = self.ws.quantity_of(d)
            if q not in quantities:
                continue
            diff = deck_facts.energy_difference(d)
            if diff is not None:
                a, b = self.plan(diff.plus), self.plan(diff.minus)
                if a is None or b is None:
                    continue
                if _electrons(a) + 1 == _electrons(b):
                    add(IonPair(d, q, a, b, None))
                continue
            if not construct:
                continue
            form = deck_facts.linear_form(d.expr)
            if form.energies or len(form.orbitals) != 1:
                continue
            node = form.orbitals[0][1]
            base = self.plan(node.state.value)
            if base is None:
                continue
            extra = -1 if q == "ionization_energy" else +1
            partner = self.deck_partner(node.state.value, extra)
            made_up = partner is None
            if made_up:
                partner = self.lowest(partner_plans(base, extra))
            if partner is None:
                continue
            if q == "ionization_energy":
                add(IonPair(d, q, partner, base, "low" if made_up else None))
            else:
                add(IonPair(d, q, base, partner, "high" if made_up else None))
        return pairs

    def deck_partner(self, name: str, extra_electrons: int) -> Optional[StatePlan]:
        """The HF plan of the first deck state on the same atoms as state
        ``name`` with ``extra_electrons`` more electrons, or None."""
        base = self.plan(name)
        if base is None:
            return None
        for other in self.ws.states:
            if other == name:
                continue
            plan = self.plan(other)
            if plan is not None and plan.atoms == base.atoms and plan.basis == base.basis \
                    and _electrons(plan) == _electrons(base) + extra_electrons:
                return plan
        return None

    def lowest(self, plans: list[StatePlan]) -> Optional[StatePlan]:
        """The plan with the lowest HF energy (None when none could be computed)."""
        best = None
        for plan in plans:
            try:
                energy = self.hf(plan)["energy"]
            except ProbeSkipped:
                continue
            if best is None or energy < best[0]:
                best = (energy, plan)
        return best[1] if best else None

    def delta_and_orbital_ev(self, pair: IonPair, low: StatePlan, high: StatePlan) -> tuple[float, float]:
        """(delta-SCF value, orbital-energy estimate) in eV: for an EA
        -e(LUMO) of the neutral, for an IE -e(HOMO) of the neutral."""
        r_low, r_high = self.hf(low), self.hf(high)
        delta = units.from_hartree(r_low["energy"] - r_high["energy"], "ev")
        if pair.quantity == "electron_affinity":
            orb = -r_low["orbitals"]["any"]["virtual"][0]
        else:
            orb = -r_high["orbitals"]["any"]["occupied"][0]
        return delta, units.from_hartree(orb, "ev")


def experiment_evidence(ctx: "ProbeContext", derive: m.Derive, computed_ev: float) -> dict:
    """The measured value of a derive (deck's reference clause or the
    reference table) for a probe's evidence, with the probe value's
    deviation; empty when none is known."""
    from deckward.rules.compute.comparison import measured_for

    measured = measured_for(ctx.ws, derive)
    if measured is None:
        return {}
    return {"experimental_ev": round(measured.value_ev, 6), "experimental_source": measured.source,
            "deviation_from_experiment_ev": round(computed_ev - measured.value_ev, 6)}


def finding(info: RuleInfo, span: Span, message: str, evidence: dict, severity: Optional[Severity] = None) -> Finding:
    return Finding(info.id, severity or info.severity, message, span, evidence=tuple(evidence.items()))


def skipped(info: RuleInfo, span: Span, reason: str) -> Finding:
    return Finding(info.id, Severity.INFO, f"probe skipped: {reason}", span, evidence=(("skipped", reason),))


def signed(value: float, digits: int = 2) -> str:
    return f"{value:+.{digits}f}"

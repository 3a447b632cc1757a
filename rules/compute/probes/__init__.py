"""Probes: cheap PySCF calculations that back findings with numbers.

Imported only on request (``deckward probe``, ``deckward check --probe``),
never on the typing path; PySCF itself is imported only when a probe runs.
One module per probe, each with ``INFO`` (a RuleInfo) and
``probe(ctx) -> findings``.
"""
from __future__ import annotations

from typing import Optional

from deckward.grammar.findings import Finding, Severity

from . import (
    basis_sensitivity,
    koopmans_relaxation,
    overlap_conditioning,
    spin_contamination,
    unbound_anion,
)

PROBES = (basis_sensitivity, unbound_anion, spin_contamination, koopmans_relaxation, overlap_conditioning)
PROBE_RULES = tuple(p.INFO for p in PROBES)


def run_probes(ws, config=None, cache=None, select: Optional[set] = None, progress=None) -> list[Finding]:
    """Findings of every probe (or those in ``select``) on one workspace.
    Decks with errors are not probed (their states may be incomplete); a
    probe that fails reports it as information instead of stopping the others.
    ``progress``: a runner ``Progress`` that shows each calculation (the
    display of ``deckward run``)."""
    from .common import ProbeContext

    if any(f.severity is Severity.ERROR for f in ws.findings):
        return []
    ctx = ProbeContext(ws, config, cache, progress)
    out: list[Finding] = []
    for module in PROBES:
        info = module.INFO
        if select is not None and info.id not in select:
            continue
        if config is not None and config.severity_for(info.id, info.severity) is None:
            continue
        try:
            out.extend(module.probe(ctx))
        except Exception as e:  # one failing probe must not hide the others
            out.append(Finding(info.id, Severity.INFO, f"probe failed: {type(e).__name__}: {e}",
                               ws.root.index.span(0, 0)))
    return out


def unprobed_reason(ws) -> Optional[str]:
    """Why no probe could look at any state of the deck (None when at least
    one state maps to a calculation): "0 findings" must not read as a clean
    bill when nothing was computed."""
    from deckward.rules.compute.runner.mapping import MappingError, plan_state

    if not ws.states:
        return "it defines no states"
    first = None
    for name in ws.states:
        try:
            plan_state(ws, name)
            return None
        except MappingError as e:
            first = first or e
        except KeyError:
            continue
    why = f": {first.located()}" if first is not None else ""
    return "no state could be mapped to a calculation" + why

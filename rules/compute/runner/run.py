"""Run a resolved deck: map its states, compute them, evaluate the derives."""
from __future__ import annotations

import hashlib
from typing import Optional

from deckward import __version__
from deckward.grammar.resolve import Workspace

from deckward.rules.compute.comparison import attach_comparisons
from .cache import RunCache, pyscf_version
from .derive_eval import evaluate
from .mapping import MappingError, needed_states, plan_state
from .parallel import RunOptions, execute
from .progress import Progress
from .results import RunReport


def deck_hash(ws: Workspace) -> str:
    """SHA-256 over the texts of the deck and every file it uses (.xyz geometries included)."""
    h = hashlib.sha256()
    for f in ws.files:
        h.update(f.digest.encode("ascii"))
    for _, digest in ws.geometry_files:
        h.update(digest.encode("ascii"))
    return h.hexdigest()


def run_workspace(ws: Workspace, cache: Optional[RunCache] = None, options: Optional[RunOptions] = None,
                  all_states: bool = False, progress_stream=None, show_progress: bool = False,
                  database=None) -> RunReport:
    """Compute the states the derives need (or all) and evaluate every derive.
    A state that cannot be mapped is reported, the others still run.  With
    ``database`` (a ``results_db.ResultsDB``), every state and derived value
    is recorded there as it arrives."""
    cache = cache or RunCache()
    report = RunReport(ws.path, deck_hash(ws), pyscf_version(), __version__)
    recorder = _recorder(database, report, options)
    try:
        _run(ws, cache, options, all_states, progress_stream, show_progress, report, recorder)
    except BaseException:
        if recorder is not None:
            recorder.interrupted()
        raise
    if recorder is not None:
        recorder.finish(report.derived, report.ok)
    return report


def _recorder(database, report: RunReport, options: Optional[RunOptions]):
    if database is None:
        return None
    from .executors import default_executor
    from .results_db import RunRecorder

    where = default_executor(options or RunOptions()).description
    return RunRecorder(database, report.deck, report.deck_hash, report.deckward_version, report.pyscf_version, where)


def _run(ws, cache, options, all_states, progress_stream, show_progress, report: RunReport, recorder) -> None:
    plans = []
    failed_mapping: dict[str, dict] = {}
    for name in needed_states(ws, all_states):
        try:
            plans.append(plan_state(ws, name))
        except MappingError as e:
            report.mapping_errors.append(e.located())
            failed_mapping[name] = _unmapped(ws, name, e)
    progress = Progress(len(plans), progress_stream, enabled=show_progress)
    on_result = recorder.on_result if recorder is not None else None
    results = execute(plans, cache, options, progress, on_result=on_result)
    results.update(failed_mapping)
    if on_result is not None:
        for unmapped in failed_mapping.values():
            on_result(unmapped)
    order = [n for n in needed_states(ws, all_states)]
    report.states = [results[n] for n in order if n in results]
    report.derived = [evaluate(d, results, ws.quantity_of(d)) for d in ws.derives]
    attach_comparisons(ws, report.derived)


def _unmapped(ws: Workspace, name: str, error: MappingError) -> dict:
    """A failed-state result for a state that never reached PySCF."""
    rs = ws.states[name]
    s = rs.settings
    return {
        "name": name,
        "status": "failed",
        "reason": error.message,
        "method": s.method.value if s.method else "?",
        "basis": ", ".join(w.value for w in s.basis.words()) if s.basis else "?",
        "reference": rs.reference,
        "charge": rs.charge,
        "multiplicity": rs.multiplicity or 0,
        "frozen_core": bool(s.frozen_core.value) if s.frozen_core else False,
        "n_basis": None, "energy": None, "electronic_energy": None, "scf_energy": None,
        "correlation_energy": None, "scf_converged": None, "s2": None, "s2_expected": None, "zpe": None,
        "frequencies_cm1": None, "optimized_geometry": None, "overlap_min_eigenvalue": None, "orbitals": None,
        "notes": [], "wall_time_s": 0.0, "cached": False, "log": None, "key": None,
    }

"""probe-overlap-conditioning: is the basis nearly linearly dependent?

Builds each distinct molecule-and-basis of the deck's states and reports
when the smallest eigenvalue of the atomic-orbital overlap matrix is below
1e-6: the SCF then works with a nearly singular metric and loses digits,
or the program silently drops functions.
"""
from __future__ import annotations

from deckward.grammar.findings import RuleInfo, Severity

from .common import ProbeContext, ProbeSkipped, finding, skipped

THRESHOLD = 1e-6  # catalogue: "below about 1e-6" (common practice, no source)

INFO = RuleInfo(
    id="probe-overlap-conditioning",
    severity=Severity.WARNING,
    category="probe",
    title="Near-linear dependence in the basis",
    why=(
        "Very diffuse functions, or atoms (and ghost atoms) close together, make some combinations of "
        "basis functions almost identical. The overlap matrix then has eigenvalues near zero, and the "
        "SCF either loses precision or the program removes functions without saying so, so two runs of "
        "the same deck may differ."
    ),
    references=("Catalogue threshold: smallest overlap eigenvalue below about 1e-6 (common practice, no source)",),
    bad_example=(
        "geometry he2 {\n  He 0 0 0\n  He 0 0 0.01 ghost\n}\n"
        "level hf_adz { method = hf basis = aug-cc-pvdz }\n"
        "state atom { geometry = he2 level = hf_adz charge = 0 multiplicity = 1 }\n"
    ),
    fires_at="atom",
    threshold_note="smallest eigenvalue below 1e-6 (catalogue, common practice)",
)


def _overlap_worker(plan_dict: dict, conn) -> None:
    """In a worker process: the overlap spectrum summary of one plan."""
    from deckward.rules.compute.runner.interrupt import ignore_in_worker

    ignore_in_worker()
    try:
        import numpy as np

        from deckward.rules.compute.runner.plan import plan_from_dict
        from deckward.rules.compute.runner.pyscf_build import build_mole

        mol = build_mole(plan_from_dict(plan_dict))
        eigenvalues = np.linalg.eigvalsh(mol.intor_symmetric("int1e_ovlp"))
        conn.send(("ok", (float(eigenvalues[0]), int((eigenvalues < THRESHOLD).sum()), int(mol.nao))))
    except Exception as e:  # reported as a skipped probe, in one line
        try:
            conn.send(("failed", f"{type(e).__name__}: {e}"))
        except OSError:
            pass
    except BaseException:
        pass


def overlap_summary(plan, time_limit_s: float):
    """(smallest eigenvalue, count below THRESHOLD, basis functions), computed
    in a worker process that is stopped at ``time_limit_s``; raises
    ProbeSkipped when it is stopped or fails."""
    from dataclasses import asdict

    from deckward.rules.compute.runner.parallel import _context

    ctx = _context()
    receive, send = ctx.Pipe(duplex=False)
    proc = ctx.Process(target=_overlap_worker, args=(asdict(plan), send), daemon=True)
    proc.start()
    send.close()
    try:
        if not receive.poll(time_limit_s):
            raise ProbeSkipped(f"the overlap matrix of `{plan.name}` with {plan.basis_label} took longer than "
                               f"probe.time_limit_s = {time_limit_s:g} s")
        try:
            kind, payload = receive.recv()
        except EOFError:
            raise ProbeSkipped(f"the overlap matrix of `{plan.name}` could not be computed (the worker ended, "
                               "out of memory?)")
        if kind != "ok":
            raise ProbeSkipped(f"the overlap matrix of `{plan.name}` could not be computed: {payload}")
        return payload
    finally:
        receive.close()
        if proc.is_alive():
            proc.kill()
        proc.join()


def probe(ctx: ProbeContext):
    seen: set[str] = set()
    for name in ctx.ws.states:
        plan = ctx.plan(name)
        if plan is None:
            continue
        key = ctx.cache.key(plan.with_changes(charge=0, spin=0, reference="restricted"))
        if key in seen:
            continue
        seen.add(key)
        try:
            reason = ctx.too_large(plan)
            if reason is not None:
                raise ProbeSkipped(reason)
            smallest, below, nao = overlap_summary(plan, ctx.settings.time_limit_s)
        except ProbeSkipped as e:
            yield skipped(INFO, ctx.state_span(name), str(e))
            continue
        if smallest >= THRESHOLD:
            continue
        yield finding(INFO, ctx.state_span(name), (
            f"smallest overlap eigenvalue {smallest:.1e} with {plan.basis_label} ({below} of {nao} below "
            f"{THRESHOLD:g}): the basis is nearly linearly dependent for `{name}`"), {
            "basis": plan.basis_label,
            "smallest_overlap_eigenvalue": smallest,
            "below_threshold": below,
            "n_basis": nao,
        })

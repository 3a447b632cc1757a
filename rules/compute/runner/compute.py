"""Compute one state with PySCF and return its results as plain data.

Runs in the command's process or in a worker process; either way the
result is a JSON-serialisable dict (see ``docs/run-output.schema.json``,
``states[]``) so that it can be cached and sent between processes.
Failures never raise out of ``compute_state``: they come back as a result
with ``status = "failed"`` and the reason in words.
"""
from __future__ import annotations

import contextlib
import os
import socket
import tempfile
import time
import traceback
from typing import Optional

from .plan import StatePlan

# Share of MP2 correlation in the B2PLYP double hybrid (S. Grimme,
# J. Chem. Phys. 124, 034108 (2006)).
B2PLYP_MP2_SHARE = 0.27


def _orbital_channels(mf) -> dict:
    """Occupied (highest first) and virtual (lowest first) orbital energies
    per spin channel: 'alpha', 'beta' and 'any' (the channel an orbital
    reference without a spin uses: spatial orbitals for restricted and
    restricted-open references, both spins merged for unrestricted ones)."""
    import numpy as np

    def split(energies, occupied_mask):
        e = np.asarray(energies, dtype=float)
        occ = sorted(e[occupied_mask].tolist(), reverse=True)
        vir = sorted(e[~occupied_mask].tolist())
        return {"occupied": occ, "virtual": vir}

    mo_e, mo_occ = mf.mo_energy, np.asarray(mf.mo_occ)
    if mo_occ.ndim == 2:  # unrestricted
        a = split(mo_e[0], mo_occ[0] > 0)
        b = split(mo_e[1], mo_occ[1] > 0)
        merged = {
            "occupied": sorted(a["occupied"] + b["occupied"], reverse=True),
            "virtual": sorted(a["virtual"] + b["virtual"]),
        }
        return {"alpha": a, "beta": b, "any": merged}
    if getattr(mo_e, "mo_ea", None) is not None:  # restricted open shell
        return {
            "alpha": split(mo_e.mo_ea, mo_occ > 0),
            "beta": split(mo_e.mo_eb, mo_occ > 1),
            "any": split(mo_e, mo_occ > 0),
        }
    same = split(mo_e, mo_occ > 0)
    return {"alpha": same, "beta": same, "any": same}


def _smallest_overlap_eigenvalue(mol) -> float:
    import numpy as np

    s = mol.intor_symmetric("int1e_ovlp")
    return float(np.linalg.eigvalsh(s)[0])


def _geometric_log_ini(log_path: str, folder: str) -> str:
    """A logging configuration that sends geomeTRIC's output to the state's log."""
    ini = os.path.join(folder, "geometric-log.ini")
    target = (log_path or os.devnull).replace("%", "%%")
    with open(ini, "w", encoding="utf-8") as f:
        f.write(
            "[loggers]\nkeys=root\n\n[handlers]\nkeys=file_handler\n\n[formatters]\nkeys=formatter\n\n"
            "[logger_root]\nlevel=INFO\nhandlers=file_handler\n\n"
            "[handler_file_handler]\nclass=geometric.nifty.RawFileHandler\nlevel=INFO\nformatter=formatter\n"
            f"args=({target!r}, 'a')\n\n[formatter_formatter]\nformat=%%(message)s\n"
        )
    return ini


def _optimize(target, log_path: Optional[str]):
    """Relax the geometry with geomeTRIC; returns (converged, new Mole)."""
    import logging

    from pyscf.geomopt import geometric_solver

    root = logging.getLogger()
    saved = (list(root.handlers), root.level)
    try:
        with tempfile.TemporaryDirectory(prefix="deckward-opt-") as tmp:
            ini = _geometric_log_ini(log_path, tmp)
            return geometric_solver.kernel(target, maxsteps=100, logIni=ini)
    finally:
        for h in list(root.handlers):
            if h not in saved[0]:
                root.removeHandler(h)
                h.close()
        root.setLevel(saved[1])


class _Failure(Exception):
    pass


def _run_level(mol, plan: StatePlan, out: dict):
    """Run SCF (and the correlated method); fill ``out``; return (mf, post)."""
    from .pyscf_build import build_correlated, build_scf

    mf = build_scf(mol, plan)
    mf.kernel()
    if not mf.converged:
        # One second-order attempt from where DIIS stopped (common practice,
        # no source); recorded in the notes.
        mf2 = mf.newton()
        mf2.kernel(mf.make_rdm1())
        if mf2.converged:
            out["notes"].append("SCF converged only with a second-order (Newton) retry")
            mf = mf2
    out["scf_energy"] = float(mf.e_tot)
    out["scf_converged"] = bool(mf.converged)
    if not mf.converged:
        raise _Failure("the SCF did not converge (see the log)")
    post = build_correlated(mf, plan)
    corr = None
    if post is not None:
        post.kernel()
        if hasattr(post, "converged") and not post.converged:
            out["correlation_energy"] = float(post.e_corr)
            raise _Failure(f"{plan.method} did not converge (see the log)")
        corr = float(post.e_corr)
        if plan.kind == "ccsd(t)":
            corr += float(post.ccsd_t())
        if plan.kind == "dft+mp2":
            corr *= B2PLYP_MP2_SHARE
    out["correlation_energy"] = corr
    out["electronic_energy"] = float(mf.e_tot) + (corr or 0.0)
    return mf, post


def _spin(mf, plan: StatePlan, out: dict) -> None:
    s = plan.spin / 2
    out["s2_expected"] = s * (s + 1)
    if plan.reference == "unrestricted":
        out["s2"] = float(mf.spin_square()[0])
    else:
        out["s2"] = None


def _frequencies(mf, plan: StatePlan, out: dict) -> None:
    if plan.family not in ("hf", "dft") or plan.kind == "dft+mp2":
        out["notes"].append(f"frequencies not computed: PySCF has analytic Hessians for Hartree-Fock and density "
                            f"functionals only, not for {plan.method}; the energy has no zero-point term")
        return
    if plan.reference == "restricted_open":
        out["notes"].append("frequencies not computed: PySCF has no analytic Hessian for restricted open-shell "
                            "references; the energy has no zero-point term")
        return
    from pyscf.hessian import thermo

    try:
        hess = mf.Hessian().kernel()
    except (NotImplementedError, AttributeError, TypeError) as e:
        out["notes"].append(f"frequencies not computed: PySCF has no analytic Hessian for this method ({e}); "
                            "the energy has no zero-point term")
        return
    analysis = thermo.harmonic_analysis(mf.mol, hess)
    freqs = []
    for f in analysis["freq_wavenumber"]:
        c = complex(f)
        freqs.append(-abs(c.imag) if abs(c.imag) > abs(c.real) else c.real)
    real_au = [complex(f).real for f in analysis["freq_au"] if abs(complex(f).imag) <= abs(complex(f).real)]
    import numpy as np

    zpe = thermo.thermo(mf, np.asarray(real_au), 298.15)["ZPE"][0]
    out["frequencies_cm1"] = [float(x) for x in freqs]
    out["zpe"] = float(zpe)
    n_imag = sum(1 for x in freqs if x < 0)
    if n_imag:
        out["notes"].append(f"{n_imag} imaginary frequenc{'y' if n_imag == 1 else 'ies'}: not a minimum; "
                            "the zero-point energy leaves them out")
    if not plan.optimize:
        out["notes"].append("frequencies at a geometry not optimised at this level (no optimize(...))")


def empty_result(plan: StatePlan) -> dict:
    return {
        "name": plan.name,
        "status": "failed",
        "reason": None,
        "method": plan.method,
        "basis": plan.basis_label,
        "reference": plan.reference,
        "charge": plan.charge,
        "multiplicity": plan.multiplicity,
        "frozen_core": plan.frozen_core,
        "n_basis": None,
        "energy": None,
        "electronic_energy": None,
        "scf_energy": None,
        "correlation_energy": None,
        "scf_converged": None,
        "s2": None,
        "s2_expected": None,
        "zpe": None,
        "frequencies_cm1": None,
        "optimized_geometry": None,
        "overlap_min_eigenvalue": None,
        "orbitals": None,
        "notes": [],
        "wall_time_s": 0.0,
        "cached": False,
        "log": None,
        "key": None,
        "host": socket.gethostname(),
    }


def _compute(plan: StatePlan, out: dict, log, log_path: Optional[str], max_memory_mb,
             relaxed: Optional[dict] = None) -> None:
    from .pyscf_build import build_mole

    mol = build_mole(plan, max_memory_mb, log)
    out["n_basis"] = int(mol.nao)
    out["overlap_min_eigenvalue"] = _smallest_overlap_eigenvalue(mol)
    if plan.optimize and relaxed is not None:
        _take_relaxed(mol, relaxed, out)
    elif plan.optimize:
        if plan.kind in ("ccsd(t)", "cisd", "dft+mp2"):
            raise _Failure(f"optimize(...) needs nuclear gradients, which PySCF does not offer for "
                           f"{plan.method} here; optimise at another level in a separate state")
        mf, post = _run_level(mol, plan, out)
        target = mf if post is None else post
        try:
            conv, mol = _optimize(target, log_path)
        except NotImplementedError as e:
            raise _Failure(f"optimize(...) needs nuclear gradients: {e}")
        if not conv:
            raise _Failure("the geometry optimisation did not converge in 100 steps (see the log)")
        coords = mol.atom_coords(unit="Angstrom")
        out["optimized_geometry"] = [
            [a.symbol, float(x), float(y), float(z), a.ghost] for a, (x, y, z) in zip(plan.atoms, coords)
        ]
        out["overlap_min_eigenvalue"] = _smallest_overlap_eigenvalue(mol)
    mf, post = _run_level(mol, plan, out)
    _spin(mf, plan, out)
    out["orbitals"] = _orbital_channels(mf)
    energy = out["electronic_energy"]
    if plan.frequencies:
        _frequencies(mf, plan, out)
        if out["zpe"] is not None:
            energy += out["zpe"]
    out["energy"] = energy


def _take_relaxed(mol, relaxed: dict, out: dict) -> None:
    """Start from the geometry an earlier optimisation of the same plan
    found (a dependent task on a cluster), instead of optimising again."""
    import numpy as np

    if relaxed.get("status") != "ok" or not relaxed.get("optimized_geometry"):
        raise _Failure(f"the geometry optimisation this state needs did not finish: {relaxed.get('reason')}")
    coords = np.array([row[1:4] for row in relaxed["optimized_geometry"]], dtype=float)
    mol.set_geom_(coords, unit="Angstrom")
    out["optimized_geometry"] = relaxed["optimized_geometry"]
    out["overlap_min_eigenvalue"] = _smallest_overlap_eigenvalue(mol)


def compute_state(plan: StatePlan, log_path: Optional[str] = None, max_memory_mb: Optional[float] = None,
                  threads: Optional[int] = None, relaxed: Optional[dict] = None) -> dict:
    """Compute one state; never raises (a failure is a result).  PySCF's
    log, its warnings and geomeTRIC's output go to ``log_path``.  With
    ``relaxed`` (the result of the same plan without frequencies), an
    ``optimize(...)`` state starts from that optimised geometry."""
    out = empty_result(plan)
    out["log"] = log_path
    start = time.monotonic()
    saved_threads = None
    log = open(log_path, "w", encoding="utf-8") if log_path else open(os.devnull, "w")
    try:
        from pyscf import lib

        if threads:
            saved_threads = lib.num_threads()
            lib.num_threads(int(threads))
        with contextlib.redirect_stdout(log), contextlib.redirect_stderr(log):
            _compute(plan, out, log, log_path, max_memory_mb, relaxed)
        from .cache_entry import finite_result

        if not finite_result(out):
            raise _Failure("PySCF returned an energy that is not a finite number (see the log)")
        out["status"] = "ok"
    except _Failure as e:
        out["status"] = "unconverged" if "converge" in str(e) else "failed"
        out["reason"] = str(e)
    except MemoryError:
        out["reason"] = "out of memory (try --max-memory with a smaller value, or a smaller basis)"
    except Exception as e:  # PySCF's own errors become the reason, in one line
        last = traceback.extract_tb(e.__traceback__)[-1] if e.__traceback__ else None
        where = f" [{os.path.basename(last.filename)}:{last.lineno}]" if last else ""
        text = str(e).strip().splitlines()[0] if str(e).strip() else ""
        out["reason"] = f"PySCF stopped: {type(e).__name__}: {text}{where}"
    finally:
        log.close()
        if saved_threads is not None:
            from pyscf import lib

            lib.num_threads(saved_threads)
    out["wall_time_s"] = round(time.monotonic() - start, 3)
    return out

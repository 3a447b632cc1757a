"""Bounds on what ``deckward run`` and the probes start: the cost estimate
and its refusal, threads, time limits below the poll interval, the first
Ctrl-C, and a results cache that is damaged, edited, a file or full."""
import json
import os
import signal
import subprocess
import sys
import time

import pytest

from runner_helpers import workspace, write_deck

from deckward.rules.engine.config import Config, load_config
from deckward.rules.compute.probes import run_probes
from deckward.rules.compute.probes.common import ProbeSettings
from deckward.rules.compute.runner import cache_entry, cost
from deckward.rules.compute.runner.cache import RunCache
from deckward.rules.compute.runner.mapping import plan_state
from deckward.rules.compute.runner.parallel import poll_timeout
from deckward.rules.compute.runner.results import RunReport, format_report
from deckward.server.cli import main

# Benzene near its experimental structure (C-C 1.396 A, C-H 1.084 A; NIST
# CCCBDB, from memory): the geometry only has to be reasonable.
BENZENE = """geometry bz {
  C  0.000  1.396 0
  C  1.209  0.698 0
  C  1.209 -0.698 0
  C  0.000 -1.396 0
  C -1.209 -0.698 0
  C -1.209  0.698 0
  H  0.000  2.480 0
  H  2.148  1.240 0
  H  2.148 -1.240 0
  H  0.000 -2.480 0
  H -2.148 -1.240 0
  H -2.148  1.240 0
}
"""
BIG = BENZENE + ("state big { geometry = bz  method = ccsd(t)  basis = aug-cc-pvqz  multiplicity = 1 }\n"
                 "derive e = energy(big)\n")
H2 = ("geometry h2 {\n  H 0 0 0\n  H 0 0 0.74\n}\n"
      "state mol { geometry = h2  method = hf  basis = sto-3g  multiplicity = 1 }\nderive e = energy(mol)\n")


def run_cli(*argv, capsys):
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


# -- the cost estimate -------------------------------------------------------------

@pytest.mark.pyscf
@pytest.mark.parametrize("basis", ["sto-3g", "6-31g*", "cc-pvtz", "aug-cc-pvqz", "def2-svp"])
def test_basis_function_count_equals_pyscf(tmp_path, basis):
    from deckward.rules.compute.runner.pyscf_build import build_mole

    ws = workspace(tmp_path, BENZENE + f"state s {{ geometry = bz  method = hf  basis = {basis}  multiplicity = 1 }}\n")
    plan = plan_state(ws, "s")
    assert cost.n_basis(plan) == build_mole(plan).nao  # PySCF's own count (spherical functions)


def test_added_shells_count_their_functions(tmp_path):
    ws = workspace(tmp_path, "geometry o { O 0 0 0 }\nbasis_set b {\n  from = cc-pvdz\n  add O s 0.03\n  add O d 0.1\n}\n"
                             "state s { geometry = o  method = hf  basis = b  multiplicity = 3 }\n")
    assert cost.n_basis(plan_state(ws, "s")) == 14 + 1 + 5  # cc-pVDZ O: 3s2p1d = 14 (Dunning 1989)


def test_benzene_ccsd_t_in_aug_cc_pvqz_is_refused_before_anything_runs(tmp_path, capsys):
    deck = write_deck(tmp_path, BIG)
    status, out, err = run_cli("run", "--max-memory", "16000", "--cache-dir", str(tmp_path / "c"), deck,
                               capsys=capsys)
    estimate = cost.estimate(plan_state(workspace(tmp_path, BIG), "big"))
    assert estimate.n_basis == 756 and estimate.scaling == 7
    assert err.splitlines() == [
        f"deckward: state `big` is too large to run: 756 basis functions, ccsd(t) scaling as N^7, about "
        f"{estimate.memory_mb / 1000:.1f} GB of memory (aug-cc-pvqz); above run.max_basis_functions = 500 and "
        "16.0 GB of memory (--max-memory)",
        "deckward: nothing was run; raise run.max_basis_functions in deckward.yaml, use a smaller basis, "
        "or run with --force",
    ]
    assert out == "" and status == 2
    assert not os.path.exists(tmp_path / "c" / "runs") or os.listdir(tmp_path / "c" / "runs") == []


@pytest.mark.pyscf
def test_the_bound_comes_from_deckward_yaml(tmp_path, capsys):
    deck = write_deck(tmp_path, H2)
    (tmp_path / "deckward.yaml").write_text("run:\n  max_basis_functions: 1\n", encoding="utf-8")
    status, out, err = run_cli("run", "--no-cache", "-q", deck, capsys=capsys)
    assert status == 2 and "above run.max_basis_functions = 1" in err
    status, out, err = run_cli("run", "--no-cache", "-q", "--force", deck, capsys=capsys)
    assert status == 0 and "converged" in out


# -- threads and time limits -------------------------------------------------------

def test_a_huge_thread_count_is_refused(tmp_path, capsys):
    deck = write_deck(tmp_path, H2)
    status, out, err = run_cli("run", "--threads", "100000", deck, capsys=capsys)
    cores = os.cpu_count() or 1
    assert err == (f"deckward: error: --threads 100000 is more than this machine can use ({cores} cores); "
                   f"use at most {4 * cores}\n")
    assert status == 2


def test_poll_timeout_keeps_limits_below_the_tick():
    assert poll_timeout([10.0], 0.05, now=10.01) == pytest.approx(0.04)
    assert poll_timeout([10.0, None], 5.0, now=10.0) == 0.25
    assert poll_timeout([10.0], 0.05, now=11.0) == 0.0
    assert poll_timeout([None], 0.05, now=10.0) == 0.25  # not started yet
    assert poll_timeout([10.0], None, now=10.0) == 0.25


@pytest.mark.pyscf
def test_a_time_limit_below_the_tick_stops_the_state(tmp_path, capsys):
    deck = write_deck(tmp_path, BENZENE + "state s { geometry = bz  method = hf  basis = cc-pvdz  multiplicity = 1 }\n"
                                          "derive e = energy(s)\n")
    status, out, err = run_cli("run", "--no-cache", "-q", "--time-limit", "0.01", deck, capsys=capsys)
    assert "s: failed: stopped at the time limit of 0.01 s" in out
    assert status == 1


# -- Ctrl-C ------------------------------------------------------------------------

def start_run(tmp_path, *flags):
    deck = write_deck(tmp_path, BENZENE + "state s { geometry = bz  method = hf  basis = cc-pvtz  multiplicity = 1 }\n"
                                          "state t { geometry = bz  method = hf  basis = cc-pvtz  charge = 1 "
                                          "multiplicity = 2 }\nderive ie = energy(t) - energy(s)\n")
    proc = subprocess.Popen([sys.executable, "-m", "deckward", "run", "--no-cache", *flags, deck],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    for line in proc.stderr:  # wait until the first state is computing
        if "running" in line:
            break
    time.sleep(1.0)
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=60)
    return proc.returncode, out, err


@pytest.mark.pyscf
def test_the_first_ctrl_c_stops_a_run_inside_its_first_scf(tmp_path):
    status, out, err = start_run(tmp_path)
    assert status == -signal.SIGINT  # ended by the signal itself, without waiting for PySCF
    assert out == ""


@pytest.mark.pyscf
def test_ctrl_c_with_worker_processes_prints_one_line_and_no_traceback(tmp_path):
    status, out, err = start_run(tmp_path, "--jobs", "2")
    assert status == 130
    assert "Traceback" not in err and "BrokenPipeError" not in err
    assert err.splitlines()[-1] == "deckward: interrupted"


def test_a_worker_whose_command_stopped_ends_quietly(tmp_path):
    """After Ctrl-C the command closes its end of the pipe; the worker
    ignores SIGINT itself and must not raise BrokenPipeError (which
    multiprocessing would print as a traceback)."""
    import multiprocessing
    from dataclasses import asdict

    from deckward.rules.compute.runner.parallel import _worker

    plan = plan_state(workspace(tmp_path, H2), "mol")
    receive, send = multiprocessing.Pipe(duplex=False)
    receive.close()
    saved = signal.getsignal(signal.SIGINT)
    try:
        _worker(asdict(plan), None, None, None, send)
        assert signal.getsignal(signal.SIGINT) is signal.SIG_IGN
    finally:
        signal.signal(signal.SIGINT, saved)


# -- the run cache -----------------------------------------------------------------

def cached_entry(tmp_path, capsys):
    """Run H2 once; return the deck and its only cache entry's path."""
    deck = write_deck(tmp_path, H2)
    status, out, err = run_cli("run", "-q", "--cache-dir", str(tmp_path / "c"), deck, capsys=capsys)
    assert status == 0
    entries = [n for n in os.listdir(tmp_path / "c" / "runs") if n.endswith(".json")]
    assert len(entries) == 1
    return deck, tmp_path / "c" / "runs" / entries[0], out


@pytest.mark.parametrize("edit", [
    lambda d: d.update(energy="-1.1"),
    lambda d: d.update(energy=float("nan")),
    lambda d: d.update(orbitals={"alpha": None}),
    lambda d: d.update(notes="text"),
    lambda d: d.pop("scf_energy"),
    lambda d: d.update(n_basis=True),
])
@pytest.mark.pyscf
def test_an_edited_cache_entry_is_computed_again(tmp_path, capsys, edit):
    deck, entry, first = cached_entry(tmp_path, capsys)
    data = json.loads(entry.read_text(encoding="utf-8"))
    edit(data)
    entry.write_text(json.dumps(data), encoding="utf-8")
    status, out, err = run_cli("run", "-q", "--cache-dir", str(tmp_path / "c"), deck, capsys=capsys)
    assert status == 0
    assert out == first  # computed again: not "(cached)", and no "nan"
    assert "nan" not in out
    assert cache_entry.problem(json.loads(entry.read_text(encoding="utf-8"))) is None  # stored again, whole


def test_a_nan_energy_is_never_stored(tmp_path):
    cache = RunCache(str(tmp_path / "runs"))
    cache.put("k", {"status": "ok", "energy": float("nan"), "electronic_energy": -1.0, "scf_energy": -1.0})
    assert not (tmp_path / "runs" / "k.json").exists()


def test_a_cache_folder_that_is_a_file_is_a_usage_error(tmp_path, capsys):
    deck = write_deck(tmp_path, H2)
    (tmp_path / "c").mkdir()
    (tmp_path / "c" / "runs").write_text("not a folder", encoding="utf-8")
    status, out, err = run_cli("run", "-q", "--cache-dir", str(tmp_path / "c"), deck, capsys=capsys)
    assert err == (f"deckward: error: the run cache {tmp_path / 'c' / 'runs'} is not a folder; remove it or choose "
                   "another with --cache-dir (or --no-cache)\n")
    assert status == 2


@pytest.mark.pyscf
def test_a_full_disk_leaves_the_results_printed_and_a_note(tmp_path, capsys, monkeypatch):
    import errno

    from deckward.rules.compute.runner import cache as cache_module

    def full(*a, **k):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(cache_module, "replace_file", full)  # the write of the entry
    deck = write_deck(tmp_path, H2)
    status, out, err = run_cli("run", "-q", "--cache-dir", str(tmp_path / "c"), deck, capsys=capsys)
    assert status == 0 and "converged" in out
    assert err == (f"deckward: results were not stored in the run cache {tmp_path / 'c' / 'runs'}: "
                   "No space left on device\n")
    assert [n for n in os.listdir(tmp_path / "c" / "runs") if not n.endswith(".log")] == []


# -- messages ---------------------------------------------------------------------

def test_the_scf_column_says_converged_when_ccsd_failed():
    state = {"name": "anion", "status": "unconverged", "reason": "ccsd did not converge (see the log)",
             "method": "ccsd", "basis": "aug-cc-pvdz", "charge": -1, "multiplicity": 1, "energy": None,
             "scf_converged": True, "s2": None, "log": None, "notes": []}
    report = RunReport("x.deck", "0" * 64, "2.x", "0.x", states=[state])
    lines = format_report(report).splitlines()
    row = next(line for line in lines if line.startswith("anion"))
    assert row.split()[-1] == "converged"
    assert "  anion: unconverged: ccsd did not converge (see the log)" in lines


def test_probe_says_when_no_state_could_be_mapped(tmp_path, capsys):
    deck = write_deck(tmp_path, "geometry g {\n  He 0 0 0\n}\n"
                                "state s { geometry = g method = foomethod basis = sto-3g multiplicity = 1 }\n")
    status, out, err = run_cli("probe", deck, capsys=capsys)
    assert out.splitlines() == [
        f"deckward: {deck} was not probed: no state could be mapped to a calculation: {deck}:4:33: "
        "method `foomethod` is not in the method table",
        "0 errors, 0 warnings, 0 info in 1 file",
    ]


# -- probe limits ------------------------------------------------------------------

GHOST = ("geometry he2 {\n  He 0 0 0\n  He 0 0 0.01 ghost\n}\n"
         "state close { geometry = he2  method = hf  basis = aug-cc-pvdz  multiplicity = 1 }\n")


@pytest.mark.parametrize("settings, reason", [
    ({"max_basis_functions": 10}, "18 basis functions with aug-cc-pvdz exceed probe.max_basis_functions = 10 "
                                  "(raise it in deckward.yaml to probe anyway)"),
    ({"time_limit_s": 0.001}, "the overlap matrix of `close` with aug-cc-pvdz took longer than "
                              "probe.time_limit_s = 0.001 s"),
])
def test_overlap_probe_honours_its_limits(tmp_path, settings, reason):
    ws = workspace(tmp_path, GHOST)
    found = run_probes(ws, Config(probe=settings), RunCache(str(tmp_path / "c")),
                       select={"probe-overlap-conditioning"})
    assert [(f.rule, f.severity.value, f.message) for f in found] == [
        ("probe-overlap-conditioning", "info", f"probe skipped: {reason}")]


def test_infinite_probe_bound_is_a_config_finding_not_a_crash(tmp_path):
    path = tmp_path / "deckward.yaml"
    path.write_text("probe:\n  max_basis_functions: inf\n", encoding="utf-8")
    cfg = load_config(str(path), set())
    assert [(f.rule, f.span.line, f.message) for f in cfg.findings] == [
        ("invalid-config", 2, "`probe.max_basis_functions` must be a positive number, not infinite")]
    assert ProbeSettings.from_config(Config(probe={"max_basis_functions": float("inf")})).max_basis_functions > 10**6


def test_a_ten_thousand_atom_deck_is_skipped_by_the_overlap_probe_without_building_it(tmp_path, monkeypatch):
    from deckward.rules.compute.runner import pyscf_build

    def never(*a, **k):
        raise AssertionError("the molecule must not be built to find that it is too large")

    monkeypatch.setattr(pyscf_build, "build_mole", never)
    atoms = "\n".join(f"  He {i * 3.0:.1f} 0 0" for i in range(10_000))
    ws = workspace(tmp_path, f"geometry many {{\n{atoms}\n}}\n"
                             "state s { geometry = many  method = hf  basis = sto-3g  multiplicity = 1 }\n")
    found = run_probes(ws, Config(), RunCache(str(tmp_path / "c")), select={"probe-overlap-conditioning"})
    assert [f.message for f in found] == [  # STO-3G He: one s function (Hehre, Stewart, Pople 1969)
        "probe skipped: 10000 basis functions with sto-3g exceed probe.max_basis_functions = 300 "
        "(raise it in deckward.yaml to probe anyway)"]

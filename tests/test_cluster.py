"""Runs on a real Dask cluster on this machine: a LocalCluster of two worker
processes, and a scheduler plus two workers started with the `dask`
command.  Numbers must equal a run in this process to 1e-8 hartree; a
worker killed mid-state costs nothing (or, past the bound, that state only);
an interrupted client leaves no half-written record and a rerun computes
only what is missing.  The PySCF work is Hartree-Fock on atoms and diatomics."""
from __future__ import annotations

import json
import os
import signal
import sqlite3
import subprocess
import sys
import time

import pytest

from cluster_support import DaskProcesses, KillOnStart
from runner_helpers import workspace, write_deck

from deckward.rules.compute.runner.cache import RunCache
from deckward.rules.compute.runner.parallel import RunOptions
from deckward.rules.compute.runner.run import run_workspace

pytest.importorskip("distributed")

# Experimental geometries: CN r = 1.1718 A (from memory, NIST CCCBDB),
# LiH r = 1.5949 A (from memory, NIST CCCBDB).
SMALL = """geometry cn {
  C 0 0 0
  N 0 0 1.1718
}
geometry f { F 0 0 0 }
geometry h { H 0 0 0 }
level hf_small { method = hf basis = 6-31g reference = unrestricted }  # allow: anion-lacks-diffuse -- a small basis keeps the cluster tests short
state radical { geometry = cn level = hf_small charge = 0 multiplicity = 2 }
state anion { geometry = cn level = hf_small charge = -1 multiplicity = 1 reference = restricted }
state fluorine { geometry = f level = hf_small charge = 0 multiplicity = 2 }
state fluoride { geometry = f level = hf_small charge = -1 multiplicity = 1 reference = restricted }
state hydrogen { geometry = h level = hf_small charge = 0 multiplicity = 2 }
derive ea_cn as electron_affinity = energy(radical) - energy(anion) in ev
derive ea_f as electron_affinity = energy(fluorine) - energy(fluoride) in ev
derive h_atom = energy(hydrogen)
"""

# One state of a few seconds (UHF on CN in a triple-zeta diffuse basis), so
# that a worker can be killed while it computes, and two short ones.
LONG = """geometry cn {
  C 0 0 0
  N 0 0 1.1718
}
geometry h { H 0 0 0 }
geometry f { F 0 0 0 }
level hf_big { method = hf basis = aug-cc-pvtz reference = unrestricted }
level hf_small { method = hf basis = 6-31g reference = unrestricted }
state slow { geometry = cn level = hf_big charge = 0 multiplicity = 2 }
state hydrogen { geometry = h level = hf_small charge = 0 multiplicity = 2 }
state fluorine { geometry = f level = hf_small charge = 0 multiplicity = 2 }
derive e_slow = energy(slow)
derive e_h = energy(hydrogen)
derive e_f = energy(fluorine)
"""

OPT_FREQ = """geometry lih {
  Li 0 0 0
  H 0 0 1.5949
}
level hf_min { method = hf basis = sto-3g reference = restricted }
state relaxed { geometry = optimize(lih) level = hf_min charge = 0 multiplicity = 1 }
state vibrating { geometry = optimize(lih) level = hf_min charge = 0 multiplicity = 1 frequencies = true }
derive e_relaxed = energy(relaxed)
derive e_zpe = energy(vibrating)
"""


@pytest.fixture(scope="module")
def local_cluster():
    from deckward.rules.compute.runner.dask_executor import DaskExecutor

    with DaskExecutor.local(2) as executor:
        yield executor


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    """SMALL computed in this process: what every cluster run must give."""
    folder = tmp_path_factory.mktemp("reference")
    ws = workspace(folder, SMALL)
    return run_workspace(ws, RunCache(str(folder / "cache")), RunOptions(in_process=True))


def _energies(report) -> dict:
    return {s["name"]: s["energy"] for s in report.states}


@pytest.mark.pyscf
def test_local_cluster_gives_the_numbers_of_a_local_run(tmp_path, local_cluster, reference):
    ws = workspace(tmp_path, SMALL)
    report = run_workspace(ws, RunCache(str(tmp_path / "cache")), RunOptions(executor=local_cluster))
    assert report.ok
    ref = _energies(reference)
    assert set(_energies(report)) == set(ref)
    for name, e in _energies(report).items():
        assert e == pytest.approx(ref[name], abs=1e-8), name
    for d, r in zip(report.derived, reference.derived):
        assert d.value_hartree == pytest.approx(r.value_hartree, abs=1e-8)
    # Each state ran on a worker process of the cluster, not here.
    workers = set(local_cluster.client.scheduler_info()["workers"])
    assert all(s["host"].split("(")[1].rstrip(")") in workers for s in report.states)


def test_threads_and_memory_follow_the_worker(local_cluster):
    from deckward.rules.compute.runner.dask_tasks import worker_resources

    client = local_cluster.client
    infos = client.scheduler_info()["workers"]
    for address, (threads, memory) in client.run(worker_resources).items():
        assert threads == len(os.sched_getaffinity(0))  # one task slot per worker: all its cores
        # three quarters of the worker's memory limit, in MB
        assert memory == round(infos[address]["memory_limit"] / 2**20 * 0.75)
    fixed = client.run(worker_resources, threads=3, max_memory_mb=500)
    assert set(fixed.values()) == {(3, 500)}  # what the run fixed wins


@pytest.mark.pyscf
def test_frequency_job_depends_on_its_optimisation(tmp_path, local_cluster):
    ws = workspace(tmp_path, OPT_FREQ)
    cache = RunCache(str(tmp_path / "cache"))
    report = run_workspace(ws, cache, RunOptions(executor=local_cluster))
    assert report.ok
    here = run_workspace(ws, RunCache(str(tmp_path / "here")), RunOptions(in_process=True))
    for name in ("relaxed", "vibrating"):
        assert report.state(name)["energy"] == pytest.approx(here.state(name)["energy"], abs=1e-8)
    assert report.state("vibrating")["zpe"] == pytest.approx(here.state("vibrating")["zpe"], abs=1e-8)
    assert report.state("vibrating")["optimized_geometry"] == report.state("relaxed")["optimized_geometry"]
    # The frequency job started from the optimisation's geometry: the
    # optimised state appears once in the cache, under its own key.
    assert os.path.isfile(os.path.join(cache.folder, report.state("relaxed")["key"] + ".json"))


@pytest.mark.pyscf
def test_worker_killed_mid_state_is_retried_on_another(tmp_path, local_cluster):
    ws = workspace(tmp_path, LONG)
    stream = KillOnStart(local_cluster.client, "slow")
    report = run_workspace(ws, RunCache(str(tmp_path / "cache")), RunOptions(executor=local_cluster),
                           progress_stream=stream, show_progress=True)
    assert stream.killed is not None
    assert report.ok, [s["reason"] for s in report.states]
    # The slow state started twice: on the killed worker, then on another.
    assert stream.text.count("] slow: running on ") == 2
    here = run_workspace(ws, RunCache(str(tmp_path / "here")), RunOptions(in_process=True))
    assert report.state("slow")["energy"] == pytest.approx(here.state("slow")["energy"], abs=1e-8)
    local_cluster.client.wait_for_workers(2, timeout=60)  # the nanny restarted it


@pytest.mark.pyscf
def test_worker_deaths_past_the_bound_fail_that_state_only(tmp_path):
    from deckward.rules.compute.runner.dask_executor import DaskExecutor

    ws = workspace(tmp_path, LONG)
    with DaskExecutor.local(2, retries=0) as executor:
        stream = KillOnStart(executor.client, "slow")
        report = run_workspace(ws, RunCache(str(tmp_path / "cache")), RunOptions(executor=executor),
                               progress_stream=stream, show_progress=True)
    slow = report.state("slow")
    assert slow["status"] == "failed"
    assert slow["reason"] == ("the worker computing it died once (killed, or out of memory); the scheduler "
                              "stopped retrying it on other workers")
    assert report.state("hydrogen")["status"] == "ok" and report.state("fluorine")["status"] == "ok"
    assert not os.path.exists(os.path.join(str(tmp_path / "cache"), slow["key"] or "none") + ".json")
    d = {x.name: x for x in report.derived}
    assert not d["e_slow"].available and d["e_h"].available


@pytest.mark.pyscf
def test_time_limit_on_a_cluster_fails_the_state_and_keeps_no_result(tmp_path, local_cluster):
    ws = workspace(tmp_path, LONG)
    cache = RunCache(str(tmp_path / "cache"))
    report = run_workspace(ws, cache, RunOptions(executor=local_cluster, time_limit_s=0.5))
    slow = report.state("slow")
    assert slow["status"] == "failed"
    assert slow["reason"] == ("stopped at the time limit of 0.5 s (the worker may finish it in the background; "
                              "the result is not kept)")
    assert cache.get(slow["key"]) is None
    assert report.state("hydrogen")["status"] == "ok" or "time limit" in report.state("hydrogen")["reason"]


@pytest.mark.pyscf
def test_probes_run_on_a_local_cluster(tmp_path):
    deck = write_deck(tmp_path, """geometry he { He 0 0 0 }
level hf_min { method = hf basis = sto-3g }
state helium { geometry = he level = hf_min charge = 0 multiplicity = 1 reference = restricted }
derive ie_koopmans as ionization_energy = -orbital(helium, homo) in ev
""", "he.deck")
    proc = _deckward("probe", "--cluster", "local", "--jobs", "2", "--cache-dir", str(tmp_path / "c"),
                     "--format", "json", deck)
    assert proc.returncode in (0, 1), proc.stderr
    assert "probe-koopmans-relaxation" in proc.stdout
    stored = [json.loads((tmp_path / "c" / "runs" / f).read_text())
              for f in os.listdir(tmp_path / "c" / "runs") if f.endswith(".json")]
    assert stored and all("(tcp://127.0.0.1:" in r["host"] for r in stored)


@pytest.fixture(scope="module")
def dask_processes(tmp_path_factory):
    with DaskProcesses(str(tmp_path_factory.mktemp("dask")), workers=2) as cluster:
        yield cluster


def _deckward(*args, **kw) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "deckward", *args], capture_output=True, text=True, timeout=300, **kw)


@pytest.mark.pyscf
def test_run_against_a_separately_started_scheduler(tmp_path, dask_processes, reference):
    deck = write_deck(tmp_path, SMALL, "acceptors.deck")
    out = tmp_path / "run.json"
    proc = _deckward("run", "--scheduler", dask_processes.address, "--cache-dir", str(tmp_path / "c"),
                     "--json", str(out), deck)
    assert proc.returncode == 0, proc.stderr
    data = json.loads(out.read_text())
    ref = _energies(reference)
    for s in data["states"]:
        assert s["energy"] == pytest.approx(ref[s["name"]], abs=1e-8)
    assert "running on " in proc.stderr and dask_processes.address.split(":")[1] in proc.stderr
    listed = _deckward("results", "--cache-dir", str(tmp_path / "c"), "--format", "json", str(tmp_path))
    assert listed.returncode == 0, listed.stderr
    rows = json.loads(listed.stdout)
    by_name = {d["name"]: d for d in rows["derived"]}
    assert set(by_name) == {"ea_cn", "ea_f", "h_atom"}
    want = {d.name: d for d in reference.derived}
    assert by_name["ea_cn"]["value"] == pytest.approx(want["ea_cn"].value, abs=1e-6)
    assert by_name["ea_cn"]["unit"] == "ev"
    assert {s["state"] for s in rows["states"]} == set(ref)


@pytest.mark.pyscf
def test_interrupted_client_leaves_no_half_record_and_rerun_computes_the_rest(tmp_path, dask_processes):
    deck = write_deck(tmp_path, LONG, "long.deck")
    cache = tmp_path / "c"
    cmd = [sys.executable, "-m", "deckward", "run", "--scheduler", dask_processes.address, "--cache-dir",
           str(cache), deck]
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    seen = ""
    deadline = time.monotonic() + 120
    try:
        while "hydrogen: done" not in seen or "fluorine: done" not in seen or "slow: running" not in seen:
            line = proc.stderr.readline()
            assert line and time.monotonic() < deadline, seen
            seen += line
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    assert proc.returncode == 130, err
    assert "deckward: interrupted" in err
    db = sqlite3.connect(str(cache / "results.sqlite"))
    assert db.execute("SELECT status FROM runs").fetchall() == [("interrupted",)]
    assert sorted(r[0] for r in db.execute("SELECT state FROM states")) == ["fluorine", "hydrogen"]
    assert db.execute("SELECT COUNT(*) FROM derived").fetchone() == (0,)
    db.close()
    stored = [f for f in os.listdir(cache / "runs") if f.endswith(".json")]
    assert len(stored) == 2 and not [f for f in os.listdir(cache / "runs") if f.startswith(".tmp")]
    # The client's futures were cancelled: the scheduler forgets the tasks.
    from distributed import Client

    with Client(dask_processes.address, timeout="30s", set_as_default=False) as client:
        deadline = time.monotonic() + 30
        while client.run_on_scheduler(lambda dask_scheduler: len(dask_scheduler.tasks)):
            assert time.monotonic() < deadline
            time.sleep(0.2)
    again = _deckward("run", "--scheduler", dask_processes.address, "--cache-dir", str(cache), deck)
    assert again.returncode == 0, again.stderr
    assert "hydrogen: cached" in again.stderr and "fluorine: cached" in again.stderr
    assert again.stderr.count(": running on ") == 1 and "slow: running on " in again.stderr


def test_unreachable_scheduler_is_one_line_and_exit_2(tmp_path):
    import socket

    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()  # nothing listens there now
    deck = write_deck(tmp_path, SMALL, "acceptors.deck")
    proc = _deckward("run", "--scheduler", f"tcp://127.0.0.1:{port}", "--connect-timeout", "1",
                     "--cache-dir", str(tmp_path / "c"), deck)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1, proc.stderr
    assert lines[0].startswith(f"deckward: error: cannot reach the Dask scheduler at tcp://127.0.0.1:{port} within 1 s")
    assert proc.stdout == ""


@pytest.mark.parametrize("args, message", [
    (["--scheduler", "127.0.0.1:8786"], "deckward: error: --scheduler takes an address such as tcp://host:8786, "
                                        "not `127.0.0.1:8786`"),
    (["--scheduler", "tcp://127.0.0.1:1", "--cluster", "local"],
     "deckward: error: --scheduler and --cluster exclude each other (a scheduler address is a running cluster)"),
    (["--cluster", "hpc"], "deckward: error: --cluster hpc: no such cluster (no deckward.yaml found); known: local"),
])
def test_executor_options_mistakes(tmp_path, args, message):
    deck = write_deck(tmp_path, SMALL, "acceptors.deck")
    proc = _deckward("run", *args, "--cache-dir", str(tmp_path / "c"), deck, cwd=str(tmp_path))
    assert proc.returncode == 2
    assert proc.stderr.strip() == message

"""The `cluster:` section of deckward.yaml: validated at its lines, and
turned by dask-jobqueue into the batch script it would submit (no batch
scheduler runs here, so nothing is submitted)."""
from __future__ import annotations

import subprocess
import sys
import textwrap

import pytest

from deckward.rules.engine.config import load_config

GOOD = textwrap.dedent("""\
    cluster:
      hpc:
        kind: slurm
        cores: 8
        memory: 16 GB
        walltime: "02:00:00"
        queue: short
        account: acceptors
        jobs: 3
        retries: 1
        job_extra_directives: ["--exclusive"]
    """)

BAD = textwrap.dedent("""\
    cluster:
      hpc:
        kind: slurmm
        cores: eight
        memroy: 4 GB
      pbs1:
        kind: pbs
        cores: 4
        memory: lots
        walltime: two hours
        job_extra_directives: -l select=1
      local:
        kind: slurm
    """)


def _load(tmp_path, text):
    path = tmp_path / "deckward.yaml"
    path.write_text(text)
    return load_config(str(path), set())


def test_a_cluster_is_read_into_a_spec(tmp_path):
    cfg = _load(tmp_path, GOOD)
    assert cfg.findings == []
    spec = cfg.clusters["hpc"]
    assert (spec.kind, spec.jobs, spec.retries, spec.jobqueue_class) == ("slurm", 3, 1, "SLURMCluster")
    assert spec.options == {"cores": 8, "memory": "16 GB", "walltime": "02:00:00", "queue": "short",
                            "account": "acceptors", "job_extra_directives": ["--exclusive"], "processes": 1}


def test_every_mistake_is_reported_at_its_line(tmp_path):
    cfg = _load(tmp_path, BAD)
    got = [(f.rule, f.span.line, f.span.column, f.message) for f in cfg.findings]
    keys = ("kind, jobs, retries, cores, processes, memory, walltime, queue, account, local_directory, "
            "log_directory, interface, python, job_extra_directives, job_script_prologue")
    assert got == [
        ("invalid-config", 3, 11, "`slurmm` is not a cluster kind (slurm | pbs | sge | lsf | htcondor | oar | moab); "
                                  "did you mean `slurm`?"),
        ("invalid-config", 4, 12, "`cluster.hpc.cores` must be a whole number of at least 1"),
        ("invalid-config", 5, 5, f"unknown key `memroy` in cluster `hpc` (keys: {keys}); did you mean `memory`?"),
        ("invalid-config", 2, 3, "cluster `hpc` needs `memory`"),
        ("invalid-config", 9, 13, "`cluster.pbs1.memory` must be an amount with its unit, such as `16 GB` (not `lots`)"),
        ("invalid-config", 10, 15, "`cluster.pbs1.walltime` must be a time such as `02:00:00`"),
        ("invalid-config", 11, 27, "`cluster.pbs1.job_extra_directives` must be a list of lines"),
        ("invalid-config", 12, 3, "`local` is the built-in local cluster (`--cluster local`); choose another name"),
    ]
    assert cfg.clusters == {}


def test_dask_jobqueue_writes_the_batch_script(tmp_path):
    pytest.importorskip("dask_jobqueue")
    from deckward.rules.compute.runner.cluster_build import jobqueue_cluster

    spec = _load(tmp_path, GOOD).clusters["hpc"]
    cluster = jobqueue_cluster(spec, spec.retries)
    try:
        script = cluster.job_script()
        assert cluster.scheduler.allowed_failures == 1
    finally:
        cluster.close()
    lines = script.splitlines()
    for directive in ("#SBATCH -p short", "#SBATCH -A acceptors", "#SBATCH --cpus-per-task=8",
                      "#SBATCH -t 02:00:00", "#SBATCH --exclusive"):
        assert directive in lines, script
    worker = [ln for ln in lines if "dask_worker" in ln or "dask worker" in ln][0]
    assert "--nthreads 8" in worker and "--nworkers" not in worker  # one worker process with the job's cores


def test_run_refuses_a_cluster_with_mistakes_in_one_line(tmp_path):
    (tmp_path / "deckward.yaml").write_text(BAD)
    deck = tmp_path / "h.deck"
    deck.write_text("geometry h { H 0 0 0 }\nlevel l { method = hf basis = sto-3g }\n"
                    "state s { geometry = h level = l multiplicity = 2 }\n")
    proc = subprocess.run([sys.executable, "-m", "deckward", "run", "--cluster", "hpc", "--no-record", str(deck)],
                          capture_output=True, text=True, cwd=str(tmp_path), timeout=120)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1
    assert lines[0].startswith("deckward: error: --cluster hpc: the configuration has mistakes: deckward.yaml:3:11: "
                               "`slurmm` is not a cluster kind")

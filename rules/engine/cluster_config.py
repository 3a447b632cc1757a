"""The ``cluster:`` section of deckward.yaml: named batch-scheduler clusters.

Each entry describes a ``dask-jobqueue`` cluster (SLURM, PBS, ...) that
``deckward run --cluster NAME`` starts and scales to ``jobs`` batch jobs::

    cluster:
      hpc:
        kind: slurm
        cores: 8
        memory: 16 GB
        walltime: "02:00:00"
        queue: short
        jobs: 4

Validated here, from the YAML nodes, so that every mistake is reported at
its line like the rest of the configuration; nothing here imports Dask (the
configuration is read on the typing path).
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Callable, Optional

from deckward.grammar.build import did_you_mean

# kind -> dask_jobqueue class
KINDS = {
    "slurm": "SLURMCluster",
    "pbs": "PBSCluster",
    "sge": "SGECluster",
    "lsf": "LSFCluster",
    "htcondor": "HTCondorCluster",
    "oar": "OARCluster",
    "moab": "MoabCluster",
}
INT_KEYS = ("cores", "processes")
TEXT_KEYS = ("memory", "walltime", "queue", "account", "local_directory", "log_directory", "interface", "python")
LIST_KEYS = ("job_extra_directives", "job_script_prologue")
OWN_KEYS = ("kind", "jobs", "retries")
ALL_KEYS = OWN_KEYS + INT_KEYS + TEXT_KEYS + LIST_KEYS
REQUIRED = ("kind", "cores", "memory")
MEMORY = re.compile(r"^\s*\d+(\.\d+)?\s*([kKMGTP]i?B|B)\s*$")
WALLTIME = re.compile(r"^\d+(:\d\d){0,3}$")


@dataclass(frozen=True)
class ClusterSpec:
    name: str
    kind: str  # a key of KINDS
    jobs: int = 1  # batch jobs to scale to
    retries: int = 2  # deaths of a worker a state survives (the scheduler's allowed-failures)
    options: dict = field(default_factory=dict)  # passed to the dask_jobqueue class

    @property
    def jobqueue_class(self) -> str:
        return KINDS[self.kind]


def parse_clusters(node, report: Callable) -> dict[str, ClusterSpec]:
    """ClusterSpecs by name from the ``cluster:`` node; mistakes go to
    ``report(node, message)``."""
    import yaml

    out: dict[str, ClusterSpec] = {}
    if not isinstance(node, yaml.MappingNode):
        report(node, "`cluster` must map cluster names to their settings (kind, cores, memory, ...)")
        return out
    for name_node, body in node.value:
        name = str(name_node.value)
        if name == "local":
            report(name_node, "`local` is the built-in local cluster (`--cluster local`); choose another name")
            continue
        if not isinstance(body, yaml.MappingNode):
            report(body, f"cluster `{name}` must be a mapping (keys: {', '.join(ALL_KEYS)})")
            continue
        spec = _one(name, name_node, body, report)
        if spec is not None:
            out[name] = spec
    return out


def _one(name: str, name_node, body, report: Callable) -> Optional[ClusterSpec]:
    import yaml

    values: dict = {}
    ok = True
    for k, v in body.value:
        key = str(k.value)
        where = f"`cluster.{name}.{key}`"
        if key not in ALL_KEYS:
            report(k, f"unknown key `{key}` in cluster `{name}` (keys: {', '.join(ALL_KEYS)})"
                   + did_you_mean(key, ALL_KEYS))
            ok = False
        elif key in LIST_KEYS:
            if not isinstance(v, yaml.SequenceNode) or not all(isinstance(x, yaml.ScalarNode) for x in v.value):
                report(v, f"{where} must be a list of lines")
                ok = False
            else:
                values[key] = [str(x.value) for x in v.value]
        elif not isinstance(v, yaml.ScalarNode) or v.value == "":
            report(v, f"{where} must be a single value")
            ok = False
        elif key == "kind":
            word = str(v.value).lower()
            if word not in KINDS:
                report(v, f"`{v.value}` is not a cluster kind ({' | '.join(KINDS)})" + did_you_mean(word, KINDS))
                ok = False
            else:
                values[key] = word
        elif key in INT_KEYS or key in ("jobs", "retries"):
            least = 0 if key == "retries" else 1
            try:
                number = int(str(v.value))
            except ValueError:
                number = None
            if number is None or number < least:
                report(v, f"{where} must be a whole number of at least {least}")
                ok = False
            else:
                values[key] = number
        elif key == "memory" and not MEMORY.match(str(v.value)):
            report(v, f"{where} must be an amount with its unit, such as `16 GB` (not `{v.value}`)")
            ok = False
        elif key == "walltime" and not WALLTIME.match(str(v.value)):
            report(v, f"{where} must be a time such as `02:00:00`")
            ok = False
        else:
            values[key] = str(v.value)
    missing = [k for k in REQUIRED if k not in values and not any(str(x.value) == k for x, _ in body.value)]
    if missing:
        report(name_node, f"cluster `{name}` needs {', '.join(f'`{k}`' for k in missing)}")
        ok = False
    if not ok:
        return None
    # One worker process per batch job unless asked otherwise: its task
    # slots then share the job's cores, which is what a state's threads
    # are counted from (dask-jobqueue would otherwise split the job).
    values.setdefault("processes", 1)
    kind = values.pop("kind")
    jobs = values.pop("jobs", 1)
    retries = values.pop("retries", 2)
    return ClusterSpec(name, kind, jobs, retries, values)

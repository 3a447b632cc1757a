"""A Dask cluster started the way one is started on real machines: a
scheduler and workers as separate processes of the ``dask`` command, on
127.0.0.1 only, each start bounded in time and every process stopped at the
end (its whole process group)."""
from __future__ import annotations

import json
import os
import shutil
import signal
import subprocess
import sys
import time

START_LIMIT_S = 60.0


def _dask_command() -> list[str]:
    exe = shutil.which("dask", path=os.path.dirname(sys.executable)) or shutil.which("dask")
    assert exe, "the `dask` command (package distributed) is not installed"
    return [exe]


class DaskProcesses:
    def __init__(self, folder: str, workers: int = 2) -> None:
        self.folder = folder
        self.workers = workers
        self.procs: list[subprocess.Popen] = []
        self.address = None

    def _start(self, args: list[str], log_name: str) -> subprocess.Popen:
        log = open(os.path.join(self.folder, log_name), "w")
        env = dict(os.environ, OMP_NUM_THREADS="1")
        proc = subprocess.Popen(_dask_command() + args, stdout=log, stderr=subprocess.STDOUT, env=env,
                                start_new_session=True, cwd=self.folder)
        self.procs.append(proc)
        return proc

    def __enter__(self) -> "DaskProcesses":
        sched_file = os.path.join(self.folder, "scheduler.json")
        try:
            self._start(["scheduler", "--host", "127.0.0.1", "--port", "0", "--no-dashboard",
                         "--scheduler-file", sched_file], "scheduler.log")
            deadline = time.monotonic() + START_LIMIT_S
            while not os.path.isfile(sched_file):
                assert time.monotonic() < deadline, "the scheduler did not start"
                time.sleep(0.1)
            time.sleep(0.2)
            with open(sched_file) as f:
                self.address = json.load(f)["address"]
            for i in range(self.workers):
                self._start(["worker", self.address, "--host", "127.0.0.1", "--nthreads", "1", "--no-dashboard",
                             "--name", f"w{i}"], f"worker{i}.log")
            from distributed import Client

            with Client(self.address, timeout="30s", set_as_default=False) as client:
                client.wait_for_workers(self.workers, timeout=START_LIMIT_S)
        except BaseException:
            self.stop()
            raise
        return self

    def __exit__(self, *exc) -> None:
        self.stop()

    def stop(self) -> None:
        for proc in reversed(self.procs):
            if proc.poll() is None:
                try:
                    os.killpg(proc.pid, signal.SIGTERM)
                except ProcessLookupError:
                    pass
        for proc in reversed(self.procs):
            try:
                proc.wait(timeout=15)
            except subprocess.TimeoutExpired:
                os.killpg(proc.pid, signal.SIGKILL)
                proc.wait()


def worker_pids(client) -> dict[str, int]:
    """Worker address -> process id of the worker (not its nanny)."""
    return client.run(os.getpid)


class KillOnStart:
    """A progress stream that kills the worker process a named state starts
    on, the first time it starts (a worker dying mid-state)."""

    def __init__(self, client, state: str) -> None:
        self.client = client
        self.state = state
        self.pids = worker_pids(client)
        self.killed = None
        self.text = ""

    def isatty(self) -> bool:
        return False

    def flush(self) -> None:
        pass

    def write(self, text: str) -> None:
        self.text += text
        if self.killed is None and text.startswith(f"[") and f"] {self.state}: running on " in text:
            address = text.split(" running on ", 1)[1].split()[1]
            time.sleep(0.3)  # well inside the state's SCF
            os.kill(self.pids[address], signal.SIGKILL)
            self.killed = address

"""The progress display on standard error: which state runs, for how long.

On a terminal one status line is redrawn every half second; otherwise (a
log file, a CI job) one line is written when a state starts and one when it
ends, so the output stays readable.  Runs on a cluster use the same display:
states wait as queued until a worker picks them up, and a running state
says where it runs.
"""
from __future__ import annotations

import sys
import threading
import time
from typing import Optional, TextIO


class Progress:
    def __init__(self, total: int, stream: Optional[TextIO] = None, enabled: bool = True) -> None:
        self.total = total
        self.stream = stream if stream is not None else sys.stderr
        self.enabled = enabled
        self.live = enabled and hasattr(self.stream, "isatty") and self.stream.isatty()
        self.running: dict[str, float] = {}
        self.where: dict[str, str] = {}
        self.queued: set[str] = set()
        self.failed = 0
        self.done = 0
        self.launched = 0
        self._lock = threading.Lock()
        self._stop = threading.Event()
        self._thread: Optional[threading.Thread] = None

    def grow(self, n: int = 1) -> None:
        """Count ``n`` more calculations (probes learn what they need as they go)."""
        self.total += n

    def __enter__(self) -> "Progress":
        self._stop.clear()
        if self.live:
            self._thread = threading.Thread(target=self._tick, daemon=True)
            self._thread.start()
        return self

    def __exit__(self, *exc) -> None:
        self._stop.set()
        if self._thread is not None:
            self._thread.join()
        if self.live:
            self._write("\r\x1b[K")

    def _write(self, text: str) -> None:
        try:
            self.stream.write(text)
            self.stream.flush()
        except (OSError, ValueError):
            pass

    def status_line(self) -> str:
        now = time.monotonic()
        parts = [f"{name} {now - t0:.1f} s" + (f" on {self.where[name]}" if name in self.where else "")
                 for name, t0 in list(self.running.items())]
        head = f"[{self.done}/{self.total}]"
        if self.queued:
            head += f" queued {len(self.queued)},"
        if self.failed:
            head += f" failed {self.failed},"
        return head + " running: " + (", ".join(parts) if parts else "-")

    def _tick(self) -> None:
        while not self._stop.wait(0.5):
            with self._lock:
                self._write("\r\x1b[K" + self.status_line())

    def _line(self, text: str) -> None:
        if not self.enabled:
            return
        with self._lock:
            self._write(("\r\x1b[K" if self.live else "") + text + "\n")

    def queue(self, name: str) -> None:
        """The state waits for a worker (cluster runs)."""
        self.queued.add(name)

    def started(self, name: str, where: Optional[str] = None) -> None:
        self.queued.discard(name)
        if name not in self.running:  # a retry or a dependent step is not a new state
            self.launched += 1
        self.running.setdefault(name, time.monotonic())
        if where:
            self.where[name] = where
        if not self.live:
            on = f" on {where}" if where else ""
            self._line(f"[{self.done}/{self.total} done] {name}: running{on} (state {self.launched} of {self.total})")

    def finished(self, name: str, result: dict) -> None:
        self.queued.discard(name)
        self.where.pop(name, None)
        t0 = self.running.pop(name, None)
        self.done += 1
        if result.get("status") != "ok":
            self.failed += 1
        if result.get("cached"):
            self._line(f"[{self.done}/{self.total}] {name}: cached")
            return
        took = f"{time.monotonic() - t0:.1f} s" if t0 is not None else ""
        status = result.get("status")
        if status == "ok":
            self._line(f"[{self.done}/{self.total}] {name}: done in {took}")
        else:
            self._line(f"[{self.done}/{self.total}] {name}: {status.upper()} after {took}: {result.get('reason')}")

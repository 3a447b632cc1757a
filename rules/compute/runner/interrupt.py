"""Stopping a run on the first Ctrl-C.

Python handles a signal only between bytecodes, and an SCF spends minutes
inside single C calls (integrals, the J and K builds), so a KeyboardInterrupt
raised "at once" arrives only when that call returns.  While a state is
computed in the command's own process, SIGINT therefore gets its default
action (the process ends at once, as any interrupted program does; nothing
half-computed is cached because results are stored only when finished).
Worker processes ignore SIGINT: the command's process, which waits in
Python and so sees the interrupt at once, stops them itself, and they never
print tracebacks about pipes closed under them.
"""
from __future__ import annotations

import contextlib
import signal
import threading


@contextlib.contextmanager
def immediate_interrupt():
    """Within the block, the first SIGINT ends the process at once (only
    in the main thread, and only when Python's own handler is installed)."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    previous = signal.getsignal(signal.SIGINT)
    if previous is not signal.default_int_handler:
        yield  # ignored, or handled by someone else: leave it so
        return
    signal.signal(signal.SIGINT, signal.SIG_DFL)
    try:
        yield
    finally:
        signal.signal(signal.SIGINT, previous)


def ignore_in_worker() -> None:
    """A worker leaves Ctrl-C to the process that started it."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)

"""What ``deckward run`` checks before it starts PySCF: that the results
cache can be used, that no state is larger than the configured bounds, and
how many threads a state may ask for."""
from __future__ import annotations

import os
from typing import Optional

# OpenMP runtimes crash when asked for tens of thousands of threads; beyond
# a few threads per core a calculation only slows down (common practice, no
# source).
THREADS_PER_CORE = 4


def max_threads() -> int:
    return THREADS_PER_CORE * (os.cpu_count() or 1)


def check_before_running(ws, cache, config, options, all_states: bool = False,
                         force: bool = False) -> Optional[str]:
    """The message that stops the run before anything is computed (None:
    go ahead)."""
    from . import cost
    from .cache import CacheUnusable
    from .mapping import MappingError, needed_states, plan_state

    if cache.enabled:
        try:
            cache.check()
        except CacheUnusable as e:
            return f"deckward: error: {e}"
    if force:
        return None
    plans = []
    for name in needed_states(ws, all_states):
        try:
            plans.append(plan_state(ws, name))
        except MappingError:
            continue  # reported by the run itself
    uncached = [p for p in plans if cache.get(cache.key(p)) is None]
    refused = cost.refusals(uncached, config.run.get("max_basis_functions"), options.max_memory_mb)
    if not refused:
        return None
    return "\n".join(f"deckward: {r}" for r in refused) + (
        "\ndeckward: nothing was run; raise run.max_basis_functions in deckward.yaml, use a smaller basis, "
        "or run with --force")

"""``bench/build_data.py``, the script that regenerates the data files in
``rules/knowledge/data/``, loaded by its path: it belongs to the checkout's
tools, not to the installed package."""
from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

PATH = Path(__file__).resolve().parent.parent / "bench" / "build_data.py"


def _load():
    spec = importlib.util.spec_from_file_location("deckward_build_data", PATH)
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up by name
    spec.loader.exec_module(module)
    return module


build_data = _load()

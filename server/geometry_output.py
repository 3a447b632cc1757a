"""``deckward run --write-geometries DIR``: each optimised geometry as an
.xyz file (``DIR/<state>.xyz``, angstrom), ready for ``geometry NAME { file
= "..." }`` in the next deck.  Ghost atoms have no place in XYZ and are
left out (the comment line says how many)."""
from __future__ import annotations

import os

from deckward.grammar.xyz import format_xyz

from .atomic_write import WriteRefused, write_new
from .checking import UsageError


def write_geometries(report, folder: str) -> list[str]:
    """Write one .xyz per optimised state; the paths written."""
    if not os.path.isdir(folder):
        raise UsageError(f"{folder}: no such folder (for --write-geometries)")
    written = []
    for s in report.states:
        geometry = s.get("optimized_geometry")
        if s.get("status") != "ok" or not geometry:
            continue
        atoms = [(sym, x, y, z) for sym, x, y, z, ghost in geometry if not ghost]
        ghosts = len(geometry) - len(atoms)
        comment = (f"state {s['name']} optimised at {s['method']}/{s['basis']}, charge {s['charge']}, multiplicity "
                   f"{s['multiplicity']}, E = {s['energy']:.10f} hartree (deckward)"
                   + (f"; {ghosts} ghost atom{'s' * (ghosts != 1)} left out" if ghosts else ""))
        path = os.path.join(folder, f"{s['name']}.xyz")
        try:
            write_new(path, format_xyz(atoms, comment).encode("utf-8"), overwrite=True)
        except WriteRefused as e:
            raise UsageError(f"{path}: not written: {e}")
        written.append(path)
    return written

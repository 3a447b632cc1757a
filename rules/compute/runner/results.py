"""A run's results: the table printed by ``deckward run`` and its JSON form
(``docs/run-output.schema.json``)."""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional

from deckward.rules.knowledge.units import unit_symbol

CAUTION = (
    "Computed values depend on the method and the basis set; decisions that rest on them need "
    "comparison with experiment and expert judgement."
)


@dataclass
class RunReport:
    deck: str
    deck_hash: str
    pyscf_version: str
    deckward_version: str
    states: list[dict] = field(default_factory=list)  # compute results, in run order
    derived: list = field(default_factory=list)  # DerivedValue
    mapping_errors: list[str] = field(default_factory=list)  # located messages

    @property
    def ok(self) -> bool:
        return (not self.mapping_errors and all(s["status"] == "ok" for s in self.states)
                and all(d.available for d in self.derived))

    def state(self, name: str) -> Optional[dict]:
        for s in self.states:
            if s["name"] == name:
                return s
        return None

    def to_dict(self) -> dict:
        return {
            "format": "deckward-run/1",
            "deck": self.deck,
            "deck_hash": self.deck_hash,
            "deckward_version": self.deckward_version,
            "pyscf_version": self.pyscf_version,
            "caution": CAUTION,
            "states": self.states,
            "derived": [d.to_dict() for d in self.derived],
            "errors": self.mapping_errors,
        }


def _fmt(value: Optional[float], digits: int) -> str:
    return "n/a" if value is None else f"{value:.{digits}f}"


def _table(header: list[str], rows: list[list[str]]) -> str:
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h) for i, h in enumerate(header)]
    line = lambda cells: "  ".join(c.ljust(w) for c, w in zip(cells, widths)).rstrip()  # noqa: E731
    return "\n".join([line(header), line(["-" * w for w in widths])] + [line(r) for r in rows])


def scf_column(s: dict) -> str:
    """What the SCF column says: the SCF's own outcome, so that a failed
    correlated step (CCSD not converging) is not blamed on the SCF; the
    state's outcome is in the notes below the table."""
    if s.get("scf_converged") is True:
        return "converged"
    if s.get("scf_converged") is False:
        return "unconverged"
    return s["status"] if s["status"] != "ok" else "converged"


def format_report(report: RunReport) -> str:
    out = [f"deck {report.deck} (PySCF {report.pyscf_version})", ""]
    if report.mapping_errors:
        out += ["cannot be run:"] + [f"  {e}" for e in report.mapping_errors] + [""]
    rows = []
    notes = []
    for s in report.states:
        status = scf_column(s) + (" (cached)" if s.get("cached") else "")
        s2 = "" if s.get("s2") is None else f"{s['s2']:.4f} ({s['s2_expected']:.2f})"
        rows.append([
            s["name"],
            f"{s['method']}/{s['basis']}",
            f"{s['charge']:+d}/{s['multiplicity']}",
            _fmt(s.get("energy"), 8),
            status,
            s2,
        ])
        if s["status"] != "ok":
            notes.append(f"{s['name']}: {s['status']}: {s.get('reason')}" + (f" (log: {s['log']})" if s.get("log") else ""))
        if s.get("zpe") is not None:
            notes.append(f"{s['name']}: energy includes the zero-point energy {s['zpe']:.6f} hartree")
        notes += [f"{s['name']}: {n}" for n in s.get("notes", [])]
    out.append(_table(["state", "method/basis", "charge/mult", "energy [hartree]", "SCF", "<S^2> (exact)"], rows))
    if notes:
        out += [""] + [f"  {n}" for n in notes]
    if report.derived:
        from deckward.rules.compute.comparison import comparison_lines

        drows = []
        for d in report.derived:
            e = d.experiment or {}
            drows.append([d.name, d.quantity or "", _fmt(d.value, 6), unit_symbol(d.unit) if d.available else "",
                          _fmt(e.get("value_ev"), 3) if e else "", _fmt(e.get("deviation_ev"), 3) if e else "",
                          "" if d.available else f"not available: {d.reason}"])
        out += ["", _table(["derived", "quantity", "value", "unit", "experiment [eV]", "deviation [eV]", ""], drows)]
        out += [f"  {line}" for line in comparison_lines(report.derived)]
    out += ["", "Caution: " + CAUTION, ""]
    return "\n".join(out)

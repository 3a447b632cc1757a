"""The results database seen from the command line: which file, and its
rows as a table, CSV or JSON (``deckward results``), plus the lines
``deckward run`` adds about values recorded before."""
from __future__ import annotations

import csv
import io
import json
import os
import time
from contextlib import contextmanager
from typing import Optional

from .checking import UsageError

STATE_COLUMNS = ("deck_path", "state", "method", "basis", "reference", "charge", "multiplicity", "status",
                 "energy", "scf_converged", "s2", "wall_time_s", "host", "pyscf_version", "plan_hash", "deck_hash",
                 "recorded_at", "run_id")
DERIVED_COLUMNS = ("deck_path", "name", "quantity", "value", "unit", "value_hartree", "reason", "deck_hash",
                   "plan_hashes", "recorded_at", "run_id")


def add_database_arguments(p) -> None:
    p.add_argument("--db", metavar="FILE",
                   help="results database (default: results.sqlite beside the run cache folder)")
    p.add_argument("--no-record", action="store_true", help="do not record this run in the results database")


def database_path(args, cache_folder: Optional[str] = None) -> str:
    from deckward.rules.compute.runner.results_db import default_db_path

    return args.db or default_db_path(cache_folder)


@contextmanager
def open_database(args, cache_folder: Optional[str] = None, readonly: bool = False):
    """The results database to record into (None with ``--no-record``)."""
    if getattr(args, "no_record", False):
        yield None
        return
    from deckward.rules.compute.runner.results_db import DatabaseError, ResultsDB

    try:
        db = ResultsDB(database_path(args, cache_folder), readonly=readonly)
    except DatabaseError as e:
        raise UsageError(str(e)) from None
    try:
        yield db
    finally:
        db.close()


def _when(stamp: Optional[float]) -> str:
    return "" if stamp is None else time.strftime("%Y-%m-%d %H:%M:%S", time.gmtime(stamp)) + " UTC"


def earlier_values(report, before: list[dict]) -> str:
    """Lines naming derived values that were recorded with another set-up
    or another number before this run (empty when nothing changed)."""
    previous = {row["name"]: row for row in before if row["deck_path"] == os.path.abspath(report.deck)}
    lines = []
    for d in report.derived:
        old = previous.get(d.name)
        if old is None or old["value"] is None or not d.available:
            continue
        if abs(old["value"] - d.value) <= 1e-9 * max(1.0, abs(d.value)):
            continue
        lines.append(f"  {d.name}: {old['value']:.6f} {old['unit']} recorded {_when(old['recorded_at'])} "
                     f"(run {old['run_id']}), now {d.value:.6f} {d.unit}")
    if not lines:
        return ""
    return "recorded before with another set-up or result (deckward results --all shows the history):\n" + \
        "\n".join(lines) + "\n"


def _cell(value) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        return f"{value:.8f}" if abs(value) < 1e6 else f"{value:g}"
    return str(value)


def _rows_for_output(rows: list[dict], columns: tuple, stamp_columns=("recorded_at",)) -> list[dict]:
    out = []
    for r in rows:
        row = {c: r.get(c) for c in columns}
        for c in stamp_columns:
            if c in row:
                row[c] = _when(row[c])
        out.append(row)
    return out


def render(states: list[dict], derived: list[dict], fmt: str) -> str:
    """``deckward results`` output in ``fmt`` (table | csv | json)."""
    s_rows = _rows_for_output(states, STATE_COLUMNS)
    d_rows = _rows_for_output(derived, DERIVED_COLUMNS)
    for r in d_rows:
        r["plan_hashes"] = json.loads(r["plan_hashes"]) if r.get("plan_hashes") else {}
    if fmt == "json":
        return json.dumps({"format": "deckward-results/1", "states": s_rows, "derived": d_rows}, indent=2) + "\n"
    if fmt == "csv":
        buf = io.StringIO()
        writer = csv.writer(buf, lineterminator="\n")
        writer.writerow(("kind", "deck_path", "name", "method/basis", "value", "unit", "status", "host",
                         "recorded_at", "plan_or_deck_hash"))
        for r in s_rows:
            writer.writerow(("state", r["deck_path"], r["state"], f"{r['method']}/{r['basis']}", _cell(r["energy"]),
                             "hartree", r["status"], r["host"], r["recorded_at"], r["plan_hash"]))
        for r in d_rows:
            writer.writerow(("derived", r["deck_path"], r["name"], "", _cell(r["value"]), r["unit"],
                             "ok" if r["value"] is not None else f"not available: {r['reason']}", "",
                             r["recorded_at"], r["deck_hash"]))
        return buf.getvalue()
    return _table(s_rows, d_rows)


def _table(s_rows: list[dict], d_rows: list[dict]) -> str:
    from deckward.rules.compute.runner.results import _table as table

    out = []
    cwd = os.getcwd()

    def short(path: str) -> str:
        rel = os.path.relpath(path, cwd)
        return path if rel.startswith("..") else rel

    if s_rows:
        out.append(table(["deck", "state", "method/basis", "charge/mult", "energy [hartree]", "status", "host",
                          "wall [s]", "recorded"],
                         [[short(r["deck_path"]), r["state"], f"{r['method']}/{r['basis']}",
                           f"{r['charge']:+d}/{r['multiplicity']}" if r["charge"] is not None else "",
                           _cell(r["energy"]), r["status"], r["host"] or "", f"{r['wall_time_s'] or 0:.1f}",
                           r["recorded_at"]] for r in s_rows]))
    if d_rows:
        out += ["", table(["deck", "derived", "quantity", "value", "unit", "recorded"],
                          [[short(r["deck_path"]), r["name"], r["quantity"] or "",
                            f"{r['value']:.6f}" if r["value"] is not None else f"n/a ({r['reason']})", r["unit"],
                            r["recorded_at"]] for r in d_rows])]
    if not out:
        return "no results recorded for these decks\n"
    return "\n".join(out).lstrip("\n") + "\n"

"""The results database: what `deckward run` records (provenance, one row
per finished state, derived values), schema versions, and `deckward
results` listing the latest per plan or the whole history."""
from __future__ import annotations

import csv
import io
import json
import os
import socket
import sqlite3
import subprocess
import sys

import pytest

from runner_helpers import workspace, write_deck

from deckward.rules.compute.runner import results_db
from deckward.rules.compute.runner.cache import RunCache, pyscf_version
from deckward.rules.compute.runner.results_db import DatabaseError, ResultsDB
from deckward.rules.compute.runner.run import run_workspace

H_ATOMS = """geometry h { H 0 0 0 }
geometry he { He 0 0 0 }
level hf_min { method = hf basis = sto-3g reference = unrestricted }
state hydrogen { geometry = h level = hf_min charge = 0 multiplicity = 2 }
state helium_cation { geometry = he level = hf_min charge = 1 multiplicity = 2 }
state helium { geometry = he level = hf_min charge = 0 multiplicity = 1 reference = restricted }
derive ie_he as ionization_energy = energy(helium_cation) - energy(helium) in ev
derive e_h = energy(hydrogen)
"""


def _run(folder, text, db_path, name="atoms.deck"):
    ws = workspace(folder, text, name)
    with ResultsDB(str(db_path)) as db:
        return ws, run_workspace(ws, RunCache(str(folder / "cache")), database=db)


@pytest.mark.pyscf
def test_a_run_is_recorded_with_its_provenance(tmp_path):
    db_path = tmp_path / "results.sqlite"
    ws, report = _run(tmp_path, H_ATOMS, db_path)
    conn = sqlite3.connect(str(db_path))
    conn.row_factory = sqlite3.Row
    assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
    assert conn.execute("PRAGMA user_version").fetchone()[0] == results_db.SCHEMA_VERSION
    run = dict(conn.execute("SELECT * FROM runs").fetchone())
    assert run["status"] == "finished" and run["executor"] == "this process"
    assert run["deck_path"] == os.path.abspath(ws.path) and run["deck_hash"] == report.deck_hash
    rows = {r["state"]: dict(r) for r in conn.execute("SELECT * FROM states")}
    assert set(rows) == {"hydrogen", "helium_cation", "helium"}
    he = rows["helium"]
    assert (he["method"], he["basis"], he["reference"], he["charge"], he["multiplicity"]) == \
        ("hf", "sto-3g", "restricted", 0, 1)
    assert he["plan_hash"] == report.state("helium")["key"]
    assert he["pyscf_version"] == pyscf_version() and he["host"] == socket.gethostname()
    assert he["scf_converged"] == 1 and he["status"] == "ok" and he["from_cache"] == 0
    assert he["energy"] == report.state("helium")["energy"]
    assert he["wall_time_s"] >= 0
    assert json.loads(he["result_json"])["orbitals"] == report.state("helium")["orbitals"]
    derived = {r["name"]: dict(r) for r in conn.execute("SELECT * FROM derived")}
    assert derived["ie_he"]["quantity"] == "ionization_energy" and derived["ie_he"]["unit"] == "ev"
    assert derived["ie_he"]["value"] == pytest.approx({d.name: d for d in report.derived}["ie_he"].value, abs=0)
    assert json.loads(derived["ie_he"]["plan_hashes"]) == {
        "helium": report.state("helium")["key"], "helium_cation": report.state("helium_cation")["key"]}
    conn.close()


@pytest.mark.pyscf
def test_latest_per_plan_and_the_whole_history(tmp_path):
    db_path = tmp_path / "results.sqlite"
    _run(tmp_path, H_ATOMS, db_path)
    _run(tmp_path, H_ATOMS, db_path)  # everything cached the second time
    changed = H_ATOMS.replace("basis = sto-3g", "basis = 6-31g")
    _run(tmp_path, changed, db_path)
    with ResultsDB(str(db_path), readonly=True) as db:
        latest = db.states([str(tmp_path)])
        history = db.states([str(tmp_path)], history=True)
        derived = db.derived([str(tmp_path)])
        derived_all = db.derived([str(tmp_path)], history=True)
    assert len(history) == 9
    assert [r["from_cache"] for r in history] == [0, 0, 0, 1, 1, 1, 0, 0, 0]
    assert len(latest) == 6  # two plans per state: sto-3g and 6-31g
    assert len(derived) == 2 and {r["name"] for r in derived} == {"ie_he", "e_h"}
    assert all(r["run_id"] == 3 for r in derived)
    assert len(derived_all) == 6


def test_paths_select_the_decks_below_them(tmp_path):
    db_path = tmp_path / "results.sqlite"
    (tmp_path / "a").mkdir()
    (tmp_path / "ab").mkdir()
    _run(tmp_path / "a", H_ATOMS, db_path)
    _run(tmp_path / "ab", H_ATOMS, db_path)
    with ResultsDB(str(db_path), readonly=True) as db:
        assert {r["deck_path"] for r in db.derived([str(tmp_path / "a")])} == {str(tmp_path / "a" / "atoms.deck")}
        assert len(db.derived([str(tmp_path / "ab" / "atoms.deck")])) == 2
        assert len(db.derived()) == 4


def test_a_fresh_file_is_migrated_and_a_newer_schema_refused(tmp_path):
    path = tmp_path / "r.sqlite"
    sqlite3.connect(str(path)).close()  # an empty file: version 0
    ResultsDB(str(path)).close()
    conn = sqlite3.connect(str(path))
    assert conn.execute("PRAGMA user_version").fetchone()[0] == results_db.SCHEMA_VERSION
    tables = {r[0] for r in conn.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
    assert tables == {"runs", "states", "derived"}
    conn.execute(f"PRAGMA user_version = {results_db.SCHEMA_VERSION + 1}")
    conn.commit()
    conn.close()
    with pytest.raises(DatabaseError) as e:
        ResultsDB(str(path))
    assert str(e.value) == (f"{path}: the results database has schema version {results_db.SCHEMA_VERSION + 1}, "
                            f"newer than this deckward understands ({results_db.SCHEMA_VERSION}); upgrade deckward")


def test_not_a_database_is_one_line(tmp_path):
    path = tmp_path / "r.sqlite"
    path.write_text("not sqlite at all, just text " * 50)
    with pytest.raises(DatabaseError) as e:
        ResultsDB(str(path))
    assert str(e.value).startswith(f"{path}: cannot be used as a results database (")


def _deckward(*args, cwd=None):
    return subprocess.run([sys.executable, "-m", "deckward", *args], capture_output=True, text=True, cwd=cwd,
                          timeout=300)


@pytest.mark.pyscf
def test_results_command_lists_what_run_recorded(tmp_path):
    deck = write_deck(tmp_path, H_ATOMS, "atoms.deck")
    cache = str(tmp_path / "c")
    assert _deckward("run", "--quiet", "--cache-dir", cache, deck).returncode == 0
    as_json = _deckward("results", "--cache-dir", cache, "--format", "json", str(tmp_path))
    assert as_json.returncode == 0, as_json.stderr
    data = json.loads(as_json.stdout)
    assert data["format"] == "deckward-results/1"
    assert {d["name"]: d["unit"] for d in data["derived"]} == {"ie_he": "ev", "e_h": "hartree"}
    assert sorted(s["state"] for s in data["states"]) == ["helium", "helium_cation", "hydrogen"]
    table = _deckward("results", "--cache-dir", cache, cwd=str(tmp_path))
    assert table.returncode == 0
    lines = table.stdout.splitlines()
    assert lines[0].split() == ["deck", "state", "method/basis", "charge/mult", "energy", "[hartree]", "status",
                                "host", "wall", "[s]", "recorded"]
    assert any(ln.startswith("atoms.deck  ie_he") for ln in lines)
    rows = list(csv.reader(io.StringIO(_deckward("results", "--cache-dir", cache, "--format", "csv").stdout)))
    assert rows[0][:3] == ["kind", "deck_path", "name"]
    assert sorted(r[2] for r in rows[1:] if r[0] == "derived") == ["e_h", "ie_he"]


@pytest.mark.pyscf
def test_run_names_a_value_that_changed_since_it_was_recorded(tmp_path):
    cache = str(tmp_path / "c")
    deck = write_deck(tmp_path, H_ATOMS, "atoms.deck")
    first = _deckward("run", "--quiet", "--cache-dir", cache, deck)
    assert "recorded before" not in first.stdout
    write_deck(tmp_path, H_ATOMS.replace("basis = sto-3g", "basis = 6-31g"), "atoms.deck")
    second = _deckward("run", "--quiet", "--cache-dir", cache, deck)
    assert second.returncode == 0
    tail = second.stdout.split("recorded before with another set-up or result", 1)[1].splitlines()
    assert tail[1].startswith("  ie_he: ") and "(run 1), now " in tail[1]
    assert tail[2].startswith("  e_h: ")


def test_results_without_a_database_is_one_line(tmp_path):
    proc = _deckward("results", "--cache-dir", str(tmp_path / "none"))
    assert proc.returncode == 2
    assert proc.stderr.strip() == (f"deckward: error: {tmp_path / 'none' / 'results.sqlite'}: no results database yet "
                                   "(`deckward run` records one)")


@pytest.mark.pyscf
def test_review_report_shows_the_recorded_values(tmp_path):
    deck = write_deck(tmp_path, H_ATOMS, "atoms.deck")
    db = str(tmp_path / "r.sqlite")
    assert _deckward("run", "--quiet", "--cache-dir", str(tmp_path / "c"), "--db", db, deck).returncode == 0
    with ResultsDB(db, readonly=True) as conn:
        want = {r["name"]: r["value"] for r in conn.derived()}
    md = _deckward("review", "--format", "markdown", "--db", db, deck)
    assert md.returncode == 0, md.stderr
    lines = md.stdout.splitlines()
    at = lines.index("Computed by `deckward run` (latest in the results database):")
    assert lines[at + 2:at + 4] == ["| Derived | Value | Recorded |", "| --- | ---: | --- |"]
    assert lines[at + 4].startswith(f"| `ie_he` | {want['ie_he']:.6f} ev | ")
    assert lines[at + 5].startswith(f"| `e_h` | {want['e_h']:.6f} hartree | ")
    html = _deckward("review", "--db", db, deck)
    assert f"<td>{want['ie_he']:.6f} ev</td>" in html.stdout
    missing = _deckward("review", "--db", str(tmp_path / "none.sqlite"), deck)
    assert missing.returncode == 2
    assert missing.stderr.strip() == f"deckward: error: {tmp_path / 'none.sqlite'}: no such results database"

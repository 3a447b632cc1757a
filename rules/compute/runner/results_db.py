"""The results database: what was computed, with what, where and when.

An SQLite file (``results.sqlite`` beside the run cache unless a path is
given) in WAL mode, written only by the command that runs the states (the
client of a cluster), one committed transaction per finished state, so an
interrupted run leaves complete rows or none.  The per-state cache stays the
source of reuse; the database is the record: every finished state and every
derived value with its provenance (deck path and content hash, plan hash,
method, basis, reference, PySCF version, host, wall time, convergence, the
numbers).

The schema carries its version in ``PRAGMA user_version``; ``MIGRATIONS[i]``
takes a database from version ``i`` to ``i + 1`` and opening applies the
missing ones.  A database newer than this deckward is refused in words.
"""
from __future__ import annotations

import json
import os
import socket
import sqlite3
import time
from contextlib import contextmanager
from typing import Iterable, Optional

DB_NAME = "results.sqlite"

MIGRATIONS = (
    # 0 -> 1: the first release.
    """
    CREATE TABLE runs (
        id INTEGER PRIMARY KEY,
        deck_path TEXT NOT NULL,
        deck_hash TEXT NOT NULL,
        deckward_version TEXT NOT NULL,
        pyscf_version TEXT NOT NULL,
        client_host TEXT NOT NULL,
        executor TEXT NOT NULL,
        started_at REAL NOT NULL,
        finished_at REAL,
        status TEXT NOT NULL
    );
    CREATE TABLE states (
        id INTEGER PRIMARY KEY,
        run_id INTEGER NOT NULL REFERENCES runs(id),
        deck_path TEXT NOT NULL,
        deck_hash TEXT NOT NULL,
        state TEXT NOT NULL,
        plan_hash TEXT,
        method TEXT,
        basis TEXT,
        reference TEXT,
        charge INTEGER,
        multiplicity INTEGER,
        pyscf_version TEXT NOT NULL,
        host TEXT,
        wall_time_s REAL,
        status TEXT NOT NULL,
        reason TEXT,
        scf_converged INTEGER,
        energy REAL,
        scf_energy REAL,
        correlation_energy REAL,
        zpe REAL,
        s2 REAL,
        n_basis INTEGER,
        from_cache INTEGER NOT NULL,
        result_json TEXT NOT NULL,
        recorded_at REAL NOT NULL
    );
    CREATE TABLE derived (
        id INTEGER PRIMARY KEY,
        run_id INTEGER NOT NULL REFERENCES runs(id),
        deck_path TEXT NOT NULL,
        deck_hash TEXT NOT NULL,
        name TEXT NOT NULL,
        quantity TEXT,
        unit TEXT NOT NULL,
        value REAL,
        value_hartree REAL,
        reason TEXT,
        plan_hashes TEXT NOT NULL,
        recorded_at REAL NOT NULL
    );
    CREATE INDEX states_by_deck ON states(deck_path, plan_hash);
    CREATE INDEX derived_by_deck ON derived(deck_path, name);
    """,
)
SCHEMA_VERSION = len(MIGRATIONS)


class DatabaseError(Exception):
    """The database cannot be opened or used (a one-line message)."""


def default_db_path(cache_folder: Optional[str] = None) -> str:
    """``results.sqlite`` in the folder above the run cache (``runs/``)."""
    from .cache import default_cache_dir

    runs = cache_folder or default_cache_dir()
    return os.path.join(os.path.dirname(os.path.abspath(runs)), DB_NAME)


def _migrate(conn: sqlite3.Connection, path: str) -> None:
    version = conn.execute("PRAGMA user_version").fetchone()[0]
    if version > SCHEMA_VERSION:
        raise DatabaseError(f"{path}: the results database has schema version {version}, newer than this "
                            f"deckward understands ({SCHEMA_VERSION}); upgrade deckward")
    for step in range(version, SCHEMA_VERSION):
        try:  # one transaction per step: a failed migration leaves the old version
            conn.executescript("BEGIN;" + MIGRATIONS[step] + f"PRAGMA user_version = {step + 1};COMMIT;")
        except sqlite3.Error:
            if conn.in_transaction:
                conn.execute("ROLLBACK")
            raise


@contextmanager
def _transaction(conn: sqlite3.Connection):
    conn.execute("BEGIN IMMEDIATE")
    try:
        yield conn
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    conn.execute("COMMIT")


class ResultsDB:
    """An open results database (use as a context manager)."""

    def __init__(self, path: str, readonly: bool = False) -> None:
        self.path = path
        try:
            if readonly:
                if not os.path.isfile(path):
                    raise DatabaseError(f"{path}: no results database (run a deck first)")
                self.conn = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=30)
            else:
                folder = os.path.dirname(os.path.abspath(path))
                os.makedirs(folder, exist_ok=True)
                self.conn = sqlite3.connect(path, timeout=30, isolation_level=None)
                self.conn.execute("PRAGMA journal_mode=WAL")
                _migrate(self.conn, path)
            if readonly:
                version = self.conn.execute("PRAGMA user_version").fetchone()[0]
                if version != SCHEMA_VERSION:
                    raise DatabaseError(f"{path}: schema version {version}, this deckward reads "
                                        f"{SCHEMA_VERSION} (run a deck to migrate it)")
        except sqlite3.Error as e:
            raise DatabaseError(f"{path}: cannot be used as a results database ({e})") from None
        self.conn.row_factory = sqlite3.Row

    def __enter__(self) -> "ResultsDB":
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def close(self) -> None:
        self.conn.close()

    # -- writing (the client only) -------------------------------------------------
    def begin_run(self, deck_path: str, deck_hash: str, deckward_version: str, pyscf_version: str,
                  executor: str) -> int:
        with _transaction(self.conn):
            cur = self.conn.execute(
                "INSERT INTO runs (deck_path, deck_hash, deckward_version, pyscf_version, client_host, executor, "
                "started_at, status) VALUES (?, ?, ?, ?, ?, ?, ?, 'running')",
                (os.path.abspath(deck_path), deck_hash, deckward_version, pyscf_version, socket.gethostname(),
                 executor, time.time()))
        return int(cur.lastrowid)

    def record_state(self, run_id: int, deck_path: str, deck_hash: str, pyscf_version: str, r: dict) -> None:
        """One finished state (ok, unconverged or failed), in one transaction."""
        with _transaction(self.conn):
            self.conn.execute(
                "INSERT INTO states (run_id, deck_path, deck_hash, state, plan_hash, method, basis, reference, "
                "charge, multiplicity, pyscf_version, host, wall_time_s, status, reason, scf_converged, energy, "
                "scf_energy, correlation_energy, zpe, s2, n_basis, from_cache, result_json, recorded_at) "
                "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
                (run_id, os.path.abspath(deck_path), deck_hash, r["name"], r.get("key"), r.get("method"),
                 r.get("basis"), r.get("reference"), r.get("charge"), r.get("multiplicity"), pyscf_version,
                 r.get("host"), r.get("wall_time_s"), r["status"], r.get("reason"),
                 None if r.get("scf_converged") is None else int(bool(r["scf_converged"])), r.get("energy"),
                 r.get("scf_energy"), r.get("correlation_energy"), r.get("zpe"), r.get("s2"), r.get("n_basis"),
                 int(bool(r.get("cached"))), json.dumps(r), time.time()))

    def finish_run(self, run_id: int, deck_path: str, deck_hash: str, derived: Iterable, plan_hashes: dict,
                   status: str) -> None:
        """The derived values and the run's status, in one transaction."""
        now = time.time()
        with _transaction(self.conn):
            for d in derived:
                used = {s: plan_hashes.get(s) for s in d.states}
                self.conn.execute(
                    "INSERT INTO derived (run_id, deck_path, deck_hash, name, quantity, unit, value, value_hartree, "
                    "reason, plan_hashes, recorded_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
                    (run_id, os.path.abspath(deck_path), deck_hash, d.name, d.quantity, d.unit, d.value,
                     d.value_hartree, d.reason, json.dumps(used, sort_keys=True), now))
            self.conn.execute("UPDATE runs SET status = ?, finished_at = ? WHERE id = ?", (status, now, run_id))

    def mark_run(self, run_id: int, status: str) -> None:
        with _transaction(self.conn):
            self.conn.execute("UPDATE runs SET status = ?, finished_at = ? WHERE id = ?", (status, time.time(), run_id))

    # -- reading ---------------------------------------------------------------------
    def states(self, paths: Optional[list[str]] = None, history: bool = False) -> list[dict]:
        """State rows for decks under ``paths``: the latest per deck and plan,
        or every row with ``history``; oldest first."""
        return self._select("states", "plan_hash", paths, history)

    def derived(self, paths: Optional[list[str]] = None, history: bool = False) -> list[dict]:
        """Derived values for decks under ``paths``: the latest per deck and
        name, or every row with ``history``."""
        return self._select("derived", "name", paths, history)

    def runs(self, paths: Optional[list[str]] = None) -> list[dict]:
        return self._select("runs", None, paths, True)

    def _select(self, table: str, group: Optional[str], paths, history: bool) -> list[dict]:
        where, args = _under(paths)
        if history or group is None:
            sql = f"SELECT * FROM {table}{where} ORDER BY id"
        else:
            sql = (f"SELECT * FROM {table} WHERE id IN (SELECT MAX(id) FROM {table}{where} "
                   f"GROUP BY deck_path, {group}) ORDER BY deck_path, id")
        try:
            return [dict(row) for row in self.conn.execute(sql, args)]
        except sqlite3.Error as e:
            raise DatabaseError(f"{self.path}: cannot be read ({e})") from None


def _under(paths: Optional[list[str]]) -> tuple[str, list]:
    """A WHERE clause selecting decks at or below any of ``paths``."""
    if not paths:
        return "", []
    parts, args = [], []
    for p in paths:
        full = os.path.abspath(p)
        parts.append("(deck_path = ? OR substr(deck_path, 1, ?) = ?)")
        prefix = full.rstrip(os.sep) + os.sep
        args += [full, len(prefix), prefix]
    return " WHERE " + " OR ".join(parts), args


class RunRecorder:
    """Records one run of one deck as its results arrive (``on_result``)
    and its derived values at the end."""

    def __init__(self, db: ResultsDB, deck_path: str, deck_hash: str, deckward_version: str, pyscf_version: str,
                 executor: str) -> None:
        self.db = db
        self.deck_path = deck_path
        self.deck_hash = deck_hash
        self.pyscf_version = pyscf_version
        self.run_id = db.begin_run(deck_path, deck_hash, deckward_version, pyscf_version, executor)
        self.plan_hashes: dict[str, Optional[str]] = {}

    def on_result(self, result: dict) -> None:
        self.plan_hashes[result["name"]] = result.get("key")
        self.db.record_state(self.run_id, self.deck_path, self.deck_hash, self.pyscf_version, result)

    def finish(self, derived, ok: bool) -> None:
        self.db.finish_run(self.run_id, self.deck_path, self.deck_hash, derived, self.plan_hashes,
                           "finished" if ok else "finished with failures")

    def interrupted(self) -> None:
        self.db.mark_run(self.run_id, "interrupted")

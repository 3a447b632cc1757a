"""A content-hash cache of findings, so an unchanged deck is not re-checked.

Checking a deck costs a parse, a resolution and every rule; reading its
cached findings costs hashing its bytes.  An entry is found by a key made of
the deck's own bytes, the path it was given as (findings carry that path),
its workspace root, the configuration, whether probes ran, and the deckward
version (with a fingerprint of the installed sources, so an edited
development checkout never serves stale findings).  The entry also lists
every file the deck ``use``s, directly or not, with the sha256 of its
contents (or ``null`` when it did not exist): a hit needs all of them to
match, so the findings are keyed by the contents of every file the deck uses.

Entries are single JSON files written to a temporary name and renamed into
place, so concurrent writers (parallel workers, two CI jobs sharing a cache)
never leave half an entry: a reader sees the old entry, the new one or none.
A damaged or unreadable entry is a miss, never an error.

Entries are checked before they are served: the layout and every type
(``entry_problem``: spans inside their file's text, known severities and
rules' shapes, bounded nesting), the key they were stored under, and a
sha256 checksum over their contents, so an edited entry (a severity
changed, a finding dropped, a span made negative) is a miss too.  Every
file is recorded with its resolved target, so re-pointing a symlink at
another file (or out of the workspace) changes the key or misses.
"""
from __future__ import annotations

import hashlib
import json
import os
import re
from typing import Any, Iterable, Optional

from deckward import __version__
from deckward.grammar.findings import Applicability, Finding, Fix, Related, Severity, Span, TextEdit
from deckward.grammar.safe_open import replace_file, resolved_path

from .scale_options import default_cache_dir  # noqa: F401  (re-exported)

FORMAT = 3  # bump when the entry layout changes
MAX_ENTRY_BYTES = 16 * 1024 * 1024  # an entry larger than this is not read
MAX_EVIDENCE_DEPTH = 8  # nesting of an evidence value


# -- (de)serialisation of findings -------------------------------------------------

def span_to_list(s: Span) -> list:
    return [s.path, s.start, s.end, s.line, s.column, s.end_line, s.end_column]


def span_from_list(v: list) -> Span:
    return Span(str(v[0]), int(v[1]), int(v[2]), int(v[3]), int(v[4]), int(v[5]), int(v[6]))


def finding_to_dict(f: Finding) -> dict:
    """Everything a Finding holds, as JSON-ready data (``finding_from_dict``
    gives back an equal Finding, evidence included)."""
    d: dict[str, Any] = {"rule": f.rule, "severity": f.severity.value, "message": f.message,
                         "span": span_to_list(f.span)}
    if f.related:
        d["related"] = [[span_to_list(r.span), r.message] for r in f.related]
    if f.fixes:
        d["fixes"] = [{"title": x.title, "safety": x.applicability.value,
                       "edits": [[span_to_list(e.span), e.new_text] for e in x.edits]} for x in f.fixes]
    if f.evidence:
        d["evidence"] = [[k, v] for k, v in f.evidence]
    if f.suppressed is not None:
        d["suppressed"] = f.suppressed
    return d


def _plain(value: Any) -> Any:
    """JSON turns tuples into lists; evidence values go back to tuples so
    that they stay hashable like the originals."""
    return tuple(_plain(v) for v in value) if isinstance(value, list) else value


def finding_from_dict(d: dict) -> Finding:
    return Finding(
        rule=d["rule"],
        severity=Severity(d["severity"]),
        message=d["message"],
        span=span_from_list(d["span"]),
        related=tuple(Related(span_from_list(s), m) for s, m in d.get("related", ())),
        fixes=tuple(
            Fix(x["title"], tuple(TextEdit(span_from_list(s), t) for s, t in x["edits"]),
                Applicability(x["safety"]))
            for x in d.get("fixes", ())
        ),
        evidence=tuple((k, _plain(v)) for k, v in d.get("evidence", ())),
        suppressed=d.get("suppressed"),
    )


# -- validation of entries read back ------------------------------------------------

class BadEntry(ValueError):
    """An entry that must not be served (its reason is the message)."""



def _check_span(v: Any, where: str) -> None:
    # type(x) is int: JSON gives exact ints, and a bool is not a position
    if not (type(v) is list and len(v) == 7 and type(v[0]) is str and type(v[1]) is int and type(v[2]) is int
            and type(v[3]) is int and type(v[4]) is int and type(v[5]) is int and type(v[6]) is int):
        raise BadEntry(f"{where}: a span is [path, start, end, line, column, end_line, end_column]")
    _, start, end, line, column, end_line, end_column = v
    if not (0 <= start <= end and 1 <= line <= end_line and column >= 1 and end_column >= 1):
        raise BadEntry(f"{where}: span {v[1:]} is not a range of a text")
    if line == end_line and end_column < column:
        raise BadEntry(f"{where}: span {v[1:]} ends before it starts")


def _check_plain(v: Any, depth: int, where: str) -> None:
    if depth > MAX_EVIDENCE_DEPTH:
        raise BadEntry(f"{where}: evidence nested too deeply")
    if isinstance(v, list):
        for x in v:
            _check_plain(x, depth + 1, where)
    elif v is not None and not isinstance(v, (str, int, float, bool)):
        raise BadEntry(f"{where}: evidence values are numbers, strings or lists")


_FINDING_KEYS = {"rule", "severity", "message", "span", "related", "fixes", "evidence", "suppressed"}
_SEVERITIES = {s.value for s in Severity}
_APPLICABILITIES = {a.value for a in Applicability}


def _check_finding(d: Any, where: str) -> None:
    if not isinstance(d, dict) or not {"rule", "severity", "message", "span"} <= set(d) <= _FINDING_KEYS:
        raise BadEntry(f"{where}: not a finding")
    if not (isinstance(d["rule"], str) and isinstance(d["message"], str)):
        raise BadEntry(f"{where}: rule and message are strings")
    if d["severity"] not in _SEVERITIES:
        raise BadEntry(f"{where}: unknown severity")
    _check_span(d["span"], where)
    related = d.get("related", [])
    if not isinstance(related, list):
        raise BadEntry(f"{where}: related is a list")
    for r in related:
        if not (isinstance(r, list) and len(r) == 2 and isinstance(r[1], str)):
            raise BadEntry(f"{where}: a related place is [span, message]")
        _check_span(r[0], where)
    fixes = d.get("fixes", [])
    if not isinstance(fixes, list):
        raise BadEntry(f"{where}: fixes is a list")
    for x in fixes:
        if not (isinstance(x, dict) and set(x) == {"title", "safety", "edits"} and isinstance(x["title"], str)
                and x["safety"] in _APPLICABILITIES and isinstance(x["edits"], list)):
            raise BadEntry(f"{where}: not a fix")
        for e in x["edits"]:
            if not (isinstance(e, list) and len(e) == 2 and isinstance(e[1], str)):
                raise BadEntry(f"{where}: an edit is [span, text]")
            _check_span(e[0], where)
    evidence = d.get("evidence", [])
    if not isinstance(evidence, list):
        raise BadEntry(f"{where}: evidence is a list")
    for item in evidence:
        if not (isinstance(item, list) and len(item) == 2 and isinstance(item[0], str)):
            raise BadEntry(f"{where}: evidence is [name, value]")
        _check_plain(item[1], 1, where)
    if d.get("suppressed") is not None and not isinstance(d["suppressed"], str):
        raise BadEntry(f"{where}: suppressed is a reason or null")


def entry_checksum(key: str, deps: Any, findings: Any) -> str:
    """sha256 of an entry's key, dependencies and findings, serialised the
    one way ``put`` writes them."""
    body = json.dumps([key, deps, findings], ensure_ascii=False, separators=(",", ":"), sort_keys=True)
    return hashlib.sha256(body.encode("utf-8", "surrogatepass")).hexdigest()


def entry_problem(entry: Any, key: str) -> Optional[str]:
    """Why a decoded entry must not be served (None: it is sound).  Checks
    the layout and every type, that each finding points into one of the
    entry's own files, the key, and the checksum."""
    try:
        if not (isinstance(entry, dict) and set(entry) == {"format", "key", "deps", "findings", "checksum"}):
            raise BadEntry("not an entry of this format")
        if entry["format"] != FORMAT or entry["key"] != key:
            raise BadEntry("stored under another key or format")
        deps, findings = entry["deps"], entry["findings"]
        if not isinstance(deps, list) or not isinstance(findings, list):
            raise BadEntry("deps and findings are lists")
        paths = set()
        for dep in deps:
            if not (isinstance(dep, list) and len(dep) == 3 and isinstance(dep[0], str) and isinstance(dep[1], str)
                    and (dep[2] is None or (isinstance(dep[2], str) and len(dep[2]) == 64))):
                raise BadEntry("a dependency is [path, resolved path, sha256 or null]")
            paths.add(dep[0])
        for i, d in enumerate(findings):
            _check_finding(d, f"finding {i}")
            if d["span"][0] not in paths:
                raise BadEntry(f"finding {i} points into a file the entry does not list")
        if entry["checksum"] != entry_checksum(key, deps, findings):
            raise BadEntry("the checksum does not match: the entry was changed")
    except BadEntry as e:
        return str(e)
    return None


# -- keys ----------------------------------------------------------------------------

def file_digest(path: str) -> Optional[str]:
    """sha256 of a file's bytes; None when it does not exist or cannot be
    read (the deck's findings then say so, and the entry remembers it)."""
    from deckward.grammar.safe_open import read_regular  # never blocks on a FIFO; NUL paths are OSError

    try:
        return hashlib.sha256(read_regular(path)).hexdigest()
    except OSError:
        return None


_CODE_FINGERPRINT: Optional[str] = None


def code_fingerprint() -> str:
    """The deckward version plus the names, sizes and modification times of
    the installed sources and data: a new release or an edited checkout
    changes it."""
    global _CODE_FINGERPRINT
    if _CODE_FINGERPRINT is None:
        import deckward.grammar
        import deckward.rules
        import deckward.server

        h = hashlib.sha256(f"deckward {__version__} cache {FORMAT}".encode())
        for pkg in (deckward.grammar, deckward.rules):
            for folder in pkg.__path__:
                for dirpath, dirs, files in os.walk(folder):
                    dirs[:] = sorted(d for d in dirs if d != "__pycache__")
                    for name in sorted(files):
                        if name.endswith((".py", ".lark", ".json", ".gz")):
                            try:
                                st = os.stat(os.path.join(dirpath, name))
                            except OSError:
                                continue
                            rel = os.path.relpath(os.path.join(dirpath, name), folder)
                            h.update(f"{pkg.__name__}/{rel}:{st.st_size}:{st.st_mtime_ns}\n".encode())
        _CODE_FINGERPRINT = h.hexdigest()
    return _CODE_FINGERPRINT


def config_fingerprint(config) -> str:
    """What in the configuration changes findings: severities, exclusions,
    probe limits, the workspace root, and the file's own findings."""
    data = {
        "root": config.root,
        "severities": {k: (v.value if v is not None else None) for k, v in sorted(config.severities.items())},
        "exclude": list(config.exclude),
        "probe": config.probe,
        "run": config.run,
        "findings": [finding_to_dict(f) for f in config.findings],
    }
    return hashlib.sha256(json.dumps(data, sort_keys=True, default=str).encode()).hexdigest()


def entry_key(path: str, root_dir: str, root_digest: str, config_print: str, probe: bool,
              realpath=os.path.realpath) -> str:
    """The key of a deck's entry (``realpath``: a remembering stand-in for
    ``os.path.realpath``, see ``FindingsCache.real``)."""
    text = json.dumps([FORMAT, code_fingerprint(), config_print, bool(probe), path,
                       os.path.abspath(path), realpath(path), realpath(root_dir), root_digest])
    return hashlib.sha256(text.encode()).hexdigest()


# -- the cache -------------------------------------------------------------------------

_HEX = re.compile(r"[0-9a-f]+")

class FindingsCache:
    """Entries in ``folder``: ``<key[:2]>/<key>.json`` holding
    ``{"format", "key", "deps": [[path, resolved path, sha256-or-null], ...],
    "findings": [...], "checksum"}``."""

    def __init__(self, folder: str) -> None:
        self.folder = folder
        self.hits = 0
        self.misses = 0
        self.write_errors = 0
        self._digests: dict[str, Optional[str]] = {}
        self._reals: dict[str, str] = {}
        self._real_folders: dict[str, str] = {}

    def digest(self, path: str) -> Optional[str]:
        """File digests are remembered for one run: a file used by many
        decks is hashed once."""
        key = os.path.abspath(path)
        if key not in self._digests:
            self._digests[key] = file_digest(path)
        return self._digests[key]

    def real(self, path: str) -> str:
        """``os.path.realpath``, remembered for one run like the digests (it
        costs a system call per folder of the path)."""
        key = os.path.abspath(path)
        found = self._reals.get(key)
        if found is None:
            found = self._reals[key] = resolved_path(key, self._real_folders)
        return found

    def _entry_path(self, key: str) -> str:
        return os.path.join(self.folder, key[:2], key + ".json")

    def get(self, key: str) -> Optional[list[Finding]]:
        """The cached findings, or None (no entry, a used file changed or was
        re-pointed, or the entry is damaged, edited or of another shape)."""
        found = self.entry(key)
        return None if found is None else found[0]

    def entry(self, key: str) -> Optional[tuple[list[Finding], list[str]]]:
        """(cached findings, the files they depend on), or None as for ``get``."""
        try:
            with open(self._entry_path(key), "rb") as f:
                data = f.read(MAX_ENTRY_BYTES + 1)
            if len(data) > MAX_ENTRY_BYTES:
                raise ValueError("entry too large")
            entry = json.loads(data)
            if entry_problem(entry, key) is not None:
                raise ValueError("entry rejected")
            for dep, real, digest in entry["deps"]:
                if self.real(dep) != real or self.digest(dep) != digest:
                    self.misses += 1
                    return None
            findings = [finding_from_dict(d) for d in entry["findings"]]
        except (OSError, ValueError, KeyError, TypeError, IndexError, RecursionError):
            self.misses += 1
            return None
        self.hits += 1
        return findings, [dep for dep, _, _ in entry["deps"]]

    def put(self, key: str, deps: Iterable[str], findings: Iterable[Finding]) -> None:
        """Store an entry atomically; a cache that cannot be written is
        counted and otherwise ignored (checking must not fail because of it)."""
        try:
            dep_rows = [[d, self.real(d), self.digest(d)] for d in deps]
        except (OSError, ValueError):  # a `use` path no file can have (a NUL byte): not cacheable
            return
        rows = [finding_to_dict(f) for f in findings]
        # Round-trip through JSON first, so that the checksum covers exactly what a reader decodes.
        dep_rows, rows = json.loads(json.dumps([dep_rows, rows], ensure_ascii=False))
        entry = {"format": FORMAT, "key": key, "deps": dep_rows, "findings": rows,
                 "checksum": entry_checksum(key, dep_rows, rows)}
        data = json.dumps(entry, ensure_ascii=False, separators=(",", ":")).encode("utf-8", "surrogatepass")
        try:
            replace_file(self._entry_path(key), data)
        except OSError:
            self.write_errors += 1

    def forget_digests(self) -> None:
        self._digests.clear()
        self._reals.clear()
        self._real_folders.clear()

    def clear(self) -> int:
        """Delete every entry (and nothing else: the folder may be one a
        user named); returns how many entries were removed."""
        removed = 0
        try:
            buckets = os.listdir(self.folder)
        except OSError:
            return 0
        for bucket in buckets:
            sub = os.path.join(self.folder, bucket)
            if len(bucket) != 2 or not _HEX.fullmatch(bucket) or not os.path.isdir(sub):
                continue
            for name in os.listdir(sub):
                if name.endswith(".json") and _HEX.fullmatch(name[:-5]) and name.startswith(bucket):
                    try:
                        os.unlink(os.path.join(sub, name))
                        removed += 1
                    except OSError:
                        pass
            try:
                os.rmdir(sub)
            except OSError:
                pass  # something else lives there: leave it
        removed += _clear_summaries(os.path.join(self.folder, "summaries"))
        return removed


def _clear_summaries(folder: str) -> int:
    """Delete the run summaries (``run_summary``: ``summaries/<32 hex>.json``)."""
    removed = 0
    try:
        names = os.listdir(folder)
    except OSError:
        return 0
    for name in names:
        if name.endswith(".json") and len(name) == 37 and _HEX.fullmatch(name[:-5]):
            try:
                os.unlink(os.path.join(folder, name))
                removed += 1
            except OSError:
                pass
    try:
        os.rmdir(folder)
    except OSError:
        pass
    return removed

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
"""
from __future__ import annotations

import hashlib
import json
import os
import re
import tempfile
from typing import Any, Iterable, Optional

from deckward import __version__
from deckward.grammar.findings import Applicability, Finding, Fix, Related, Severity, Span, TextEdit

from .scale_options import default_cache_dir  # noqa: F401  (re-exported)

FORMAT = 1  # bump when the entry layout changes


# -- (de)serialisation of findings -------------------------------------------------

def span_to_list(s: Span) -> list:
    return [s.path, s.start, s.end, s.line, s.column, s.end_line, s.end_column]


def span_from_list(v: list) -> Span:
    return Span(str(v[0]), *(int(x) for x in v[1:7]))


def finding_to_dict(f: Finding) -> dict:
    """Everything a Finding holds, as JSON-ready data (``finding_from_dict``
    gives back an equal Finding, evidence included)."""
    d: dict[str, Any] = {"rule": f.rule, "severity": f.severity.value, "message": f.message,
                         "span": span_to_list(f.span)}
    if f.related:
        d["related"] = [[span_to_list(r.span), r.message] for r in f.related]
    if f.fixes:
        d["fixes"] = [{"title": x.title, "applicability": x.applicability.value,
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
                Applicability(x["applicability"]))
            for x in d.get("fixes", ())
        ),
        evidence=tuple((k, _plain(v)) for k, v in d.get("evidence", ())),
        suppressed=d.get("suppressed"),
    )


# -- keys ----------------------------------------------------------------------------

def file_digest(path: str) -> Optional[str]:
    """sha256 of a file's bytes; None when it does not exist or cannot be
    read (the deck's findings then say so, and the entry remembers it)."""
    try:
        with open(path, "rb") as f:
            return hashlib.sha256(f.read()).hexdigest()
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


def entry_key(path: str, root_dir: str, root_digest: str, config_print: str, probe: bool) -> str:
    text = json.dumps([FORMAT, code_fingerprint(), config_print, bool(probe), path,
                       os.path.abspath(path), os.path.realpath(root_dir), root_digest])
    return hashlib.sha256(text.encode()).hexdigest()


# -- the cache -------------------------------------------------------------------------

_HEX = re.compile(r"[0-9a-f]+")

class FindingsCache:
    """Entries in ``folder``: ``<key[:2]>/<key>.json`` holding
    ``{"deps": [[path, sha256-or-null], ...], "findings": [...]}``."""

    def __init__(self, folder: str) -> None:
        self.folder = folder
        self.hits = 0
        self.misses = 0
        self.write_errors = 0
        self._digests: dict[str, Optional[str]] = {}

    def digest(self, path: str) -> Optional[str]:
        """File digests are remembered for one run: a file used by many
        decks is hashed once."""
        key = os.path.abspath(path)
        if key not in self._digests:
            self._digests[key] = file_digest(path)
        return self._digests[key]

    def _entry_path(self, key: str) -> str:
        return os.path.join(self.folder, key[:2], key + ".json")

    def get(self, key: str) -> Optional[list[Finding]]:
        """The cached findings, or None (no entry, a used file changed, or
        the entry is damaged)."""
        try:
            with open(self._entry_path(key), "rb") as f:
                entry = json.loads(f.read())
            for dep, digest in entry["deps"]:
                if self.digest(dep) != digest:
                    self.misses += 1
                    return None
            findings = [finding_from_dict(d) for d in entry["findings"]]
        except (OSError, ValueError, KeyError, TypeError, IndexError):
            self.misses += 1
            return None
        self.hits += 1
        return findings

    def put(self, key: str, deps: Iterable[str], findings: Iterable[Finding]) -> None:
        """Store an entry atomically; a cache that cannot be written is
        counted and otherwise ignored (checking must not fail because of it)."""
        entry = {"deps": [[d, self.digest(d)] for d in deps],
                 "findings": [finding_to_dict(f) for f in findings]}
        data = json.dumps(entry, ensure_ascii=False, separators=(",", ":")).encode("utf-8")
        target = self._entry_path(key)
        tmp = None
        try:
            os.makedirs(os.path.dirname(target), exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=os.path.dirname(target), prefix=".", suffix=".tmp")
            with os.fdopen(fd, "wb") as f:
                f.write(data)
            os.replace(tmp, target)
            tmp = None
        except OSError:
            self.write_errors += 1
        finally:
            if tmp is not None:
                try:
                    os.unlink(tmp)
                except OSError:
                    pass

    def forget_digests(self) -> None:
        self._digests.clear()

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
        return removed

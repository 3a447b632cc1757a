"""Resolution: load ``use`` files and link names into a ``Workspace``.

A ``Workspace`` is one deck file with everything it uses: name tables,
states linked to their geometry and level with per-state overrides applied,
every reference (for go-to-definition and rename), and the findings of
parsing and resolution.  Files are parsed once per ``Loader`` and shared by
every deck that uses them.
"""
from __future__ import annotations

import os
import re
from dataclasses import field
from typing import Callable, Optional

from . import model as m
from .build import build_deck
from .findings import Finding, Related, Severity, Span
from .records import record
from .safe_open import MAX_FILE_BYTES, path_problem, read_regular
from .text_index import LineIndex

try:  # the standard library's own SHA-256: hashlib would load OpenSSL (about 2 ms of every start)
    from _sha2 import sha256 as _sha256  # Python 3.12+
except ImportError:
    try:
        from _sha256 import sha256 as _sha256  # Python 3.10, 3.11
    except ImportError:
        from hashlib import sha256 as _sha256

# `use` chains deeper than this, or more files than this in one workspace,
# are not loaded (a located finding says so): no real set-up comes near.
MAX_USE_DEPTH = 64
MAX_USE_FILES = 1000
MAX_NAMES_PER_FILE = 10_000  # definitions read from one file
MAX_SUGGESTIONS = 100  # undefined names of one workspace that get a did-you-mean


@record(frozen=True)
class ParsedFile:
    """One file as parsed once by a ``Loader``: its deck, findings and digest."""

    path: str
    deck: m.Deck
    findings: tuple[Finding, ...]
    index: LineIndex
    digest: str  # sha256 of the text


def decode(data: bytes, path: str) -> tuple[str, Optional[Finding]]:
    """Text of a file, and a finding when it is not valid UTF-8 (the text is
    then decoded with replacement characters so that checking goes on)."""
    try:
        return data.decode("utf-8"), None
    except UnicodeDecodeError as e:
        text = data.decode("utf-8", errors="replace")
        prefix = data[: e.start].decode("utf-8", errors="replace")
        index = LineIndex(text, path)
        start = len(prefix)
        return text, Finding(
            "syntax-error",
            Severity.ERROR,
            f"the file is not valid UTF-8: byte 0x{data[e.start]:02x} cannot be decoded",
            index.span(start, start + 1),
        )


class Loader:
    """Parses files once and remembers them.

    ``overlay`` maps absolute paths to the text of unsaved editor buffers;
    everything else is read from disk."""

    def __init__(self, overlay: Optional[dict[str, str]] = None) -> None:
        self.overlay = overlay if overlay is not None else {}
        self._files: dict[str, ParsedFile] = {}

    def forget(self, path: str) -> None:
        self._files.pop(os.path.abspath(path), None)

    def parse_text(self, path: str, text: str) -> ParsedFile:
        key = os.path.abspath(path)
        digest = _sha256(text.encode("utf-8", "surrogatepass")).hexdigest()
        cached = self._files.get(key)
        if cached is not None and cached.digest == digest and cached.path == path:
            return cached
        deck, findings, index = build_deck(path, text)
        parsed = ParsedFile(path, deck, tuple(findings), index, digest)
        self._files[key] = parsed
        return parsed

    def read_text(self, path: str) -> tuple[str, Optional[Finding]]:
        """The text of a non-deck file (an .xyz geometry): the editor's
        buffer when open, else the disk (raises OSError)."""
        key = os.path.abspath(path)
        if key in self.overlay:
            return self.overlay[key], None
        data = read_regular(path, MAX_FILE_BYTES)  # regular files only: a FIFO never blocks
        return decode(data[:MAX_FILE_BYTES], path)

    def load(self, path: str) -> ParsedFile:
        """Parse the file at ``path`` (raises OSError if it cannot be read)."""
        key = os.path.abspath(path)
        if key in self.overlay:
            return self.parse_text(path, self.overlay[key])
        data = read_regular(path, MAX_FILE_BYTES)
        extra = None
        if len(data) > MAX_FILE_BYTES:
            data = data[:MAX_FILE_BYTES]
            extra = f"the file is larger than {MAX_FILE_BYTES // (1024 * 1024)} MB; only the start was read"
        text, bad = decode(data, path)
        parsed = self.parse_text(path, text)
        added = []
        if bad is not None:
            added.append(bad)
        if extra is not None:
            added.append(Finding("syntax-error", Severity.ERROR, extra, parsed.index.span(0, 0)))
        if added:
            parsed = ParsedFile(parsed.path, parsed.deck, tuple(added) + parsed.findings, parsed.index, parsed.digest)
            self._files[key] = parsed
        return parsed


@record(frozen=True)
class Definition:
    """Where a name is defined: its kind, the node and the file."""

    kind: str  # geometry | basis_set | level | state | derive
    name: m.Located[str]
    node: object
    path: str


@record(frozen=True)
class Reference:
    """A use of a name: what it refers to (None when undefined)."""

    name: m.Located[str]
    kind: str  # the kind of definition expected
    target: Optional[Definition]


@record(frozen=True)
class ResolvedState:
    """A state with its geometry, level and effective settings linked."""

    state: m.State
    path: str
    geometry: Optional[m.Geometry]
    optimize: bool
    level: Optional[m.Level]
    settings: m.LevelSettings  # the state's overrides over its level's settings

    @property
    def name(self) -> str:
        return self.state.name.value

    @property
    def charge(self) -> int:
        return self.state.charge.value if self.state.charge else 0

    @property
    def multiplicity(self) -> Optional[int]:
        return self.state.multiplicity.value if self.state.multiplicity else None

    @property
    def reference(self) -> str:
        """The effective reference; unset means restricted for a closed shell
        and unrestricted for an open shell (the runner's default too)."""
        if self.settings.reference is not None:
            return self.settings.reference.value
        return "restricted" if (self.multiplicity or 1) == 1 else "unrestricted"


@record(frozen=True)
class Workspace:
    """One deck and everything it uses, resolved."""

    root: ParsedFile
    files: tuple[ParsedFile, ...]  # root first, then used files in load order
    root_dir: str
    definitions: dict = field(hash=False)  # name -> Definition
    states: dict = field(hash=False)  # name -> ResolvedState
    references: tuple[Reference, ...] = ()
    findings: tuple[Finding, ...] = ()  # parse findings of all files + resolution findings
    broken_names: frozenset = frozenset()
    geometry_files: tuple[tuple[str, str], ...] = ()  # (path, sha256) of every .xyz file read

    @property
    def path(self) -> str:
        return self.root.path

    @property
    def study(self) -> Optional[m.Study]:
        for f in self.files:
            if f.deck.study is not None:
                return f.deck.study
        return None

    def of_kind(self, kind: str) -> list[Definition]:
        return [d for d in self.definitions.values() if d.kind == kind]

    def geometry(self, name: str) -> Optional[m.Geometry]:
        d = self.definitions.get(name)
        return d.node if d is not None and d.kind == "geometry" else None

    def level(self, name: str) -> Optional[m.Level]:
        d = self.definitions.get(name)
        return d.node if d is not None and d.kind == "level" else None

    def basis_set(self, name: str) -> Optional[m.BasisSet]:
        d = self.definitions.get(name)
        return d.node if d is not None and d.kind == "basis_set" else None

    @property
    def derives(self) -> list[m.Derive]:
        return [d.node for d in self.definitions.values() if d.kind == "derive"]

    def file(self, path: str) -> Optional[ParsedFile]:
        for f in self.files:
            if f.path == path:
                return f
        return None

    def quantity_of(self, derive: m.Derive) -> Optional[str]:
        """What a derived number means: ``as``, else its name, else the goal."""
        return quantity_of(derive, self.study)


_IE_NAME = re.compile(r"^(v|a)?(ip|ie)(_|\d|$)|^ioni[sz]ation", re.IGNORECASE)
_EA_NAME = re.compile(r"^(v|a)?ea(_|\d|$)|affinity", re.IGNORECASE)
_GAP_NAME = re.compile(r"^gap", re.IGNORECASE)


def quantity_of(derive: m.Derive, study: Optional[m.Study]) -> Optional[str]:
    if derive.quantity is not None:
        return derive.quantity.value
    name = derive.name.value
    if _IE_NAME.search(name):
        return "ionization_energy"
    if _EA_NAME.search(name):
        return "electron_affinity"
    if _GAP_NAME.search(name):
        return "fundamental_gap"
    if study is not None and study.goal is not None:
        return study.goal.value
    return None


def resolve(path: str, loader: Loader, root_dir: str, text: Optional[str] = None) -> Workspace:
    """Load ``path`` (or ``text`` as that file), its ``use`` files, and link
    every name, inside the workspace ``root_dir`` (which the caller chooses:
    grammar does not look for configuration files; see
    ``deckward.rules.engine.project``).  Never raises for problems in the decks:
    they become findings.  Raises OSError only when the root file cannot be
    read."""
    root = loader.parse_text(path, text) if text is not None else loader.load(path)
    root_dir = os.path.realpath(root_dir)
    findings: list[Finding] = list(root.findings)
    files: list[ParsedFile] = [root]

    # -- load use files (depth first, each once) -----------------------------
    # An explicit stack, not recursion: a chain of thousands of files must
    # not exhaust Python's stack (it ends at MAX_USE_DEPTH with a finding).
    stack = [(root, iter(root.deck.uses), (os.path.realpath(root.path),))]
    loaded = {os.path.realpath(root.path)}
    while stack:
        pf, pending, chain = stack[-1]
        use = next(pending, None)
        if use is None:
            stack.pop()
            continue
        problem = path_problem(use.path.value)
        if problem is not None:
            findings.append(Finding("use-outside-workspace", Severity.ERROR,
                                    f"`{shown(use.path.value)}` cannot be read ({problem})", use.path.span))
            continue
        target = os.path.normpath(os.path.join(os.path.dirname(pf.path), use.path.value))
        real = os.path.realpath(target)
        where = use.path.span
        if not _inside(real, root_dir):
            findings.append(Finding("use-outside-workspace", Severity.ERROR,
                                    f"`{use.path.value}` is outside the workspace root {_short(root_dir)}", where))
            continue
        if real in chain:
            cycle = " -> ".join(os.path.basename(p) for p in chain[chain.index(real):] + (real,))
            findings.append(Finding("use-outside-workspace", Severity.ERROR,
                                    f"`{use.path.value}` forms a cycle of use: {cycle}", where))
            continue
        if real in loaded:
            continue
        if len(chain) > MAX_USE_DEPTH:
            findings.append(Finding("use-outside-workspace", Severity.ERROR,
                                    f"`{use.path.value}` is not loaded: `use` is nested more than {MAX_USE_DEPTH} "
                                    f"files deep here", where))
            continue
        if len(files) > MAX_USE_FILES:
            findings.append(Finding("use-outside-workspace", Severity.ERROR,
                                    f"`{use.path.value}` is not loaded: the deck already uses {MAX_USE_FILES} files",
                                    where))
            continue
        try:
            used = loader.load(target)
        except IsADirectoryError:
            findings.append(Finding("use-outside-workspace", Severity.ERROR,
                                    f"`{use.path.value}` is a folder, not a deck file", where))
            continue
        except OSError as e:
            reason = "does not exist" if isinstance(e, FileNotFoundError) else f"cannot be read ({e.strerror or e})"
            findings.append(Finding("use-outside-workspace", Severity.ERROR, f"`{shown(use.path.value)}` {reason}", where))
            continue
        files.append(used)
        loaded.add(real)
        findings.extend(used.findings)
        stack.append((used, iter(used.deck.uses), chain + (real,)))
    geometry_files: list[tuple[str, str]] = []
    files = [_with_geometry_files(pf, loader, root_dir, findings, geometry_files) for pf in files]
    root = files[0]

    # -- name table ------------------------------------------------------------
    definitions: dict[str, Definition] = {}
    broken = set().union(*(f.deck.broken_names for f in files))
    for pf in files:
        for count, (kind, name, node) in enumerate(pf.deck.definitions()):
            if count == MAX_NAMES_PER_FILE:
                findings.append(Finding("syntax-error", Severity.ERROR,
                                        f"the file defines more than {MAX_NAMES_PER_FILE} names; this one and the "
                                        "rest are not read", name.span))
            if count >= MAX_NAMES_PER_FILE:
                broken.add(name.value)  # so that their uses are not reported as undefined
                continue
            d = Definition(kind, name, node, pf.path)
            first = definitions.get(name.value)
            if first is None:
                definitions[name.value] = d
                continue
            here, other = d, first
            if first.path == root.path and d.path != root.path:
                here, other = first, d
            findings.append(Finding(
                "duplicate-name", Severity.ERROR,
                f"`{name.value}` is defined twice: as a {other.kind} on line {other.name.span.line}"
                + ("" if other.path == here.path else f" of {os.path.basename(other.path)}")
                + f" and as a {here.kind} here",
                here.name.span,
                related=(Related(other.name.span, f"`{name.value}` is first defined here"),),
            ))

    references: list[Reference] = []
    names_of_kind: dict[str, list[str]] = {}
    suggested = [0]

    def ref(name: m.Located[str], kind: str) -> Optional[Definition]:
        d = definitions.get(name.value)
        if d is not None and d.kind == kind:
            references.append(Reference(name, kind, d))
            return d
        references.append(Reference(name, kind, None))
        if name.value in broken:
            return None
        fixes = ()
        if d is not None:
            msg = f"`{name.value}` is a {d.kind}, not a {kind}"
            related = (Related(d.name.span, f"`{name.value}` is defined here"),)
        else:
            from .suggest import Suggestions, replacement_fixes, suggest  # only a misspelling pays for it

            close = Suggestions(())
            if suggested[0] < MAX_SUGGESTIONS:  # past that, a did-you-mean each would cost names x names
                suggested[0] += 1
                if kind not in names_of_kind:
                    names_of_kind[kind] = [n for n, dd in definitions.items() if dd.kind == kind]
                close = suggest(name.value, names_of_kind[kind])
            msg = f"no {kind} is named `{name.value}`" + close.hint()
            related = ()
            # another defined name: the same calculation, spelt right (safe when clearly the one meant)
            fixes = replacement_fixes(name.span, close, title=f"Use the {kind} `{{}}`")
        findings.append(Finding("undefined-name", Severity.ERROR, msg, name.span, related=related, fixes=fixes))
        return None

    states: dict[str, ResolvedState] = {}
    for pf in files:
        deck = pf.deck
        for st in deck.states:
            geometry = level = None
            if st.geometry is not None:
                gd = ref(st.geometry.name, "geometry")
                geometry = gd.node if gd else None
            if st.level is not None:
                ld = ref(st.level, "level")
                level = ld.node if ld else None
            settings = st.overrides.merged_over(level.settings if level else m.LevelSettings())
            missing = []
            if st.geometry is None:
                missing.append("`geometry`")
            if st.level is None or level is not None:  # an undefined level is reported already
                if settings.method is None:
                    missing.append("`method`" if st.level is None else f"`method` (level `{level.name.value}` has none)")
                if settings.basis is None:
                    missing.append("`basis`" if st.level is None else f"`basis` (level `{level.name.value}` has none)")
            if missing and st.name.value not in broken:
                findings.append(Finding("missing-setting", Severity.ERROR,
                                        f"state `{st.name.value}` has no " + " and no ".join(missing),
                                        st.name.span))
            if definitions.get(st.name.value) is not None and definitions[st.name.value].node is st:
                states[st.name.value] = ResolvedState(st, pf.path, geometry, bool(st.geometry and st.geometry.optimize),
                                                      level, settings)
        for bs in deck.basis_sets:
            if bs.source is not None:
                for word in bs.source.words():
                    if word.value in definitions and definitions[word.value].kind == "basis_set":
                        references.append(Reference(word, "basis_set", definitions[word.value]))
        for lv in list(deck.levels) + [s for s in deck.states]:
            spec = lv.settings.basis if isinstance(lv, m.Level) else lv.overrides.basis
            if spec is not None:
                for word in spec.words():
                    d = definitions.get(word.value)
                    if d is not None and d.kind == "basis_set":
                        references.append(Reference(word, "basis_set", d))
        for dv in deck.derives:
            for node in m.walk(dv.expr):
                if isinstance(node, (m.EnergyOf, m.OrbitalOf)):
                    ref(node.state, "state")

    findings.sort(key=Finding.sort_key)
    return Workspace(root, tuple(files), root_dir, definitions, states, tuple(references), tuple(findings),
                     frozenset(broken), tuple(geometry_files))


def _with_geometry_files(pf: ParsedFile, loader: Loader, root_dir: str, findings: list,
                         read: list) -> ParsedFile:
    """The file with every ``geometry { file = "x.xyz" }`` holding the atoms
    of its .xyz file (path relative to the deck, inside the workspace root,
    like ``use``); problems become findings, located in the .xyz file when
    they are in its text."""
    if not any(g.file is not None for g in pf.deck.geometries):
        return pf
    from dataclasses import replace

    from .xyz import parse_xyz  # only for decks that read .xyz files (the cold start stays small)

    geometries = []
    for g in pf.deck.geometries:
        if g.file is None or g.atoms:
            geometries.append(g)
            continue
        target = os.path.normpath(os.path.join(os.path.dirname(pf.path), g.file.value))
        where = g.file.span
        problem = None
        if not _inside(os.path.realpath(target), root_dir):
            problem = f"`{g.file.value}` is outside the workspace root {_short(root_dir)}"
        else:
            try:
                text, bad = loader.read_text(target)
            except IsADirectoryError:
                problem = f"`{g.file.value}` is a folder, not an .xyz file"
            except OSError as e:
                reason = "does not exist" if isinstance(e, FileNotFoundError) else f"cannot be read ({e.strerror or e})"
                problem = f"`{g.file.value}` {reason}"
        if problem is not None:
            findings.append(Finding("use-outside-workspace", Severity.ERROR, problem, where))
            geometries.append(g)
            continue
        atoms, found, _ = parse_xyz(target, text)
        if bad is not None:
            found.insert(0, bad)
        findings.extend(found)
        read.append((target, _sha256(text.encode("utf-8", "surrogatepass")).hexdigest()))
        geometries.append(replace(g, atoms=atoms, file_path=target))
    deck = replace(pf.deck, geometries=tuple(geometries))
    return ParsedFile(pf.path, deck, pf.findings, pf.index, pf.digest)


def shown(text: str) -> str:
    """``text`` fit for a message: control characters and lone surrogates
    written as escapes, so a message can always be printed and encoded."""
    out = []
    for ch in text:
        code = ord(ch)
        if code < 0x20 or code == 0x7F or 0xD800 <= code <= 0xDFFF:
            out.append(f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}")
        else:
            out.append(ch)
    return "".join(out)


def inside_root(path: str, root: str) -> bool:
    """``path`` lies in the folder ``root`` (both already resolved)."""
    return _inside(path, root)


def _inside(path: str, root: str) -> bool:
    try:
        return os.path.commonpath([path, root]) == root
    except ValueError:
        return False


def _short(path: str) -> str:
    return os.path.basename(path.rstrip(os.sep)) + os.sep if path else path

"""The project around a deck: its workspace root, its configuration, the
parsed files, and the check of a deck in it.

Every front end asks this module, so that the command line, the parallel
checker, the review and the language server agree on which ``deckward.yaml``
applies to a deck and where its workspace ends (the limit of ``use`` and of
geometry files):

- the root is the folder of the nearest ``deckward.yaml`` at or above the
  deck (or of the file given with ``--config``);
- without one, it is the *anchor*: the folder named on the command line, or
  the editor's workspace folder holding the deck; without an anchor, the
  deck's own folder.

Nested workspaces therefore resolve the same way everywhere: a deck below
``outer/inner/deckward.yaml`` belongs to ``inner`` whether ``outer/`` was
checked from the command line or opened in an editor.

A ``Projects`` holds one ``Project`` per root and one ``Loader`` shared by
all of them (a file is parsed once however many decks use it); its overlay
holds the editor's unsaved buffers.
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from typing import Iterable, Mapping, Optional

from deckward.grammar.findings import Finding
from deckward.grammar.resolve import Loader, Workspace, inside_root, resolve
from deckward.grammar.safe_open import resolved_path

from .config import CONFIG_NAME, Config, load_config
from .checker import check_workspace, known_rule_ids


def find_config_file(start: str) -> Optional[str]:
    """``deckward.yaml`` in ``start`` (a folder, or a file's folder) or in a
    folder above it, shown relative to the working folder when below it."""
    folder = os.path.abspath(start)
    if not os.path.isdir(folder):
        folder = os.path.dirname(folder)
    while True:
        candidate = os.path.join(folder, CONFIG_NAME)
        if os.path.isfile(candidate):
            return _display_path(candidate)
        parent = os.path.dirname(folder)
        if parent == folder:
            return None
        folder = parent


def _display_path(path: str) -> str:
    rel = os.path.relpath(path)
    return path if rel.startswith("..") else rel


def check_resolved(ws: Workspace, config: Config, probe: bool = False, progress=None) -> list[Finding]:
    """Every finding of a resolved workspace under ``config``; with ``probe``
    the PySCF probes run too (imported only then) and their findings go
    through the same severities and suppressions."""
    extra: list[Finding] = []
    if probe:
        from deckward.rules.compute.probes import run_probes

        extra = run_probes(ws, config, progress=progress)
    return check_workspace(ws, config, extra=extra, probed=probe)


def _file_key(path: str) -> Optional[tuple]:
    try:
        st = os.stat(path)
    except OSError:
        return None
    return (st.st_mtime_ns, st.st_size)


@dataclass(frozen=True)
class Analysis:
    """One check of one deck: its resolved workspace and every finding of it
    (suppressed ones included), under the configuration that applied."""

    workspace: Workspace
    findings: list[Finding]
    config: Config


class Project:
    """One workspace root with its configuration.

    The configuration is read once; with ``live`` (the language server) it
    is read again when the file's modification time or size changes, so an
    edit to ``deckward.yaml`` applies to the next check."""

    def __init__(self, root: str, config_path: Optional[str], loader: Loader, live: bool = False) -> None:
        self.root = os.path.realpath(root)
        self.config_path = config_path
        self.loader = loader
        self.live = live
        self._config: Optional[Config] = None
        self._config_key: Optional[tuple] = None
        self._real_folders: dict[str, str] = {}  # for resolved_path (not when live)

    @property
    def config(self) -> Config:
        if self.config_path is None:
            if self._config is None:
                self._config = Config()
            return self._config
        if self._config is None or (self.live and _file_key(self.config_path) != self._config_key):
            self._config_key = _file_key(self.config_path)
            self._config = load_config(self.config_path, known_rule_ids())
        return self._config

    def reload(self) -> None:
        """Forget the configuration read so far (the client reported a change)."""
        self._config = None

    def contains(self, path: str) -> bool:
        real = resolved_path(path, self._real_folders) if not self.live else os.path.realpath(path)
        return inside_root(real, self.root)

    def resolve(self, path: str, text: Optional[str] = None) -> Workspace:
        """``path`` (or ``text`` as that file) resolved in this workspace;
        raises OSError only when the deck itself cannot be read."""
        return resolve(path, self.loader, self.root, text=text)

    def analyse(self, path: str, text: Optional[str] = None, probe: bool = False,
                progress=None) -> Analysis:
        """Resolve and check one deck.  With ``probe`` the PySCF probes run
        too (imported only then) and their findings go through the same
        severities and suppressions."""
        config = self.config
        ws = self.resolve(path, text)
        return Analysis(ws, check_resolved(ws, config, probe, progress), config)

    def __repr__(self) -> str:
        return f"Project({self.root!r}, config={self.config_path!r})"


class Projects:
    """Every project a front end has met, one per root, sharing one Loader.

    ``config_path``: a configuration given explicitly (``--config``): every
    deck then belongs to its project.  ``folders``: the editor's workspace
    folders, the anchors of decks that have no ``deckward.yaml`` above them."""

    def __init__(self, config_path: Optional[str] = None, loader: Optional[Loader] = None,
                 folders: Iterable[str] = (), live: bool = False,
                 overlay: Optional[Mapping[str, str]] = None) -> None:
        self.explicit = config_path
        self.loader = loader if loader is not None else Loader(overlay)
        self.folders = [os.path.abspath(f) for f in folders]
        self.live = live
        self._projects: dict[tuple[str, Optional[str]], Project] = {}
        self._found: dict[str, Optional[str]] = {}  # folder -> its configuration (not when live)
        self._of_path: dict[tuple[str, Optional[str]], Project] = {}  # (deck, anchor) -> project (not when live)

    def _config_file(self, absolute: str) -> Optional[str]:
        if self.explicit is not None:
            return self.explicit
        if self.live:  # a deckward.yaml created in the editor applies at once
            return find_config_file(absolute)
        folder = absolute if os.path.isdir(absolute) else os.path.dirname(absolute)
        if folder not in self._found:
            self._found[folder] = find_config_file(folder)
        return self._found[folder]

    def for_path(self, path: str, anchor: Optional[str] = None) -> Project:
        """The project of the deck ``path``; ``anchor`` is the folder (or file)
        it was named under on the command line.  Outside the editor the
        answer is remembered per deck (a repository check asks twice for
        each of thousands of decks)."""
        absolute = os.path.abspath(path)
        if not self.live:
            known = self._of_path.get((absolute, anchor))
            if known is not None:
                return known
        config_path = self._config_file(absolute)
        if config_path is not None:
            root = os.path.dirname(os.path.abspath(config_path))
        else:
            root = self._anchor_root(absolute, anchor)
        key = (root, os.path.abspath(config_path) if config_path else None)
        project = self._projects.get(key)
        if project is None:
            project = self._projects[key] = Project(root, config_path, self.loader, self.live)
        if not self.live:
            self._of_path[(absolute, anchor)] = project
        return project

    def _anchor_root(self, absolute: str, anchor: Optional[str]) -> str:
        if anchor is not None:
            folder = os.path.abspath(anchor)
            return folder if os.path.isdir(folder) else os.path.dirname(folder)
        for folder in sorted(self.folders, key=len, reverse=True):
            if os.path.commonpath([folder, absolute]) == folder:
                return folder
        return os.path.dirname(absolute)

    def reload(self) -> None:
        """Re-read every configuration on next use (``deckward.yaml`` changed)."""
        self._projects.clear()
        self._found.clear()
        self._of_path.clear()

    def config_for(self, path: str, anchor: Optional[str] = None) -> Config:
        return self.for_path(path, anchor).config


def config_findings(projects: Iterable[Project]) -> list[Finding]:
    """The findings of each distinct configuration, once however many decks
    it applies to."""
    out: list[Finding] = []
    seen: set[int] = set()
    for project in projects:
        config = project.config
        if id(config) not in seen:
            seen.add(id(config))
            out.extend(config.findings)
    return out

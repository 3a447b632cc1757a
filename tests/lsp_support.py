"""Shared pieces of the language-server tests: the server command, a test
workspace whose deckward.yaml keeps only chosen rules on, and a record of
every diagnostics notification (with its version) the client received."""
from __future__ import annotations

import asyncio
import os
import sys
import time

from lsprotocol import types as t
from pytest_lsp import LanguageClient
from pygls.uris import from_fs_path

SERVER_COMMAND = [sys.executable, "-m", "deckward", "serve"]
TIMEOUT_S = 15.0


def write_workspace(folder, files: dict, keep=("restricted-open-shell",)) -> None:
    """Write ``files`` and a deckward.yaml that turns off every catalogue
    rule not in ``keep`` (rules are added all the time; the tests assert on
    exact findings of the rules they name)."""
    from deckward.rules.engine.registry import all_rules

    language = {"syntax-error", "unknown-key", "duplicate-key", "invalid-value", "undefined-name",
                "duplicate-name", "use-outside-workspace", "internal-error"}
    lines = ["rules:"]
    for rid, rule in sorted(all_rules().items()):
        if rid not in keep and rid not in language:
            lines.append(f"  {rid}: off")
    if len(lines) == 1:
        lines = []
    files = dict(files)
    files.setdefault("deckward.yaml", "\n".join(lines) + "\n")
    for rel, text in files.items():
        path = os.path.join(str(folder), rel)
        os.makedirs(os.path.dirname(path), exist_ok=True)
        with open(path, "w", encoding="utf-8", newline="") as f:
            f.write(text)


def uri_of(folder, rel: str) -> str:
    return from_fs_path(os.path.join(str(folder), rel))


def record_diagnostics(client) -> None:
    """Keep every publishDiagnostics params in ``client.published``."""
    client.published = []
    protocol = client.protocol
    original = protocol._handle_notification

    def handle(method_name, params):
        if method_name == t.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS:
            client.published.append(params)
        return original(method_name, params)

    protocol._handle_notification = handle


async def wait_for_diagnostics(client, uri: str, version, timeout: float = TIMEOUT_S):
    """The diagnostics published for ``uri`` at ``version``."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        for p in client.published:
            if p.uri == uri and p.version == version:
                return p.diagnostics
        await asyncio.sleep(0.01)
    seen = [(p.uri.rsplit("/", 1)[-1], p.version) for p in client.published]
    raise AssertionError(f"no diagnostics for {uri} version {version}; received {seen}")


def open_document(client, uri: str, text: str, version: int = 1) -> None:
    client.text_document_did_open(t.DidOpenTextDocumentParams(
        text_document=t.TextDocumentItem(uri=uri, language_id="deck", version=version, text=text)))


def change_document(client, uri: str, text: str, version: int) -> None:
    client.text_document_did_change(t.DidChangeTextDocumentParams(
        text_document=t.VersionedTextDocumentIdentifier(uri=uri, version=version),
        content_changes=[t.TextDocumentContentChangeWholeDocument(text=text)]))


def apply_text_edits(text: str, edits) -> str:
    """Apply LSP edits (UTF-16 positions, \\n lines) to ``text``."""
    lines = text.split("\n")

    def offset(pos):
        start = sum(len(line) + 1 for line in lines[: pos.line])
        line = lines[pos.line] if pos.line < len(lines) else ""
        units = 0
        for i, ch in enumerate(line):
            if units >= pos.character:
                return start + i
            units += 2 if ord(ch) > 0xFFFF else 1
        return start + len(line)

    ordered = sorted(edits, key=lambda e: (e.range.start.line, e.range.start.character), reverse=True)
    for e in ordered:
        text = text[: offset(e.range.start)] + e.new_text + text[offset(e.range.end):]
        lines = text.split("\n")
    return text


def brief(diagnostics) -> list[tuple]:
    """(code, start line, start char, end line, end char, message) sorted."""
    return sorted((d.code, d.range.start.line, d.range.start.character, d.range.end.line, d.range.end.character,
                   d.message) for d in diagnostics)


class session:
    """``async with session(root, *args) as client``: a server started with
    ``deckward serve ARGS`` for one test, initialised on ``root`` with the
    capabilities of ``profile``, shut down afterwards."""

    def __init__(self, root, *args: str, profile: str = "neovim@v0.7.0"):
        self.root, self.args, self.profile = root, args, profile

    async def __aenter__(self):
        from pytest_lsp import ClientServerConfig, client_capabilities

        self.client = await ClientServerConfig(server_command=SERVER_COMMAND + list(self.args)).start()
        self.client.root = self.root
        record_diagnostics(self.client)
        result = await self.client.initialize_session(t.InitializeParams(
            capabilities=client_capabilities(self.profile), root_uri=uri_of(self.root, "")))
        self.client.server_capabilities = result.capabilities
        return self.client

    async def __aexit__(self, *exc):
        try:
            await self.client.shutdown_session()
        finally:
            await self.client.stop()


def client_fixture(folder: str, files: dict | None = None, keep=("restricted-open-shell",),
                   profile: str = "neovim@v0.7.0"):
    """A module-scoped pytest-lsp ``client`` fixture: ``deckward serve`` on
    a fresh workspace ``folder`` holding ``files``, with ``client.root``,
    ``client.published`` and ``client.server_capabilities`` set."""
    import pytest_lsp
    from pytest_lsp import ClientServerConfig, client_capabilities

    @pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND), scope="module")
    async def client(lsp_client: LanguageClient, tmp_path_factory):
        root = tmp_path_factory.mktemp(folder)
        write_workspace(root, files or {}, keep=keep)
        lsp_client.root = root
        lsp_client.opened = 0
        record_diagnostics(lsp_client)
        result = await lsp_client.initialize_session(t.InitializeParams(
            capabilities=client_capabilities(profile), root_uri=uri_of(root, "")))
        lsp_client.server_capabilities = result.capabilities
        yield
        await lsp_client.shutdown_session()

    return client


# The CN radical at a restricted reference (demo deck; geometry invented for the demo) and its one finding.
RADICAL = (
    "geometry cn {\n  C  0.0  0.0  0.0\n  N  0.0  0.0  1.1718\n}\n"
    "level hf_adz { method = hf  basis = aug-cc-pvdz  reference = restricted }\n"
    "state radical { geometry = cn  level = hf_adz  charge = 0  multiplicity = 2 }\n"
)
RADICAL_FINDINGS = [("restricted-open-shell", 4, 61, 4, 71,
                     "state `radical` has multiplicity 2 (open shell) but level `hf_adz` sets reference = restricted")]

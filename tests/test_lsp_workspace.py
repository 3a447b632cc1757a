"""Workspace behaviour of the server: editing a used file re-checks the open
decks that use it, and deckward.yaml is re-read when it changes."""
from __future__ import annotations

import time

import pytest
from lsprotocol import types as t
from pytest_lsp import LanguageClient

from lsp_support import (TIMEOUT_S, brief, change_document, client_fixture, open_document, uri_of,
                         wait_for_diagnostics)

pytestmark = pytest.mark.asyncio(loop_scope="module")

SHARED = "level hf_adz { method = hf  basis = aug-cc-pvdz  reference = unrestricted }\n"
USER = ('use "shared.deck"\n'
        "geometry cn {\n  C  0.0  0.0  0.0\n  N  0.0  0.0  1.1718\n}\n"
        "state radical { geometry = cn  level = hf_adz  charge = 0  multiplicity = 2 }\n")


client = client_fixture("lsp-workspace", files={"shared.deck": SHARED, "user.deck": USER})


async def publication_matching(client, uri: str, after: int, expected, key=brief):
    """Wait until diagnostics for ``uri`` published after the first ``after``
    notifications equal ``expected`` (under ``brief``); earlier re-checks
    that raced with the edit may come first."""
    import asyncio

    deadline = time.monotonic() + TIMEOUT_S
    seen = []
    while time.monotonic() < deadline:
        seen = [key(p.diagnostics) for p in client.published[after:] if p.uri == uri]
        if expected in seen:
            return
        await asyncio.sleep(0.01)
    raise AssertionError(f"no diagnostics {expected} for {uri}; received {seen}")


async def test_editing_a_used_file_rechecks_the_deck_that_uses_it(client: LanguageClient):
    user, shared = uri_of(client.root, "user.deck"), uri_of(client.root, "shared.deck")
    open_document(client, user, USER)
    assert brief(await wait_for_diagnostics(client, user, 1)) == []
    open_document(client, shared, SHARED)
    await wait_for_diagnostics(client, shared, 1)
    mark = len(client.published)
    # the shared level is renamed: the state in user.deck now names nothing
    change_document(client, shared, SHARED.replace("level hf_adz", "level hf_tz"), 2)
    await publication_matching(client, user, mark, [
        ("undefined-name", 5, 39, 5, 45, "no level is named `hf_adz`; did you mean `hf_tz`?")])


async def test_configuration_is_reread_when_it_changes(client: LanguageClient):
    uri = uri_of(client.root, "config_probe.deck")
    text = SHARED.replace("unrestricted", "restricted") + (
        "geometry oh {\n  O 0 0 0\n  H 0 0 0.9697\n}\n"
        "state radical { geometry = oh  level = hf_adz  charge = 0  multiplicity = 2 }\n")
    open_document(client, uri, text)
    diags = await wait_for_diagnostics(client, uri, 1)
    assert [(d.code, d.severity) for d in diags] == [("restricted-open-shell", t.DiagnosticSeverity.Error)]
    config = client.root / "deckward.yaml"
    config.write_text(config.read_text(encoding="utf-8") + "  restricted-open-shell: info\n", encoding="utf-8")
    mark = len(client.published)
    client.workspace_did_change_watched_files(t.DidChangeWatchedFilesParams(changes=[
        t.FileEvent(uri=uri_of(client.root, "deckward.yaml"), type=t.FileChangeType.Changed)]))
    await publication_matching(client, uri, mark, [("restricted-open-shell", t.DiagnosticSeverity.Information)],
                               key=lambda diags: [(d.code, d.severity) for d in diags])

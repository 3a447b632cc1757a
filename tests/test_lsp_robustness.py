"""The server survives bad input and heavy use and keeps answering right."""
from __future__ import annotations

import asyncio

import pytest
from lsprotocol import types as t
from pytest_lsp import LanguageClient

from lsp_support import (RADICAL, RADICAL_FINDINGS, brief, change_document, client_fixture, open_document, uri_of,
                         wait_for_diagnostics)

pytestmark = pytest.mark.asyncio(loop_scope="module")

EXPECTED = RADICAL_FINDINGS


client = client_fixture("lsp-robust")


async def symbols_of(client, uri):
    return await client.text_document_document_symbol_async(
        t.DocumentSymbolParams(text_document=t.TextDocumentIdentifier(uri=uri)))


async def test_malformed_json_and_unknown_request(client: LanguageClient):
    stdin = client._server.stdin
    body = b'{"jsonrpc": "2.0", "id": 99, "method": '  # cut short: not JSON
    stdin.write(b"Content-Length: %d\r\n\r\n" % len(body) + body)
    await stdin.drain()
    with pytest.raises(Exception, match="deckward/noSuchRequest"):
        await client.protocol.send_request_async("deckward/noSuchRequest", {})
    uri = uri_of(client.root, "after_bad.deck")
    open_document(client, uri, RADICAL)
    assert brief(await wait_for_diagnostics(client, uri, 1)) == EXPECTED
    assert [s.name for s in await symbols_of(client, uri)] == ["cn", "hf_adz", "radical"]


async def test_ten_thousand_line_document(client: LanguageClient):
    atoms = "".join(f"  H  {i * 0.001:.3f}  0.0  0.0\n" for i in range(9991))
    text = RADICAL + "geometry big {\n" + atoms + "}\n" + "state lost { geometry = cn  level = nowhere  charge = 0  multiplicity = 2 }\n"
    assert text.count("\n") >= 10000
    uri = uri_of(client.root, "big.deck")
    open_document(client, uri, text)
    diags = await wait_for_diagnostics(client, uri, 1, timeout=60)
    last = text.count("\n") - 1
    assert brief(diags) == EXPECTED + [("undefined-name", last, 36, last, 43, "no level is named `nowhere`")]
    assert [s.name for s in await symbols_of(client, uri)] == ["cn", "hf_adz", "radical", "big", "lost"]


async def test_two_hundred_rapid_changes(client: LanguageClient):
    uri = uri_of(client.root, "typing.deck")
    open_document(client, uri, RADICAL)
    await wait_for_diagnostics(client, uri, 1)
    typed = ""
    for version in range(2, 202):  # type a comment, one character per change
        typed += "x"
        change_document(client, uri, RADICAL + "# " + typed + "\n", version)
    diags = await wait_for_diagnostics(client, uri, 201)
    assert brief(diags) == EXPECTED
    versions = [p.version for p in client.published if p.uri == uri]
    assert versions == sorted(versions)  # nothing stale after something newer
    assert versions[-1] == 201
    await asyncio.sleep(0.5)
    assert [p.version for p in client.published if p.uri == uri][-1] == 201


async def test_document_closed_while_being_checked(client: LanguageClient):
    atoms = "".join(f"  H  {i * 0.001:.3f}  0.0  0.0\n" for i in range(5000))
    text = RADICAL + "geometry big {\n" + atoms + "}\n"
    uri = uri_of(client.root, "closing.deck")
    open_document(client, uri, text)
    await asyncio.sleep(0.05)  # the check has started
    client.text_document_did_close(t.DidCloseTextDocumentParams(text_document=t.TextDocumentIdentifier(uri=uri)))
    other = uri_of(client.root, "next.deck")
    open_document(client, other, RADICAL)
    assert brief(await wait_for_diagnostics(client, other, 1)) == EXPECTED
    assert [s.name for s in await symbols_of(client, other)] == ["cn", "hf_adz", "radical"]
    await asyncio.sleep(0.3)
    closing = [p for p in client.published if p.uri == uri]
    assert closing and list(closing[-1].diagnostics) == []  # the closed document ends up clear

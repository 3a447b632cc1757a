"""Nothing a client sends stops the server answering: broken framing,
absurd lengths, parameters that do not fit, lone surrogates, and tens of
thousands of edits (memory stays flat)."""
from __future__ import annotations

import asyncio

import pytest
from lsprotocol import types as t
from pygls.exceptions import JsonRpcInvalidParams
from pytest_lsp import LanguageClient

from lsp_support import (RADICAL, RADICAL_FINDINGS, brief, change_document, client_fixture, open_document, uri_of,
                         wait_for_diagnostics)

pytestmark = pytest.mark.asyncio(loop_scope="module")

EXPECTED = RADICAL_FINDINGS


client = client_fixture("lsp-faults")


async def still_answers(client) -> None:
    """A fresh deck gets its exact diagnostics and a request its answer."""
    client.opened += 1
    uri = uri_of(client.root, f"after{client.opened}.deck")
    open_document(client, uri, RADICAL)
    assert brief(await wait_for_diagnostics(client, uri, 1)) == EXPECTED
    symbols = await client.text_document_document_symbol_async(
        t.DocumentSymbolParams(text_document=t.TextDocumentIdentifier(uri=uri)))
    assert [s.name for s in symbols] == ["cn", "hf_adz", "radical"]


async def send_raw(client, data: bytes) -> None:
    stdin = client._server.stdin
    stdin.write(data)
    await stdin.drain()


BODY = b'{"jsonrpc": "2.0", "method": "$/deckward-test", "params": {}}'


@pytest.mark.parametrize("header", [
    b"Content-Length: abc\r\n\r\n",                  # not a number
    b"Content-Type: application/json\r\n\r\n",       # no length at all
    b"Content-Length: -5\r\n\r\n",                   # negative
    b"Content-Length: 1099511627776\r\n\r\n",        # a terabyte: refused, not allocated
], ids=["non-numeric", "missing", "negative", "terabyte"])
async def test_bad_content_length_is_skipped(client: LanguageClient, header):
    await send_raw(client, header + BODY)
    await still_answers(client)


async def test_server_process_is_alive_after_faults(client: LanguageClient):
    assert client._server.returncode is None


def position_request(line, character):
    return {"textDocument": {"uri": "file:///nowhere.deck"}, "position": {"line": line, "character": character}}


@pytest.mark.parametrize("params", [
    position_request(-1, 0),
    position_request(2**31, 0),
    position_request(0, -3),
    None,
    {"textDocument": None},
], ids=["negative-line", "line-2-31", "negative-character", "null", "null-document"])
async def test_invalid_params_are_answered_with_an_error(client: LanguageClient, params):
    with pytest.raises(JsonRpcInvalidParams, match="invalid parameters for textDocument/hover"):
        await asyncio.wait_for(raw_request(client, t.TEXT_DOCUMENT_HOVER, params), 10)
    await still_answers(client)


def raw_request(client, method: str, params):
    """Send a request exactly as given (the typed client would refuse it)."""
    from concurrent.futures import Future

    client.raw_ids = getattr(client, "raw_ids", 0) + 1
    msg_id = f"raw-{client.raw_ids}"
    future: Future = Future()
    client.protocol._request_futures[msg_id] = future
    client.protocol._send_data({"jsonrpc": "2.0", "id": msg_id, "method": method, "params": params})
    return asyncio.wrap_future(future)


async def test_lone_surrogate_in_the_text(client: LanguageClient):
    uri = uri_of(client.root, "surrogate.deck")
    text = ('use "a\ud800.deck"\n' + RADICAL.replace("geometry cn {", "# note \ud800\ngeometry cn {")
            + 'study "x\udc00" { goal = energy }\n')
    open_document(client, uri, text)
    diags = await wait_for_diagnostics(client, uri, 1)
    found = brief(diags)
    assert [d[0] for d in found] == ["restricted-open-shell", "use-outside-workspace"]
    assert found[0] == ("restricted-open-shell", 6, 61, 6, 71, EXPECTED[0][5])
    assert found[1][1:5] == (0, 4, 0, 13)  # the quoted path, surrogate included (one UTF-16 unit)
    report = await client.text_document_diagnostic_async(t.DocumentDiagnosticParams(
        text_document=t.TextDocumentIdentifier(uri=uri)))
    assert sorted(d.code for d in report.items) == ["restricted-open-shell", "use-outside-workspace"]
    symbols = await client.text_document_document_symbol_async(
        t.DocumentSymbolParams(text_document=t.TextDocumentIdentifier(uri=uri)))
    assert symbols[0].name == "x\ufffd"


def rss_kib(pid: int) -> int:
    with open(f"/proc/{pid}/status", encoding="ascii") as f:
        for line in f:
            if line.startswith("VmRSS:"):
                return int(line.split()[1])
    raise AssertionError("no VmRSS")


async def test_memory_stays_flat_over_twenty_thousand_edits(client: LanguageClient):
    uri = uri_of(client.root, "typing_long.deck")
    open_document(client, uri, RADICAL)
    await wait_for_diagnostics(client, uri, 1)

    async def edits(first: int, count: int) -> None:
        for version in range(first, first + count):
            # type one character at the end of the last line, as a keystroke does
            client.text_document_did_change(t.DidChangeTextDocumentParams(
                text_document=t.VersionedTextDocumentIdentifier(uri=uri, version=version),
                content_changes=[t.TextDocumentContentChangePartial(
                    range=t.Range(start=t.Position(line=6, character=0), end=t.Position(line=6, character=0)),
                    text="x" if version % 100 else "\n")]))
            if version % 500 == 0:
                await client._server.stdin.drain()
        # a request is answered after every notification sent before it
        await client.text_document_document_symbol_async(
            t.DocumentSymbolParams(text_document=t.TextDocumentIdentifier(uri=uri)))

    pid = client._server.pid
    await edits(2, 2000)  # warm up: caches, the allocator's arenas
    before = rss_kib(pid)
    await edits(2002, 20000)
    after = rss_kib(pid)
    # pygls 2.1.1 as it is keeps about 2 KB per notification: 20,000 edits would add about 40 MB.
    assert after - before < 8 * 1024, f"RSS grew by {after - before} KiB over 20,000 edits"
    change_document(client, uri, RADICAL, 30000)
    assert brief(await wait_for_diagnostics(client, uri, 30000, timeout=60)) == EXPECTED

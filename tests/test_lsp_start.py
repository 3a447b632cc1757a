"""A fast start: ``initialize`` is answered before pygls, lsprotocol and the
checker are imported, with exactly the answer pygls would give."""
from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from lsprotocol import types as t
from pygls.protocol import default_converter
from pytest_lsp import client_capabilities

from deckward.server.lsp import fast_start
from deckward.server.lsp.server import build_server
from lsp_support import open_document, session, uri_of, write_workspace

PROFILES = os.listdir(os.path.join(os.path.dirname(__import__("pytest_lsp").__file__), "clients"))
PROFILES = sorted(p[:-5].replace("_v", "@v").replace("_", "-") for p in PROFILES if p.endswith(".json"))


def test_every_bundled_profile_is_covered():
    assert {"neovim@v0.7.0", "neovim@v0.11.0", "visual-studio-code@v1.65.2", "emacs@v29.1"} <= set(PROFILES)


@pytest.mark.parametrize("profile", PROFILES)
def test_early_answer_equals_what_pygls_answers(profile):
    caps = client_capabilities(profile)
    params = default_converter().unstructure(t.InitializeParams(capabilities=caps, process_id=None))
    wire = json.loads(json.dumps(params))  # as the client sends it
    assert fast_start.initialize_result(wire) == fast_start.pygls_result(build_server(), caps)


def test_answering_initialize_imports_only_the_standard_library():
    script = (
        "import io, json, sys\n"
        "import deckward.server.cli\n"  # the console script's module
        "from deckward.server import cmd_serve\n"
        "from deckward.server.lsp.transport import MessageReader\n"
        "body = json.dumps({'jsonrpc': '2.0', 'id': 7, 'method': 'initialize',"
        " 'params': {'processId': None, 'rootUri': None, 'capabilities': {}}}).encode()\n"
        "out = io.BytesIO()\n"
        "first, answered = cmd_serve.answer_first("
        "MessageReader(io.BytesIO(b'Content-Length: %d\\r\\n\\r\\n' % len(body) + body)), out)\n"
        "print(json.dumps({'answer': out.getvalue().decode(), 'modules': sorted(sys.modules)}))\n"
    )
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, check=True)
    report = json.loads(done.stdout)
    header, body = report["answer"].split("\r\n\r\n")
    assert header == f"Content-Length: {len(body)}"
    answer = json.loads(body)
    assert answer["id"] == 7 and answer["result"]["capabilities"]["positionEncoding"] == "utf-16"
    heavy = [m for m in report["modules"] if m.split(".")[0] in ("pygls", "lsprotocol", "cattrs", "attrs", "lark",
                                                                   "yaml", "asyncio", "numpy", "pyscf")
             or m.startswith(("deckward.grammar", "deckward.rules", "deckward.server.checking"))]
    assert heavy == []


async def test_negotiated_encoding_reaches_the_server_state(tmp_path):
    # neovim 0.11 offers utf-8 first: `Ä` is two bytes, so `bais` starts at byte 10 of its line.
    text = "level l {\n  bais = 1 # Ä\n}\nlevel m { Äx = 1 }\n"
    write_workspace(tmp_path, {"e.deck": text})
    async with session(tmp_path, profile="neovim@v0.11.0") as client:
        assert client.server_capabilities.position_encoding == t.PositionEncodingKind.Utf8
        uri = uri_of(tmp_path, "e.deck")
        open_document(client, uri, text)
        report = await client.text_document_diagnostic_async(t.DocumentDiagnosticParams(
            text_document=t.TextDocumentIdentifier(uri=uri)))
        ranges = sorted((d.range.start.line, d.range.start.character, d.range.end.character) for d in report.items)
        assert (1, 2, 6) in ranges  # `bais`, ASCII before it
        assert any(line == 3 and start == 10 for line, start, _ in ranges)  # after `level m { ` (10 bytes)

"""No silent no-ops: a refused formatting and a broken deckward.yaml are
told to the user, the log goes where ``--log-file`` says in one line per
refusal, and rule links resolve."""
from __future__ import annotations

import asyncio
import time
from urllib.parse import urlsplit
from urllib.request import url2pathname

import pytest
from lsprotocol import types as t

from lsp_support import TIMEOUT_S, open_document, session, uri_of, wait_for_diagnostics, write_workspace

CN = "geometry cn {\n  C  0.0  0.0  0.0\n  N  0.0  0.0  1.1718\n}\n"
LEVEL = "level dz { method = hf  basis = cc-pvdz  reference = unrestricted }\n"
STATE = "state radical { geometry = cn  level = dz  charge = 0  multiplicity = 2 }\n"


async def wait_for(predicate, what: str):
    deadline = time.monotonic() + TIMEOUT_S
    while time.monotonic() < deadline:
        found = predicate()
        if found:
            return found
        await asyncio.sleep(0.01)
    raise AssertionError(f"no {what}")


async def test_refused_formatting_says_why(tmp_path):
    text = CN + "level dz {\n  method = = hf\n}\n"
    write_workspace(tmp_path, {"broken.deck": text})
    async with session(tmp_path) as client:
        uri = uri_of(tmp_path, "broken.deck")
        open_document(client, uri, text)
        diags = await wait_for_diagnostics(client, uri, 1)
        (syntax,) = [d for d in diags if d.code == "syntax-error"]
        edits = await client.text_document_formatting_async(t.DocumentFormattingParams(
            text_document=t.TextDocumentIdentifier(uri=uri),
            options=t.FormattingOptions(tab_size=2, insert_spaces=True)))
        assert list(edits) == []
        (message,) = await wait_for(lambda: client.messages, "window/showMessage")
        assert message.type == t.MessageType.Warning
        assert message.message == f"deckward: not formatted: 1 syntax error; line 6: {syntax.message}"


async def test_broken_configuration_is_shown_and_diagnosed_on_the_file(tmp_path):
    config = "rules:\n  restricted-open-shel: info\n"
    write_workspace(tmp_path, {"cn.deck": CN + LEVEL + STATE, "deckward.yaml": config})
    async with session(tmp_path) as client:
        uri = uri_of(tmp_path, "cn.deck")
        config_uri = uri_of(tmp_path, "deckward.yaml")
        open_document(client, uri, CN + LEVEL + STATE)
        await wait_for_diagnostics(client, uri, 1)
        (published,) = await wait_for(lambda: [p for p in client.published if p.uri == config_uri],
                                      "diagnostics on deckward.yaml")
        (d,) = published.diagnostics
        expected = "unknown rule `restricted-open-shel`; did you mean `restricted-open-shell`?"
        assert (d.code, d.message) == ("invalid-config", expected)
        assert (d.range.start.line, d.range.start.character, d.range.end.line, d.range.end.character) == (1, 2, 1, 22)
        (message,) = await wait_for(lambda: client.messages, "window/showMessage")
        assert message.type == t.MessageType.Warning
        assert message.message == (f"deckward: {tmp_path / 'deckward.yaml'} has 1 problem and the settings it could "
                                   f"not read are not applied; line 2: {expected}")
        # pulled, with the file open in the editor
        open_document(client, config_uri, config)
        report = await client.text_document_diagnostic_async(t.DocumentDiagnosticParams(
            text_document=t.TextDocumentIdentifier(uri=config_uri)))
        assert [(x.code, x.message) for x in report.items] == [("invalid-config", expected)]
        # mended: the file's diagnostics clear, and nothing more is shown
        (tmp_path / "deckward.yaml").write_text("rules:\n  restricted-open-shell: info\n", encoding="utf-8")
        mark = len(client.published)
        client.workspace_did_change_watched_files(t.DidChangeWatchedFilesParams(changes=[
            t.FileEvent(uri=config_uri, type=t.FileChangeType.Changed)]))
        await wait_for(lambda: [p for p in client.published[mark:] if p.uri == config_uri and not p.diagnostics],
                       "cleared diagnostics on deckward.yaml")
        assert len(client.messages) == 1


async def test_log_file_and_one_line_refusals(tmp_path):
    write_workspace(tmp_path, {"cn.deck": CN + LEVEL + STATE})
    log = tmp_path / "server.log"
    async with session(tmp_path, "--log-file", str(log), "--log-level", "info") as client:
        uri = uri_of(tmp_path, "cn.deck")
        open_document(client, uri, CN + LEVEL + STATE)
        await wait_for_diagnostics(client, uri, 1)
        with pytest.raises(Exception, match="already the name of a level"):
            await client.text_document_rename_async(t.RenameParams(
                text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=5, character=28),
                new_name="dz"))
    lines = log.read_text(encoding="utf-8").splitlines()
    refused = [line for line in lines if "request refused" in line]
    assert len(refused) == 1
    assert refused[0].endswith("request refused: `dz` is already the name of a level (cn.deck line 5)")
    assert " WARNING " in refused[0]
    assert not any("Traceback" in line for line in lines)
    assert any(" INFO " in line for line in lines)  # the level asked for


@pytest.mark.parametrize("args, message", [
    (["--log-level", "loud"], "--log-level takes one of debug | info | warning | error, not `loud`"),
    (["--log-file", "/nonexistent-folder/x.log"], "cannot write the log file /nonexistent-folder/x.log: "
                                                  "No such file or directory"),
])
def test_serve_option_errors(args, message, capsys):
    from deckward.server.cli import main

    assert main(["serve", *args]) == 2
    assert message in capsys.readouterr().err


async def test_rule_links_resolve_to_the_rule_docs(tmp_path):
    text = CN + LEVEL.replace("unrestricted", "restricted") + STATE
    write_workspace(tmp_path, {"cn.deck": text})
    async with session(tmp_path) as client:
        uri = uri_of(tmp_path, "cn.deck")
        open_document(client, uri, text)
        (d,) = await wait_for_diagnostics(client, uri, 1)
    href = urlsplit(d.code_description.href)
    assert href.scheme == "file" and href.fragment == "restricted-open-shell"
    with open(url2pathname(href.path), encoding="utf-8") as f:
        docs = f.read()
    assert "\n### restricted-open-shell\n" in docs

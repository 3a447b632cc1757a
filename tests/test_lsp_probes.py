"""The PySCF probes from the editor: a source action bound to a command that
reports progress and then publishes the probe findings with the rest."""
from __future__ import annotations

import ast
import asyncio
import time

import pytest
from lsprotocol import types as t
from pytest_lsp import LanguageClient

from lsp_support import (client_fixture, open_document, uri_of, wait_for_diagnostics)

pytestmark = [pytest.mark.asyncio(loop_scope="module"), pytest.mark.pyscf]  # computes with PySCF

# EA of the carbon atom at HF: negative with 6-31G*, positive with 6-31+G*
# (NIST CCCBDB, check-values section 7: -0.527 / 0.453 eV with aug-cc-pVTZ),
# so probe-basis-sensitivity reports that the basis decides the sign.
C_DECK = ("geometry c { C 0 0 0 }\nlevel lv { method = hf basis = 6-31g* }\n"
          "state neutral { geometry = c level = lv charge = 0 multiplicity = 3 }\n"
          "state anion { geometry = c level = lv charge = -1 multiplicity = 4 }\n"
          "derive ea = energy(neutral) - energy(anion) in ev\n")


client = client_fixture("lsp-probes", keep=("restricted-open-shell", "probe-basis-sensitivity"), profile="neovim@v0.11.0")


async def test_probe_action_runs_with_progress_and_publishes_findings(client: LanguageClient):
    uri = uri_of(client.root, "carbon.deck")
    open_document(client, uri, C_DECK)
    if client.capabilities.text_document.diagnostic is None:
        assert list(await wait_for_diagnostics(client, uri, 1)) == []
    actions = await client.text_document_code_action_async(t.CodeActionParams(
        text_document=t.TextDocumentIdentifier(uri=uri),
        range=t.Range(start=t.Position(line=0, character=0), end=t.Position(line=0, character=0)),
        context=t.CodeActionContext(diagnostics=[], only=[t.CodeActionKind.Source])))
    # The client library reads any code action that carries a command as a bare
    # Command and puts the action's command object, as text, in its `command`
    # field; read the code action's command back from it.
    (raw,) = [a for a in actions if "deckward.runProbes" in str(a.command)]
    assert raw.title == "Run the PySCF probes on this deck (Hartree-Fock; seconds to minutes)"
    inner = ast.literal_eval(raw.command) if isinstance(raw.command, str) else raw.command
    probe = t.Command(title=inner["title"], command=inner["command"], arguments=inner["arguments"])
    assert (probe.command, probe.arguments) == ("deckward.runProbes", [uri])
    # no calculation has run yet: typing never starts one
    mark = len(client.published)
    result = await asyncio.wait_for(client.workspace_execute_command_async(t.ExecuteCommandParams(
        command=probe.command, arguments=probe.arguments)), 120)
    assert result["findings"] == 1
    # progress: begin, a report per probe, end
    (reports,) = client.progress_reports.values()
    assert isinstance(reports[0], t.WorkDoneProgressBegin) and isinstance(reports[-1], t.WorkDoneProgressEnd)
    assert [r.message for r in reports if isinstance(r, t.WorkDoneProgressReport)] == [
        "probe-basis-sensitivity", "probe-unbound-anion", "probe-spin-contamination",
        "probe-koopmans-relaxation", "probe-overlap-conditioning"]
    if client.capabilities.text_document.diagnostic is None:
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline and not [p for p in client.published[mark:] if p.uri == uri]:
            await asyncio.sleep(0.05)
        diags = [p for p in client.published[mark:] if p.uri == uri][-1].diagnostics
    else:
        diags = (await client.text_document_diagnostic_async(t.DocumentDiagnosticParams(
            text_document=t.TextDocumentIdentifier(uri=uri)))).items
    (d,) = diags
    assert d.code == "probe-basis-sensitivity"
    assert (d.range.start.line, d.range.start.character, d.range.end.character) == (4, 7, 9)
    assert d.message.startswith("delta-SCF EA at HF: -0.54 eV with 6-31g*, +0.47 eV with 6-31+g*: "
                                "the basis decides the sign")

"""PySCF probes from the editor: a command with progress, never while typing.

The probes run real Hartree-Fock calculations (seconds to minutes), so the
server offers them as a source action ("Run the PySCF probes on this
deck") bound to the ``deckward.runProbes`` command. The command runs one
probe after another on the server's executor (it has two workers, so
typing diagnostics keep flowing), reports work-done progress, and then publishes the deck's
diagnostics with the probe findings added. The findings are kept for that
exact text: the next edit drops them, and running the command again brings
them back (the calculations are cached on disk).
"""
from __future__ import annotations

import asyncio
import uuid
from typing import TYPE_CHECKING

from lsprotocol import types as t

from deckward.grammar.findings import Finding

from .core import DeckServer

if TYPE_CHECKING:
    from .workspace import Analysis

COMMAND = "deckward.runProbes"
ACTION_KIND = "source.deckward.probes"
ACTION_TITLE = "Run the PySCF probes on this deck (Hartree-Fock; seconds to minutes)"

def _run_one(analysis: "Analysis", probe_id: str) -> list[Finding]:
    from deckward.rules.engine.checker import check_workspace
    from deckward.rules.compute.probes import run_probes

    found = run_probes(analysis.workspace, analysis.config, select={probe_id})
    # severities from deckward.yaml and `# allow:` comments apply to probe findings too
    checked = check_workspace(analysis.workspace, analysis.config, select={probe_id}, extra=found, probed=True)
    return [f for f in checked if f.rule == probe_id and f.suppressed is None and f.span.path == analysis.path]


async def run_probes_command(server: DeckServer, uri: str) -> dict:
    analysis = await server.analysis(uri)
    if analysis is None:
        return {"findings": 0, "message": "the document is not open"}
    from deckward.rules.compute.probes import PROBE_RULES

    token = f"deckward-probes-{uuid.uuid4().hex}"
    progress = True
    try:
        await server.work_done_progress.create_async(token)
    except Exception:  # a client without work-done progress: run without it
        progress = False
    if progress:
        server.work_done_progress.begin(token, t.WorkDoneProgressBegin(
            title="deckward probes", message="Hartree-Fock calculations with PySCF", percentage=0))
    loop = asyncio.get_running_loop()
    findings: list[Finding] = []
    ids = [info.id for info in PROBE_RULES]
    for i, probe_id in enumerate(ids):
        if progress:
            server.work_done_progress.report(token, t.WorkDoneProgressReport(
                message=probe_id, percentage=int(100 * i / len(ids))))
        try:
            findings.extend(await loop.run_in_executor(server.executor, _run_one, analysis, probe_id))
        except Exception as e:  # one failing probe must not stop the others or the server
            server.window_log_message(t.LogMessageParams(
                type=t.MessageType.Warning, message=f"{probe_id} failed: {type(e).__name__}: {e}"))
    server.probe_results[uri] = (analysis.text, findings)
    server.changed()  # a pulled report must not come back "unchanged"
    summary = f"{len(findings)} probe finding{'s' * (len(findings) != 1)}"
    if progress:
        server.work_done_progress.end(token, t.WorkDoneProgressEnd(message=summary))
    if server.is_open(uri):
        server.publisher.schedule(uri, 0.0)
        server.refresh_pull_diagnostics()
    return {"findings": len(findings), "message": summary}


def probe_action(uri: str) -> t.CodeAction:
    return t.CodeAction(title=ACTION_TITLE, kind=ACTION_KIND,
                        command=t.Command(title=ACTION_TITLE, command=COMMAND, arguments=[uri]))


async def run_probes(ls, uri: str):  # pygls reads these annotations: keep them importable
    return await run_probes_command(ls, uri)


COMMANDS = [(COMMAND, run_probes)]
SOURCE_ACTIONS = [(ACTION_KIND, probe_action)]
FEATURES: list = []

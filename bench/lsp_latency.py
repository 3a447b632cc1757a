"""Editor latency: from a change notification to its diagnostics.

Starts ``deckward serve`` over stdio with a real LSP client (pygls), sends
``textDocument/didChange`` and times the arrival of the
``textDocument/publishDiagnostics`` that carries the new version, for a
small deck and a 2,000-line deck.  In the same run it times ``deckward
check`` on the same text (a fresh process, as a user runs it, and the
in-process check alone) and prints the ratios.  The server waits
``DEBOUNCE_S`` after the last change before checking; that wait is part of
what an editor sees and is included.

It also times the start: from launching ``deckward serve`` to the answer
to ``initialize``, against launching a bare ``python -c pass`` (goal: at
most 8x), with the early answer (``server/lsp/fast_start.py``) and without
it (``DECKWARD_LSP_SLOW_START=1``, pygls answering after every import).

    python bench/lsp_latency.py [--repeat N]
"""
from __future__ import annotations

import argparse
import asyncio
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time

from lsprotocol import types as t
from pygls.lsp.client import LanguageClient
from pygls.uris import from_fs_path

from deckward.server.checking import check_paths
from deckward.server.lsp.core import DEBOUNCE_S

SMALL = """\
# Vertical electron affinity of NO2 (demo deck, invented geometry)
study "acceptor-no2" { goal = electron_affinity  kind = vertical }
geometry no2 {
  N  0.000000   0.000000  0.000000
  O  0.000000   1.098900  0.465300
  O  0.000000  -1.098900  0.465300
}
level cc_tz { method = ccsd(t)  basis = aug-cc-pvtz  reference = unrestricted }
state neutral { geometry = no2  level = cc_tz  charge = 0  multiplicity = 2 }
state anion { geometry = no2  level = cc_tz  charge = -1  multiplicity = 1 }
derive ea = energy(neutral) - energy(anion) in ev
"""


def large_deck(lines: int = 2000) -> str:
    """A screening deck of many small fragments, about ``lines`` lines."""
    parts = ['study "acceptor-screen" { goal = electron_affinity  kind = vertical }\n',
             "level hf_dz { method = hf  basis = aug-cc-pvdz  reference = unrestricted }\n"]
    i = 0
    while sum(p.count("\n") for p in parts) < lines - 9:
        parts.append(
            f"geometry frag{i} {{\n  C  0.0  0.0  0.0\n  N  0.0  0.0  {1.17 + i * 1e-4:.4f}\n}}\n"
            f"state n{i} {{ geometry = frag{i}  level = hf_dz  charge = 0  multiplicity = 2 }}\n"
            f"state a{i} {{ geometry = frag{i}  level = hf_dz  charge = -1  multiplicity = 1 }}\n"
            f"derive ea{i} = energy(n{i}) - energy(a{i}) in ev\n")
        i += 1
    return "".join(parts)


async def lsp_latencies(path: str, text: str, repeat: int) -> list[float]:
    client = LanguageClient("deckward-bench", "1")
    arrived: dict[int, float] = {}

    @client.feature(t.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
    def on_diagnostics(params: t.PublishDiagnosticsParams):
        if params.version is not None:
            arrived.setdefault(params.version, time.perf_counter())

    await client.start_io(sys.executable, "-m", "deckward", "serve")
    uri = from_fs_path(path)
    await client.initialize_async(t.InitializeParams(capabilities=t.ClientCapabilities(),
                                                     root_uri=from_fs_path(os.path.dirname(path))))
    client.initialized(t.InitializedParams())
    client.text_document_did_open(t.DidOpenTextDocumentParams(
        text_document=t.TextDocumentItem(uri=uri, language_id="deck", version=1, text=text)))
    await _wait(arrived, 1)
    out = []
    for k in range(repeat):
        version = k + 2
        new_text = text + f"# edit {k}\n"
        sent = time.perf_counter()
        client.text_document_did_change(t.DidChangeTextDocumentParams(
            text_document=t.VersionedTextDocumentIdentifier(uri=uri, version=version),
            content_changes=[t.TextDocumentContentChangeWholeDocument(text=new_text)]))
        await _wait(arrived, version)
        out.append(arrived[version] - sent)
    await client.shutdown_async(None)
    client.exit(None)
    await client.stop()
    return out


async def _wait(arrived: dict, version: int, timeout: float = 60.0) -> None:
    deadline = time.perf_counter() + timeout
    while version not in arrived:
        if time.perf_counter() > deadline:
            raise TimeoutError(f"no diagnostics for version {version}")
        await asyncio.sleep(0.001)


def bare_python_time(repeat: int) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-c", "pass"])
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def initialize_time(repeat: int, slow: bool = False) -> float:
    """Launch of ``deckward serve`` to the arrival of the initialize answer."""
    body = json.dumps({"jsonrpc": "2.0", "id": 1, "method": "initialize",
                       "params": {"processId": None, "rootUri": None, "capabilities": {}}}).encode()
    env = dict(os.environ, DECKWARD_LSP_SLOW_START="1") if slow else None
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        proc = subprocess.Popen([sys.executable, "-m", "deckward", "serve"], stdin=subprocess.PIPE,
                                stdout=subprocess.PIPE, env=env)
        proc.stdin.write(b"Content-Length: %d\r\n\r\n" % len(body) + body)
        proc.stdin.flush()
        length = int(proc.stdout.readline().split(b":")[1])
        while proc.stdout.readline().strip():
            pass
        answer = json.loads(proc.stdout.read(length))
        times.append(time.perf_counter() - start)
        assert answer["id"] == 1 and "capabilities" in answer["result"], answer
        proc.kill()
        proc.wait()
    return statistics.median(times)


def cli_time(path: str, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "deckward", "check", "--no-cache", path], capture_output=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def in_process_time(path: str, repeat: int) -> float:
    check_paths([path])  # warm: parser tables and data loaded once, as in the server
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        check_paths([path])
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=10)
    args = ap.parse_args()
    with tempfile.TemporaryDirectory(prefix="deckward-bench-") as folder:
        return measure(folder, args.repeat)


def measure(folder: str, repeat: int) -> int:
    bare = bare_python_time(max(5, repeat))
    fast = initialize_time(max(5, repeat))
    slow = initialize_time(max(3, repeat // 2), slow=True)
    print(f"python -c pass: {bare * 1000:.0f} ms; initialize answered after {fast * 1000:.0f} ms "
          f"= {fast / bare:.2f}x (goal <= 8x); without the early answer {slow * 1000:.0f} ms = {slow / bare:.2f}x")
    print(f"debounce in the server: {DEBOUNCE_S * 1000:.0f} ms (included in the LSP latency)")
    print(f"{'deck':<18}{'lines':>6}{'LSP change->diag':>18}{'check (process)':>17}{'check (in-proc)':>17}"
          f"{'LSP/process':>13}{'LSP/in-proc':>13}")
    for name, text in (("small", SMALL), ("2000 lines", large_deck(2000))):
        path = os.path.join(folder, name.replace(" ", "_") + ".deck")
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
        lsp = statistics.median(asyncio.run(lsp_latencies(path, text, repeat)))
        proc = cli_time(path, max(3, repeat // 2))
        inproc = in_process_time(path, repeat)
        print(f"{name:<18}{text.count(chr(10)):>6}{lsp * 1000:>15.1f} ms{proc * 1000:>14.1f} ms"
              f"{inproc * 1000:>14.1f} ms{lsp / proc:>13.2f}{lsp / inproc:>13.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())

"""Hover through a real client, rendered by a CommonMark parser
(markdown-it-py): the facts come first, each finding is one linked line,
and basis words and messages render exactly as written."""
from __future__ import annotations

from html.parser import HTMLParser

import pytest
import pytest_lsp
from lsprotocol import types as t
from markdown_it import MarkdownIt
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

from deckward.server.lsp.markdown import code, escape
from deckward.server.rule_docs import rule_url
from lsp_support import (SERVER_COMMAND, open_document, record_diagnostics, uri_of, wait_for_diagnostics,
                         write_workspace)

pytestmark = pytest.mark.asyncio(loop_scope="module")

# Demo deck of the screening scenario (CN and CN-; geometry invented for the demo).
DECK = (
    'study "cn acceptor" { goal = electron_affinity }\n'                                  # 0
    "geometry cn {\n  C  0.0  0.0  0.0\n  N  0.0  0.0  1.1718\n}\n"                       # 1-4
    "level hf_pz { method = hf  basis = 6-31g*  reference = unrestricted }\n"             # 5
    "state neutral { geometry = cn  level = hf_pz  charge = 0  multiplicity = 2 }\n"      # 6
    "state anion { geometry = cn  level = hf_pz  charge = -1  multiplicity = 1 }\n"       # 7
    "derive ea = energy(neutral) - energy(anion) in ev\n"                                 # 8
)


class _Html(HTMLParser):
    """Elements of rendered HTML: (tag, text content, attributes) of each
    table cell, list item, code span and link."""

    KEEP = {"td", "th", "li", "code", "a", "em", "strong", "h1", "h2", "p"}

    def __init__(self):
        super().__init__()
        self.open: list[tuple[str, list[str], dict]] = []
        self.elements: list[tuple[str, str, dict]] = []

    def handle_starttag(self, tag, attrs):
        if tag in self.KEEP:
            self.open.append((tag, [], dict(attrs)))

    def handle_endtag(self, tag):
        if tag in self.KEEP:
            for i in range(len(self.open) - 1, -1, -1):
                if self.open[i][0] == tag:
                    name, parts, attrs = self.open.pop(i)
                    self.elements.append((name, "".join(parts), attrs))
                    break

    def handle_data(self, data):
        for _, parts, _ in self.open:
            parts.append(data)


def render(markdown: str) -> list[tuple[str, str, dict]]:
    md = MarkdownIt("commonmark").enable("table")
    # markdown-it refuses file: links by its own safety policy (not CommonMark's); editors open them.
    md.validateLink = lambda url: True
    parser = _Html()
    parser.feed(md.render(markdown))
    return parser.elements


def of(elements, tag):
    return [text for name, text, _ in elements if name == tag]


@pytest_lsp.fixture(config=ClientServerConfig(server_command=SERVER_COMMAND), scope="module")
async def client(lsp_client: LanguageClient, tmp_path_factory):
    root = tmp_path_factory.mktemp("lsp-hover")
    write_workspace(root, {"cn.deck": DECK}, keep=("anion-lacks-diffuse",))
    lsp_client.root = root
    record_diagnostics(lsp_client)
    await lsp_client.initialize_session(t.InitializeParams(
        capabilities=client_capabilities("neovim@v0.7.0"), root_uri=uri_of(root, "")))
    uri = uri_of(root, "cn.deck")
    open_document(lsp_client, uri, DECK)
    lsp_client.deck_diagnostics = await wait_for_diagnostics(lsp_client, uri, 1)
    yield
    await lsp_client.shutdown_session()


async def hover(client, line: int, character: int) -> str:
    result = await client.text_document_hover_async(t.HoverParams(
        text_document=t.TextDocumentIdentifier(uri=uri_of(client.root, "cn.deck")),
        position=t.Position(line=line, character=character)))
    assert result.contents.kind == t.MarkupKind.Markdown
    return result.contents.value


async def test_basis_hover_shows_the_table_first_then_one_line_per_finding(client: LanguageClient):
    (finding,) = [d for d in client.deck_diagnostics if d.code == "anion-lacks-diffuse"]
    assert (finding.range.start.line, finding.range.start.character, finding.range.end.character) == (5, 35, 41)
    text = await hover(client, 5, 38)
    facts, findings = text.split("\n\n---\n\n")
    assert facts.startswith("`6-31g*`: double zeta, family pople\n\n| element | functions |")
    assert findings == (f"- **anion-lacks-diffuse** (error): {escape(finding.message)} "
                        f"([documentation]({rule_url('anion-lacks-diffuse')}))")
    html = render(text)
    assert of(html, "code")[0] == "6-31g*"
    # 6-31G*: 3s2p1d on C and N; most diffuse sp exponents C 0.1687144782, N 0.2120314975
    # (Hariharan, Pople, Theor. Chim. Acta 28, 213 (1973), as the Basis Set Exchange package gives them).
    cells = of(html, "td")
    assert cells[:4] == ["C", "3s2p1d", "0.1687", "0.1687"]
    assert cells[5:9] == ["N", "3s2p1d", "0.212", "0.212"]
    assert cells[4].startswith("no (threshold") and cells[9].startswith("no (threshold")
    # the message renders exactly as the diagnostic says it: `*` is not emphasis
    (item,) = of(html, "li")
    assert item == f"anion-lacks-diffuse (error): {finding.message.replace('`', '')} (documentation)"
    assert of(html, "em") == [] and of(html, "strong") == ["anion-lacks-diffuse"]
    (anchor,) = [attrs for name, _, attrs in html if name == "a"]
    assert anchor["href"] == rule_url("anion-lacks-diffuse")


async def test_state_hover_lists_electrons_and_level(client: LanguageClient):
    text = await hover(client, 7, 8)  # `anion`
    assert text == ("**state** `anion`\n\n- electrons: 14 (even)\n- charge: -1\n- multiplicity: 1\n"
                    "- reference: unrestricted\n- level: `hf_pz`\n- method: `hf`\n- basis: `6-31g*`\n"
                    "- geometry: `cn`")
    # CN- has 6 + 7 + 1 = 14 electrons.
    assert of(render(text), "li")[:1] == ["electrons: 14 (even)"]


async def test_level_hover(client: LanguageClient):
    text = await hover(client, 5, 8)
    assert text == "**level** `hf_pz`: method `hf`, basis `6-31g*`, reference unrestricted"


async def test_escaping_follows_commonmark():
    nasty = "state `a_b` uses 6-31+G* and **bold** <b>x</b> | [link](y) #1 _u_ \\ & `x``y`"
    (p,) = of(render(escape(nasty)), "p")
    assert p == nasty.replace("`a_b`", "a_b").replace("`x``y`", "x``y")
    assert of(render(code("a``b")), "code") == ["a``b"]
    assert of(render(code("`x")), "code") == ["`x"]

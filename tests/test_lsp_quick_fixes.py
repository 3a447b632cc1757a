"""Quick fixes for every "did you mean" and for a missing `}`, through a real
client: exact titles, preference and edits."""
from __future__ import annotations

import pytest
from lsprotocol import types as t
from pytest_lsp import LanguageClient

from lsp_support import apply_text_edits, client_fixture, open_document, uri_of, wait_for_diagnostics

pytestmark = pytest.mark.asyncio(loop_scope="module")

# Demo deck of the screening scenario (CN radical; geometry invented for the demo).
CN = "geometry cn {\n  C  0.0  0.0  0.0\n  N  0.0  0.0  1.1718\n}\n"
LEVEL = "level hf_adz { method = hf  basis = aug-cc-pvdz  reference = unrestricted }\n"


client = client_fixture("lsp-quick-fixes", keep=("unknown-method", "unknown-basis"))


async def fixes_for(client, text: str, code: str):
    """(diagnostic range, [(title, preferred, fixed text)]) of the one ``code`` diagnostic."""
    client.opened += 1
    uri = uri_of(client.root, f"q{client.opened}.deck")
    open_document(client, uri, text)
    diags = await wait_for_diagnostics(client, uri, 1)
    (d,) = [d for d in diags if d.code == code]
    actions = await client.text_document_code_action_async(t.CodeActionParams(
        text_document=t.TextDocumentIdentifier(uri=uri), range=d.range,
        context=t.CodeActionContext(diagnostics=[d], only=[t.CodeActionKind.QuickFix])))
    r = d.range
    return ((r.start.line, r.start.character, r.end.line, r.end.character),
            [(a.title, a.is_preferred, apply_text_edits(text, a.edit.changes[uri])) for a in actions])


async def test_unknown_key(client: LanguageClient):
    text = CN + LEVEL + "state radical { geometry = cn  level = hf_adz  charge = 0  multiplicty = 2 }\n"
    where, fixes = await fixes_for(client, text, "unknown-key")
    assert where == (5, 59, 5, 70)
    assert fixes == [("Use `multiplicity`", True, text.replace("multiplicty", "multiplicity"))]


async def test_invalid_value(client: LanguageClient):
    text = CN + LEVEL.replace("unrestricted", "unrestirkted")
    where, fixes = await fixes_for(client, text, "invalid-value")
    assert where == (4, 61, 4, 73)
    assert fixes == [("Use `unrestricted`", True, CN + LEVEL)]


async def test_name_typo_is_safe_and_preferred(client: LanguageClient):
    text = CN + LEVEL + "state radical { geometry = cn  level = hf_az  charge = 0  multiplicity = 2 }\n"
    where, fixes = await fixes_for(client, text, "undefined-name")
    assert where == (5, 39, 5, 44)
    assert fixes == [("Use the level `hf_adz`", True, text.replace("hf_az ", "hf_adz "))]


async def test_basis_typo_ranks_the_transposition_first(client: LanguageClient):
    text = CN + LEVEL.replace("aug-cc-pvdz", "aug-cc-pdvz")
    where, fixes = await fixes_for(client, text, "unknown-basis")
    assert where == (4, 36, 4, 47)
    assert [title for title, _, _ in fixes] == [
        "Use `aug-cc-pvdz` (risky: changes what is computed)",
        "Use `aug-cc-pv5z` (risky: changes what is computed)",
        "Use `aug-cc-pV6Z` (risky: changes what is computed)",
    ]
    assert fixes[0][2] == CN + LEVEL


async def test_method_typo(client: LanguageClient):
    text = CN + LEVEL.replace("method = hf", "method = b3lpy")
    where, fixes = await fixes_for(client, text, "unknown-method")
    assert where == (4, 24, 4, 29)
    assert fixes[0] == ("Use `b3lyp` (risky: changes what is computed)", None, CN + LEVEL.replace("= hf", "= b3lyp"))


async def test_missing_closing_brace(client: LanguageClient):
    text = CN + "level hf_adz {\n  method = hf\n  basis = aug-cc-pvdz\n\nstate radical { geometry = cn }\n"
    where, fixes = await fixes_for(client, text, "syntax-error")
    assert where == (4, 13, 4, 14)
    assert fixes == [("Close the block with `}`", True, text.replace("pvdz\n\n", "pvdz\n}\n\n"))]

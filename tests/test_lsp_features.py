"""End to end: the real server over stdio, driven by a pytest-lsp client
with Neovim 0.7's capabilities (push diagnostics, UTF-16 positions)."""
from __future__ import annotations

import os

import pytest
from lsprotocol import types as t
from pytest_lsp import LanguageClient

from deckward.grammar.formatter import format_text
from deckward.rules.engine.registry import get as get_rule
from lsp_support import (apply_text_edits, brief, change_document, client_fixture, open_document, uri_of,
                         wait_for_diagnostics, write_workspace)

pytestmark = pytest.mark.asyncio(loop_scope="module")

# Demo deck (our screening scenario; geometry values invented for the demo).
NO2 = """\
# Vertical electron affinity of NO2: first screening pass
study "no2 – acceptor 😀" { goal = electron_afinity }

geometry no2 {
  N  0.000000   0.000000  0.000000
  O  0.000000   1.098900  0.465300
  O  0.000000  -1.098900  0.465300
}

level hf_adz {
  method    = hf
  basis     = aug-cc-pvdz
  reference = restricted
}

state neutral { geometry = no2  level = hf_adz  charge = 0  multiplicity = 2 }
state anion { geometry = no2  level = hf_adzz  charge = -1  multiplicity = 1 }

derive ea = energy(neutral) - energy(anion) in ev
"""

SHARED = """\
geometry cn {
  C  0.0  0.0  0.0
  N  0.0  0.0  1.1718
}
"""

USER_A = """\
use "shared.deck"
level dz { method = hf  basis = cc-pvdz  reference = unrestricted }
state radical { geometry = cn  level = dz  charge = 0  multiplicity = 2 }
"""

USER_B = """\
use "shared.deck"
level tz { method = hf  basis = cc-pvtz  reference = unrestricted }
state anion { geometry = optimize(cn)  level = tz  charge = -1  multiplicity = 1 }
"""


client = client_fixture("lsp-features", files={"no2.deck": NO2, "shared.deck": SHARED, "a.deck": USER_A, "b.deck": USER_B})


async def open_fresh(client, name: str, text: str):
    """Open ``text`` as ``name`` (written to disk too) and return its diagnostics."""
    write_workspace(client.root, {name: text})
    uri = uri_of(client.root, name)
    open_document(client, uri, text)
    return uri, await wait_for_diagnostics(client, uri, 1)


async def test_diagnostics_are_exact_with_utf16_columns(client: LanguageClient):
    uri, diags = await open_fresh(client, "diag.deck", NO2)
    assert brief(diags) == [
        # `electron_afinity` starts at code point 34 of line 1, after "–" (one UTF-16 unit) and
        # "😀" (two UTF-16 units): UTF-16 column 35.
        ("invalid-value", 1, 35, 1, 51,
         "`electron_afinity` is not a value of `goal` (values: ionization_energy | electron_affinity | "
         "fundamental_gap | excitation_energy | energy); did you mean `electron_affinity`?"),
        ("restricted-open-shell", 12, 14, 12, 24,
         "state `neutral` has multiplicity 2 (open shell) but level `hf_adz` sets reference = restricted"),
        ("undefined-name", 16, 38, 16, 45, "no level is named `hf_adzz`; did you mean `hf_adz`?"),
    ]
    ros = next(d for d in diags if d.code == "restricted-open-shell")
    assert ros.severity == t.DiagnosticSeverity.Error
    assert ros.source == "deckward"
    assert ros.code_description.href.endswith(".md#restricted-open-shell")


async def test_related_spans_become_related_information(client: LanguageClient):
    text = "geometry cn {\n  C 0 0 0\n}\ngeometry cn {\n  N 0 0 0\n}\n"
    uri, diags = await open_fresh(client, "dup.deck", text)
    (d,) = diags
    assert d.code == "duplicate-name"
    (rel,) = d.related_information
    assert rel.location.uri == uri
    assert (rel.location.range.start.line, rel.location.range.start.character) == (0, 9)
    assert rel.message == "`cn` is first defined here"


async def test_quick_fix_applies_and_rechecks(client: LanguageClient):
    uri, diags = await open_fresh(client, "fix.deck", NO2)
    ros = next(d for d in diags if d.code == "restricted-open-shell")
    actions = await client.text_document_code_action_async(t.CodeActionParams(
        text_document=t.TextDocumentIdentifier(uri=uri), range=ros.range,
        context=t.CodeActionContext(diagnostics=[ros])))
    quick = [a for a in actions if a.kind == t.CodeActionKind.QuickFix]
    assert [(a.title, a.is_preferred) for a in quick] == [
        ("Use an unrestricted reference", True), ("Use a restricted open-shell reference", None)]
    new_text = apply_text_edits(NO2, quick[0].edit.changes[uri])
    assert "  reference = unrestricted\n" in new_text
    change_document(client, uri, new_text, 2)
    after = await wait_for_diagnostics(client, uri, 2)
    assert sorted(d.code for d in after) == ["invalid-value", "undefined-name"]


async def test_apply_all_safe_fixes_source_action(client: LanguageClient):
    text = NO2.replace("level = hf_adzz", "level = hf_adz2") + (
        "level hf_adz2 { method = hf  basis = aug-cc-pvdz  reference = restricted }\n"
        "state cation { geometry = no2  level = hf_adz2  charge = 1  multiplicity = 2 }\n")
    uri, diags = await open_fresh(client, "fixall.deck", text)
    assert [d.code for d in diags].count("restricted-open-shell") == 2
    actions = await client.text_document_code_action_async(t.CodeActionParams(
        text_document=t.TextDocumentIdentifier(uri=uri),
        range=t.Range(start=t.Position(line=0, character=0), end=t.Position(line=0, character=0)),
        context=t.CodeActionContext(diagnostics=[], only=[t.CodeActionKind.SourceFixAll])))
    (action,) = actions
    # the two references, and `electron_afinity` (one letter from `electron_affinity`)
    assert action.title == "Apply all safe fixes in this file (3 fixes)"
    fixed = apply_text_edits(text, action.edit.changes[uri])
    assert fixed.count("reference = unrestricted") == 2 and "= restricted\n" not in fixed
    assert "goal = electron_affinity }" in fixed
    change_document(client, uri, fixed, 2)
    after = await wait_for_diagnostics(client, uri, 2)
    assert "restricted-open-shell" not in [d.code for d in after]


async def hover_at(client, uri, line, character) -> str:
    result = await client.text_document_hover_async(t.HoverParams(
        text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=line, character=character)))
    return result.contents.value if result else ""


async def test_hover_on_finding_basis_state_and_method(client: LanguageClient):
    uri, _ = await open_fresh(client, "hover.deck", NO2)
    on_finding = await hover_at(client, uri, 12, 16)
    assert on_finding.startswith("- **restricted-open-shell** (error): state `neutral` has multiplicity 2")
    assert get_rule("restricted-open-shell").info.why not in on_finding  # behind the link

    on_basis = await hover_at(client, uri, 11, 16)
    # aug-cc-pVDZ: [4s3p2d] on N and O, most diffuse s/p exponents N 0.06124/0.05611, O 0.07896/0.06856
    # (Kendall, Dunning, Harrison, J. Chem. Phys. 96, 6796 (1992), as distributed by the Basis Set Exchange).
    assert "| N | 4s3p2d | 0.06124 | 0.05611 | yes" in on_basis
    assert "| O | 4s3p2d | 0.07896 | 0.06856 | yes" in on_basis

    on_state = await hover_at(client, uri, 18, 22)  # `neutral` inside energy(neutral)
    # NO2 has 7 + 8 + 8 = 23 electrons.
    assert on_state.startswith("**state** `neutral`")
    assert "- electrons: 23 (odd)" in on_state
    assert "- multiplicity: 2" in on_state
    assert "- reference: restricted" in on_state

    on_method = await hover_at(client, uri, 10, 15)
    assert on_method.startswith("`hf`: family hf (Hartree-Fock)")


async def complete_at(client, uri, line, character) -> list[str]:
    result = await client.text_document_completion_async(t.CompletionParams(
        text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=line, character=character)))
    return [i.label for i in result.items]


async def test_completion_in_context(client: LanguageClient):
    text = (
        "geometry hi {\n  H 0 0 0\n  I 0 0 1.61\n}\n"
        "level l1 { method = hf  basis = def2-svp }\n"
        "state s1 { geometry = hi  level = l1  charge = 0  multiplicity = 1 }\n"
        "state s2 {\n  \n}\n"
        "level l2 {\n  basis = \n  method = \n  reference = \n}\n"
        "derive e = energy(s1) - orbital(s1, \n"
    )
    uri, _ = await open_fresh(client, "complete.deck", text)
    keys = await complete_at(client, uri, 7, 2)
    assert keys == ["geometry", "level", "charge", "multiplicity", "frequencies", "method", "basis",
                    "reference", "frozen_core"]
    basis = await complete_at(client, uri, 10, 10)
    # def2-SVP is defined through iodine (Weigend, Ahlrichs 2005); 6-31G is not (it stops at Zn).
    assert "def2-svp" in basis and "6-31g" not in basis
    methods = await complete_at(client, uri, 11, 11)
    assert {"hf", "ccsd(t)", "b3lyp"} <= set(methods)
    assert await complete_at(client, uri, 12, 14) == ["restricted", "unrestricted", "restricted_open"]
    assert await complete_at(client, uri, 14, 36) == ["homo", "lumo", "homo-1", "lumo+1"]
    states = await complete_at(client, uri, 14, 18)
    assert states == ["s1", "s2"]
    # after `level = ` in state s1; l2 is unfinished (settings without values) but defined
    assert await complete_at(client, uri, 5, 34) == ["l1", "l2"]
    top = await complete_at(client, uri, 4, 0)  # at the start of a line after a block
    assert top == ["study", "geometry", "basis_set", "level", "state", "derive", "use"]


async def test_document_symbols(client: LanguageClient):
    uri, _ = await open_fresh(client, "symbols.deck", NO2)
    symbols = await client.text_document_document_symbol_async(t.DocumentSymbolParams(
        text_document=t.TextDocumentIdentifier(uri=uri)))
    assert [(s.name, s.kind, s.detail) for s in symbols] == [
        ("no2 – acceptor 😀", t.SymbolKind.Module, "study"),
        ("no2", t.SymbolKind.Struct, "3 atoms"),
        ("hf_adz", t.SymbolKind.Class, "hf/aug-cc-pvdz"),
        ("neutral", t.SymbolKind.Object, "charge 0, multiplicity 2"),
        ("anion", t.SymbolKind.Object, "charge -1, multiplicity 1"),
        ("ea", t.SymbolKind.Function, None),
    ]


async def test_definition_across_use_files(client: LanguageClient):
    uri = uri_of(client.root, "a.deck")
    open_document(client, uri, USER_A)
    await wait_for_diagnostics(client, uri, 1)
    loc = await client.text_document_definition_async(t.DefinitionParams(
        text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=2, character=29)))
    assert loc.uri == uri_of(client.root, "shared.deck")
    assert (loc.range.start.line, loc.range.start.character, loc.range.end.character) == (0, 9, 11)


async def test_references_and_rename_across_files(client: LanguageClient):
    uri = uri_of(client.root, "a.deck")
    open_document(client, uri, USER_A)
    refs = await client.text_document_references_async(t.ReferenceParams(
        text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=2, character=29),
        context=t.ReferenceContext(include_declaration=True)))
    where = sorted((os.path.basename(r.uri), r.range.start.line, r.range.start.character) for r in refs)
    assert where == [("a.deck", 2, 27), ("b.deck", 2, 34), ("shared.deck", 0, 9)]
    edit = await client.text_document_rename_async(t.RenameParams(
        text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=2, character=29),
        new_name="cyanide"))
    files = {"a.deck": USER_A, "b.deck": USER_B, "shared.deck": SHARED}
    renamed = {os.path.basename(u): apply_text_edits(files[os.path.basename(u)], e) for u, e in edit.changes.items()}
    assert renamed == {
        "a.deck": USER_A.replace("geometry = cn", "geometry = cyanide"),
        "b.deck": USER_B.replace("optimize(cn)", "optimize(cyanide)"),
        "shared.deck": SHARED.replace("geometry cn", "geometry cyanide"),
    }


async def test_rename_refuses_a_taken_name(client: LanguageClient):
    uri = uri_of(client.root, "a.deck")
    open_document(client, uri, USER_A)
    with pytest.raises(Exception, match="already the name of a level"):
        await client.text_document_rename_async(t.RenameParams(
            text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=2, character=29),
            new_name="dz"))


async def test_formatting(client: LanguageClient):
    text = ("level hf_adz {\n method=hf\n   basis = aug-cc-pvdz   # diffuse\n}\n\n\n\n"
            "geometry no2 {\nN 0 0 0\nO 0 1.0989 0.4653\nO 0 -1.0989 0.4653\n}\n"
            "derive ea = energy(a)-energy(b) in ev\n")
    uri, _ = await open_fresh(client, "format.deck", text)
    edits = await client.text_document_formatting_async(t.DocumentFormattingParams(
        text_document=t.TextDocumentIdentifier(uri=uri), options=t.FormattingOptions(tab_size=2, insert_spaces=True)))
    formatted = apply_text_edits(text, edits)
    assert formatted == (
        "level hf_adz {\n  method = hf\n  basis  = aug-cc-pvdz  # diffuse\n}\n\n"
        "geometry no2 {\n  N  0   0       0\n  O  0   1.0989  0.4653\n  O  0  -1.0989  0.4653\n}\n"
        "derive ea = energy(a) - energy(b) in ev\n")
    assert format_text(formatted) == formatted

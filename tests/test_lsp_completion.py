"""Completion through a real client: every item replaces the whole word
being completed (basis words hold `-`, `+`, `*`, `(`, `)` and `,`), and
comments, strings and coordinate columns get nothing."""
from __future__ import annotations

import pytest
from lsprotocol import types as t
from pytest_lsp import LanguageClient

from lsp_support import apply_text_edits, client_fixture, open_document, uri_of, wait_for_diagnostics

pytestmark = pytest.mark.asyncio(loop_scope="module")

# Demo deck of the screening scenario (CN radical; geometry invented for the demo).
HEAD = (
    "geometry cn {\n"            # 0
    "  C  0.0  0.0  0.0\n"       # 1
    "  N  0.0  0.0  1.1718\n"    # 2
    "}\n"                        # 3
)


client = client_fixture("lsp-completion")


async def complete(client, text: str, line: int, character: int) -> list[t.CompletionItem]:
    client.opened += 1
    uri = uri_of(client.root, f"c{client.opened}.deck")
    open_document(client, uri, text)
    await wait_for_diagnostics(client, uri, 1)
    result = await client.text_document_completion_async(t.CompletionParams(
        text_document=t.TextDocumentIdentifier(uri=uri), position=t.Position(line=line, character=character)))
    return list(result.items) if result else []


def edit_of(items, label: str) -> tuple:
    (item,) = [i for i in items if i.label == label]
    r = item.text_edit.range
    return (r.start.line, r.start.character, r.end.line, r.end.character, item.text_edit.new_text)


def accept(text: str, items, label: str) -> str:
    (item,) = [i for i in items if i.label == label]
    return apply_text_edits(text, [item.text_edit])


async def test_trigger_characters_exclude_space(client: LanguageClient):
    assert list(client.server_capabilities.completion_provider.trigger_characters) == ["=", "(", ",", ":"]


async def test_basis_word_is_replaced_whole(client: LanguageClient):
    text = HEAD + "level l { method = hf  basis = aug-cc-p }\n"
    items = await complete(client, text, 4, 39)  # after `aug-cc-p`
    assert all(i.text_edit is not None and i.insert_text is None for i in items)
    assert edit_of(items, "aug-cc-pvdz") == (4, 31, 4, 39, "aug-cc-pvdz")
    assert accept(text, items, "aug-cc-pvdz") == HEAD + "level l { method = hf  basis = aug-cc-pvdz }\n"


async def test_cursor_inside_a_word_replaces_the_part_after_it_too(client: LanguageClient):
    text = HEAD + "level l { method = hf  basis = aug-cc-pvtz }\n"
    items = await complete(client, text, 4, 37)  # after `aug-cc`, before `-pvtz`
    assert edit_of(items, "aug-cc-pvdz") == (4, 31, 4, 42, "aug-cc-pvdz")


async def test_method_word_with_parenthesis(client: LanguageClient):
    text = HEAD + "level l { method = ccsd(  basis = cc-pvdz }\n"
    items = await complete(client, text, 4, 24)  # after `ccsd(`
    assert edit_of(items, "ccsd(t)") == (4, 19, 4, 24, "ccsd(t)")
    assert accept(text, items, "ccsd(t)") == HEAD + "level l { method = ccsd(t)  basis = cc-pvdz }\n"


async def test_basis_word_with_a_comma_is_quoted(client: LanguageClient):
    # 6-31G(d,p) covers C and N (Hariharan, Pople, Theor. Chim. Acta 28, 213 (1973)).
    text = HEAD + "level l {\n  basis = 6-31g(d\n}\n"
    items = await complete(client, text, 5, 17)
    assert edit_of(items, "6-31g(d,p)") == (5, 10, 5, 17, '"6-31g(d,p)"')
    (item,) = [i for i in items if i.label == "6-31g(d,p)"]
    assert item.filter_text == "6-31g(d,p)"
    assert edit_of(items, "6-31g(d)") == (5, 10, 5, 17, "6-31g(d)")


async def test_quoted_basis_word_includes_the_quotes(client: LanguageClient):
    text = HEAD + 'level l {\n  basis = "6-31g(d,"\n}\n'
    items = await complete(client, text, 5, 19)  # inside the string, before the closing quote
    assert edit_of(items, "6-31g(d,p)") == (5, 10, 5, 20, '"6-31g(d,p)"')
    (item,) = [i for i in items if i.label == "6-31g(d,p)"]
    assert item.filter_text == '"6-31g(d,p)'


async def test_right_after_equals_a_space_is_inserted(client: LanguageClient):
    text = HEAD + "level l {\n  reference =\n}\n"
    items = await complete(client, text, 5, 13)
    assert [i.label for i in items] == ["restricted", "unrestricted", "restricted_open"]
    assert edit_of(items, "unrestricted") == (5, 13, 5, 13, " unrestricted")


async def test_keys_and_statements_replace_the_partial_word(client: LanguageClient):
    text = HEAD + "state s {\n  geometry = cn  lev\n}\nsta\n"
    items = await complete(client, text, 5, 20)
    assert edit_of(items, "level") == (5, 17, 5, 20, "level = ")
    assert "geometry" not in [i.label for i in items]  # written already
    top = await complete(client, text, 7, 3)
    assert edit_of(top, "state") == (7, 0, 7, 3, "state")


async def test_derive_arguments(client: LanguageClient):
    text = (HEAD + "level l { method = hf  basis = cc-pvdz  reference = unrestricted }\n"
            "state neutral { geometry = cn  level = l  charge = 0  multiplicity = 2 }\n"
            "derive ie = orbital(neu, homo-\n")
    items = await complete(client, text, 6, 23)
    assert [i.label for i in items] == ["neutral"]
    assert edit_of(items, "neutral") == (6, 20, 6, 23, "neutral")
    orbitals = await complete(client, text, 6, 30)
    assert edit_of(orbitals, "homo-1") == (6, 25, 6, 30, "homo-1")


async def test_no_completion_in_comments_strings_and_coordinates(client: LanguageClient):
    text = ('study "the anion is " { goal = electron_affinity }\n'
            "# the anion is \n"
            "geometry cn {\n  C  0.0 \n  N  0.0  0.0  1.1718\n}\n")
    assert await complete(client, text, 1, 15) == []  # in a comment
    assert await complete(client, text, 0, 20) == []  # in the study's title
    assert await complete(client, text, 3, 5) == []  # after the element symbol
    assert await complete(client, text, 3, 9) == []  # after a coordinate
    at_line_start = await complete(client, text, 4, 0)
    assert [i.label for i in at_line_start] == ["units"]  # atoms written: no .xyz `file` either
    empty = await complete(client, "geometry cn {\n  \n}\n", 1, 2)
    assert [i.label for i in empty] == ["units", "file"]


async def test_basis_set_add_line(client: LanguageClient):
    text = HEAD + "basis_set extra {\n  from = aug-cc-pvdz\n  add N \n}\n"
    items = await complete(client, text, 6, 8)
    assert [i.label for i in items] == ["s", "p", "d", "f", "g", "h", "i"]
    assert edit_of(items, "p") == (6, 8, 6, 8, "p")

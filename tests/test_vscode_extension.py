"""The VS Code extension (editors/vscode): its TextMate grammar gives every
token of the example decks the scope that deckward's own parser says it has,
and the extension builds as a .vsix.

The grammar runs exactly as in VS Code: npm's vscode-textmate on the
Oniguruma engine (vscode-oniguruma), driven by editors/vscode/test/tokenize.js.
Needs Node and `npm ci` in editors/vscode (CI does both)."""
from __future__ import annotations

import json
import os
import shutil
import subprocess
import zipfile

import pytest

from deckward.grammar.parser import parse_text
from deckward.grammar.scanner import scan
from deckward.grammar.text_index import LineIndex
from test_recovery_replay import DECKS

VSCODE = os.path.join(os.path.dirname(__file__), "..", "editors", "vscode")
NODE = shutil.which("node")
MODULES = os.path.join(VSCODE, "node_modules")

pytestmark = pytest.mark.editor  # drives Node headless

needs_node = pytest.mark.skipif(
    NODE is None or not os.path.isdir(os.path.join(MODULES, "vscode-textmate")),
    reason="node or the extension's npm packages are missing (apt-get install nodejs npm; "
           "npm ci in editors/vscode); CI installs them")

KEYWORD = "keyword.control.statement.deck"
DEFINED = "entity.name.type.deck"
DERIVED = "entity.name.function.deck"
KEY = "variable.other.key.deck"
REFERENCE = "variable.other.reference.deck"
NUMBER = "constant.numeric.deck"
BASIS = "support.constant.basis.deck"
VALUE = "constant.other.value.deck"
STRING = "string.quoted.double.deck"
ELEMENT = "support.type.element.deck"
FUNCTION = "support.function.deck"
UNIT = "constant.other.unit.deck"
COMMENT = "comment.line.number-sign.deck"


def expected_scopes(text: str):
    """(start, end, scope) for the tokens of ``text``, from deckward's parser."""
    parsed = parse_text(text, LineIndex(text))
    broken = {id(c) for c in parsed.broken}
    out = [(s, e, COMMENT) for s, e, _ in scan(text).comments]
    for st in parsed.statements:
        if id(st.chunk) in broken:
            continue
        base = st.chunk.start
        tree = st.tree
        head = tree.children
        out.append((base + head[0].start_pos, base + head[0].end_pos, KEYWORD))
        if tree.data in ("geometry_stmt", "basis_set_stmt", "level_stmt", "state_stmt", "derive_stmt"):
            out.append((base + head[1].start_pos, base + head[1].end_pos,
                        DERIVED if tree.data == "derive_stmt" else DEFINED))
        for node in tree.iter_subtrees():
            out.extend((base + s, base + e, scope) for s, e, scope in _node_scopes(node))
    return out


def _tok(token, scope):
    return [(token.start_pos, token.end_pos, scope)]


def _node_scopes(node):
    kids = node.children
    if node.data == "setting":
        key = str(kids[0]).lower()
        found = _tok(kids[0], KEY)
        value = kids[1]
        if getattr(value, "data", None) == "word_value":
            scope = BASIS if key in ("basis", "from") else REFERENCE if key in ("geometry", "level") else VALUE
            found += _tok(value.children[0], scope)
        elif getattr(value, "data", None) == "number_value":
            found += _tok(value.children[0], NUMBER)
        elif getattr(value, "data", None) == "string_value":
            found += _tok(value.children[0], STRING)
        elif getattr(value, "data", None) == "optimize_value":
            found += _tok(value.children[1], REFERENCE)
        return found
    if node.data == "map_entry":
        return _tok(kids[0], ELEMENT) + (_tok(kids[-1], BASIS) if kids[-1].type == "WORD" else [])
    if node.data == "atom":
        return _tok(kids[0], ELEMENT) + [t for k in kids[1:4] for t in _tok(k, NUMBER)]
    if node.data == "add_shell":
        return _tok(kids[1], ELEMENT) + _tok(kids[3], NUMBER)
    if node.data in ("energy", "orbital"):
        return _tok(kids[0], FUNCTION) + _tok(kids[1], REFERENCE)
    if node.data == "number":
        return _tok(kids[0], NUMBER)
    if node.data == "derive_stmt":
        return [t for k in kids if getattr(k, "type", None) == "UNIT" for t in _tok(k, UNIT)]
    return []


def tokenize(paths):
    proc = subprocess.run([NODE, os.path.join(VSCODE, "test", "tokenize.js"), *paths],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout)


def _scopes_at(tokens, lines_utf16, start, end):
    """The scopes of every TextMate token overlapping [start, end)."""
    found = []
    for line, s, e, scopes in tokens:
        a, b = lines_utf16[line] + s, lines_utf16[line] + e
        if a < end and start < b:
            found.append(scopes)
    return found


def _utf16_line_starts(text):
    starts, offset = [], 0
    for line in text.split("\n"):
        starts.append(offset)
        offset += len(line) + 1
    return starts


@needs_node
def test_the_grammar_scopes_what_the_parser_sees(tmp_path):
    paths = {}
    for name, text in DECKS.items():
        assert text.isascii(), name  # offsets below are code points = UTF-16 units
        path = tmp_path / name.replace("/", "_")
        path.write_text(text, encoding="utf-8")
        paths[str(path)] = text
    tokenized = tokenize(list(paths))
    wrong, counts = [], {}
    for path, text in paths.items():
        starts = _utf16_line_starts(text)
        for start, end, scope in expected_scopes(text):
            counts[scope] = counts.get(scope, 0) + 1
            got = _scopes_at(tokenized[path], starts, start, end)
            if not got or any(scope not in scopes for scopes in got):
                wrong.append((os.path.basename(path), text[start:end], scope, got))
    assert wrong == [], counts
    # Every kind of token is exercised by the examples.
    assert all(counts.get(s, 0) >= 2 for s in (KEYWORD, DEFINED, DERIVED, KEY, REFERENCE, NUMBER, BASIS, VALUE,
                                               STRING, ELEMENT, FUNCTION, UNIT, COMMENT)), counts


@needs_node
def test_keywords_typed_as_keys_are_keys_and_basis_words_stay_whole(tmp_path):
    text = ("state cation { geometry = cn  level = hf  charge = +1 }  # cation, é\n"
            "level hf { method = ccsd(t)  basis = 6-311++g** }\n"
            "basis_set mix {\n  from = { default: cc-pvdz, O: aug-cc-pvdz }\n  add O s 0.0273\n}\n"
            "geometry cn { C 0 0 0  N 0 0 1.1718 }\n"
            "derive ea_eig = -orbital(cation, homo-1) in ev\n")
    path = tmp_path / "keys.deck"
    path.write_text(text, encoding="utf-8")
    tokens = tokenize([str(path)])[str(path)]
    lines = text.split("\n")
    by_text = [(lines[line][s:e], scopes[-1]) for line, s, e, scopes in tokens if lines[line][s:e].strip()]
    assert by_text[:12] == [
        ("state", KEYWORD), ("cation", DEFINED), ("{", "punctuation.section.block.begin.deck"),
        ("geometry", KEY), ("=", "keyword.operator.assignment.deck"), ("cn", REFERENCE),
        ("level", KEY), ("=", "keyword.operator.assignment.deck"), ("hf", REFERENCE),
        ("charge", KEY), ("=", "keyword.operator.assignment.deck"), ("+1", NUMBER),
    ]
    assert ("# cation, é", COMMENT) in by_text
    assert ("ccsd(t)", VALUE) in by_text and ("6-311++g**", BASIS) in by_text
    assert ("cc-pvdz", BASIS) in by_text and ("aug-cc-pvdz", BASIS) in by_text and ("O", ELEMENT) in by_text
    assert ("0.0273", NUMBER) in by_text and ("1.1718", NUMBER) in by_text and ("N", ELEMENT) in by_text
    assert ("orbital", FUNCTION) in by_text and ("homo-1", "constant.language.orbital.deck") in by_text
    assert ("ev", UNIT) in by_text and ("ea_eig", DERIVED) in by_text


def test_the_extension_registers_the_deck_language():
    with open(os.path.join(VSCODE, "package.json"), encoding="utf-8") as f:
        manifest = json.load(f)
    (language,) = manifest["contributes"]["languages"]
    assert (language["id"], language["extensions"]) == ("deck", [".deck"])
    (grammar,) = manifest["contributes"]["grammars"]
    assert (grammar["language"], grammar["scopeName"]) == ("deck", "source.deck")
    for rel in (language["configuration"], grammar["path"], manifest["main"]):
        assert os.path.isfile(os.path.join(VSCODE, rel)), rel
    with open(os.path.join(VSCODE, language["configuration"]), encoding="utf-8") as f:
        config = json.load(f)
    assert config["comments"] == {"lineComment": "#"}
    assert config["brackets"] == [["{", "}"], ["(", ")"]]
    # Every npm dependency is pinned to a range of one minor version, and locked.
    for deps in (manifest["dependencies"], manifest["devDependencies"]):
        assert all(v.startswith("~") for v in deps.values()), deps
    with open(os.path.join(VSCODE, "package-lock.json"), encoding="utf-8") as f:
        lock = json.load(f)
    assert set(lock["packages"][""]["devDependencies"]) == set(manifest["devDependencies"])
    with open(os.path.join(VSCODE, ".gitignore"), encoding="utf-8") as f:
        assert "node_modules/" in f.read().split()


@needs_node
def test_the_extension_builds_as_a_vsix(tmp_path):
    out = tmp_path / "deckward.vsix"
    proc = subprocess.run(
        [NODE, os.path.join(MODULES, "@vscode", "vsce", "vsce"), "package", "--skip-license",
         "--allow-missing-repository", "--out", str(out)],
        cwd=VSCODE, stdin=subprocess.DEVNULL, capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    names = set(zipfile.ZipFile(out).namelist())
    for required in ("extension/package.json", "extension/extension.js", "extension/language-configuration.json",
                     "extension/syntaxes/deck.tmLanguage.json",
                     "extension/node_modules/vscode-languageclient/package.json"):
        assert required in names
    # Only what runs in VS Code: no test scripts, no build-time packages.
    assert not any(n.startswith(("extension/test/", "extension/node_modules/vscode-textmate/",
                                 "extension/node_modules/@vscode/vsce/")) for n in names)


@pytest.mark.skipif(NODE is None, reason="node is not installed (apt-get install nodejs); CI installs it")
def test_the_client_is_valid_javascript_that_starts_deckward_serve():
    proc = subprocess.run([NODE, "--check", os.path.join(VSCODE, "extension.js")], capture_output=True, text=True,
                          timeout=60)
    assert proc.returncode == 0, proc.stderr
    with open(os.path.join(VSCODE, "extension.js"), encoding="utf-8") as f:
        source = f.read()
    assert 'require("vscode-languageclient/node")' in source and '["deckward", "serve"]' in source

"""Geometries read from .xyz files: they check like the same geometry
written inline, problems in the file are located in the file, the path is
confined to the workspace like `use`, and the editor can follow the path."""
from __future__ import annotations

import os

import pytest

from runner_helpers import write_deck

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.engine.config import Config
from deckward.rules.engine.checker import check_workspace

# Mistakes on purpose: two H atoms 0.2 A apart (far under 2 x 0.31 A,
# Cordero 2008 covalent radius of H, check-values section 4), a fragment
# 9 A away, and multiplicity 1 for an odd electron count (1 + 1 + 9 = 11
# electrons from H, H, F).
ATOM_LINES = ["H    0.0  0.0  0.0", "H    0.0  0.0  0.2", "F    9.0  0.0  0.0"]
REST = ("level lv { method = hf basis = aug-cc-pvdz }\n"
        "state n { geometry = g level = lv charge = 0 multiplicity = 1 }\n")
INLINE = "geometry g {\n" + "".join(f"  {a}\n" for a in ATOM_LINES) + "}\n" + REST
FROM_FILE = 'geometry g { file = "g.xyz" }\n' + REST
XYZ = f"{len(ATOM_LINES)}\nthree atoms, badly placed\n" + "\n".join(ATOM_LINES) + "\n"


def _check(folder, text, name="deck.deck"):
    path = write_deck(folder, text, name)
    ws = resolve(path, Loader(), str(folder))
    return check_workspace(ws, Config()), ws


def _covered(f):
    with open(f.span.path, encoding="utf-8") as fh:
        return fh.read()[f.span.start:f.span.end]


def test_xyz_geometry_checks_like_the_inline_geometry(tmp_path):
    inline_dir, file_dir = tmp_path / "inline", tmp_path / "file"
    inline_dir.mkdir()
    file_dir.mkdir()
    write_deck(file_dir, XYZ, "g.xyz")
    inline, _ = _check(inline_dir, INLINE)
    from_file, _ = _check(file_dir, FROM_FILE)
    key = lambda f: (f.rule, f.severity.value, f.message, _covered(f))  # noqa: E731
    assert sorted(map(key, from_file)) == sorted(map(key, inline))
    rules = {f.rule for f in inline}
    assert {"atoms-too-close", "disconnected-fragments", "charge-multiplicity-mismatch"} <= rules
    # Atom findings point into the .xyz file, at the atom's own line.
    close = next(f for f in from_file if f.rule == "atoms-too-close")
    assert os.path.basename(close.span.path) == "g.xyz" and close.span.line in (3, 4)


def test_bad_xyz_gives_findings_located_in_the_file(tmp_path):
    write_deck(tmp_path, "3\ncomment\nO 0 0 0\nH 0 0.75 x\n", "g.xyz")
    found, ws = _check(tmp_path, FROM_FILE)
    xyz = os.path.join(str(tmp_path), "g.xyz")
    syntax = [(f.span.path, f.span.line, f.span.column, f.message) for f in found if f.rule == "syntax-error"]
    assert syntax == [
        (xyz, 1, 1, "the first line announces 3 atoms but the file has 1 atom line"),
        (xyz, 4, 10, "`x` is not a coordinate (a number in angstrom)"),
    ]
    write_deck(tmp_path, "two\n\nO 0 0 0\n", "g.xyz")
    found, _ = _check(tmp_path, FROM_FILE)
    assert [(f.span.line, f.message) for f in found if f.rule == "syntax-error"] == [
        (1, "an .xyz file starts with the number of atoms, not `two`")]
    write_deck(tmp_path, "1\n\nO 0 0 0\n1\n\nO 0 0 1\n", "g.xyz")
    found, _ = _check(tmp_path, FROM_FILE)
    assert [(f.span.line, f.message) for f in found if f.rule == "syntax-error"] == [
        (4, "line 4 follows the 1 atoms the first line announces (only one geometry is read from an .xyz file)")]


def test_xyz_path_is_relative_to_the_deck_and_confined_to_the_workspace(tmp_path):
    root = tmp_path / "ws"
    (root / "decks").mkdir(parents=True)
    write_deck(tmp_path, XYZ, "outside.xyz")
    text = 'geometry g { file = "../../outside.xyz" }\ngeometry h { file = "none.xyz" }\n' + REST
    path = write_deck(root / "decks", text)
    ws = resolve(path, Loader(), str(root))
    found = [(f.rule, f.span.line, f.message) for f in ws.findings]
    assert found == [
        ("use-outside-workspace", 1, "`../../outside.xyz` is outside the workspace root ws/"),
        ("use-outside-workspace", 2, "`none.xyz` does not exist"),
    ]
    span = ws.findings[0].span
    assert text[span.start:span.end] == '"../../outside.xyz"'


def test_file_with_atoms_or_units_is_an_error(tmp_path):
    write_deck(tmp_path, XYZ, "g.xyz")
    found, _ = _check(tmp_path, 'geometry g {\n  file = "g.xyz"\n  units = bohr\n  H 0 0 0\n}\n')
    assert [(f.rule, f.span.line, f.message) for f in found if f.rule == "invalid-value"] == [
        ("invalid-value", 2, "a geometry takes its atoms from `file` or from its own lines, not both"),
        ("invalid-value", 3, "an .xyz file is in angstrom: `units` does not apply to a geometry read from `file`"),
    ]


def test_units_suspect_in_an_xyz_file_points_at_its_first_atom_with_no_fix(tmp_path):
    # Water in bohr (O-H 0.9572 A = 1.8088 bohr; NIST CCCBDB experimental
    # geometry, from memory) written to an .xyz file, which is angstrom.
    write_deck(tmp_path, "3\n\nO 0 0 0.2217\nH 0 1.4309 -0.8867\nH 0 -1.4309 -0.8867\n", "w.xyz")
    found, _ = _check(tmp_path, 'geometry w { file = "w.xyz" }\n')
    (f,) = [f for f in found if f.rule == "units-suspect"]
    assert (os.path.basename(f.span.path), f.span.line, f.fixes) == ("w.xyz", 3, ())
    assert f.message.startswith("geometry `w` with atoms from `w.xyz` (an .xyz file is in angstrom): no atom has")


def test_runner_plan_uses_the_file_atoms(tmp_path):
    from deckward.rules.compute.runner.mapping import plan_state

    text = 'geometry g { file = "g.xyz" }\nlevel lv { method = hf basis = cc-pvdz }\nstate n { geometry = g level = lv }\n'
    write_deck(tmp_path, "2\n\nH 0 0 0\nH 0 0 0.7414\n", "g.xyz")
    path = write_deck(tmp_path, text)
    plan = plan_state(resolve(path, Loader(), str(tmp_path)), "n")
    assert [(a.symbol, a.xyz) for a in plan.atoms] == [("H", (0.0, 0.0, 0.0)), ("H", (0.0, 0.0, 0.7414))]
    assert plan.unit == "angstrom"


def test_editor_goes_to_the_xyz_file_and_completes_its_path(tmp_path):
    from deckward.server.lsp.geometry_files import file_items, file_location

    write_deck(tmp_path, XYZ, "g.xyz")
    (tmp_path / "sub").mkdir()
    write_deck(tmp_path / "sub", XYZ, "h.xyz")
    path = write_deck(tmp_path, FROM_FILE)
    ws = resolve(path, Loader(), str(tmp_path))
    loc = file_location(ws, path, FROM_FILE.index("g.xyz"))
    assert loc.uri.endswith("/g.xyz") and loc.range.start.line == 0
    assert file_location(ws, path, FROM_FILE.index("level")) is None
    assert [i.label for i in file_items(ws)] == ['"g.xyz"', '"sub/h.xyz"']


@pytest.mark.pyscf
def test_run_writes_optimised_geometries_as_xyz(tmp_path, capsys):
    # H2 at HF/STO-3G relaxes to r = 0.712 A (Szabo & Ostlund, table 3.x,
    # from memory); the file holds the runner's optimised coordinates and
    # reads back as a geometry file.
    import json

    from deckward.grammar.xyz import parse_xyz
    from deckward.server.cli import main

    deck = write_deck(tmp_path, "geometry h2 {\n  H 0 0 0\n  H 0 0 0.80\n}\nlevel lv { method = hf basis = sto-3g }\n"
                      "state n { geometry = optimize(h2) level = lv charge = 0 multiplicity = 1 }\n")
    out = tmp_path / "geo"
    out.mkdir()
    rc = main(["run", deck, "--quiet", "--cache-dir", str(tmp_path / "c"), "--json", str(tmp_path / "r.json"),
               "--write-geometries", str(out)])
    assert rc == 0
    assert capsys.readouterr().err.endswith(f"deckward: wrote 1 optimised geometry to {out}\n")
    text = (out / "n.xyz").read_text()
    atoms, findings, _ = parse_xyz(str(out / "n.xyz"), text)
    assert findings == []
    expected = json.loads((tmp_path / "r.json").read_text())["states"][0]["optimized_geometry"]
    assert [(a.symbol.value, *a.xyz) for a in atoms] == [
        (s, round(x, 10), round(y, 10), round(z, 10)) for s, x, y, z, _ in expected]
    r = abs(atoms[1].xyz[2] - atoms[0].xyz[2])
    assert abs(r - 0.712) < 0.002
    assert text.splitlines()[1].startswith("state n optimised at hf/sto-3g, charge 0, multiplicity 1, E = -1.1175")

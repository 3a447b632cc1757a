"""Resolution: names, duplicates, `use` files (relative, confined, cycles)."""
import os

from rule_harness import check_text

GEO = "geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\n"
LEVEL = "level hf_adz { method = hf basis = aug-cc-pvdz reference = unrestricted }\n"


def rows(findings, rules=("undefined-name", "duplicate-name", "use-outside-workspace")):
    return [(os.path.basename(f.span.path), f.rule, f.span.line, f.span.column, f.message)
            for f in findings if f.rule in rules]


def test_undefined_names_with_did_you_mean():
    text = GEO + LEVEL + (
        "state radical { geometry = cm level = hf_adz charge = 0 multiplicity = 2 }\n"   # line 6
        "state anion { geometry = cn level = hf_dz charge = -1 multiplicity = 1 }\n"     # line 7
        "derive ea = energy(radical) - energy(anoin)\n"                                  # line 8
    )
    findings, _ = check_text(text)
    assert rows(findings) == [
        ("deck.deck", "undefined-name", 6, 28, "no geometry is named `cm`; did you mean `cn`?"),
        ("deck.deck", "undefined-name", 7, 37, "no level is named `hf_dz`; did you mean `hf_adz`?"),
        ("deck.deck", "undefined-name", 8, 38, "no state is named `anoin`; did you mean `anion`?"),
    ]


def test_reference_to_wrong_kind_points_at_definition():
    text = GEO + LEVEL + "state s { geometry = hf_adz level = hf_adz charge = 0 multiplicity = 2 }\n"
    findings, _ = check_text(text)
    (f,) = [f for f in findings if f.rule == "undefined-name"]
    assert (f.span.line, f.span.column, f.message) == (6, 22, "`hf_adz` is a level, not a geometry")
    assert [(r.span.line, r.message) for r in f.related] == [(5, "`hf_adz` is defined here")]


def test_duplicate_name_with_related_first_definition():
    text = GEO + "geometry cn {\n  C 0 0 0\n  N 0 0 1.18\n}\n"
    findings, _ = check_text(text)
    assert rows(findings) == [
        ("deck.deck", "duplicate-name", 5, 10, "`cn` is defined twice: as a geometry on line 1 and as a geometry here"),
    ]
    (f,) = [f for f in findings if f.rule == "duplicate-name"]
    assert [(r.span.line, r.span.column) for r in f.related] == [(1, 10)]


def test_use_loads_definitions_relative_to_the_using_file():
    files = {"shared/geo.deck": GEO, "shared/levels.deck": 'use "geo.deck"\n' + LEVEL}
    text = 'use "shared/levels.deck"\nstate s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\n'
    findings, ws = check_text(text, files=files)
    assert rows(findings) == []
    assert [os.path.relpath(f.path, os.path.dirname(ws.path)) for f in ws.files] == [
        "deck.deck", os.path.join("shared", "levels.deck"), os.path.join("shared", "geo.deck")]
    assert ws.states["s"].geometry.name.value == "cn"


def test_use_problems_are_reported_at_the_use_line():
    files = {"a.deck": 'use "deck.deck"\n' + GEO}
    text = 'use "a.deck"\nuse "missing.deck"\nuse "../outside.deck"\nuse "sub"\n'
    os_files = dict(files)
    os_files["sub/x.deck"] = ""
    findings, _ = check_text(text, files=os_files)
    assert rows(findings) == [
        ("a.deck", "use-outside-workspace", 1, 5, "`deck.deck` forms a cycle of use: deck.deck -> a.deck -> deck.deck"),
        ("deck.deck", "use-outside-workspace", 2, 5, "`missing.deck` does not exist"),
        ("deck.deck", "use-outside-workspace", 3, 5, "`../outside.deck` is outside the workspace root "
         + os.path.basename(os.path.dirname(findings[0].span.path)) + "/"),
        ("deck.deck", "use-outside-workspace", 4, 5, "`sub` is a folder, not a deck file"),
    ]


def test_duplicate_across_use_reported_in_the_using_file():
    files = {"geo.deck": GEO}
    text = 'use "geo.deck"\ngeometry cn { C 0 0 0 }\n'
    findings, _ = check_text(text, files=files)
    assert rows(findings) == [
        ("deck.deck", "duplicate-name", 2, 10, "`cn` is defined twice: as a geometry on line 1 of geo.deck and as a "
         "geometry here"),
    ]


def test_findings_in_used_file_are_reported_against_it():
    files = {"geo.deck": "geometry cn { C 0 0 0 N 0 0 }\n"}
    findings, _ = check_text('use "geo.deck"\n', files=files)
    assert [(os.path.basename(f.span.path), f.rule, f.span.line) for f in findings if f.rule == "syntax-error"] == [
        ("geo.deck", "syntax-error", 1)]


def test_references_recorded_for_navigation():
    text = GEO + LEVEL + "state s { geometry = cn level = hf_adz charge = 0 multiplicity = 2 }\nderive e = energy(s)\n"
    _, ws = check_text(text)
    assert [(r.kind, r.name.value, r.name.span.line, r.target.name.span.line) for r in ws.references] == [
        ("geometry", "cn", 6, 1), ("level", "hf_adz", 6, 5), ("state", "s", 7, 6)]


def test_state_without_geometry_method_or_basis():
    text = GEO + "level bare { reference = unrestricted }\n" + (
        "state a { level = bare charge = 0 multiplicity = 2 }\n"      # line 6
        "state b { geometry = cn method = hf charge = 0 multiplicity = 2 }\n"  # line 7
        "state c { geometry = cn method = hf basis = sto-3g charge = 0 multiplicity = 2 }\n"
    )
    findings, _ = check_text(text)
    assert [(f.span.line, f.span.column, f.message) for f in findings if f.rule == "missing-setting"] == [
        (6, 7, "state `a` has no `geometry` and no `method` (level `bare` has none) and no `basis` (level `bare` has none)"),
        (7, 7, "state `b` has no `basis`"),
    ]

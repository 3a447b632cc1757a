"""The canonical layout never changes meaning, keeps comments, and is stable."""
from __future__ import annotations

import dataclasses
import subprocess
import sys

import pytest

from deckward.grammar import model as m
from deckward.grammar.build import build_deck
from deckward.grammar.findings import Span
from deckward.grammar.formatter import format_text

MESSY = """\
# Vertical electron affinity of NO2 (demo deck; coordinates invented for the demo)
study "acceptor-no2" {
  goal = electron_affinity   # what is reported
  kind=vertical
}



geometry no2 {   # the radical
  units = angstrom
  N   0.000000   0.000000   0.000000
  # the second atom
  o 0.0 1.0989 0.4653
  O 0.000000  -1.098900   -.4653 GHOST

}
basis_set extra { from = { default: cc-pvdz, O: "6-311++g(2d,p)" } add O s 0.0273 }
level cc_tz {
  method      = ccsd(t)
  basis = aug-cc-pvtz
  reference   = unrestricted
  frozen_core = true
  # last words of the level
}

state neutral { geometry = no2  level = cc_tz  charge = 0   multiplicity = 2 }
STATE anion   { geometry = optimize( no2 )  level = cc_tz  charge = -1  multiplicity = 1 } # allow: x -- y

derive ea as electron_affinity = energy(neutral)-energy(anion) in ev
derive t = -(energy(neutral) - energy(anion)) * 2 + ((orbital(neutral, homo - 1, alpha)))/3 - (1 - 2)
derive e = ( energy(neutral) )
# end of the deck
"""

EXPECTED = """\
# Vertical electron affinity of NO2 (demo deck; coordinates invented for the demo)
study "acceptor-no2" {
  goal = electron_affinity  # what is reported
  kind = vertical
}

geometry no2 {  # the radical
  units = angstrom
  N  0.000000   0.000000  0.000000
  # the second atom
  o  0.0        1.0989    0.4653
  O  0.000000  -1.098900  -.4653    ghost
}
basis_set extra {
  from = { default: cc-pvdz, O: "6-311++g(2d,p)" }
  add O s 0.0273
}
level cc_tz {
  method      = ccsd(t)
  basis       = aug-cc-pvtz
  reference   = unrestricted
  frozen_core = true
  # last words of the level
}

state neutral { geometry = no2  level = cc_tz  charge = 0  multiplicity = 2 }
state anion { geometry = optimize(no2)  level = cc_tz  charge = -1  multiplicity = 1 }  # allow: x -- y

derive ea as electron_affinity = energy(neutral) - energy(anion) in ev
derive t = -(energy(neutral) - energy(anion)) * 2 + (orbital(neutral, homo-1, alpha)) / 3 - (1 - 2)
derive e = (energy(neutral))
# end of the deck
"""


def shape(node):
    """The model without source positions (what the deck means)."""
    if isinstance(node, Span):
        return None
    if isinstance(node, m.Located):
        return shape(node.value)
    if isinstance(node, m.Comment):
        return node.text.rstrip()
    if dataclasses.is_dataclass(node):
        skip = {"span", "path", "text", "statement_spans", "keyword_span", "body_span", "xyz_spans",
                "last_setting_end", "comments"}
        return {f.name: shape(getattr(node, f.name)) for f in dataclasses.fields(node) if f.name not in skip}
    if isinstance(node, (tuple, list)):
        return [shape(x) for x in node]
    if isinstance(node, frozenset):
        return sorted(node)
    return node


def meaning(text: str):
    deck, findings, _ = build_deck("deck.deck", text)
    assert not [f for f in findings if f.rule == "syntax-error"]
    return shape(deck), [c.text.strip() for c in deck.comments], sorted((f.rule, f.message) for f in findings)


def test_canonical_layout_exactly():
    assert format_text(MESSY) == EXPECTED


@pytest.mark.parametrize("text", [MESSY, EXPECTED, "state a { charge = 0 }\n", "derive x = -(-(1)) - -2 * (3 / (4 - 5))\n"])
def test_formatting_keeps_meaning_and_comments_and_is_idempotent(text):
    once = format_text(text)
    assert meaning(once) == meaning(text)
    assert format_text(once) == once


def test_crlf_files_stay_crlf():
    text = "level l {\r\n method = hf # c\r\n}\r\n"
    assert format_text(text) == "level l {\r\n  method = hf  # c\r\n}\r\n"


def test_refuses_text_with_syntax_errors():
    assert format_text("geometry no2 {\n  N 0 0 0\n") is None
    assert format_text("level l { method = }\n") is None


def test_command_line_check_and_write(tmp_path):
    good = tmp_path / "good.deck"
    good.write_text(EXPECTED, encoding="utf-8")
    messy = tmp_path / "messy.deck"
    messy.write_text(MESSY, encoding="utf-8")
    broken = tmp_path / "broken.deck"
    broken.write_text("level l { method = }\n", encoding="utf-8")
    run = lambda *a: subprocess.run([sys.executable, "-m", "deckward", "format", *a],  # noqa: E731
                                    capture_output=True, text=True)
    check = run("--check", str(good), str(messy))
    assert (check.returncode, check.stdout) == (
        1, f"{messy}: not in the canonical layout\n1 file to lay out, 1 already canonical\n")
    assert messy.read_text(encoding="utf-8") == MESSY
    write = run(str(messy))
    assert write.returncode == 0 and messy.read_text(encoding="utf-8") == EXPECTED
    assert write.stdout == f"{messy}: laid out anew\n1 file laid out anew, 0 already canonical\n"
    refused = run(str(broken))
    assert refused.returncode == 1
    assert refused.stdout == "0 files laid out anew, 0 already canonical, 1 left as they were (see above)\n"
    assert refused.stderr.startswith(f"{broken}:1:")
    assert broken.read_text(encoding="utf-8") == "level l { method = }\n"


def test_neighbouring_one_line_blocks_are_aligned_in_columns():
    text = ("state neutral { geometry = no2 level = cc_tz charge = 0 multiplicity = 2 }\n"
            "state anion { geometry = no2 level = cc_tz charge = -1 multiplicity = 1 reference = restricted }\n"
            "\n"
            "state lone { level = cc_tz geometry = no2 }\n")
    assert format_text(text) == (
        "state neutral { geometry = no2  level = cc_tz  charge = 0   multiplicity = 2 }\n"
        "state anion   { geometry = no2  level = cc_tz  charge = -1  multiplicity = 1  reference = restricted }\n"
        "\n"
        "state lone { level = cc_tz  geometry = no2 }\n")
    assert format_text(format_text(text)) == format_text(text)


def test_bundled_examples_are_in_the_canonical_layout():
    import os

    folder = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "examples")
    for dirpath, _, files in os.walk(folder):
        for name in files:
            if not name.endswith(".deck") or name == "no2_typos.deck":  # that one has syntax errors on purpose
                continue
            with open(os.path.join(dirpath, name), encoding="utf-8") as f:
                text = f.read()
            assert format_text(text) == text, name

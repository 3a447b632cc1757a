"""Any text whatsoever gives findings and never a traceback, and every
finding's span lies inside its file."""
import os
import random

import pytest

import pytest

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from deckward.grammar.resolve import Loader, resolve
from deckward.rules.engine.checker import check_workspace

VALID = '''study "acceptor-no2" { goal = electron_affinity kind = vertical }
geometry no2 {
  units = angstrom
  N   0.000000   0.000000   0.000000
  O   0.000000   1.098900   0.465300
  O   0.000000  -1.098900   0.465300
}
basis_set acc { from = { default: cc-pvdz, O: aug-cc-pvdz } add O s 0.0273 }
level cc_tz { method = ccsd(t) basis = aug-cc-pvtz reference = unrestricted frozen_core = true }
state neutral { geometry = no2  level = cc_tz  charge = 0   multiplicity = 2 }
state anion   { geometry = optimize(no2)  level = cc_tz  charge = -1  multiplicity = 1 basis = acc }
derive ea as electron_affinity = energy(neutral) - energy(anion) in ev  # allow: level-mismatch -- demo
derive ea_eig = -orbital(neutral, lumo+1, beta) * 2 / (1 + 1) in kcal/mol
'''

FOLDER = ""  # set per module by the fixture below, inside pytest's own temporary folder


@pytest.fixture(autouse=True, scope="module")
def _module_folder(tmp_path_factory):
    global FOLDER
    FOLDER = str(tmp_path_factory.mktemp("fuzz"))


def check_bytes(data: bytes, name="fuzz.deck"):
    path = os.path.join(FOLDER, name)
    with open(path, "wb") as f:
        f.write(data)
    ws = resolve(path, Loader(), FOLDER)
    findings = check_workspace(ws)
    text = ws.root.deck.text
    for f in findings:
        if f.span.path != path:
            continue
        assert 0 <= f.span.start <= f.span.end <= len(text), (f, len(text))
        assert f.span.line >= 1 and f.span.column >= 1
        assert f.span.end_line <= text.count("\n") + 1
    return findings


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.text(max_size=400))
def test_arbitrary_text(text):
    check_bytes(text.encode("utf-8", "surrogatepass"))


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.binary(max_size=400))
def test_arbitrary_bytes(data):
    check_bytes(data)


ALPHABET = list("{}()=,:#\"-+*/\n ") + ["state", "level", "geometry", "derive", "use", "optimize(", "energy(",
                                         "orbital(", "ghost", "1.5", "-1", "aug-cc-pvdz", "x"]


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(st.integers(0, len(VALID)), st.integers(0, 8), st.sampled_from(ALPHABET)), max_size=6))
def test_mutated_valid_deck(mutations):
    text = VALID
    for pos, cut, insert in mutations:
        pos = min(pos, len(text))
        text = text[:pos] + insert + text[pos + cut:]
    check_bytes(text.encode())


def test_empty_and_whitespace_files():
    assert check_bytes(b"") == [] or all(f.rule != "syntax-error" for f in check_bytes(b""))
    assert [f for f in check_bytes(b"\n\n   # only a comment\n") if f.rule == "syntax-error"] == []


def test_invalid_utf8_is_located():
    findings = check_bytes(b"geometry g {\n  H 0 0 0 \xff\xfe\n}\n")
    bad = [f for f in findings if "UTF-8" in f.message]
    assert [(f.rule, f.span.line, f.span.column, f.message) for f in bad] == [
        ("syntax-error", 2, 11, "the file is not valid UTF-8: byte 0xff cannot be decoded")]


def test_binary_garbage():
    rng = random.Random(1234)
    data = bytes(rng.randrange(256) for _ in range(20000))
    findings = check_bytes(data)
    assert findings and all(f.span.line >= 1 for f in findings)
    assert len([f for f in findings if f.rule == "syntax-error"]) <= 52


def test_deep_nesting():
    check_bytes(b"{" * 50000)
    check_bytes(b"derive x = " + b"(" * 20000 + b"1" + b")" * 20000 + b"\n")
    findings = check_bytes(b"derive x = " + b"-" * 5000 + b"1\n")
    assert any("nested" in f.message for f in findings)


def test_five_megabyte_file():
    """5 MB: a deck whose statements are buried in long comment blocks, then
    5 MB of random bytes (the syntax findings are capped)."""
    comment = "# " + "x" * 4000 + "\n"
    body = "".join(VALID.replace("no2", f"g{i}").replace("neutral", f"n{i}").replace("anion", f"a{i}")
                   .replace('study "acceptor-no2" { goal = electron_affinity kind = vertical }\n', "")
                   + comment * 40 for i in range(32))
    assert len(body) > 5_000_000
    findings = check_bytes(body.encode(), name="big.deck")
    assert not [f for f in findings if f.rule == "syntax-error"]
    rng = random.Random(99)
    findings = check_bytes(rng.randbytes(5 * 1024 * 1024), name="noise.deck")
    syntax = [f.message for f in findings if f.rule == "syntax-error"]
    # the encoding finding, 50 syntax errors, and one saying the rest is not reported
    assert len(syntax) == 52
    assert syntax.count("more than 50 syntax errors: the rest of the file is not reported") == 1


# -- odd values in every slot: NUL bytes and lone surrogates in every string
# position, numbers that are not finite or have hundreds of digits in every
# number position, deep nesting (shared with bench/fuzz_escapes.py)

from odd_inputs import DEEP, DEEPER, NUMBER_SLOTS, ODD_NUMBERS, ODD_STRINGS, STRING_SLOTS, escapes, fill  # noqa: E402


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.sampled_from(ODD_STRINGS) | st.text(max_size=6), min_size=STRING_SLOTS, max_size=STRING_SLOTS),
       st.lists(st.sampled_from(ODD_NUMBERS), min_size=NUMBER_SLOTS, max_size=NUMBER_SLOTS),
       st.sampled_from(DEEP + ["2"]))
def test_odd_values_in_every_slot(strings, numbers, deep):
    s, n = iter(strings), iter(numbers)
    assert escapes(fill(lambda: next(s), lambda: next(n), deep), FOLDER) == []


@pytest.mark.parametrize("slot", range(STRING_SLOTS))
@pytest.mark.parametrize("odd", ["a\x00b.deck", "\ud800", "x\udfffy"])
def test_nul_and_lone_surrogates_in_each_string_position(slot, odd):
    values = iter(odd if i == slot else "cc-pvdz" for i in range(STRING_SLOTS))
    assert escapes(fill(lambda: next(values), lambda: "1", "2"), FOLDER) == []


@pytest.mark.parametrize("slot", range(NUMBER_SLOTS))
@pytest.mark.parametrize("odd", ["1e309", "-1e309", "9" * 400])
def test_non_finite_numbers_in_each_number_position(slot, odd):
    values = iter(odd if i == slot else "1" for i in range(NUMBER_SLOTS))
    text = fill(lambda: "cc-pvdz", lambda: next(values), "2")
    assert escapes(text, FOLDER) == []
    findings = check_bytes(text.encode("utf-8"))
    assert [f.rule for f in findings if f.span.line == _line_of_slot(text, slot)] != []


def _line_of_slot(text: str, slot: int) -> int:
    """The line of the n-th number slot, found by filling only it with a marker."""
    from odd_inputs import TEMPLATE

    marked = TEMPLATE.replace("{n%d}" % slot, "@@")
    for i, line in enumerate(marked.split("\n"), 1):
        if "@@" in line:
            return i
    raise AssertionError(slot)


@pytest.mark.parametrize("deep", DEEPER)
def test_deep_nesting_in_a_derive(deep):
    assert escapes(fill(lambda: "cc-pvdz", lambda: "1", deep), FOLDER) == []

"""Metadata of the findings the grammar itself reports.

These are rules like any other for users (listed by ``deckward rules``,
configurable in deckward.yaml, documented in docs/rules.md); their checks
live in the parser, the model builder and resolution.
"""
from .findings import Applicability, RuleInfo, Severity

_E = Severity.ERROR
_TYPO_NOTE = ("Replaces the word with the nearest candidate (an edit distance that counts two swapped "
              "neighbouring letters as one edit). Safe when one candidate is clearly nearest; offered as "
              "risky when two are equally near.")

LANGUAGE_RULES = (
    RuleInfo(
        id="syntax-error",
        severity=_E,
        title="The text does not parse",
        why="A deck that does not parse cannot be checked or run. The message says what was expected "
        "at the place parsing failed; parsing resumes at the next statement, so later mistakes are "
        "reported too. A missing `}` is reported at the block it should close.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example='geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n\nstate neutral { geometry = no2 }\n',
        good_example='geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n}\n',
        fix=Applicability.SAFE,
        fix_note="A block that is not closed gets a `}` on its own line after its last text, before the "
        "statement that follows: where the parser already ended it.",
        fixed_example='geometry no2 {\n  N 0 0 0\n  O 0 1.0989 0.4653\n}\n\nstate neutral { geometry = no2 }\n',
    ),
    RuleInfo(
        id="unknown-key",
        severity=_E,
        title="A key that the block does not take",
        why="A misspelt key (`mutiplicity`) would otherwise be ignored silently and the calculation "
        "would run with a default the author did not choose.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example="level hf_dz {\n  method = hf\n  bais = cc-pvdz\n}\n",
        good_example="level hf_dz {\n  method = hf\n  basis = cc-pvdz\n}\n",
        fix=Applicability.SAFE,
        fix_note=_TYPO_NOTE,
        fixed_example="level hf_dz {\n  method = hf\n  basis = cc-pvdz\n}\n",
    ),
    RuleInfo(
        id="duplicate-key",
        severity=_E,
        title="A key set twice in one block",
        why="When a key is set twice only one value can win; which one the author meant is unclear.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example="level hf_dz {\n  method = hf\n  method = mp2\n  basis = cc-pvdz\n}\n",
        good_example="level hf_dz {\n  method = hf\n  basis = cc-pvdz\n}\n",
    ),
    RuleInfo(
        id="invalid-value",
        severity=_E,
        title="A value that the key does not take",
        why="Enumerated keys (goal, kind, reference, units ...) take a fixed set of words, charges and "
        "multiplicities are whole numbers, exponents are positive. A wrong value would change what "
        "is computed or make it impossible.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example="level hf_dz {\n  method = hf\n  basis = cc-pvdz\n  reference = unrestriced\n}\n",
        good_example="level hf_dz {\n  method = hf\n  basis = cc-pvdz\n  reference = unrestricted\n}\n",
        fix=Applicability.SAFE,
        fix_note=_TYPO_NOTE,
        fixed_example="level hf_dz {\n  method = hf\n  basis = cc-pvdz\n  reference = unrestricted\n}\n",
    ),
    RuleInfo(
        id="missing-setting",
        severity=_E,
        title="A state that lacks what it needs to be computed",
        why="A state needs a geometry, a method and a basis (directly or through its level); without "
        "them nothing can be computed and the rules cannot check it.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example="geometry oh {\n  O 0 0 0\n  H 0 0 0.9697\n}\nstate radical { geometry = oh charge = 0 multiplicity = 2 }\n",
        good_example="geometry oh {\n  O 0 0 0\n  H 0 0 0.9697\n}\n"
        "state radical { geometry = oh method = hf basis = aug-cc-pvdz charge = 0 multiplicity = 2 }\n",
    ),
    RuleInfo(
        id="undefined-name",
        severity=_E,
        title="A reference that names nothing",
        why="A state that refers to a geometry, level or state that does not exist cannot be computed; "
        "usually the name is misspelt, and the message suggests the closest defined name.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\nlevel hf_dz { method = hf basis = aug-cc-pvdz }\n"
        "state radical { geometry = cn level = hf_dzz charge = 0 multiplicity = 2 }\n",
        good_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\nlevel hf_dz { method = hf basis = aug-cc-pvdz }\n"
        "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n",
        fix=Applicability.SAFE,
        fix_note=_TYPO_NOTE + " The new name is one the deck defines, of the kind the place needs.",
        fixed_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\nlevel hf_dz { method = hf basis = aug-cc-pvdz }\n"
        "state radical { geometry = cn level = hf_dz charge = 0 multiplicity = 2 }\n",
    ),
    RuleInfo(
        id="duplicate-name",
        severity=_E,
        title="A name defined twice",
        why="Every name is defined once per deck, including the files it uses; otherwise a reference "
        "could mean either definition.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\ngeometry cn {\n  C 0 0 0\n  N 0 0 1.18\n}\n",
        good_example="geometry cn {\n  C 0 0 0\n  N 0 0 1.1718\n}\ngeometry cn_long {\n  C 0 0 0\n  N 0 0 1.18\n}\n",
    ),
    RuleInfo(
        id="use-outside-workspace",
        severity=_E,
        title="A `use` that cannot be followed",
        why="A `use` path must name an existing deck inside the workspace root and must not form a cycle; "
        "otherwise the deck depends on files a collaborator or the CI machine does not have.",
        references=("The deck language, version 1 (docs/deck-language.md).",),
        bad_example='use "../../elsewhere/geometries.deck"\n',
        good_example="",
    ),
)

"""Build the deck model from parse trees, checking keys and values.

The grammar accepts any ``key = value``; this module knows which keys each
block takes and what values they allow, so that a misspelt key or value gets
a message that names the alternatives (``unknown-key``, ``invalid-value``,
``duplicate-key``).
"""
from __future__ import annotations

import math
import re
from dataclasses import replace
from typing import Optional

from . import model as m
from .findings import Applicability, Finding, Fix, Severity, Span, TextEdit
from .numbers import MAX_COORDINATE, finite
from .parser import ParseOutput, parse_text
from .text_index import LineIndex

MAX_EXPRESSION_DEPTH = 200
MAX_ATOMS_PER_GEOMETRY = 200_000  # twice the largest geometry the benchmarks check
_ORBITAL_RE = re.compile(r"^(homo|lumo)(?:\s*([+-])\s*(\d+))?$", re.IGNORECASE)
_NAME_RE = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")

LEVEL_KEYS = ("method", "basis", "reference", "frozen_core")
KEYS = {
    "study": ("goal", "kind", "compare", "note"),
    "geometry": ("units", "file"),
    "basis_set": ("from",),
    "level": LEVEL_KEYS,
    "state": ("geometry", "level", "charge", "multiplicity", "frequencies") + LEVEL_KEYS,
}


def closest_names(word: str, candidates, n: int = 1) -> list[str]:
    """The candidates nearest to ``word`` (``deckward.grammar.suggest``)."""
    from .suggest import closest  # only a misspelling pays for it

    return closest(word, candidates, n)


def did_you_mean(word: str, candidates, n: int = 1) -> str:
    from .suggest import suggest

    return suggest(word, candidates, n).hint()


class _Builder:
    def __init__(self, path: str, text: str, index: LineIndex):
        self.path = path
        self.text = text
        self.index = index
        self.findings: list[Finding] = []
        self.unusable: set[str] = set()  # names of statements left out for a bad value

    # -- helpers ----------------------------------------------------------
    def span_of(self, node, base: int, limit: int) -> Span:
        if hasattr(node, "start_pos"):  # a token
            start, end = node.start_pos, node.end_pos
        else:
            meta = node.meta
            if getattr(meta, "empty", True):
                return self.index.span(base, base)
            start, end = meta.start_pos, meta.end_pos
        start = min(start, limit)
        end = min(end, limit)
        return self.index.span(base + start, base + end)

    def error(self, rule: str, span: Span, message: str, fixes: tuple = ()) -> None:
        self.findings.append(Finding(rule, Severity.ERROR, message, span, fixes=fixes))

    def typo(self, rule: str, span: Span, message: str, word: str, candidates) -> None:
        """A finding for a misspelt key or value, with the nearest candidate
        named and offered as a fix (safe when it is clearly the one meant)."""
        from .suggest import replacement_fixes, suggest  # only a misspelling pays for it

        close = suggest(word, candidates)
        self.error(rule, span, message + close.hint(), replacement_fixes(span, close))

    def numbers(self, tokens, sp, what: str, limit: Optional[float] = None) -> Optional[tuple[float, ...]]:
        """The tokens' values, or None after reporting each one that is not
        finite (or larger than ``limit``)."""
        values = []
        for tok in tokens:
            value, problem = finite(str(tok), limit)
            if problem is not None:
                shown = str(tok) if len(str(tok)) <= 24 else str(tok)[:20] + "..."
                self.error("invalid-value", sp(tok), f"`{shown}` {problem} as {what}")
            values.append(value)
        return None if any(v is None for v in values) else tuple(values)

    # -- statements -------------------------------------------------------
    def build(self, out: ParseOutput) -> m.Deck:
        parts: dict[str, list] = {k: [] for k in ("uses", "study", "geometries", "basis_sets", "levels", "states", "derives")}
        statement_spans = []
        for st in out.statements:
            base, limit = st.chunk.start, st.chunk.end - st.chunk.start
            tree = st.tree
            sp = lambda node: self.span_of(node, base, limit)  # noqa: E731
            statement_spans.append(sp(tree))
            kind = tree.data
            try:
                if kind == "use_stmt":
                    parts["uses"].append(self.use(tree, sp))
                elif kind == "study_stmt":
                    study = self.study(tree, sp)
                    if parts["study"]:
                        self.error("duplicate-name", study.keyword_span, "a deck has at most one `study`; this is the second")
                    else:
                        parts["study"].append(study)
                elif kind == "geometry_stmt":
                    geometry = self.geometry(tree, sp)
                    if geometry is not None:
                        parts["geometries"].append(geometry)
                elif kind == "basis_set_stmt":
                    parts["basis_sets"].append(self.basis_set(tree, sp))
                elif kind == "level_stmt":
                    parts["levels"].append(self.level(tree, sp))
                elif kind == "state_stmt":
                    parts["states"].append(self.state(tree, sp))
                elif kind == "derive_stmt":
                    d = self.derive(tree, sp)
                    if d is not None:
                        parts["derives"].append(d)
            except RecursionError:
                self.error("syntax-error", sp(tree), "the statement is nested too deeply to read")
        comments = tuple(
            m.Comment(self.text[s + 1 : e], self.index.span(s, e), own) for s, e, own in out.comments
        )
        broken = frozenset(c.name for c in out.broken if c.name) | frozenset(self.unusable)
        return m.Deck(
            path=self.path,
            text=self.text,
            uses=tuple(parts["uses"]),
            study=parts["study"][0] if parts["study"] else None,
            geometries=tuple(parts["geometries"]),
            basis_sets=tuple(parts["basis_sets"]),
            levels=tuple(parts["levels"]),
            states=tuple(parts["states"]),
            derives=tuple(parts["derives"]),
            comments=comments,
            statement_spans=tuple(statement_spans),
            broken_names=broken,
        )

    def use(self, tree, sp) -> m.Use:
        tok = tree.children[1]
        return m.Use(m.Located(_unquote(tok), sp(tok)), sp(tree))

    def settings(self, block: str, items, sp) -> dict[str, tuple]:
        """key -> (key token, value tree) for the block's settings, reporting
        unknown and repeated keys."""
        allowed = KEYS[block]
        found: dict[str, tuple] = {}
        for item in items:
            if getattr(item, "data", None) != "setting":
                continue
            key_tok, value = item.children
            key = str(key_tok).lower()
            if key not in allowed:
                self.typo("unknown-key", sp(key_tok),
                          f"`{key_tok}` is not a key of a {block} block (keys: {', '.join(allowed)})", key, allowed)
                continue
            if key in found:
                first_line = sp(found[key][0]).line
                self.error("duplicate-key", sp(key_tok), f"`{key}` is set twice in this {block} block (first on line {first_line})")
                continue
            found[key] = (key_tok, value)
        return found

    # -- values -----------------------------------------------------------
    def word(self, value, sp, what: str) -> Optional[m.Located[str]]:
        kind = value.data
        if kind in ("word_value", "string_value", "number_value"):
            tok = value.children[0]
            text = _unquote(tok) if kind == "string_value" else str(tok)
            return m.Located(text, sp(tok))
        self.error("invalid-value", sp(value), f"{what} must be a single word here")
        return None

    def enum(self, value, sp, key: str, choices) -> Optional[m.Located[str]]:
        w = self.word(value, sp, f"`{key}`")
        if w is None:
            return None
        low = w.value.lower()
        if low not in choices:
            self.typo("invalid-value", w.span, f"`{w.value}` is not a value of `{key}` (values: {' | '.join(choices)})",
                      low, choices)
            return None
        return m.Located(low, w.span)

    def boolean(self, value, sp, key: str) -> Optional[m.Located[bool]]:
        w = self.enum(value, sp, key, ("true", "false"))
        return None if w is None else m.Located(w.value == "true", w.span)

    def integer(self, value, sp, key: str, minimum: Optional[int] = None) -> Optional[m.Located[int]]:
        if value.data != "number_value":
            self.error("invalid-value", sp(value), f"`{key}` must be a whole number")
            return None
        tok = value.children[0]
        try:
            number = float(tok)
        except ValueError:
            number = float("nan")
        if not number.is_integer() or abs(number) > 10**6:
            self.error("invalid-value", sp(tok), f"`{key}` must be a whole number, not `{tok}`")
            return None
        if minimum is not None and number < minimum:
            self.error("invalid-value", sp(tok), f"`{key}` must be at least {minimum}, not `{tok}`")
            return None
        return m.Located(int(number), sp(tok))

    def name_ref(self, value, sp, key: str) -> Optional[m.Located[str]]:
        w = self.word(value, sp, f"`{key}`")
        if w is None:
            return None
        if not _NAME_RE.match(w.value) or value.data != "word_value":
            self.error("invalid-value", w.span, f"`{key}` must name a {key} defined in the deck, not `{w.value}`")
            return None
        return w

    def basis_spec(self, value, sp, key: str) -> Optional[m.BasisSpec]:
        if value.data == "map_value":
            entries = []
            default = None
            seen = {}
            for entry in value.children:
                if getattr(entry, "data", None) != "map_entry":
                    continue
                k_tok, v_tok = entry.children
                v = m.Located(_unquote(v_tok) if v_tok.type == "STRING" else str(v_tok), sp(v_tok))
                k = m.Located(str(k_tok), sp(k_tok))
                low = k.value.lower()
                if low in seen:
                    self.error("duplicate-key", k.span, f"`{k.value}` appears twice in this map (first on line {seen[low]})")
                    continue
                seen[low] = k.span.line
                if low == "default":
                    default = v
                else:
                    entries.append((k, v))
            return m.BasisSpec(default, tuple(entries), sp(value))
        w = self.word(value, sp, f"`{key}`")
        if w is None:
            return None
        return m.BasisSpec(w, (), w.span)

    def level_settings(self, found, sp) -> m.LevelSettings:
        method = reference = frozen = basis = None
        if "method" in found:
            method = self.word(found["method"][1], sp, "`method`")
        if "basis" in found:
            basis = self.basis_spec(found["basis"][1], sp, "basis")
        if "reference" in found:
            reference = self.enum(found["reference"][1], sp, "reference", m.REFERENCES)
        if "frozen_core" in found:
            frozen = self.boolean(found["frozen_core"][1], sp, "frozen_core")
        return m.LevelSettings(method, basis, reference, frozen)

    # -- blocks -----------------------------------------------------------
    def study(self, tree, sp) -> m.Study:
        kids = tree.children
        title = None
        if len(kids) > 1 and getattr(kids[1], "type", None) == "STRING":
            title = m.Located(_unquote(kids[1]), sp(kids[1]))
        found = self.settings("study", kids, sp)
        get = lambda k, choices: self.enum(found[k][1], sp, k, choices) if k in found else None  # noqa: E731
        note = self.word(found["note"][1], sp, "`note`") if "note" in found else None
        return m.Study(
            sp(tree), sp(kids[0]), title, get("goal", m.GOALS), get("kind", m.KINDS), get("compare", m.COMPARES), note
        )

    def geometry(self, tree, sp) -> m.Geometry:
        name_tok = tree.children[1]
        items = tree.children[3:-1]
        found = self.settings("geometry", items, sp)
        units = self.enum(found["units"][1], sp, "units", m.UNITS_LENGTH) if "units" in found else None
        atoms = []
        usable = True
        for item in items:
            if getattr(item, "data", None) != "atom":
                continue
            if len(atoms) >= MAX_ATOMS_PER_GEOMETRY:
                self.error("syntax-error", sp(item), f"geometry `{name_tok}` has more than {MAX_ATOMS_PER_GEOMETRY} "
                           "atoms; this one and the rest are not read")
                break
            sym, x, y, z, *ghost = item.children
            xyz = self.numbers((x, y, z), sp, "a coordinate", MAX_COORDINATE)
            if xyz is None:
                usable = False
                continue
            atoms.append(
                m.Atom(
                    m.Located(str(sym), sp(sym)),
                    xyz,
                    (sp(x), sp(y), sp(z)),
                    bool(ghost),
                    sp(item),
                )
            )
        lb, rb = tree.children[2], tree.children[-1]
        body = self.index.span(sp(lb).end, max(sp(lb).end, sp(rb).start))
        file = None
        if "file" in found:
            value = found["file"][1]
            if value.data != "string_value":
                self.error("invalid-value", sp(value), '`file` takes a quoted path, e.g. file = "no2.xyz"')
            else:
                file = m.Located(_unquote(value.children[0]), sp(value.children[0]))
                if atoms:
                    self.error("invalid-value", file.span, "a geometry takes its atoms from `file` or from its "
                               "own lines, not both")
                if units is not None:
                    self.error("invalid-value", units.span, "an .xyz file is in angstrom: `units` does not apply "
                               "to a geometry read from `file`")
        if not usable:  # like a statement that does not parse: left out, its name known
            self.unusable.add(str(name_tok))
            return None
        return m.Geometry(m.Located(str(name_tok), sp(name_tok)), sp(tree), units, tuple(atoms), body, file)

    def basis_set(self, tree, sp) -> m.BasisSet:
        name_tok = tree.children[1]
        items = tree.children[3:-1]
        found = self.settings("basis_set", items, sp)
        source = self.basis_spec(found["from"][1], sp, "from") if "from" in found else None
        shells = []
        for item in items:
            if getattr(item, "data", None) != "add_shell":
                continue
            _, el, letter, exp = item.children
            if str(letter).lower() not in m.SHELL_LETTERS or len(str(letter)) != 1:
                self.error(
                    "invalid-value", sp(letter), f"`{letter}` is not a shell letter (s, p, d, f, g, h, i)"
                )
                continue
            found = self.numbers((exp,), sp, "an exponent")
            if found is None:
                continue
            value = found[0]
            if not value > 0:
                self.error("invalid-value", sp(exp), f"an exponent must be positive, not `{exp}`")
                continue
            shells.append(
                m.Shell(m.Located(str(el), sp(el)), m.Located(str(letter), sp(letter)), m.Located(value, sp(exp)), sp(item))
            )
        return m.BasisSet(m.Located(str(name_tok), sp(name_tok)), sp(tree), source, tuple(shells))

    def level(self, tree, sp) -> m.Level:
        name_tok = tree.children[1]
        found = self.settings("level", tree.children[3:-1], sp)
        return m.Level(m.Located(str(name_tok), sp(name_tok)), sp(tree), self.level_settings(found, sp))

    def state(self, tree, sp) -> m.State:
        name_tok = tree.children[1]
        items = tree.children[3:-1]
        found = self.settings("state", items, sp)
        geometry = None
        if "geometry" in found:
            value = found["geometry"][1]
            if value.data == "optimize_value":
                name = value.children[1]
                geometry = m.GeometryRef(m.Located(str(name), sp(name)), True, sp(value))
            else:
                ref = self.name_ref(value, sp, "geometry")
                if ref is not None:
                    geometry = m.GeometryRef(ref, False, ref.span)
        level = self.name_ref(found["level"][1], sp, "level") if "level" in found else None
        charge = self.integer(found["charge"][1], sp, "charge") if "charge" in found else None
        mult = self.integer(found["multiplicity"][1], sp, "multiplicity", minimum=1) if "multiplicity" in found else None
        freq = self.boolean(found["frequencies"][1], sp, "frequencies") if "frequencies" in found else None
        last_end = sp(tree.children[2]).end
        for item in items:
            last_end = max(last_end, sp(item).end)
        return m.State(
            m.Located(str(name_tok), sp(name_tok)),
            sp(tree),
            geometry,
            level,
            charge,
            mult,
            freq,
            self.level_settings(found, sp),
            last_end,
        )

    def derive(self, tree, sp) -> Optional[m.Derive]:
        kids = tree.children
        name_tok = kids[1]
        i = 2
        quantity = None
        if getattr(kids[i], "type", None) == "AS":
            q = kids[i + 1]
            low = str(q).lower()
            if low in m.QUANTITIES:
                quantity = m.Located(low, sp(q))
            else:
                self.typo("invalid-value", sp(q), f"`{q}` is not a quantity (quantities: {', '.join(m.QUANTITIES)})",
                          low, m.QUANTITIES)
            i += 2
        expr_tree = kids[i]
        unit = None
        if i + 1 < len(kids) and getattr(kids[i + 1], "type", None) == "IN":
            u = kids[i + 2]
            low = str(u).lower()
            if low in m.ENERGY_UNITS:
                unit = m.Located(low, sp(u))
            else:
                self.typo("invalid-value", sp(u), f"`{u}` is not an energy unit (units: {', '.join(m.ENERGY_UNITS)})",
                          low, m.ENERGY_UNITS)
        if expression_depth(expr_tree) > MAX_EXPRESSION_DEPTH:
            self.error("syntax-error", sp(expr_tree), f"the expression is nested more than {MAX_EXPRESSION_DEPTH} levels deep")
            return None
        expr = self.expr(expr_tree, sp)
        if expr is None:
            return None
        reference = None
        if getattr(kids[-1], "data", None) == "reference_clause":
            reference = self.reference(kids[-1], sp)
        return m.Derive(m.Located(str(name_tok), sp(name_tok)), sp(tree), quantity, expr, unit, reference)

    def reference(self, tree, sp) -> Optional[m.MeasuredReference]:
        kids = tree.children
        value = float(kids[1])
        if not math.isfinite(value):
            self.error("invalid-value", sp(kids[1]), f"a reference value is a finite number, not `{kids[1]}`")
            return None
        uncertainty = None
        i = 2
        if getattr(kids[i], "type", None) == "PLUSMINUS":
            uncertainty = float(kids[i + 1])
            if uncertainty < 0:
                self.error("invalid-value", sp(kids[i + 1]), f"an uncertainty is not negative: `{kids[i + 1]}`")
                return None
            i += 2
        u, source = kids[i], kids[i + 1]
        low = str(u).lower()
        if low not in m.ENERGY_UNITS:
            self.error("invalid-value", sp(u), f"`{u}` is not an energy unit (units: {', '.join(m.ENERGY_UNITS)})"
                       + did_you_mean(low, m.ENERGY_UNITS))
            return None
        text = _unquote(source)
        if not text.strip():
            self.error("invalid-value", sp(source), "a reference value names its source (who measured it, where)")
            return None
        return m.MeasuredReference(value, uncertainty, m.Located(low, sp(u)), m.Located(text, sp(source)), sp(tree))

    def expr(self, t, sp) -> Optional[m.Expr]:
        kind = t.data
        if kind == "number":
            found = self.numbers((t.children[0],), sp, "a number")
            return None if found is None else m.Number(found[0], sp(t))
        if kind == "energy":
            name = t.children[1]
            return m.EnergyOf(m.Located(str(name), sp(name)), sp(t))
        if kind == "orbital":
            _, state, orb, *spin = t.children
            match = _ORBITAL_RE.match(str(orb))
            if not match:
                self.typo("invalid-value", sp(orb), f"`{orb}` is not an orbital (homo, lumo, homo-N, lumo+N)",
                          str(orb).lower(), ("homo", "lumo"))
                return None
            which, sign, count = match.groups()
            offset = 0
            if count and len(count) > 6:
                self.error("invalid-value", sp(orb), f"`{which}{sign}{count[:6]}...` ({len(count)} digits) is too far "
                           "from the HOMO or LUMO to be an orbital")
                return None
            if count:
                offset = int(count) * (1 if sign == "+" else -1)
                if (which.lower() == "homo" and offset > 0) or (which.lower() == "lumo" and offset < 0):
                    self.error(
                        "invalid-value",
                        sp(orb),
                        f"`{orb}`: write orbitals below the HOMO as homo-N and above the LUMO as lumo+N",
                    )
                    return None
            spin_loc = None
            if spin:
                s = str(spin[0]).lower()
                if s not in m.SPINS:
                    self.typo("invalid-value", sp(spin[0]), f"`{spin[0]}` is not a spin (alpha, beta)", s, m.SPINS)
                    return None
                spin_loc = m.Located(s, sp(spin[0]))
            return m.OrbitalOf(m.Located(str(state), sp(state)), m.Located(which.lower(), sp(orb)), offset, spin_loc, sp(t))
        if kind in ("neg", "pos"):
            operand = self.expr(t.children[1], sp)
            return None if operand is None else m.Unary("-" if kind == "neg" else "+", operand, sp(t))
        if kind in ("add", "sub", "mul", "div"):
            left = self.expr(t.children[0], sp)
            right = self.expr(t.children[2], sp)
            if left is None or right is None:
                return None
            return m.Binary({"add": "+", "sub": "-", "mul": "*", "div": "/"}[kind], left, right, sp(t))
        if kind == "sum" or len(t.children) == 1:  # parenthesised
            return self.expr(t.children[0], sp)
        return None


def expression_depth(tree, stop: int = MAX_EXPRESSION_DEPTH) -> int:
    """Nesting depth of a tree, computed without recursion (it stops
    counting as soon as the depth passes ``stop``)."""
    best = 0
    stack = [(tree, 1)]
    while stack:
        node, d = stack.pop()
        best = max(best, d)
        if best > stop:
            return best
        for c in getattr(node, "children", ()):
            if hasattr(c, "children"):
                stack.append((c, d + 1))
    return best


def _unquote(tok) -> str:
    s = str(tok)
    if len(s) >= 2 and s[0] == '"' and s[-1] == '"':
        s = s[1:-1]
    return s.replace('\\"', '"').replace("\\\\", "\\")


def build_deck(path: str, text: str) -> tuple[m.Deck, list[Finding], LineIndex]:
    """Parse and build one deck file: (deck, findings, line index)."""
    index = LineIndex(text, path)
    out = parse_text(text, index)
    builder = _Builder(path, text, index)
    deck = builder.build(out)
    findings = _with_closing_fixes(list(out.findings), text, index) + builder.findings
    return deck, findings, index


def _end_of_block_text(text: str, where: int) -> int:
    """The end of the last line before ``where`` that is neither blank nor a
    comment of its own (comments just above a statement belong to it)."""
    end = where
    while end > 0:
        line_start = text.rfind("\n", 0, end - 1) + 1 if text[end - 1] == "\n" else text.rfind("\n", 0, end) + 1
        line = text[line_start:end].strip()
        if line and not line.startswith("#"):
            return line_start + len(text[line_start:end].rstrip())
        end = line_start
    return len(text[:where].rstrip())


def _with_closing_fixes(findings: list[Finding], text: str, index: LineIndex) -> list[Finding]:
    """Give each "block ... is not closed" syntax error the fix that closes
    it: a `}` on a line of its own after the block's last text, indented
    like the line that opened it, before the statement that follows (the
    place the parser already ended the block).  Safe: the deck is read the
    way the parser read it."""
    if not any(f.rule == "syntax-error" and "is not closed" in f.message for f in findings):
        return findings
    from .scanner import scan

    where_by_brace = {block.brace_start: where for block, where, _ in scan(text).unclosed}
    out = []
    for f in findings:
        where = where_by_brace.get(f.span.start) if f.rule == "syntax-error" else None
        if where is not None and "is not closed" in f.message:
            at = _end_of_block_text(text, where)
            line_start = text.rfind("\n", 0, f.span.start) + 1
            opening_line = text[line_start:f.span.start]
            indent = opening_line[: len(opening_line) - len(opening_line.lstrip())]
            edit = TextEdit(index.span(at, at), "\n" + indent + "}")
            f = replace(f, fixes=f.fixes + (Fix("Close the block with `}`", (edit,), Applicability.SAFE),))
        out.append(f)
    return out

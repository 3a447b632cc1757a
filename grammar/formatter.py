"""The canonical layout of a deck: text in, text out.

Formatting works on the parse trees, so it can only re-space what the parser
understood: every value, name, number and string is copied exactly as
written (``1.0989``, ``-.4653`` and ``aug-cc-pVTZ`` stay as they are), and
only white space, the case of structural keywords and the layout change.
Comments are kept: a comment on a line of its own stays before the item it
preceded, a trailing comment stays at the end of the line of the item it
followed (so ``# allow:`` suppressions keep covering the same text).

The layout:

- one statement after another, at most one blank line between them;
- a block written on one line without atoms or shells stays on one line:
  ``state anion { geometry = no2  level = cc_tz  charge = -1 }``, and
  neighbouring one-line blocks of the same kind are aligned in columns;
- any other block has one key, atom or ``add`` shell per line, indented by
  two spaces, with the ``=`` of its settings aligned;
- atoms in aligned columns, coordinates aligned on the decimal point;
- derive expressions with one space around binary operators, the author's
  parentheses kept, ``orbital(state, homo-1)``.

A text with syntax errors is not formatted (``format_text`` returns None):
re-laying out a statement the parser could not read might change it.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Optional

from .build import MAX_EXPRESSION_DEPTH, expression_depth
from .parser import parse_text
from .text_index import LineIndex

INDENT = "  "
INLINE_SEPARATOR = "  "  # between settings of a block kept on one line
_PRECEDENCE = {"add": 1, "sub": 1, "mul": 2, "div": 2}
_OPERATOR = {"add": "+", "sub": "-", "mul": "*", "div": "/"}


@dataclass
class _Line:
    """One output line and the source text it came from."""

    depth: int
    text: str
    src_start: int
    src_end: int
    comment_depth: int  # indentation of own-line comments placed before it
    blank_before_allowed: bool = True
    trailing: Optional[str] = None
    before: list = field(default_factory=list)  # own-line comments: (text, blank_before)
    blank_before: bool = False
    # For a block kept on one line: its head ("state anion"), and its
    # settings as (key, "key = value"), so that neighbours can be aligned.
    row: Optional[tuple[str, list]] = None


def format_text(text: str) -> Optional[str]:
    """The canonical layout of ``text``, or None when it has syntax errors
    (an expression nested past ``MAX_EXPRESSION_DEPTH`` counts as one: the
    model builder reports it, and laying it out would recurse that deep)."""
    index = LineIndex(text, "")
    out = parse_text(text, index)
    if out.findings or out.broken:
        return None
    # A statement's tree is one level above its expression.
    if any(expression_depth(st.tree, MAX_EXPRESSION_DEPTH + 1) > MAX_EXPRESSION_DEPTH + 1 for st in out.statements):
        return None
    bom = "\ufeff" if text.startswith("\ufeff") else ""
    newline = "\r\n" if "\r\n" in text[: text.find("\n") + 1 or len(text)] else "\n"
    lines: list[_Line] = []
    for st in out.statements:
        lines.extend(_Statement(text, st.chunk.start).lines(st.tree))
    lines.sort(key=lambda ln: ln.src_start)
    tail: list[tuple[str, bool]] = []  # comments after the last statement
    _place_comments(text, lines, out.comments, tail)
    _mark_blank_lines(text, lines)
    _align_rows(lines)
    rendered: list[str] = []
    after_open = False  # the previous line opened a block: no blank line here
    for ln in lines:
        for comment, blank in ln.before:
            if rendered and blank and not after_open:
                rendered.append("")
            rendered.append(INDENT * ln.comment_depth + comment)
            after_open = False
        if rendered and ln.blank_before and ln.blank_before_allowed and not after_open:
            rendered.append("")
        body = INDENT * ln.depth + ln.text
        if ln.trailing is not None:
            body += "  " + ln.trailing
        rendered.append(body)
        after_open = ln.text.endswith("{")
    for comment, blank in tail:
        if rendered and blank:
            rendered.append("")
        rendered.append(comment)
    if not rendered:
        return bom
    return bom + newline.join(rendered) + newline


# ------------------------------------------------------------ aligned blocks


def _align_rows(lines: list[_Line]) -> None:
    """Align neighbouring one-line blocks of the same kind into columns:

        state neutral { geometry = no2  level = cc_tz  charge = 0   multiplicity = 2 }
        state anion   { geometry = no2  level = cc_tz  charge = -1  multiplicity = 1 }

    Neighbours are consecutive lines with no blank line or comment between
    them; columns are aligned while the rows have the same key in the same
    place, and the rest of each row follows as written."""
    i = 0
    while i < len(lines):
        if lines[i].row is None or lines[i].trailing is not None:
            i += 1
            continue
        kind = lines[i].row[0].split()[0]
        j = i + 1
        while (j < len(lines) and lines[j].row is not None and lines[j].row[0].split()[0] == kind
               and not lines[j].blank_before and not lines[j].before and lines[j].trailing is None):
            j += 1
        if j - i > 1:
            _align_group(lines[i:j])
        i = j


def _align_group(group: list[_Line]) -> None:
    rows = [ln.row for ln in group]
    head_width = max(len(head) for head, _ in rows)
    shared = 0
    shortest = min(len(cells) for _, cells in rows)
    while shared < shortest and len({cells[shared][0] for _, cells in rows}) == 1:
        shared += 1
    widths = [max(len(cells[k][1]) for _, cells in rows) for k in range(shared)]
    for ln, (head, cells) in zip(group, rows):
        parts = [cells[k][1].ljust(widths[k]) if k < len(cells) - 1 else cells[k][1] for k in range(shared)]
        parts += [c for _, c in cells[shared:]]
        ln.text = f"{head.ljust(head_width)} {{ {INLINE_SEPARATOR.join(parts)} }}"


# --------------------------------------------------------------------- comments


def _place_comments(text: str, lines: list[_Line], comments, tail) -> None:
    """Attach every comment to the output line it belongs with."""
    starts = [ln.src_start for ln in lines]
    import bisect

    for start, end, own_line in comments:
        body = text[start:end].rstrip()
        blank = _blank_gap_before(text, start)
        if not own_line:
            i = bisect.bisect_left(starts, start) - 1
            if i >= 0:
                host = lines[i]
                if host.trailing is None:
                    host.trailing = body
                else:
                    host.before.append((body, False))
                continue
        i = bisect.bisect_right(starts, start)
        if i < len(lines):
            lines[i].before.append((body, blank))
        else:
            tail.append((body, blank))


def _blank_gap_before(text: str, pos: int) -> bool:
    """Whether the white space just before ``pos`` holds an empty line."""
    i = pos
    while i > 0 and text[i - 1] in " \t\r\n\f\ufeff":
        i -= 1
    return i > 0 and text.count("\n", i, pos) >= 2


def _mark_blank_lines(text: str, lines: list[_Line]) -> None:
    for ln in lines:
        ln.blank_before = _blank_gap_before(text, ln.src_start)


# ------------------------------------------------------------------- statements


def _is_token(node) -> bool:
    return hasattr(node, "type")


class _Statement:
    def __init__(self, text: str, base: int) -> None:
        self.text = text
        self.base = base

    def start(self, node) -> int:
        if _is_token(node):
            return self.base + node.start_pos
        return self.base + node.meta.start_pos

    def end(self, node) -> int:
        if _is_token(node):
            return self.base + node.end_pos
        return self.base + node.meta.end_pos

    def line(self, depth: int, text: str, first, last, comment_depth: Optional[int] = None, **kw) -> _Line:
        return _Line(depth, text, self.start(first), self.end(last),
                     depth if comment_depth is None else comment_depth, **kw)

    # -- dispatch --------------------------------------------------------
    def lines(self, tree) -> list[_Line]:
        kind = tree.data
        kids = tree.children
        if kind == "use_stmt":
            return [self.line(0, f"use {kids[1]}", kids[0], kids[-1])]
        if kind == "derive_stmt":
            return [self.line(0, self.derive(kids), kids[0], kids[-1])]
        keyword = str(kids[0]).lower()
        lbrace = next(i for i, k in enumerate(kids) if _is_token(k) and k.type == "LBRACE")
        head_parts = [keyword] + [str(k) for k in kids[1:lbrace]]
        head = " ".join(head_parts)
        items = kids[lbrace + 1 : -1]
        lb, rb = kids[lbrace], kids[-1]
        inline_src = self.text[self.end(lb) : self.start(rb)]
        has_rows = any(getattr(i, "data", None) in ("atom", "add_shell") for i in items)
        if not items:
            return [self.line(0, head + " {}", kids[0], rb)]
        if "\n" not in inline_src and not has_rows:
            cells = [(str(i.children[0]).lower(), self.setting(i, 0)) for i in items if i.data == "setting"]
            body = INLINE_SEPARATOR.join(c for _, c in cells)
            line = self.line(0, f"{head} {{ {body} }}", kids[0], rb)
            if len(cells) == len(items):
                line.row = (head, cells)
            return [line]
        out = [self.line(0, head + " {", kids[0], lb)]
        key_width = max((len(str(i.children[0])) for i in items if i.data == "setting"), default=0)
        atom_rows = self.atom_rows([i for i in items if i.data == "atom"])
        shell_rows = self.shell_rows([i for i in items if i.data == "add_shell"])
        for item in items:
            if item.data == "setting":
                text = self.setting(item, key_width)
            elif item.data == "atom":
                text = atom_rows[id(item)]
            else:
                text = shell_rows[id(item)]
            out.append(self.line(1, text, item, item))
        out[1].blank_before_allowed = False
        out.append(self.line(0, "}", rb, rb, comment_depth=1, blank_before_allowed=False))
        return out

    # -- block items -----------------------------------------------------
    def setting(self, item, key_width: int) -> str:
        key, value = item.children
        return f"{str(key).ljust(key_width)} = {self.value(value)}"

    def value(self, value) -> str:
        kind = value.data
        if kind == "map_value":
            entries = [c for c in value.children if getattr(c, "data", None) == "map_entry"]
            if not entries:
                return "{}"
            return "{ " + ", ".join(f"{e.children[0]}: {e.children[1]}" for e in entries) + " }"
        if kind == "optimize_value":
            return f"optimize({value.children[1]})"
        return str(value.children[0])

    def atom_rows(self, atoms) -> dict[int, str]:
        if not atoms:
            return {}
        sym_width = max(len(str(a.children[0])) for a in atoms)
        columns = []
        for col in range(1, 4):
            parts = [_split_number(str(a.children[col])) for a in atoms]
            columns.append((max(len(p[0]) for p in parts), max(len(p[1]) for p in parts)))
        rows = {}
        for a in atoms:
            text = str(a.children[0]).ljust(sym_width)
            for col in range(1, 4):
                left, right = _split_number(str(a.children[col]))
                lw, rw = columns[col - 1]
                text += "  " + left.rjust(lw) + right.ljust(rw)
            if len(a.children) > 4:
                text += "  " + str(a.children[4]).lower()
            rows[id(a)] = text.rstrip()
        return rows

    def shell_rows(self, shells) -> dict[int, str]:
        if not shells:
            return {}
        width = max(len(str(s.children[1])) for s in shells)
        return {
            id(s): f"add {str(s.children[1]).ljust(width)} {s.children[2]} {s.children[3]}" for s in shells
        }

    # -- derive ----------------------------------------------------------
    def derive(self, kids) -> str:
        parts = ["derive", str(kids[1])]
        i = 2
        if _is_token(kids[i]) and kids[i].type == "AS":
            parts += ["as", str(kids[i + 1])]
            i += 2
        parts += ["=", self.expr(kids[i], 0)]
        rest = kids[i + 1:]
        if rest and _is_token(rest[0]) and rest[0].type == "IN":
            parts += ["in", str(rest[1])]
            rest = rest[2:]
        if rest:  # the reference clause, its tokens as written
            parts += [str(tok) for tok in rest[0].children]
        return " ".join(parts)

    def wrapped(self, node) -> bool:
        """Whether the author put ``node`` in parentheses."""
        i = self.start(node) - 1
        while i >= 0 and self.text[i] in " \t\r\n":
            i -= 1
        j = self.end(node)
        while j < len(self.text) and self.text[j] in " \t\r\n":
            j += 1
        if i < 0 or j >= len(self.text) or self.text[i] != "(" or self.text[j] != ")":
            return False
        depth = 0
        for k in range(i, j + 1):  # the two parentheses must match each other
            ch = self.text[k]
            if ch == "(":
                depth += 1
            elif ch == ")":
                depth -= 1
                if depth == 0 and k != j:
                    return False
        return depth == 0

    def expr(self, node, needed: int) -> str:
        """``needed``: 0 nothing required; 1 parentheses required if the
        node binds looser than the context (set by the caller)."""
        kind = node.data
        kids = node.children
        if kind == "number":
            text = str(kids[0])
        elif kind == "energy":
            text = f"energy({kids[1]})"
        elif kind == "orbital":
            args = [str(kids[1]), re.sub(r"\s+", "", str(kids[2]))] + [str(k) for k in kids[3:]]
            text = "orbital(" + ", ".join(args) + ")"
        elif kind in ("neg", "pos"):
            inner = kids[1]
            paren = getattr(inner, "data", "") in _PRECEDENCE
            text = ("-" if kind == "neg" else "+") + self.expr(inner, 1 if paren else 0)
        elif kind in _PRECEDENCE:
            prec = _PRECEDENCE[kind]
            left, right = kids[0], kids[2]
            lneed = _PRECEDENCE.get(getattr(left, "data", ""), 9) < prec
            rneed = _PRECEDENCE.get(getattr(right, "data", ""), 9) <= prec
            text = f"{self.expr(left, int(lneed))} {_OPERATOR[kind]} {self.expr(right, int(rneed))}"
        else:  # a parenthesised sum kept as its own node
            return self.expr(kids[0], needed)
        if needed or self.wrapped(node):
            return f"({text})"
        return text


def _split_number(text: str) -> tuple[str, str]:
    """(part up to the decimal point, the rest) for aligning on the point."""
    m = re.match(r"^[+-]?\d*", text)
    cut = m.end() if m else 0
    return text[:cut], text[cut:]

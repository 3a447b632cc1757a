"""Text edits on ``state`` blocks that keep the author's layout.

Fixes that change a state (point it at another level, wrap its geometry in
``optimize(...)``, drop an override) or add a new state next to an existing
one must look as if the author had typed them: one-line states stay on one
line, multi-line states get one setting a line with the block's indentation
and ``=`` alignment, comments survive, and inserted lines use the file's line
ending (``edits.insert_lines_after``).
"""
from __future__ import annotations

import re
from typing import Optional

from deckward.grammar import model as m
from deckward.grammar.findings import Span, TextEdit
from deckward.grammar.records import record
from deckward.grammar.text_index import LineIndex

from .edits import indentation_of_line, insert_lines_after, replace

_KEY_CHARS = re.compile(r"[A-Za-z0-9_]")
_KEY_EQUALS = re.compile(r"^([ \t]*)([A-Za-z_][A-Za-z0-9_]*)([ \t]*)=")


@record(frozen=True)
class Setting:
    """One ``key = value`` of a state as written."""

    key: str
    key_start: int  # offset of the key's first character
    value: Span  # the value as written (``optimize(x)`` and ``{...}`` maps included)


def key_start(text: str, value_start: int) -> int:
    """Offset of the key of the setting whose value starts at ``value_start``
    (scans back over white space, ``=`` and the key name)."""
    i = value_start
    while i > 0 and text[i - 1] in " \t\r\n":
        i -= 1
    if i > 0 and text[i - 1] == "=":
        i -= 1
    while i > 0 and text[i - 1] in " \t\r\n":
        i -= 1
    while i > 0 and _KEY_CHARS.match(text[i - 1]):
        i -= 1
    return i


def value_spans(state: m.State) -> dict[str, Span]:
    """key -> span of its value, for the keys the state writes (and the model
    could read)."""
    o = state.overrides
    found = {
        "geometry": state.geometry.span if state.geometry else None,
        "level": state.level.span if state.level else None,
        "charge": state.charge.span if state.charge else None,
        "multiplicity": state.multiplicity.span if state.multiplicity else None,
        "frequencies": state.frequencies.span if state.frequencies else None,
        "method": o.method.span if o.method else None,
        "basis": o.basis.span if o.basis else None,
        "reference": o.reference.span if o.reference else None,
        "frozen_core": o.frozen_core.span if o.frozen_core else None,
    }
    return {k: v for k, v in found.items() if v is not None}


def settings_of(text: str, state: m.State) -> list[Setting]:
    """The state's settings in the order they are written."""
    out = [Setting(k, key_start(text, span.start), span) for k, span in value_spans(state).items()]
    return sorted(out, key=lambda s: s.key_start)


def is_one_line(state: m.State) -> bool:
    return state.span.line == state.span.end_line


@record(frozen=True)
class Style:
    """How a state block is laid out."""

    one_line: bool
    statement_indent: str  # before ``state``
    setting_indent: str  # before each key (multi-line blocks)
    key_width: int  # 0: ``key = value``; else keys padded so that ``=`` lines up

    def setting(self, key: str, value: str) -> str:
        if self.key_width > len(key):
            return f"{key.ljust(self.key_width)}= {value}"
        return f"{key} = {value}"


def style_of(index: LineIndex, state: m.State) -> Style:
    text = index.text
    statement_indent = indentation_of_line(index, state.span.line)
    if is_one_line(state):
        return Style(True, statement_indent, "", 0)
    settings = settings_of(text, state)
    indent = statement_indent + "  "
    widths = []
    first_on_line = []
    for s in settings:
        line = index.position(s.key_start)[0]
        line_text = text[index.line_start(line) : index.line_end(line)]
        match = _KEY_EQUALS.match(line_text)
        if match and index.line_start(line) + len(match.group(1)) == s.key_start:
            first_on_line.append(s)
            widths.append(len(match.group(2)) + len(match.group(3)))
    if first_on_line:
        indent = indentation_of_line(index, index.position(first_on_line[0].key_start)[0])
    aligned = len(widths) > 1 and len(set(widths)) == 1 and any(
        w != len(s.key) + 1 for w, s in zip(widths, first_on_line)
    )
    return Style(False, statement_indent, indent, widths[0] if aligned else 0)


def render_state(style: Style, name: str, settings: list[tuple[str, str]]) -> str:
    """A state block in ``style`` (lines joined with \\n, no trailing newline)."""
    if style.one_line:
        body = " ".join(style.setting(k, v) for k, v in settings)
        return f"{style.statement_indent}state {name} {{ {body} }}"
    lines = [f"{style.statement_indent}state {name} {{"]
    lines += [style.setting_indent + style.setting(k, v) for k, v in settings]
    lines.append(style.statement_indent + "}")
    return "\n".join(lines)


def insert_state_after(index: LineIndex, after: m.State, block: str, one_line: bool) -> TextEdit:
    """Insert a rendered state on new lines after ``after`` (a blank line
    first when the blocks are multi-line, as such blocks are usually set)."""
    return insert_lines_after(index, after.span, block if one_line else "\n" + block)


class StateEditor:
    """Collects changes to one state's settings and turns them into
    non-overlapping edits: ``set`` replaces a value or adds the setting,
    ``remove`` deletes it (the whole line when nothing else is on it; a
    trailing comment stays)."""

    def __init__(self, index: LineIndex, state: m.State) -> None:
        self.index = index
        self.state = state
        self.settings = {s.key: s for s in settings_of(index.text, state)}
        self._replace: dict[str, str] = {}
        self._remove: set[str] = set()
        self._add: list[tuple[str, str]] = []

    def has(self, key: str) -> bool:
        return key in self.settings

    def text_of(self, key: str) -> Optional[str]:
        s = self.settings.get(key)
        return None if s is None else self.index.text[s.value.start : s.value.end]

    def set(self, key: str, value: str) -> None:
        if key in self.settings:
            if self.text_of(key) != value:
                self._replace[key] = value
        else:
            self._add.append((key, value))

    def remove(self, key: str) -> None:
        if key in self.settings:
            self._remove.add(key)

    def edits(self) -> list[TextEdit]:
        out = []
        for key, value in self._replace.items():
            out.append(replace(self.settings[key].value, value))
        for key in self._remove:
            out.append(self._removal(self.settings[key]))
        if self._add:
            out.append(self._addition())
        return out

    def _removal(self, s: Setting) -> TextEdit:
        text, index = self.index.text, self.index
        line = index.position(s.key_start)[0]
        start_of_line, end_of_line = index.line_start(line), index.line_end(line)
        before = text[start_of_line : s.key_start]
        after = text[s.value.end : end_of_line]
        if not before.strip() and not after.strip():
            # Alone on its line: remove the line and its line ending.
            nxt = index.line_start(line + 1) if line < index.line_count else len(text)
            return TextEdit(index.span(start_of_line, nxt), "")
        start = s.key_start
        while start > start_of_line and text[start - 1] in " \t":
            start -= 1
        if start == start_of_line:  # first on its line: keep what follows in place
            end = s.value.end
            while end < end_of_line and text[end] in " \t":
                end += 1
            return TextEdit(index.span(s.key_start, end), "")
        return TextEdit(index.span(start, s.value.end), "")

    def _addition(self) -> TextEdit:
        index, state = self.index, self.state
        kept = [s for k, s in self.settings.items() if k not in self._remove]
        anchor = max((s.value.end for s in kept), default=None)
        style = style_of(index, state)
        close_line = index.position(state.span.end - 1)[0]
        if anchor is None:
            anchor = index.text.index("{", state.name.span.end) + 1
        anchor_line = index.position(anchor)[0]
        if style.one_line or anchor_line == close_line:
            new = "".join(" " + style.setting(k, v) for k, v in self._add)
            return TextEdit(index.span(anchor, anchor), new)
        lines = "\n".join(style.setting_indent + style.setting(k, v) for k, v in self._add)
        return insert_lines_after(index, index.span(anchor, anchor), lines)

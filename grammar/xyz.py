"""Read the atoms of an XYZ file (the common exchange format of geometries).

The format: a first line with the number of atoms, a comment line, then one
line per atom, ``SYMBOL x y z`` in angstrom (further columns, as some
programs write, are ignored).  Only the first frame is read.  Every atom
keeps the span of its text in the .xyz file, so a finding about an atom
points into that file; every problem is a located ``syntax-error``.
"""
from __future__ import annotations

import math
import re

from . import model as m
from .findings import Finding, Severity
from .text_index import LineIndex

_FIELD = re.compile(r"\S+")
_NUMBER = re.compile(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eEdD][+-]?\d+)?$")
MAX_ATOMS = 100_000


def parse_xyz(path: str, text: str) -> tuple[tuple[m.Atom, ...], list[Finding], LineIndex]:
    """(atoms, findings, line index) of one XYZ file; never raises."""
    index = LineIndex(text, path)
    findings: list[Finding] = []

    def error(start: int, end: int, message: str) -> None:
        findings.append(Finding("syntax-error", Severity.ERROR, message, index.span(start, end)))

    def fields(line: int) -> list[tuple[str, int, int]]:
        base = index.line_start(line)
        body = text[base:index.line_end(line)]
        return [(mt.group(), base + mt.start(), base + mt.end()) for mt in _FIELD.finditer(body)]

    lines = index.line_count
    first = fields(1)
    if not first:
        error(0, index.line_end(1), "an .xyz file starts with the number of atoms; this line is empty")
        return (), findings, index
    word, s, e = first[0]
    if not word.isdigit() or len(first) > 1:
        error(s, first[-1][2], f"an .xyz file starts with the number of atoms, not `{index.text[s:first[-1][2]]}`")
        return (), findings, index
    count = int(word)
    if count > MAX_ATOMS:
        error(s, e, f"{count} atoms is more than the {MAX_ATOMS} an .xyz geometry may have")
        return (), findings, index
    atoms: list[m.Atom] = []
    for line in range(3, 3 + count):
        if line > lines or not fields(line):
            where = index.line_start(1)
            error(where, index.line_end(1),
                  f"the first line announces {count} atoms but the file has {len(atoms)} atom line"
                  f"{'s' * (len(atoms) != 1)}")
            return tuple(atoms), findings, index
        parts = fields(line)
        if len(parts) < 4:
            error(parts[0][1], parts[-1][2], f"an atom line is `SYMBOL x y z`; line {line} has {len(parts)} "
                  f"field{'s' * (len(parts) != 1)}")
            continue
        (sym, ss, se), *coords = parts[:4]
        values = []
        for value, cs, ce in coords:
            number = float(value.replace("d", "e").replace("D", "e")) if _NUMBER.match(value) else math.nan
            if not math.isfinite(number):
                error(cs, ce, f"`{value}` is not a coordinate (a number in angstrom)")
            values.append(number)
        if not all(math.isfinite(v) for v in values):
            continue
        spans = tuple(index.span(cs, ce) for _, cs, ce in coords)
        atoms.append(m.Atom(m.Located(sym, index.span(ss, se)), (values[0], values[1], values[2]), spans, False,
                            index.span(ss, parts[3][2])))
    for line in range(3 + count, lines + 1):
        extra = fields(line)
        if extra:
            error(extra[0][1], extra[-1][2], f"line {line} follows the {count} atoms the first line announces "
                  "(only one geometry is read from an .xyz file)")
            break
    return tuple(atoms), findings, index


def format_xyz(atoms, comment: str = "") -> str:
    """XYZ text of (symbol, x, y, z) in angstrom, 10 decimals (sub-femtometre)."""
    rows = [str(len(atoms)), comment.replace("\n", " ")]
    rows += [f"{sym:<2} {x:16.10f} {y:16.10f} {z:16.10f}" for sym, x, y, z in atoms]
    return "\n".join(rows) + "\n"

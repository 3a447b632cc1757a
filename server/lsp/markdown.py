"""Markdown for hover text: deck words and messages shown as written.

Basis words hold `*`, `+` and `(`, names hold `_`, messages quote words
in backticks: written into Markdown unescaped, `6-31+G*` renders as
`6-31+G` and `**6-31+g***` as a broken heading.  CommonMark lets a
backslash escape any ASCII punctuation; a code span shows its content
literally, provided its fence is longer than any run of backticks inside.
"""
from __future__ import annotations

import re

# Punctuation that can start or end Markdown syntax, also inside a table cell (|).
_SPECIAL = re.compile(r"([\\`*_\[\]<>#|~&!])")
_CODE = re.compile(r"(`+)([^`]|[^`].*?[^`])\1(?!`)")


def escape_plain(text: str) -> str:
    """``text`` with every Markdown-significant character escaped."""
    return _SPECIAL.sub(r"\\\1", text)


def code(text: str) -> str:
    """``text`` as an inline code span, whatever backticks it holds."""
    longest = max((len(run) for run in re.findall(r"`+", text)), default=0)
    fence = "`" * (longest + 1)
    pad = " " if text.startswith("`") or text.endswith("`") or (text.startswith(" ") and text.endswith(" ")) else ""
    return f"{fence}{pad}{text}{pad}{fence}"


def escape(text: str) -> str:
    """A message for Markdown: its `quoted` words stay code spans, the rest
    is escaped."""
    out, pos = [], 0
    for mt in _CODE.finditer(text):
        out.append(escape_plain(text[pos:mt.start()]))
        out.append(code(mt.group(2)))
        pos = mt.end()
    out.append(escape_plain(text[pos:]))
    return "".join(out)


def link(label: str, url: str) -> str:
    """``[label](url)``; the URL in angle brackets when it holds spaces or parentheses."""
    target = f"<{url}>" if re.search(r"[\s()<>]", url) else url
    return f"[{escape_plain(label)}]({target})"

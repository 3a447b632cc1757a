"""Data derived from a shipped file, kept on disk in a form quick to load.

A compressed JSON index costs tens of milliseconds to decompress and decode
on every start of the command line; the same data written with ``marshal``
loads in a fraction of that.  ``load`` returns one named part of what
``build()`` derives from ``source``, read from the cache folder (the one of
``DECKWARD_CACHE_DIR``, else ``~/.cache/deckward``) when an entry made from the
same file (path, size, modification time) by the same Python exists, else
built, written for the next start and returned.  A cache folder that cannot
be written or an entry that cannot be read only means building again.
``recall`` and ``remember`` do the same for a small file read anyway,
keyed by its whole text (the configuration: reading it as YAML costs more
than the rest of a start's configuration handling).
"""
from __future__ import annotations

import marshal
import os
import sys
import zlib

from deckward import __version__

from .parser import _cache_dir
from .safe_open import replace_file

_FORMAT = 1


def _stamp(source: str):
    st = os.stat(source)
    return (_FORMAT, __version__, sys.implementation.cache_tag, marshal.version, os.path.abspath(source),
            st.st_size, st.st_mtime_ns)


def _entry(source: str, part: str) -> str:
    name = os.path.basename(source).split(".")[0]
    where = zlib.crc32(os.path.abspath(source).encode("utf-8", "surrogatepass"))
    return os.path.join(_cache_dir(), "derived", f"{name}-{where:08x}.{part}.marshal")


def load(source: str, part: str, build):
    """Part ``part`` of ``build()`` (a dict of marshal-able values by part
    name) for the file ``source`` as it is now."""
    try:
        stamp = _stamp(source)
    except OSError:
        return build()[part]
    try:
        with open(_entry(source, part), "rb") as f:
            stored, value = marshal.loads(f.read())  # marshal.load(f) reads in small pieces
        if stored == stamp:
            return value
    except (OSError, EOFError, ValueError, TypeError):
        pass
    parts = build()
    for name, value in parts.items():
        _write(_entry(source, name), (stamp, value))
    return parts[part]


def _write(path: str, entry) -> None:
    try:
        replace_file(path, marshal.dumps(entry))
    except (OSError, ValueError):
        pass  # not remembered: the next start builds it again


def recall(source: str, part: str, text: str):
    """What ``remember`` stored for ``source`` when it held exactly ``text``
    (for a small file whose content is read anyway), else None."""
    try:
        with open(_entry(source, part), "rb") as f:
            stored, value = marshal.loads(f.read())
    except (OSError, EOFError, ValueError, TypeError):
        return None
    return value if stored == _text_stamp(text) else None


def remember(source: str, part: str, text: str, value) -> None:
    _write(_entry(source, part), (_text_stamp(text), value))


def _text_stamp(text: str):
    # the deckward version too: what a clean read of the text yields may change with a release
    return (_FORMAT, __version__, sys.implementation.cache_tag, marshal.version, text)

"""Reading a deck (or any file deckward reads) without hanging or overrunning.

``open(path).read()`` blocks forever on a FIFO with no writer, never ends on
``/dev/zero`` and raises ``ValueError`` (not ``OSError``) for a path with a
NUL character or a lone surrogate.  Every reader of user-named files goes
through ``read_regular``: the file is opened without blocking, checked to be
a regular file by its open descriptor (so a swap between check and open
cannot fool it), and read up to a size limit.  Every problem is an
``OSError`` whose ``strerror`` says in words what is wrong, so callers turn
it into one located finding or one line.
"""
from __future__ import annotations

import errno
import itertools
import os
import stat

MAX_FILE_BYTES = 20 * 1024 * 1024


class NotRegularFile(OSError):
    """The path names a FIFO, a device, a socket or a folder."""


def path_problem(path: str) -> str | None:
    """Why ``path`` cannot name a file at all (a NUL character, a lone
    surrogate), else None."""
    if "\0" in path:
        return "the path contains a NUL character"
    try:
        os.fsencode(path)
    except UnicodeError:
        return "the path contains a character that cannot be a file name"
    return None


def kind_of(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    return "not a regular file"


def is_regular_file(path: str) -> bool:
    """``path`` (after symbolic links) is a regular file; never raises."""
    try:
        return stat.S_ISREG(os.stat(path).st_mode)
    except (OSError, ValueError):
        return False


def read_regular(path: str, limit: int = MAX_FILE_BYTES) -> bytes:
    """Up to ``limit + 1`` bytes of the regular file at ``path`` (a caller
    sees that the file is too large when more than ``limit`` come back).

    Raises ``NotRegularFile`` for anything but a regular file and
    ``OSError`` (with ``strerror`` in words) for a path that cannot name a
    file; never blocks on a FIFO or a device."""
    problem = path_problem(path)
    if problem is not None:
        raise OSError(errno.EINVAL, problem, path)
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0) | getattr(os, "O_CLOEXEC", 0)
    fd = os.open(path, flags)
    try:
        mode = os.fstat(fd).st_mode
        if not stat.S_ISREG(mode):
            what = kind_of(mode)
            if stat.S_ISDIR(mode):
                raise IsADirectoryError(errno.EISDIR, f"it is {what}", path)
            raise NotRegularFile(errno.EINVAL, f"it is {what}, not a regular file", path)
        chunks = []
        left = limit + 1
        while left > 0:
            chunk = os.read(fd, min(left, 1 << 20))
            if not chunk:
                break
            chunks.append(chunk)
            left -= len(chunk)
        return b"".join(chunks)
    finally:
        os.close(fd)


def resolved_path(path: str, real_folders: dict[str, str]) -> str:
    """``os.path.realpath(path)``, asking the system about each folder of a
    run once: ``real_folders`` remembers folder -> its real path, so a file
    that is not itself a link costs one ``lstat`` instead of one per folder
    of its path (thousands of decks in a few folders).  The memo belongs to
    one run; a long-lived caller (the editor) must not keep it."""
    absolute = os.path.abspath(path)
    folder, name = os.path.split(absolute)
    if not name or name in (".", ".."):
        return os.path.realpath(absolute)
    real_folder = real_folders.get(folder)
    if real_folder is None:
        real_folder = real_folders[folder] = os.path.realpath(folder)
    try:
        if stat.S_ISLNK(os.lstat(absolute).st_mode):
            return os.path.realpath(absolute)
    except (OSError, ValueError):
        pass  # a file that does not exist (or cannot): realpath keeps its name too
    return os.path.join(real_folder, name)


_TEMPORARIES = itertools.count()


def replace_file(path: str, data: bytes) -> None:
    """Write ``data`` as the file ``path`` atomically, for deckward's own
    cache files: to a temporary name of this process in the same folder,
    then renamed over ``path``, so a reader (a parallel worker, a second CI
    job sharing the cache) sees the old file, the new one or none, never
    half of one.  Raises OSError; the temporary file never stays behind.
    (A user's deck is written by ``deckward.server.atomic_write``, which
    also keeps its mode and refuses a file changed meanwhile.)"""
    folder = os.path.dirname(path) or "."
    os.makedirs(folder, exist_ok=True)
    tmp = os.path.join(folder, f".{os.path.basename(path)}.{os.getpid()}.{next(_TEMPORARIES)}.tmp")
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
        with os.fdopen(fd, "wb") as f:
            f.write(data)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise

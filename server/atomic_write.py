"""Replacing a file's bytes so that it is never left damaged.

The new bytes go to a temporary file in the same folder, which is flushed,
fsynced, given the original's permissions and renamed over the original: a
reader (or a crash) sees either the old file or the new one, never half of
each.  The original is compared with the snapshot taken when it was read,
just before the rename, so an edit made meanwhile (an editor saving the
file) is not overwritten; the old file is kept under a second name across the
rename and compared once more afterwards, so a write that lands in the very
last moment is put back rather than lost.  A read-only file is refused even
when the process could override the permission (root), because read-only is
the owner's word; a file with other hard links is refused, because replacing
it would leave the other names holding the old text.  Temporary files carry
the writer's process id, so ones left by a killed writer are recognised and
removed by the next write in that folder.
"""
from __future__ import annotations

import hashlib
import os
import re
import secrets
import stat
from dataclasses import dataclass

from deckward.grammar.safe_open import MAX_FILE_BYTES, read_regular

_OWN_TEMP = re.compile(r"^\.(?P<base>.+)\.(?P<pid>\d+)\.[0-9a-f]{12}\.deckward-(tmp|keep)$")
STALE_AFTER_S = 60.0  # a temporary file younger than this may belong to a write in progress


class WriteRefused(Exception):
    """The file was not written; the message says why (the file is untouched)."""


@dataclass(frozen=True)
class Snapshot:
    """What a file held when it was read."""

    path: str
    data: bytes
    size: int
    mtime_ns: int
    inode: int

    @property
    def digest(self) -> str:
        return hashlib.sha256(self.data).hexdigest()


def read_snapshot(path: str) -> Snapshot:
    """Read ``path`` and remember its state (raises OSError)."""
    st = os.stat(path)
    data = read_regular(path, MAX_FILE_BYTES)
    if len(data) > MAX_FILE_BYTES:
        raise OSError(27, f"it is larger than {MAX_FILE_BYTES // (1024 * 1024)} MB", path)
    return Snapshot(path, data, st.st_size, st.st_mtime_ns, st.st_ino)


def unchanged_since(snapshot: Snapshot) -> bool:
    """The file still holds exactly the snapshot's bytes."""
    try:
        st = os.stat(snapshot.path)
        if st.st_size != snapshot.size or st.st_ino != snapshot.inode:
            return False
        return read_regular(snapshot.path, snapshot.size) == snapshot.data
    except OSError:
        return False


def _holds_snapshot(path: str, snapshot: Snapshot) -> bool:
    """``path`` is the snapshot's file (same inode) with the same bytes."""
    try:
        return os.stat(path).st_ino == snapshot.inode and read_regular(path, snapshot.size) == snapshot.data
    except OSError:
        return False


def _own_name(target: str, kind: str) -> str:
    folder, base = os.path.split(target)
    return os.path.join(folder, f".{base}.{os.getpid()}.{secrets.token_hex(6)}.deckward-{kind}")


def _new_own_file(target: str, kind: str) -> tuple[str, int]:
    """A new file of our own naming beside ``target``, open for writing (only we can read it yet)."""
    tmp = _own_name(target, kind)
    try:
        return tmp, os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_CLOEXEC", 0), 0o600)
    except OSError as e:
        raise WriteRefused(f"no temporary file can be made in its folder ({e.strerror or e})")


def _pid_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        return True  # exists, owned by someone else
    return True


def clean_stale_temporaries(folder: str) -> list[str]:
    """Remove temporary files of our own naming whose writer is gone (its
    process no longer exists and the file is older than STALE_AFTER_S);
    returns the names removed."""
    import time

    removed = []
    try:
        names = os.listdir(folder or ".")
    except OSError:
        return removed
    now = time.time()
    for name in names:
        match = _OWN_TEMP.match(name)
        if match is None:
            continue
        path = os.path.join(folder, name)
        try:
            st = os.lstat(path)
        except OSError:
            continue
        if not stat.S_ISREG(st.st_mode) or now - st.st_mtime < STALE_AFTER_S:
            continue
        pid = int(match.group("pid"))
        if pid != os.getpid() and _pid_alive(pid):
            continue
        try:
            os.unlink(path)
            removed.append(name)
        except OSError:
            pass
    return removed


def _is_read_only(path: str, st: os.stat_result) -> bool:
    return not (st.st_mode & (stat.S_IWUSR | stat.S_IWGRP | stat.S_IWOTH)) or not os.access(path, os.W_OK)


def write_atomically(snapshot: Snapshot, data: bytes) -> None:
    """Replace the file of ``snapshot`` with ``data``, keeping its mode (and
    owner where allowed).  Raises ``WriteRefused`` and leaves the file as it
    was when it is read-only, changed since the snapshot, or cannot be
    replaced."""
    target = os.path.realpath(snapshot.path)  # write through a symbolic link, do not replace it
    try:
        st = os.stat(target)
    except OSError as e:
        raise WriteRefused(f"it can no longer be read ({e.strerror or e})")
    if not stat.S_ISREG(st.st_mode):
        raise WriteRefused("it is not a regular file")
    if _is_read_only(target, st):
        raise WriteRefused("it is read-only")
    folder = os.path.dirname(target) or "."
    clean_stale_temporaries(folder)
    if st.st_nlink > 1:
        raise WriteRefused(f"it has {st.st_nlink} hard links, and replacing it would leave the other names "
                           "with the old text")
    if not unchanged_since(snapshot):
        raise WriteRefused("it changed on disk while being fixed")
    tmp, fd = _new_own_file(target, "tmp")
    keep = None
    try:
        try:
            with os.fdopen(fd, "wb") as f:
                f.write(data)
                f.flush()
                os.fsync(f.fileno())
                os.fchmod(f.fileno(), stat.S_IMODE(st.st_mode))
                try:
                    os.fchown(f.fileno(), st.st_uid, st.st_gid)
                except (OSError, AttributeError):
                    pass  # not allowed for other owners; the mode is what matters
        except OSError as e:
            raise WriteRefused(f"the new text could not be written ({e.strerror or e})")
        if not unchanged_since(snapshot):  # the last moment before the rename
            raise WriteRefused("it changed on disk while being fixed")
        keep = _own_name(target, "keep")
        try:
            os.link(target, keep)  # the old file, reachable after the rename
        except OSError:
            keep = None  # no hard links on this file system: the check above is the last one
        try:
            os.replace(tmp, target)
        except OSError as e:
            raise WriteRefused(f"it could not be replaced ({e.strerror or e})")
        tmp = None
        if keep is not None and not _holds_snapshot(keep, snapshot):
            # written to in place between the last check and the rename:
            # put that text back rather than lose it
            try:
                os.replace(keep, target)
                keep = None
            except OSError as e:
                kept, keep = keep, None  # never delete the only copy of that text
                raise WriteRefused(f"it changed on disk while being fixed, and its text is kept in {kept} "
                                   f"({e.strerror or e})")
            _fsync_folder(folder)
            raise WriteRefused("it changed on disk while being fixed")
        _fsync_folder(folder)
    finally:
        for leftover in (tmp, keep):
            if leftover is not None:
                try:
                    os.unlink(leftover)
                except OSError:
                    pass


def _fsync_folder(folder: str) -> None:
    """Make the rename durable (best effort: not every system allows it)."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def write_new(path: str, data: bytes, overwrite: bool = False) -> None:
    """Write a whole file at once: the bytes go to a temporary file in the
    same folder, fsynced, then take the name in one step, so nobody ever
    sees half a file.  Without ``overwrite`` an existing file is refused
    (``WriteRefused``), also when it appears while writing (the name is
    taken with a hard link, which fails if it exists)."""
    folder = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(folder):
        raise WriteRefused("its folder does not exist")
    if not overwrite and os.path.lexists(path):
        raise WriteRefused("it exists (use --force to replace it)")
    tmp, fd = _new_own_file(os.path.abspath(path), "new")  # named like the fixer's, so stale ones are cleaned alike
    try:
        try:
            with os.fdopen(fd, "wb") as f:
                f.write(data)
                f.flush()
                os.fsync(f.fileno())
                os.fchmod(f.fileno(), 0o666 & ~_umask())
        except OSError as e:
            raise WriteRefused(f"it could not be written ({e.strerror or e})")
        try:
            if overwrite:
                os.replace(tmp, path)
            else:
                os.link(tmp, path)
        except FileExistsError:
            raise WriteRefused("it exists (use --force to replace it)")
        except OSError as e:
            raise WriteRefused(f"it could not be written ({e.strerror or e})")
        _fsync_folder(folder)
    finally:
        try:
            os.unlink(tmp)
        except OSError:
            pass


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask

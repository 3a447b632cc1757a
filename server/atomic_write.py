"""Replacing a file's bytes so that it is never left damaged.

The new bytes go to a temporary file in the same folder, which is flushed,
fsynced, given the original's permissions and renamed over the original: a
reader (or a crash) sees either the old file or the new one, never half of
each.  The original is compared with the snapshot taken when it was read,
just before the rename, so an edit made meanwhile (an editor saving the
file) is not overwritten.  A read-only file is refused even when the process
could override the permission (root), because read-only is the owner's word.
"""
from __future__ import annotations

import hashlib
import os
import stat
import tempfile
from dataclasses import dataclass


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
    with open(path, "rb") as f:
        st = os.fstat(f.fileno())
        data = f.read()
    return Snapshot(path, data, st.st_size, st.st_mtime_ns, st.st_ino)


def unchanged_since(snapshot: Snapshot) -> bool:
    """The file still holds exactly the snapshot's bytes."""
    try:
        st = os.stat(snapshot.path)
        if st.st_size != snapshot.size or st.st_ino != snapshot.inode:
            return False
        with open(snapshot.path, "rb") as f:
            return f.read() == snapshot.data
    except OSError:
        return False


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
    if _is_read_only(target, st):
        raise WriteRefused("it is read-only")
    if not unchanged_since(snapshot):
        raise WriteRefused("it changed on disk while being fixed")
    folder = os.path.dirname(target) or "."
    try:
        fd, tmp = tempfile.mkstemp(dir=folder, prefix="." + os.path.basename(target) + ".", suffix=".tmp")
    except OSError as e:
        raise WriteRefused(f"no temporary file can be made in its folder ({e.strerror or e})")
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
        try:
            os.replace(tmp, target)
        except OSError as e:
            raise WriteRefused(f"it could not be replaced ({e.strerror or e})")
        tmp = None
        _fsync_folder(folder)
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
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
    try:
        fd, tmp = tempfile.mkstemp(dir=folder, prefix="." + os.path.basename(path) + ".", suffix=".tmp")
    except OSError as e:
        raise WriteRefused(f"no temporary file can be made in its folder ({e.strerror or e})")
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

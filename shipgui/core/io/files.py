"""Crash-safe file writing: a reader sees the old file or the new one, never half.

Every file is first written in full to a temporary file in the target's own
folder (so the final rename stays on one file system), flushed to disk, and
then renamed over the target in one step.  :func:`write_files_atomic` does
this for several files at once: all are written before the first is put in
place, and if putting one in place fails, the files put in place before it
are restored, so a run writes all of its files or none.

Permissions stay what a user expects: a new file gets the usual mode (the
process umask applied to 0666, as any program's new file), and a file that is
replaced keeps its mode.  The temporary name is short and fixed in length
(``.shipgui-`` and 8 hex digits), so any name the file system accepts for the
target also works for its temporary file.
"""

from __future__ import annotations

import errno
import os
import secrets
import stat
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

__all__ = ["write_bytes_atomic", "write_text_atomic", "write_files_atomic", "fsync_directory",
           "write_problem", "name_refused", "TEMP_PREFIX"]

TEMP_PREFIX = ".shipgui-"
_TEMP_SUFFIX = ".tmp"
# Failures that come from the name or place the user chose, not from the machine.
_REFUSED = {errno.ENAMETOOLONG, errno.EINVAL, errno.EILSEQ, errno.EACCES, errno.EPERM,
            errno.EROFS, errno.ENOENT, errno.ENOTDIR, errno.EISDIR, errno.EEXIST}


def write_bytes_atomic(path: str | Path, data: bytes) -> None:
    """Replace ``path`` with ``data`` in one step; on failure the old file stays."""
    write_files_atomic({path: data})


def write_text_atomic(path: str | Path, text: str) -> None:
    write_bytes_atomic(path, text.encode("utf-8"))


def write_files_atomic(files: Mapping[str | Path, bytes]) -> None:
    """Write every file of ``files`` (path -> content) or none of them.

    Raises the ``OSError`` of the first failure, with ``filename`` set to the
    path as given; the files already replaced by then are put back as they were
    (a new file is removed again) and no temporary file is left behind.
    Symbolic links are followed: the file a link points to is replaced, the
    link stays.
    """
    staged: list[_Staged] = []
    try:
        for path, data in files.items():
            staged.append(_stage(Path(path), data))
        _put_in_place(staged)
    finally:
        for item in staged:
            item.discard()
    for folder in dict.fromkeys(item.target.parent for item in staged):
        fsync_directory(folder)


def fsync_directory(folder: str | Path) -> None:
    """Make a rename in ``folder`` durable (a no-op where folders cannot be synced)."""
    try:
        dir_fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(dir_fd)
    except OSError:
        pass
    finally:
        os.close(dir_fd)


def name_refused(exc: OSError) -> bool:
    """Whether a write failed because of the name or place chosen (a bad argument)
    rather than the machine (a full disk, a failing drive)."""
    return exc.errno in _REFUSED


def write_problem(exc: OSError) -> str:
    """The reason a write failed, in a dispatcher's words."""
    reasons = {
        errno.ENOSPC: "the disk is full",
        errno.EDQUOT: "the disk quota is used up",
        errno.ENAMETOOLONG: "the name is too long for this file system",
        errno.EACCES: "permission denied",
        errno.EPERM: "permission denied",
        errno.EROFS: "the folder is on a read-only file system",
        errno.ENOENT: "the folder does not exist",
        errno.ENOTDIR: "a part of the path is not a folder",
        errno.EISDIR: "that is a folder",
        errno.EINVAL: "the file system does not accept this name",
        errno.EILSEQ: "the file system does not accept the characters of this name",
    }
    return reasons.get(exc.errno or 0, exc.strerror or str(exc))


# --------------------------------------------------------------------- internals

@dataclass
class _Staged:
    """A target and its fully written temporary file; later also its backup."""

    given: Path  # as the caller named it, for messages
    target: Path  # links resolved
    temp: Path | None
    backup: Path | None = None  # a hard link to the replaced file
    old: bytes | None = None  # the replaced file's bytes where no hard link can be made
    existed: bool = False
    placed: bool = False

    def discard(self) -> None:
        for path in (self.temp, self.backup):
            if path is not None:
                try:
                    os.unlink(path)
                except OSError:
                    pass
        self.temp = self.backup = None


def _stage(given: Path, data: bytes) -> _Staged:
    target = Path(os.path.realpath(given))
    try:
        mode = _kept_mode(target)
        fd, temp = _open_temp(target.parent)
    except OSError as exc:
        raise _named(exc, given) from None
    item = _Staged(given, target, temp, existed=mode is not None)
    try:
        with os.fdopen(fd, "wb") as f:
            if mode is not None and hasattr(os, "fchmod"):  # a replaced file keeps its mode
                os.fchmod(f.fileno(), mode)
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
    except OSError as exc:
        item.discard()
        raise _named(exc, given) from None
    except BaseException:
        item.discard()
        raise
    return item


def _kept_mode(target: Path) -> int | None:
    """The permission bits of the file being replaced; None for a new file."""
    try:
        info = os.stat(target)
    except FileNotFoundError:
        return None
    if stat.S_ISDIR(info.st_mode):
        raise IsADirectoryError(errno.EISDIR, os.strerror(errno.EISDIR), str(target))
    return stat.S_IMODE(info.st_mode)


def _open_temp(folder: Path) -> tuple[int, Path]:
    """A new file with a short random name in ``folder``, created with mode 0666
    so that the umask gives it the usual permissions."""
    flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0) \
        | getattr(os, "O_CLOEXEC", 0)
    for _ in range(100):
        temp = folder / f"{TEMP_PREFIX}{secrets.token_hex(4)}{_TEMP_SUFFIX}"
        try:
            return os.open(temp, flags, 0o666), temp
        except FileExistsError:
            continue
    raise FileExistsError(errno.EEXIST, "no free temporary name", str(folder))


def _put_in_place(staged: list[_Staged]) -> None:
    """Rename every temporary file over its target; undo all on the first failure."""
    try:
        for item in staged:
            _keep_backup(item)
            try:
                os.replace(item.temp, item.target)  # type: ignore[arg-type]
            except OSError as exc:
                raise _named(exc, item.given) from None
            item.temp, item.placed = None, True
    except BaseException:
        for item in reversed(staged):
            _restore(item)
        raise


def _keep_backup(item: _Staged) -> None:
    """Keep what ``item`` replaces until the whole set is in place: a hard link
    (no copy, no space), or the bytes where the file system has no hard links."""
    if not item.existed:
        return
    for _ in range(100):
        backup = item.target.parent / f"{TEMP_PREFIX}{secrets.token_hex(4)}{_TEMP_SUFFIX}"
        try:
            os.link(item.target, backup)
        except FileExistsError:
            continue
        except OSError:
            break
        item.backup = backup
        return
    try:
        item.old = item.target.read_bytes()
    except OSError as exc:
        raise _named(exc, item.given) from None


def _restore(item: _Staged) -> None:
    """Put back what was at ``item``'s target before this run (best effort)."""
    if not item.placed:
        return
    try:
        if item.backup is not None:
            os.replace(item.backup, item.target)
            item.backup = None
        elif item.old is not None:
            fd, temp = _open_temp(item.target.parent)
            with os.fdopen(fd, "wb") as f:
                f.write(item.old)
                f.flush()
                os.fsync(f.fileno())
            os.replace(temp, item.target)
        else:
            os.unlink(item.target)
    except OSError:
        pass
    item.placed = False


def _named(exc: OSError, given: Path) -> OSError:
    """``exc`` naming the file the caller asked for (not a temporary name)."""
    return type(exc)(exc.errno, exc.strerror or str(exc), str(given))

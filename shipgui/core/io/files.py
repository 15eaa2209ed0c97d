"""Crash-safe file writing: a reader sees the old file or the new one, never half."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

__all__ = ["write_bytes_atomic", "write_text_atomic", "fsync_directory"]


def write_bytes_atomic(path: str | Path, data: bytes) -> None:
    """Write to a temporary file in the same folder, fsync, then replace ``path``."""
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as f:
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    fsync_directory(path.parent)


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


def write_text_atomic(path: str | Path, text: str) -> None:
    write_bytes_atomic(path, text.encode("utf-8"))

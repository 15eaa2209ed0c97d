"""Small pieces of wording the whole app shares: counts with the right plural, and
why a file could not be written in words a dispatcher understands."""

from __future__ import annotations

import errno

__all__ = ["count", "os_error_text"]

_PLURALS = {"is": "are", "this": "these", "was": "were", "has": "have"}


def count(n: int, noun: str, plural: str | None = None) -> str:
    """'1 job', '3 jobs', '0 vehicles'; ``plural`` for irregular nouns."""
    if n == 1:
        return f"1 {noun}"
    return f"{n} {plural or _PLURALS.get(noun, noun + 's')}"


# Reasons the operating system gives, said plainly (its own text reads
# "Errno 28" or, through Qt, "Writing canceled by application").
_REASONS = {
    errno.ENOSPC: "the disk is full",
    errno.EDQUOT: "your disk quota is used up",
    errno.EROFS: "the disk is read-only",
    errno.EACCES: "you are not allowed to write there",
    errno.EPERM: "you are not allowed to write there",
    errno.ENOENT: "the folder does not exist (any more)",
    errno.ENAMETOOLONG: "the file name is too long",
    errno.EISDIR: "a folder has that name",
}


def os_error_text(exc: OSError) -> str:
    """Why writing failed, e.g. 'the disk is full' (callers name the file: the
    system's own file name may be a temporary one)."""
    return _REASONS.get(exc.errno or 0) or exc.strerror or str(exc) or "an unknown reason"

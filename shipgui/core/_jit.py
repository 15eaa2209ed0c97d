"""One way to compile the numeric kernels.

Every kernel is decorated where it is defined with :func:`jit`.  With numba
installed, that is ``numba.njit(cache=True, nogil=True)``: the kernel is
compiled on its first call and the machine code is cached (in the package's
``__pycache__``, or, when that folder is not writable, in the user's cache
folder: numba picks the first writable place), so later starts only load it.
``nogil`` lets the app's window keep running while a kernel works.  numba's
own switch ``NUMBA_DISABLE_JIT=1`` runs every kernel as plain Python (the
tests do that once); without numba the decorator returns the function as it
is.  Nothing is patched at run time, so first use from several threads is
safe (numba compiles under its own lock).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TypeVar

__all__ = ["jit", "COMPILED"]

F = TypeVar("F", bound=Callable)

try:
    import numba
except ImportError:  # pragma: no cover - numba is a declared dependency
    numba = None

# True when kernels are compiled to machine code (numba present and not disabled).
COMPILED = numba is not None and not numba.config.DISABLE_JIT


def jit(func: F) -> F:
    """Compile ``func`` with numba (cached, releasing the GIL), or leave it as Python."""
    if numba is None:
        return func
    return numba.njit(cache=True, nogil=True)(func)

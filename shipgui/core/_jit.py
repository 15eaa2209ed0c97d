"""One way to compile the numeric kernels.

Every kernel is decorated where it is defined with :func:`jit`.  With numba
installed, that is ``numba.njit(cache=True, nogil=True)``: the kernel is
compiled on its first call and the machine code is cached, so later starts
only load it.  numba picks the cache folder: the package's ``__pycache__``
when it is writable, else the user's cache folder (``$XDG_CACHE_HOME/numba``
or ``~/.cache/numba`` on Linux; for a frozen app always there), or
``NUMBA_CACHE_DIR`` when set.  ``nogil`` lets the app's window keep running
while a kernel works.  numba's own switch ``NUMBA_DISABLE_JIT=1`` runs every
kernel as plain Python; without numba the decorator returns the function as
it is.  Nothing is patched at run time, so first use from several threads is
safe (numba compiles under its own lock).

Small helpers are marked ``inline=True``: numba copies them into each kernel
that calls them instead of compiling and linking them on their own, which
saves about a fifth of the first start's compile time.
"""

from __future__ import annotations

from collections.abc import Callable
from functools import partial
from typing import TypeVar

__all__ = ["jit", "COMPILED"]

F = TypeVar("F", bound=Callable)

try:
    import numba
except ModuleNotFoundError as exc:  # pragma: no cover - numba is a declared dependency
    if exc.name != "numba":
        raise  # numba is there but broken: say so rather than run 100 times slower
    numba = None

# True when kernels are compiled to machine code (numba present and not disabled).
COMPILED = numba is not None and not numba.config.DISABLE_JIT


def jit(func: F | None = None, *, inline: bool = False):
    """Compile ``func`` with numba (cached, releasing the GIL), or leave it as Python.

    ``inline=True`` marks a small helper that is compiled into its callers.
    """
    if func is None:
        return partial(jit, inline=inline)
    if numba is None:
        return func
    options = {"nogil": True, **({"inline": "always"} if inline else {})}
    try:
        return numba.njit(cache=True, **options)(func)
    except RuntimeError:
        # No writable cache folder at all (read-only package and home): compile
        # on every start rather than fail to import.
        return numba.njit(**options)(func)

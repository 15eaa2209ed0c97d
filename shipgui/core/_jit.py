"""numba, when it is installed and not switched off with SHIPGUI_NO_NUMBA=1."""

from __future__ import annotations

import os
from collections.abc import Callable

__all__ = ["numba_jit"]


def numba_jit() -> Callable | None:
    """``numba.njit(cache=True, nogil=True)``, or None: callers then run the
    same kernels as plain Python (or another kernel)."""
    if os.environ.get("SHIPGUI_NO_NUMBA"):
        return None
    try:
        import numba
    except ImportError:
        return None
    return numba.njit(cache=True, nogil=True)

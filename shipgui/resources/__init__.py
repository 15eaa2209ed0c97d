"""Files shipped with the package: the invented demo day and the app icon."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

__all__ = ["resource_path"]


def resource_path(*parts: str) -> Path:
    """A file shipped in this package (a source checkout, a wheel or a bundle)."""
    return Path(str(resources.files(__name__).joinpath(*parts)))

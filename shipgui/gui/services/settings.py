"""Remembered desktop preferences: a thin wrapper over QSettings with a defaults table.

Only keys in :data:`DEFAULTS` can be read or written; anything else is a
programming mistake and raises ``KeyError`` instead of silently creating a
new entry in the user's settings file.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QByteArray, QSettings

__all__ = ["ORGANISATION", "APPLICATION", "DEFAULTS", "AppSettings", "MAX_RECENT"]

ORGANISATION = "shipgui"
APPLICATION = "shipgui"
MAX_RECENT = 8

DEFAULTS: dict[str, object] = {
    "files/recent": [],
    "files/last_directory": "",
    "window/geometry": QByteArray(),
    "window/state": QByteArray(),
    "timeline/pixels_per_hour": 90,
}


class AppSettings:
    """Typed access to the preferences; ``store`` defaults to the user's settings."""

    def __init__(self, store: QSettings | None = None, *,
                 data_directory: Path | None = None) -> None:
        self._store = store if store is not None else QSettings(ORGANISATION, APPLICATION)
        self._data_directory = data_directory

    @classmethod
    def at_path(cls, path: str | Path) -> AppSettings:
        """Settings kept in an INI file, data (recovery files) beside it (used by tests)."""
        return cls(QSettings(str(path), QSettings.Format.IniFormat),
                   data_directory=Path(path).resolve().parent)

    def data_directory(self) -> Path:
        """Where the app keeps its own files (recovery files): the user's application
        data folder, unless these settings were given another place."""
        if self._data_directory is None:
            from .autosave import default_data_directory
            self._data_directory = default_data_directory()
        return self._data_directory

    def _check(self, key: str) -> object:
        if key not in DEFAULTS:
            raise KeyError(f"unknown setting {key!r}")
        return DEFAULTS[key]

    def get(self, key: str):
        default = self._check(key)
        value = self._store.value(key, default)
        if isinstance(default, list):
            if value is None or value == "":
                return []
            return [str(v) for v in (value if isinstance(value, list) else [value])]
        if isinstance(default, int) and not isinstance(default, bool):
            try:
                return int(value)
            except (TypeError, ValueError):
                return default
        if isinstance(default, QByteArray):
            return value if isinstance(value, QByteArray) else QByteArray()
        return value if value is not None else default

    def set(self, key: str, value) -> None:
        self._check(key)
        self._store.setValue(key, value)

    def sync(self) -> None:
        self._store.sync()

    # ------------------------------------------------------------ recent files
    def recent_files(self) -> list[str]:
        return self.get("files/recent")

    def add_recent_file(self, path: str | Path) -> list[str]:
        """Put ``path`` first in the recent list (no duplicates, at most MAX_RECENT)."""
        text = str(Path(path).resolve())
        files = [text] + [f for f in self.recent_files() if f != text]
        files = files[:MAX_RECENT]
        self.set("files/recent", files)
        return files

    def remove_recent_file(self, path: str | Path) -> None:
        text = str(Path(path).resolve())
        self.set("files/recent", [f for f in self.recent_files() if f != text])

"""Remembered desktop preferences: a thin wrapper over QSettings with a defaults table.

Only keys in :data:`DEFAULTS` can be read or written; anything else is a
programming mistake and raises ``KeyError`` instead of silently creating a
new entry in the user's settings file.
"""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

from PySide6.QtCore import QByteArray, QSettings

from shipgui.core import Settings
from shipgui.core.io.validation import check_settings

__all__ = ["ORGANISATION", "APPLICATION", "DEFAULTS", "AppSettings", "MAX_RECENT",
           "MAX_FOLDERS", "FOLDER", "DEFAULT", "NONE"]

ORGANISATION = "shipgui"
APPLICATION = "shipgui"
MAX_RECENT = 8
MAX_FOLDERS = 50  # folders whose last day settings are remembered

# Where the day settings of a newly opened jobs file come from.
FOLDER, DEFAULT, NONE = "folder", "default", "none"

DEFAULTS: dict[str, object] = {
    "files/recent": [],
    "files/last_directory": "",
    # Day settings (depot, day, turnaround, speed, road factor) as JSON: the last
    # ones used per folder, newest first, and the dispatcher's default.
    "day/by_folder": "",
    "day/default": "",
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

    # ------------------------------------------------------------ day settings
    def day_settings_for(self, folder: str | Path) -> tuple[Settings, str]:
        """Settings for a day opened from ``folder``: the last ones used there
        (:data:`FOLDER`), else the default (:data:`DEFAULT`), else none (:data:`NONE`)."""
        found = _settings_from(self._folders().get(_folder_key(folder)))
        if found is not None:
            return found, FOLDER
        default = self.default_day_settings()
        if default is not None:
            return default, DEFAULT
        return Settings(), NONE

    def remember_day_settings(self, folder: str | Path, settings: Settings) -> None:
        """Keep ``settings`` as the last ones used for days in ``folder``."""
        key = _folder_key(folder)
        folders = {key: _record(settings)}
        folders.update((k, v) for k, v in self._folders().items() if k != key)
        self.set("day/by_folder", json.dumps(dict(list(folders.items())[:MAX_FOLDERS])))

    def default_day_settings(self) -> Settings | None:
        return _settings_from(_json(self.get("day/default")))

    def set_default_day_settings(self, settings: Settings | None) -> None:
        """The settings a jobs file from a folder never planned before starts with."""
        self.set("day/default", "" if settings is None else json.dumps(_record(settings)))

    def _folders(self) -> dict:
        found = _json(self.get("day/by_folder"))
        return found if isinstance(found, dict) else {}


def _folder_key(folder: str | Path) -> str:
    return str(Path(folder).resolve())


def _json(text):
    try:
        return json.loads(text) if text else None
    except (TypeError, ValueError, RecursionError):
        return None


# What is remembered: the standing rules of a depot's day.  The vehicles
# available are not: a limit carried over silently would leave jobs unserved.
REMEMBERED = ("turnaround", "depot", "day_start", "day_end", "speed_kmh", "circuity",
              "max_day")


def _record(settings: Settings) -> dict:
    return {k: v for k, v in dataclasses.asdict(settings).items() if k in REMEMBERED}


def _settings_from(record) -> Settings | None:
    """Settings from a stored record, or None if it is missing or no longer valid
    (the settings file is the user's; it may have been edited by hand)."""
    if not isinstance(record, dict):
        return None
    names = {f.name for f in dataclasses.fields(Settings)} & set(REMEMBERED)
    try:
        settings = Settings(**{k: v for k, v in record.items() if k in names})
        if check_settings(settings):
            return None
    except (TypeError, ValueError, OverflowError):
        return None
    return settings

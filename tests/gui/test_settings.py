"""The preferences wrapper: defaults, unknown keys, recent files."""

from __future__ import annotations

import pytest

from shipgui.gui.services.settings import DEFAULTS, MAX_RECENT, AppSettings


def test_defaults(app_settings):
    assert app_settings.get("files/recent") == []
    assert app_settings.get("timeline/pixels_per_hour") == DEFAULTS["timeline/pixels_per_hour"]


def test_unknown_keys_are_rejected(app_settings):
    with pytest.raises(KeyError):
        app_settings.get("colour/theme")
    with pytest.raises(KeyError):
        app_settings.set("colour/theme", "dark")


def test_values_survive_a_new_instance(tmp_path):
    first = AppSettings.at_path(tmp_path / "s.ini")
    first.set("timeline/pixels_per_hour", 150)
    first.add_recent_file(tmp_path / "a.shipgui")
    first.sync()
    second = AppSettings.at_path(tmp_path / "s.ini")
    assert second.get("timeline/pixels_per_hour") == 150
    assert second.recent_files() == [str((tmp_path / "a.shipgui").resolve())]


def test_recent_files_are_unique_newest_first_and_bounded(app_settings, tmp_path):
    for k in range(MAX_RECENT + 3):
        app_settings.add_recent_file(tmp_path / f"{k}.shipgui")
    app_settings.add_recent_file(tmp_path / "5.shipgui")
    files = app_settings.recent_files()
    assert len(files) == MAX_RECENT
    assert files[0].endswith("5.shipgui") and len(set(files)) == len(files)
    app_settings.remove_recent_file(tmp_path / "5.shipgui")
    assert not any(f.endswith("/5.shipgui") for f in app_settings.recent_files())

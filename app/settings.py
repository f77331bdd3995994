"""Settings remembered between sessions (QSettings): display units and recent files."""
from __future__ import annotations

from PySide6.QtCore import QSettings

from core.project import UNIT_SYSTEMS

ORGANIZATION = "Mountsmith"
APPLICATION = "Mountsmith"
MAX_RECENT = 8


class AppSettings:
    """Typed access to the user's QSettings (IniFormat, user scope)."""

    def __init__(self):
        self._settings = QSettings(QSettings.Format.IniFormat, QSettings.Scope.UserScope,
                                   ORGANIZATION, APPLICATION)

    # units
    @property
    def units(self) -> str:
        value = self._settings.value("display/units", "SI")
        return value if value in UNIT_SYSTEMS else "SI"

    @units.setter
    def units(self, system: str) -> None:
        if system in UNIT_SYSTEMS:
            self._settings.setValue("display/units", system)

    # recent files
    @property
    def recent_files(self) -> list[str]:
        value = self._settings.value("files/recent", [])
        if isinstance(value, str):
            value = [value] if value else []
        return [str(item) for item in (value or []) if item][:MAX_RECENT]

    def add_recent_file(self, path: str) -> list[str]:
        files = [path] + [item for item in self.recent_files if item != path]
        self._settings.setValue("files/recent", files[:MAX_RECENT])
        return files[:MAX_RECENT]

    def remove_recent_file(self, path: str) -> list[str]:
        files = [item for item in self.recent_files if item != path]
        self._settings.setValue("files/recent", files)
        return files

    def clear_recent_files(self) -> None:
        self._settings.setValue("files/recent", [])

    # window layout
    def window_layout(self) -> tuple[bytes | None, bytes | None]:
        """Saved (geometry, dock state) of the main window, or None where never saved."""
        geometry = self._settings.value("window/geometry")
        state = self._settings.value("window/state")
        return (geometry if geometry else None), (state if state else None)

    def save_window_layout(self, geometry, state) -> None:
        self._settings.setValue("window/geometry", geometry)
        self._settings.setValue("window/state", state)

    def sync(self) -> None:
        self._settings.sync()

    @property
    def file_name(self) -> str:
        return self._settings.fileName()

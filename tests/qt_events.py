"""A Qt event counter for GUI tests (install it as an event filter on the widget to watch)."""
from __future__ import annotations

from PySide6 import QtCore


class EventCounter(QtCore.QObject):
    """Counts the events of one type a watched object receives; lets every event through."""

    def __init__(self, event_type: QtCore.QEvent.Type):
        super().__init__()
        self.event_type = event_type
        self.count = 0

    def eventFilter(self, _watched, event):  # noqa: N802 (Qt naming)
        if event.type() == self.event_type:
            self.count += 1
        return False

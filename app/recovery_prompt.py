"""Autosave of unsaved work and the offer to restore it after a crash.

:func:`install` attaches an :class:`Autosave` to a main window: while the design has unsaved
changes a timer writes a recovery copy every few seconds (:func:`core.recovery.write_recovery`);
a save, or a clean exit, removes it. :func:`offer_restore` runs once at start: if a program that
no longer runs left a copy, it asks whether to restore it. All file work is in
:mod:`core.recovery`; this module only schedules and asks.
"""
from __future__ import annotations

import datetime as _datetime
import os
from dataclasses import fields, replace
from pathlib import Path

from PySide6 import QtCore, QtGui, QtWidgets

from core.design import DesignInputs
from core.errors import MountsmithError
from core.recovery import Recovery, discard_recovery, find_recovery, write_recovery

#: Environment variable with the autosave interval in seconds (tests shorten it).
INTERVAL_ENV = "MOUNTSMITH_AUTOSAVE_SECONDS"
DEFAULT_INTERVAL_S = 5.0


def _interval_ms() -> int:
    try:
        seconds = float(os.environ.get(INTERVAL_ENV, DEFAULT_INTERVAL_S))
    except ValueError:
        seconds = DEFAULT_INTERVAL_S
    if not seconds == seconds or seconds <= 0:   # NaN or not positive
        seconds = DEFAULT_INTERVAL_S
    return int(min(max(seconds, 0.2), 3600.0) * 1000)


class Autosave(QtCore.QObject):
    """Writes the window's recovery copy while the design is modified.

    Parameters
    ----------
    window : MainWindow
        Any object with a ``model`` (:class:`core.design_model.DesignModel`) and a ``statusBar()``.
    """

    def __init__(self, window):
        super().__init__(window)
        self.window = window
        self.written = None
        self.failed = False
        self.timer = QtCore.QTimer(self)
        self.timer.setInterval(_interval_ms())
        self.timer.timeout.connect(self.write_if_modified)
        self.timer.start()
        window.model.events.dirty_changed.connect(self._dirty_changed)
        app = QtWidgets.QApplication.instance()
        if app is not None:
            app.aboutToQuit.connect(self.discard)

    def write_if_modified(self) -> bool:
        """Write the recovery copy if the design is modified and changed since the last copy."""
        model = self.window.model
        if not model.dirty or model.project == self.written:
            return False
        try:
            write_recovery(model.project, model.path)
        except MountsmithError as error:
            if not self.failed:   # say it once, not every few seconds
                self.window.statusBar().showMessage(f"Autosave failed: {error}", 10_000)
            self.failed = True
            return False
        self.failed = False
        self.written = model.project
        return True

    def _dirty_changed(self, dirty: bool) -> None:
        if not dirty:   # saved, or back to the saved state: nothing to recover
            self.discard()

    def discard(self) -> None:
        """Remove this program's recovery copy."""
        self.written = None
        discard_recovery()


def ask_restore(window, recovery: Recovery) -> bool:
    """Ask whether to restore a recovery copy (tests replace this function)."""
    when = _datetime.datetime.fromtimestamp(recovery.saved_at).strftime("%Y-%m-%d %H:%M:%S")
    source = recovery.source_path or "a new, never saved design"
    answer = QtWidgets.QMessageBox.question(
        window, "Restore unsaved changes?",
        f"Mountsmith did not close normally. Unsaved changes to {source} were kept at {when}.\n\n"
        "Restore them? (Choosing No deletes the kept copy.)",
        QtWidgets.QMessageBox.StandardButton.Yes | QtWidgets.QMessageBox.StandardButton.No,
        QtWidgets.QMessageBox.StandardButton.Yes)
    return answer == QtWidgets.QMessageBox.StandardButton.Yes


def restore(window, recovery: Recovery) -> None:
    """Put a recovery copy into the window's model as unsaved changes (undo goes back to the file)."""
    model = window.model
    project = recovery.project
    source = recovery.source_path
    if source and Path(source).is_file() and window.open_file(source):
        model.set_design(project.design)
        model.set_name(project.name)
        view = project.view
        model.update_view(**{f.name: getattr(view, f.name) for f in fields(view)})
    else:
        model.new(replace(project, design=DesignInputs()))
        model.set_design(project.design)


def offer_restore(window) -> bool:
    """At start: offer the newest orphaned recovery copy; return True if it was restored."""
    recovery = find_recovery()
    if recovery is None:
        return False
    restored = False
    if ask_restore(window, recovery):
        restore(window, recovery)
        restored = True
    discard_recovery(recovery)
    return restored


#: Qt platforms without a screen: nobody could answer the restore question there.
HEADLESS_PLATFORMS = ("offscreen", "minimal")


def install(window, offer: bool | None = None) -> Autosave:
    """Attach autosave to ``window`` and offer an orphaned recovery copy.

    ``offer`` defaults to True except on a headless Qt platform, where the copy is kept
    for the next start with a screen instead of blocking on a question nobody sees.
    """
    if offer is None:
        offer = QtGui.QGuiApplication.platformName() not in HEADLESS_PLATFORMS
    if offer:
        offer_restore(window)
    window.autosave = Autosave(window)
    return window.autosave

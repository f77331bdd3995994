"""The Mountsmith design window.

Layout: the design panel (operating-point sliders on top, then the design
fields) docked on the left, the results docked on the right, and in the
middle a tab widget whose first tab holds the transmissibility plots. Other
analysis views join with :meth:`MainWindow.add_analysis_view` (a tab) or
:meth:`MainWindow.add_panel` (a dock).

Redraws are coalesced: model events set a dirty flag and post one redraw event;
:meth:`MainWindow.refresh_now` draws at once. A posted event, not a zero-delay
timer: Qt delivers it before the pending paint (posted at low priority), so the
slider that moved and the plots it moves are painted in one pass (a timer fired
after that paint, and every step painted twice: about 0.8 ms more, measured).
"""
from __future__ import annotations

import os
import sys
from pathlib import Path

os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
from PySide6 import QtCore, QtGui, QtWidgets  # noqa: E402  (PySide6 before pyqtgraph)

from app.design_panel import DesignPanel, OperatingPointControls  # noqa: E402
from app.plots import TransmissibilityPlots  # noqa: E402
from app.results_panel import ResultsPanel  # noqa: E402
from app.studies_panel import default_floor_study  # noqa: E402
from app.study_tabs import StudyTabs  # noqa: E402
from app.settings import APPLICATION, ORGANIZATION, AppSettings  # noqa: E402
from app.style import caution_label  # noqa: E402
from app import export  # noqa: E402
from core.cautions import CAUTION_LINE, SAFETY_TITLE, safety_text  # noqa: E402
from core.design_model import DesignModel  # noqa: E402
from core.errors import MountsmithError  # noqa: E402
from core.design import DesignInputs  # noqa: E402
from core.project import FILE_SUFFIX, Project, ViewSettings  # noqa: E402
from core.studies import Studies  # noqa: E402
from core.units import SYSTEM_NAMES, UNIT_SYSTEMS  # noqa: E402

READOUT_HINT = "Point at the plots to read r, |T| and phase"
PROJECT_FILTER = f"Mountsmith projects (*{FILE_SUFFIX} *.json);;All files (*)"
#: Share of the screen's width and height the window takes at its first start.
FIRST_START_SCREEN_SHARE = 0.94
#: The coalesced redraw posted by :meth:`MainWindow.schedule_redraw`.
REDRAW_EVENT = QtCore.QEvent.Type(QtCore.QEvent.registerEventType())

#: Menu actions as data: name, menu, text, shortcut.
ACTIONS = (
    ("new", "File", "&New design", QtGui.QKeySequence.StandardKey.New),
    ("new_equipment", "File", "New e&quipment design (floor vibration)", None),
    ("open", "File", "&Open…", QtGui.QKeySequence.StandardKey.Open),
    ("save", "File", "&Save", QtGui.QKeySequence.StandardKey.Save),
    ("save_as", "File", "Save &As…", QtGui.QKeySequence.StandardKey.SaveAs),
    ("export_png", "File", "Export plot &image…", "Ctrl+E"),
    ("copy_image", "File", "&Copy plot image", "Ctrl+Shift+C"),
    ("export_csv", "File", "Export curves as CS&V…", None),
    ("export_review", "File", "Export &review sheet…", None),
    ("quit", "File", "&Quit", QtGui.QKeySequence.StandardKey.Quit),
    ("undo", "Edit", "&Undo", QtGui.QKeySequence.StandardKey.Undo),
    ("redo", "Edit", "&Redo", QtGui.QKeySequence.StandardKey.Redo),
    ("safety", "Help", "&Safety notes", None),
    ("about", "Help", "&About Mountsmith", None),
)

#: Choice groups in the View menu: view field, title, (value, text).
VIEW_CHOICES = (
    ("units", "Units", tuple((system, SYSTEM_NAMES[system]) for system in UNIT_SYSTEMS)),
    ("magnitude_scale", "Transmissibility axis", (("ratio", "Ratio (log)"), ("db", "Decibels"))),
    ("x_axis", "Frequency axis", (("ratio", "Frequency ratio ω/ωn"), ("hz", "Frequency (Hz)"),
                                  ("rpm", "Speed (r/min)"))),
)


class _RedrawReceiver(QtCore.QObject):
    """Receives the posted redraw (a QObject of its own: an ``event`` override on the window
    would put every event of the window through Python)."""

    def __init__(self, redraw, parent):
        super().__init__(parent)
        self._redraw = redraw

    def event(self, event: QtCore.QEvent) -> bool:
        if event.type() == REDRAW_EVENT:
            self._redraw()
            return True
        return super().event(event)


class MainWindow(QtWidgets.QMainWindow):
    """The design window over one :class:`~core.design_model.DesignModel`.

    Attributes
    ----------
    model : DesignModel
    design_panel : DesignPanel
    operating : OperatingPointControls
        The damping and frequency-ratio sliders.
    plots : TransmissibilityPlots
    results : ResultsPanel
    tabs : QTabWidget
        Central analysis views; the plots are tab 0.
    actions : dict of str to QAction
    """

    def __init__(self, model: DesignModel | None = None, settings: AppSettings | None = None):
        super().__init__()
        self.settings = settings or AppSettings()
        self.model = model or DesignModel(Project(view=ViewSettings(units=self.settings.units)))
        self.setObjectName("mountsmith_main_window")
        self.resize(1400, 860)
        self._redraw_pending = False
        self._redraw_posted = False
        self._redraw_receiver = _RedrawReceiver(self._posted_redraw, self)
        self.redraw_count = 0

        # ---- central tabs with the plots
        self.tabs = QtWidgets.QTabWidget()
        self.tabs.setDocumentMode(True)
        self.plots = TransmissibilityPlots()
        self.tabs.addTab(self.plots, "Transmissibility")
        self.setCentralWidget(self.tabs)

        # ---- left dock: sliders + design fields
        self.operating = OperatingPointControls(self.model)
        self.design_panel = DesignPanel(self.model)
        scroll = QtWidgets.QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setWidget(self.design_panel)
        scroll.setFrameShape(QtWidgets.QFrame.Shape.NoFrame)
        scroll.setHorizontalScrollBarPolicy(QtCore.Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        left = QtWidgets.QWidget()
        left_layout = QtWidgets.QVBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        left_layout.addWidget(self.operating)
        left_layout.addWidget(scroll, 1)
        left.setMinimumWidth(372)  # the design fields with their units
        self.design_dock = self.add_panel(left, "Design", QtCore.Qt.DockWidgetArea.LeftDockWidgetArea)

        # ---- right dock: results
        self.results = ResultsPanel()
        results_scroll = QtWidgets.QScrollArea()
        results_scroll.setWidgetResizable(True)
        results_scroll.setWidget(self.results)
        results_scroll.setFrameShape(QtWidgets.QFrame.Shape.NoFrame)
        results_scroll.setHorizontalScrollBarPolicy(QtCore.Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        results_scroll.setMinimumWidth(370)
        self.results_dock = self.add_panel(results_scroll, "Results", QtCore.Qt.DockWidgetArea.RightDockWidgetArea)

        # ---- status bar: readout and caution
        self.readout_label = QtWidgets.QLabel(READOUT_HINT)
        self.readout_label.setObjectName("readout")
        self.readout_label.setMinimumWidth(360)
        self.statusBar().addWidget(self.readout_label)
        self.caution_label = caution_label("status_caution", wrap=False)
        self.statusBar().addPermanentWidget(self.caution_label)
        self.plots.readout_changed.connect(self._show_readout)

        self.actions: dict[str, QtGui.QAction] = {}
        self.view_actions: dict[tuple[str, str], QtGui.QAction] = {}
        self._build_menus()

        self.study_tabs = StudyTabs(self)

        events = self.model.events
        events.design_changed.connect(self._design_changed)
        events.view_changed.connect(self._view_changed)
        events.name_changed.connect(lambda _name: self._update_title())
        events.path_changed.connect(lambda _path: self._update_title())
        events.dirty_changed.connect(lambda _dirty: self._update_title())
        events.undo_changed.connect(self._update_undo_actions)
        events.project_replaced.connect(lambda _project: self.results.forget_heights())
        geometry, state = self.settings.window_layout()
        if geometry is not None:
            self.restoreGeometry(geometry)
        if state is not None:
            self.restoreState(state)
        self._view_changed(self.model.view)
        self._update_title()
        self._update_undo_actions(self.model.can_undo, self.model.can_redo)
        self.schedule_redraw()   # drawn when the event loop starts, unless a file opens first

    # ------------------------------------------------------------------ extension points
    def add_analysis_view(self, widget: QtWidgets.QWidget, title: str) -> int:
        """Add an analysis view as a central tab; return its index."""
        return self.tabs.addTab(widget, title)

    def add_panel(self, widget: QtWidgets.QWidget, title: str,
                  area=QtCore.Qt.DockWidgetArea.RightDockWidgetArea) -> QtWidgets.QDockWidget:
        """Add a dockable panel; return the dock."""
        dock = QtWidgets.QDockWidget(title, self)
        dock.setObjectName(f"dock_{title.lower().replace(' ', '_')}")
        dock.setWidget(widget)
        dock.setFeatures(QtWidgets.QDockWidget.DockWidgetFeature.DockWidgetMovable
                         | QtWidgets.QDockWidget.DockWidgetFeature.DockWidgetFloatable)
        self.addDockWidget(area, dock)
        return dock

    # ------------------------------------------------------------------ menus
    def _build_menus(self) -> None:
        menus = {}
        handlers = {
            "new": self.new_design, "new_equipment": self.new_equipment_design,
            "export_review": lambda: self.export_review_sheet(), "open": lambda: self.open_file(), "save": self.save,
            "save_as": lambda: self.save_as(), "export_png": lambda: self.export_png(),
            "copy_image": self.copy_image, "export_csv": lambda: self.export_csv(),
            "quit": self.close, "undo": self.model.undo, "redo": self.model.redo,
            "safety": self.show_safety_notes, "about": self.show_about,
        }
        for name in ("File", "Edit", "View", "Help"):
            menus[name] = self.menuBar().addMenu(f"&{name}")
        self.recent_menu = QtWidgets.QMenu("Open &recent", self)
        self.recent_menu.aboutToShow.connect(self._fill_recent_menu)
        for name, menu, text, shortcut in ACTIONS:
            action = QtGui.QAction(text, self)
            action.setObjectName(f"action_{name}")
            if shortcut is not None:
                action.setShortcut(QtGui.QKeySequence(shortcut))
            action.triggered.connect(lambda _checked=False, h=handlers[name]: h())
            menus[menu].addAction(action)
            self.actions[name] = action
            if name == "open":
                menus[menu].addMenu(self.recent_menu)
            if name in ("save_as", "export_review"):
                menus[menu].addSeparator()
        for field, title, choices in VIEW_CHOICES:
            submenu = menus["View"].addMenu(title)
            group = QtGui.QActionGroup(self)
            group.setExclusive(True)
            for value, text in choices:
                action = QtGui.QAction(text, self, checkable=True)
                action.setObjectName(f"view_{field}_{value}")
                action.triggered.connect(lambda _checked=False, f=field, v=value: self.set_view_option(f, v))
                group.addAction(action)
                submenu.addAction(action)
                self.view_actions[(field, value)] = action
        menus["View"].addSeparator()
        menus["View"].addAction(self.design_dock.toggleViewAction())
        menus["View"].addAction(self.results_dock.toggleViewAction())
        self.menus = menus

    def _fill_recent_menu(self) -> None:
        self.recent_menu.clear()
        files = self.settings.recent_files
        for path in files:
            action = self.recent_menu.addAction(path)
            action.triggered.connect(lambda _checked=False, p=path: self.open_file(p))
        if not files:
            self.recent_menu.addAction("(none)").setEnabled(False)
        else:
            self.recent_menu.addSeparator()
            self.recent_menu.addAction("Clear list").triggered.connect(self.settings.clear_recent_files)

    # ------------------------------------------------------------------ model events
    def _design_changed(self, _design) -> None:
        self.design_panel.refresh()
        self.operating.refresh()
        self.schedule_redraw()

    def _view_changed(self, view: ViewSettings) -> None:
        self.design_panel.set_units(view.units)
        self.results.forget_heights()
        for (field, value), action in self.view_actions.items():
            if action.isChecked() != (getattr(view, field) == value):
                action.setChecked(getattr(view, field) == value)
        self.schedule_redraw()

    def set_view_option(self, field: str, value: str) -> None:
        """Change a view setting (units, magnitude scale, x axis); units are also remembered."""
        self.model.update_view(**{field: value})
        if field == "units":
            self.settings.units = value

    def schedule_redraw(self) -> None:
        """Mark the plots and results dirty; they redraw once when the event loop is next idle."""
        self._redraw_pending = True
        if not self._redraw_posted:
            self._redraw_posted = True
            QtCore.QCoreApplication.postEvent(self._redraw_receiver, QtCore.QEvent(REDRAW_EVENT))

    def _posted_redraw(self) -> None:
        self._redraw_posted = False
        if self._redraw_pending:
            self.refresh_now()

    @property
    def redraw_pending(self) -> bool:
        return self._redraw_pending

    def refresh_now(self) -> None:
        """Redraw plots and results at once from the model."""
        self._redraw_pending = False
        evaluation = self.model.evaluate()
        for value in ("hz", "rpm"):  # absolute frequency needs a natural frequency
            self.view_actions[("x_axis", value)].setEnabled(evaluation.result is not None)
        self.operating.refresh()
        self.plots.show_design(self.model.design, evaluation, self.model.view)
        self.results.show_evaluation(self.model.design, evaluation, self.model.view.units)
        self.study_tabs.schedule()
        self.redraw_count += 1

    def _show_readout(self, value) -> None:
        if value is None:
            self.readout_label.setText(READOUT_HINT)
            return
        self.readout_label.setText(
            f"r = {value.ratio:.4g}    |T| = {value.magnitude:.4g} ({value.magnitude_db:.3g} dB)    "
            f"phase = {value.phase_deg:.4g}°")

    def _update_title(self) -> None:
        path = self.model.path
        where = Path(path).name if path else "not saved"
        self.setWindowTitle(f"{self.model.name} ({where})[*] — Mountsmith")
        self.setWindowModified(self.model.dirty)

    def _update_undo_actions(self, can_undo: bool, can_redo: bool) -> None:
        self.actions["undo"].setEnabled(can_undo)
        self.actions["redo"].setEnabled(can_redo)

    # ------------------------------------------------------------------ dialogs (tests replace these)
    def ask_save_changes(self) -> str:
        """Ask what to do with unsaved changes: "save", "discard" or "cancel"."""
        buttons = QtWidgets.QMessageBox.StandardButton
        answer = QtWidgets.QMessageBox.question(
            self, "Unsaved changes", f"“{self.model.name}” has unsaved changes. Save them first?",
            buttons.Save | buttons.Discard | buttons.Cancel, buttons.Save)
        return {buttons.Save: "save", buttons.Discard: "discard"}.get(answer, "cancel")

    def choose_open_path(self) -> str | None:
        path, _ = QtWidgets.QFileDialog.getOpenFileName(self, "Open design", self._folder(), PROJECT_FILTER)
        return path or None

    def choose_save_path(self, title: str, suggestion: str, file_filter: str) -> str | None:
        path, _ = QtWidgets.QFileDialog.getSaveFileName(self, title, suggestion, file_filter)
        return path or None

    def show_error(self, title: str, message: str) -> None:
        QtWidgets.QMessageBox.warning(self, title, message)

    def _folder(self) -> str:
        path = self.model.path or (self.settings.recent_files or [""])[0]
        return str(Path(path).parent) if path else str(Path.home())

    # ------------------------------------------------------------------ file commands
    def maybe_save(self) -> bool:
        """True when it is fine to drop the current design (saved, discarded or clean)."""
        if not self.model.dirty:
            return True
        answer = self.ask_save_changes()
        if answer == "save":
            return self.save()
        return answer == "discard"

    def new_design(self) -> bool:
        if not self.maybe_save():
            return False
        self.model.new(Project(view=ViewSettings(units=self.settings.units)))
        return True

    def new_equipment_design(self) -> bool:
        """A new sensitive-equipment project: natural frequency chosen directly, a floor study on a flat floor."""
        if not self.maybe_save():
            return False
        self.model.new(Project(name="Untitled equipment design", kind="equipment",
                               design=DesignInputs(tuning="natural_frequency", natural_frequency_hz=3.0),
                               studies=Studies(floor=default_floor_study()),
                               view=ViewSettings(units=self.settings.units)))
        self.tabs.setCurrentWidget(self.study_tabs.floor)
        return True

    def open_file(self, path: str | None = None) -> bool:
        """Open a project; on a bad file show the core's message and keep the current design."""
        if not self.maybe_save():
            return False
        path = path or self.choose_open_path()
        if not path:
            return False
        try:
            self.model.open(path)
        except MountsmithError as error:
            self.show_error("Cannot open project", str(error))
            if not Path(path).exists():
                self.settings.remove_recent_file(str(path))
            return False
        self.settings.add_recent_file(str(Path(path).resolve()))
        self.refresh_now()
        return True

    def save(self) -> bool:
        if self.model.path is None:
            return self.save_as()
        return self._save_to(self.model.path)

    def save_as(self, path: str | None = None) -> bool:
        if path is None:
            suggestion = str(Path(self._folder()) / (self._safe_name() + FILE_SUFFIX))
            path = self.choose_save_path("Save design as", suggestion, PROJECT_FILTER)
        if not path:
            return False
        return self._save_to(path)

    def _save_to(self, path: str) -> bool:
        try:
            self.model.save(path)
        except MountsmithError as error:
            self.show_error("Cannot save project", str(error))
            return False
        self.settings.add_recent_file(str(Path(path).resolve()))
        self.statusBar().showMessage(f"Saved {path}", 4000)
        return True

    def _safe_name(self) -> str:
        keep = "".join(ch if ch.isalnum() or ch in "-_ " else "_" for ch in self.model.name).strip()
        return keep.replace(" ", "_") or "design"

    # ------------------------------------------------------------------ exports
    def export_png(self, path: str | None = None, width: int = export.DEFAULT_SIZE[0],
                   height: int = export.DEFAULT_SIZE[1]) -> bool:
        if path is None:
            size = self.ask_export_size()
            if size is None:
                return False
            width, height = size
            suggestion = str(Path(self._folder()) / (self._safe_name() + ".png"))
            path = self.choose_save_path("Export plot image", suggestion, "PNG image (*.png)")
        if not path:
            return False
        try:
            export.export_png(self.model, path, width, height)
        except MountsmithError as error:
            self.show_error("Cannot export image", str(error))
            return False
        self.statusBar().showMessage(f"Wrote {path} ({width}×{height} px)", 4000)
        return True

    def ask_export_size(self) -> tuple[int, int] | None:
        """Ask for the pixel size of an exported image (default 1800 × 1200)."""
        dialog = QtWidgets.QDialog(self)
        dialog.setWindowTitle("Image size")
        form = QtWidgets.QFormLayout(dialog)
        spins = []
        for label, value in (("Width (px)", export.DEFAULT_SIZE[0]), ("Height (px)", export.DEFAULT_SIZE[1])):
            spin = QtWidgets.QSpinBox()
            spin.setRange(*export.SIZE_LIMITS)
            spin.setValue(value)
            form.addRow(label, spin)
            spins.append(spin)
        buttons = QtWidgets.QDialogButtonBox(QtWidgets.QDialogButtonBox.StandardButton.Ok
                                             | QtWidgets.QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(dialog.accept)
        buttons.rejected.connect(dialog.reject)
        form.addRow(buttons)
        if dialog.exec() != QtWidgets.QDialog.DialogCode.Accepted:
            return None
        return spins[0].value(), spins[1].value()

    def copy_image(self) -> None:
        """Put the exported figure (default size) on the clipboard."""
        image = export.render_image(self.model)
        QtWidgets.QApplication.clipboard().setImage(image)
        self.statusBar().showMessage("Plot image copied to the clipboard", 4000)

    def export_csv(self, path: str | None = None) -> bool:
        if path is None:
            suggestion = str(Path(self._folder()) / (self._safe_name() + "_curves.csv"))
            path = self.choose_save_path("Export curves", suggestion, "CSV (*.csv)")
        if not path:
            return False
        try:
            export.export_csv(self.model, path)
        except MountsmithError as error:
            self.show_error("Cannot export curves", str(error))
            return False
        return True

    def export_review_sheet(self, path: str | None = None) -> bool:
        """Write the design-review sheet (A4 PDF) of the project; errors go to :meth:`show_error`."""
        if path is None:
            suggestion = str(Path(self._folder()) / (self._safe_name() + "_review.pdf"))
            path = self.choose_save_path("Export review sheet", suggestion, "PDF (*.pdf)")
        if not path:
            return False
        source = Path(self.model.path).name if self.model.path else None
        try:
            from app.review_sheet import export_review_sheet  # imported here: 25 ms off the start-up
            export_review_sheet(self.model.project, path, source)
        except MountsmithError as error:
            self.show_error("Cannot export review sheet", str(error))
            return False
        self.statusBar().showMessage(f"Wrote {path}", 4000)
        return True

    # ------------------------------------------------------------------ help
    def show_safety_notes(self) -> None:
        QtWidgets.QMessageBox.information(self, SAFETY_TITLE, safety_text())

    def show_about(self) -> None:
        QtWidgets.QMessageBox.about(
            self, "About Mountsmith",
            "Mountsmith — design of resilient machine mounts: transmissibility, stiffness, damping and "
            "static deflection per mount.\n\n" + CAUTION_LINE)

    # ------------------------------------------------------------------ closing
    def closeEvent(self, event: QtGui.QCloseEvent) -> None:
        if self.maybe_save():
            self._redraw_pending = False
            self.settings.save_window_layout(self.saveGeometry(), self.saveState())
            self.settings.sync()
            event.accept()
        else:
            event.ignore()


def run(path: str | None = None) -> int:
    """Open the window on ``path`` (or a new design), run the event loop, return the exit code."""
    app = QtWidgets.QApplication.instance() or QtWidgets.QApplication(sys.argv[:1])
    app.setOrganizationName(ORGANIZATION)
    app.setApplicationName(APPLICATION)
    window = MainWindow()
    if window.settings.window_layout()[0] is None:   # first start: most of the screen, not 1400 x 860
        screen = app.primaryScreen()
        if screen is not None:
            space = screen.availableGeometry()
            window.resize(int(space.width() * FIRST_START_SCREEN_SHARE),
                          int(space.height() * FIRST_START_SCREEN_SHARE))
    window.show()
    if path:
        window.open_file(path)
    from app.recovery_prompt import install  # autosave while modified, restore offer after a crash
    install(window)
    return app.exec()

"""The study tabs of the design window: start and stop, rigid body, design map, floor, two-stage.

:class:`StudyTabs` adds one central tab per study (``MainWindow.add_analysis_view``)
with its editor (:mod:`app.studies_panel`) beside the standalone view that draws
it, fills the study rows of the results panel, and draws the equal-peak
comparison curve on the transmissibility plots.

Every number comes from core: ``core.studies`` (simulate_passages,
evaluate_passage, build_rigid_body, evaluate_rigid_body, floor_check,
evaluate_two_stage, two_stage_curves, design_map_of, design_at_map_point),
``core.rigid_body`` and ``core.transmissibility``. Results are cached by their
inputs, so a study is recomputed only when the design or the study changed;
the updates wait for a pause: a slider drag redraws the plots at every step and
the studies once the edits stop for ``STUDY_DELAY_MS``, or at the latest
``STUDY_MAX_WAIT_MS`` after the first edit of a burst (the start-and-stop
simulations alone cost about 25 ms, more than a frame). Only the shown tab is
drawn.
"""
from __future__ import annotations

import math
import os

os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
from PySide6 import QtCore, QtWidgets  # noqa: E402  (PySide6 before pyqtgraph)
import numpy as np  # noqa: E402
import pyqtgraph as pg  # noqa: E402

from app.design_map_view import DesignMapView  # noqa: E402
from app.design_panel import message_label  # noqa: E402
from app.floor_view import FloorView  # noqa: E402
from app.passage_view import PassageView  # noqa: E402
from app.rigid_body_view import RigidBodyView  # noqa: E402
from app.studies_panel import (  # noqa: E402
    FloorEditor, MaterialEditor, PassageEditor, RigidBodyEditor, TwoStageEditor)
from app.style import LINE_WIDTH, PALETTE, caution_label, style_axes  # noqa: E402
from core import rigid_body, studies  # noqa: E402
from core.curves import drawn_curve_family  # noqa: E402
from core.errors import MountsmithError  # noqa: E402
from core.transmissibility import damping_with_same_peak  # noqa: E402
from core.units import format_value  # noqa: E402

#: Pause after the last edit before the studies update (ms).
STUDY_DELAY_MS = 150
#: Longest wait from the first edit of an uninterrupted burst to a study update (ms).
STUDY_MAX_WAIT_MS = 1000
#: Attributes holding the views of each study tab, built when the tab is first drawn (a window
#: starts about 0.2 s sooner without the five tabs' plots, measured).
VIEW_ATTRIBUTES = {
    "runup_view": "passage", "rundown_view": "passage", "passage_header": "passage",
    "rigid_body_view": "rigid_body", "map_view": "design_map", "floor_view": "floor",
    "two_stage_plot": "two_stage", "single_stage_curve": "two_stage", "two_stage_curve": "two_stage",
    "two_stage_speed": "two_stage",
}
#: Width of the editor column of a study tab (px).
EDITOR_WIDTH = 330
#: Width of the design map's note column (px).
NOTE_WIDTH = 210


def _scrolled(widget: QtWidgets.QWidget, width: int | None = EDITOR_WIDTH) -> QtWidgets.QScrollArea:
    """``widget`` in a frameless scroll area; with ``width``, an editor column that scrolls vertically only."""
    scroll = QtWidgets.QScrollArea()
    scroll.setWidgetResizable(True)
    scroll.setWidget(widget)
    scroll.setFrameShape(QtWidgets.QFrame.Shape.NoFrame)
    if width is not None:
        scroll.setHorizontalScrollBarPolicy(QtCore.Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        scroll.setMinimumWidth(width)
    return scroll


def log_ticks(low: float, high: float) -> list:
    """Tick spec of a log10 axis from ``low`` to ``high``: 1, 2, 5 per decade labelled, the rest faint."""
    decades = range(math.floor(math.log10(low)) - 1, math.ceil(math.log10(high)) + 1)
    major = [(math.log10(m * 10.0 ** e), f"{m * 10.0 ** e:g}") for e in decades for m in (1, 2, 5)]
    minor = [(math.log10(m * 10.0 ** e), "") for e in decades for m in (3, 4, 6, 7, 8, 9)]
    return [major, minor]


def _label(text: str = "", name: str | None = None) -> QtWidgets.QLabel:
    label = QtWidgets.QLabel(text)
    label.setWordWrap(True)
    label.setTextInteractionFlags(QtCore.Qt.TextInteractionFlag.TextSelectableByMouse)
    if name:
        label.setObjectName(name)
    return label


class StudyTab(QtWidgets.QWidget):
    """An editor column on the left, the study's view on the right, a message above the view."""

    def __init__(self, editor: QtWidgets.QWidget, parent=None, editor_on_top: bool = False,
                 editor_below: bool = False, editor_width: int = EDITOR_WIDTH):
        super().__init__(parent)
        self.editor = editor
        self.side = QtWidgets.QWidget()
        self.side_layout = QtWidgets.QHBoxLayout(self.side) if editor_below else QtWidgets.QVBoxLayout(self.side)
        self.side_layout.setContentsMargins(0, 0, 0, 0)
        self.side_layout.addWidget(editor)
        self.content = QtWidgets.QWidget()
        self.content_layout = QtWidgets.QVBoxLayout(self.content)
        self.content_layout.setContentsMargins(4, 4, 4, 4)
        self.message = message_label()
        self.message.setObjectName("study_message")
        self.content_layout.addWidget(self.message)
        self.off_label = _label("", "study_off")
        self.content_layout.addWidget(self.off_label)
        self.content_layout.addStretch(0)   # keeps the notes at the top while the view is hidden
        content = _scrolled(self.content, None)   # a narrow window scrolls the view, never widens
        layout = QtWidgets.QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        if editor_on_top:
            top = _scrolled(self.side, None)
            top.setVerticalScrollBarPolicy(QtCore.Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
            top.setFixedHeight(self.side.sizeHint().height() + 18)
            layout.addWidget(top)
            layout.addWidget(content, 1)
            return
        if editor_below:   # a wide view over a wide editor, the user moves the border
            self.splitter = QtWidgets.QSplitter(QtCore.Qt.Orientation.Vertical)
            self.splitter.addWidget(content)
            self.splitter.addWidget(_scrolled(self.side, None))
            self.splitter.setStretchFactor(0, 1)
            self.splitter.setSizes([4 * EDITOR_WIDTH, EDITOR_WIDTH - 60])
        else:
            self.splitter = QtWidgets.QSplitter(QtCore.Qt.Orientation.Horizontal)
            self.splitter.addWidget(_scrolled(self.side, editor_width))
            self.splitter.addWidget(content)
            self.splitter.setStretchFactor(1, 1)
            self.splitter.setSizes([editor_width, 10 * EDITOR_WIDTH])
        self.splitter.setChildrenCollapsible(False)
        layout.addWidget(self.splitter)

    def show_message(self, text: str | None) -> None:
        self.message.setText(text or "")
        self.message.setVisible(bool(text))

    def show_off(self, text: str | None) -> None:
        """A note in place of the view while the study is off."""
        self.off_label.setText(text or "")
        self.off_label.setVisible(bool(text))


class StudyTabs(QtCore.QObject):
    """The study tabs of one :class:`~app.main_window.MainWindow` and their results.

    Attributes
    ----------
    start_stop, rigid_body, design_map, floor, two_stage : StudyTab
    material : MaterialEditor
        In the design panel's damping group.
    """

    def __init__(self, window):
        super().__init__(window)
        self.window = window
        self.model = window.model
        self._cache: dict[str, tuple[object, object]] = {}
        self._view_builders: dict[str, object] = {}   # tab name -> builds its views on first draw
        self._drawn: dict[str, object] = {}
        self._timer = QtCore.QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(STUDY_DELAY_MS)
        self._timer.timeout.connect(self.refresh_now)
        self._burst = QtCore.QElapsedTimer()   # time since the first edit the timer waits for
        self.update_count = 0

        model = self.model
        self.start_stop = self._build_start_stop(model)
        self.rigid_body = self._build_rigid_body(model)
        self.design_map = self._build_design_map(model)
        self.floor = self._build_floor(model)
        self.two_stage = self._build_two_stage(model)
        self.tab_of = {"passage": self.start_stop, "rigid_body": self.rigid_body, "design_map": self.design_map,
                       "floor": self.floor, "two_stage": self.two_stage}
        titles = {"passage": "Start and stop", "rigid_body": "Rigid body", "design_map": "Design map",
                  "floor": "Floor", "two_stage": "Two-stage"}
        self.index_of = {name: window.add_analysis_view(tab, titles[name]) for name, tab in self.tab_of.items()}

        self.material = MaterialEditor(model)
        window.design_panel.damping_form.addRow("Material", self.material)
        self.material.compare_check.toggled.connect(lambda _checked: self.refresh_comparison())

        model.events.studies_changed.connect(lambda _studies: window.schedule_redraw())
        window.tabs.currentChanged.connect(lambda _index: self.refresh_now())

    # ------------------------------------------------------------------ building
    def _later(self, name: str, build_views) -> None:
        """Keep ``build_views`` (the tab's plots) until the tab is first drawn or a view is asked for."""
        self._view_builders[name] = build_views

    def build_views(self, name: str) -> None:
        """Build the views of study tab ``name`` now, if they are not yet built."""
        builder = self._view_builders.pop(name, None)
        if builder is not None:
            builder()

    def __getattr__(self, attribute: str):
        """A view attribute of a tab not yet built builds that tab's views (tests, exports)."""
        name = VIEW_ATTRIBUTES.get(attribute)
        if name is not None and name in self.__dict__.get("_view_builders", {}):
            self.build_views(name)
            return getattr(self, attribute)
        raise AttributeError(f"{type(self).__name__!r} object has no attribute {attribute!r}")

    def _build_start_stop(self, model) -> StudyTab:
        tab = StudyTab(PassageEditor(model, compact=True), editor_on_top=True)

        def views():
            self.runup_view = PassageView()
            self.rundown_view = PassageView()
            self.passage_header = _label("", "passage_header")
            tab.content_layout.addWidget(self.passage_header)
            row = QtWidgets.QHBoxLayout()
            for view in (self.runup_view, self.rundown_view):
                view.caution_label.setVisible(False)     # one caution line for both, below
                row.addWidget(view)
                view.displacement_plot.legend.setVisible(False)  # it covers the peak at this size: the header says it
            tab.content_layout.addLayout(row, 1)
            tab.content_layout.addWidget(caution_label())
        self._later("passage", views)
        return tab

    def _build_rigid_body(self, model) -> StudyTab:
        tab = StudyTab(RigidBodyEditor(model), editor_below=True)

        def views():
            self.rigid_body_view = RigidBodyView(model.view.units)
            tab.content_layout.addWidget(self.rigid_body_view, 1)
        self._later("rigid_body", views)
        return tab

    def _build_design_map(self, model) -> StudyTab:
        note = QtWidgets.QWidget()
        layout = QtWidgets.QVBoxLayout(note)
        layout.setContentsMargins(4, 4, 4, 4)
        self.map_note = _label("", "map_note")
        layout.addWidget(self.map_note)
        layout.addStretch(1)
        tab = StudyTab(note, editor_width=NOTE_WIDTH)   # a column of text: the map takes the width

        def views():
            self.map_view = DesignMapView()
            self.map_view.pointClicked.connect(self.move_design_to)
            tab.content_layout.addWidget(self.map_view, 1)
        self._later("design_map", views)
        return tab

    def _build_floor(self, model) -> StudyTab:
        editor = FloorEditor(model)
        tab = StudyTab(editor, editor_below=True)
        inverse = QtWidgets.QGroupBox("Highest natural frequency meeting the criterion")
        form = QtWidgets.QVBoxLayout(inverse)
        self.floor_inverse_label = _label("—", "floor_inverse")
        self.use_fn_button = QtWidgets.QPushButton("Use it")
        self.use_fn_button.setObjectName("use_floor_fn")
        self.use_fn_button.setToolTip("Set the design's natural frequency (tuning: chosen directly)")
        self.use_fn_button.clicked.connect(self.use_floor_natural_frequency)
        form.addWidget(self.floor_inverse_label)
        form.addWidget(self.use_fn_button)
        editor.layout().insertWidget(editor.layout().count() - 1, inverse)   # under the inputs, above the stretch
        self.floor_table = QtWidgets.QTableWidget(0, 5)
        self.floor_table.setObjectName("floor_margins")
        self.floor_table.setHorizontalHeaderLabels(
            ["Band\nHz", "Equipment\nµm/s", "Limit\nµm/s", "Margin\ndB", "Stroke\nµm RMS"])
        self.floor_table.verticalHeader().setVisible(False)
        self.floor_table.setEditTriggers(QtWidgets.QAbstractItemView.EditTrigger.NoEditTriggers)
        self.floor_table.horizontalHeader().setSectionResizeMode(QtWidgets.QHeaderView.ResizeMode.Stretch)
        box = QtWidgets.QGroupBox("Per band (assessed bands)")
        inner = QtWidgets.QVBoxLayout(box)
        inner.addWidget(self.floor_table)
        box.setMinimumWidth(380)
        self.floor_table.verticalHeader().setDefaultSectionSize(22)
        tab.side_layout.addWidget(box, 3)

        def views():
            self.floor_view = FloorView()
            self.floor_view.floorSpectrumEdited.connect(editor.set_bands)
            tab.content_layout.addWidget(self.floor_view, 1)
        self._later("floor", views)
        return tab

    def _build_two_stage(self, model) -> StudyTab:
        tab = StudyTab(TwoStageEditor(model))
        self.two_stage_label = _label("", "two_stage_summary")
        tab.side_layout.addWidget(self.two_stage_label)
        tab.side_layout.addStretch(1)

        def views():
            self.two_stage_plot = pg.PlotWidget(background=PALETTE["background"])
            plot = self.two_stage_plot.getPlotItem()
            plot.setMenuEnabled(False)
            plot.hideButtons()
            plot.setLogMode(x=True, y=True)
            plot.showGrid(x=True, y=True, alpha=PALETTE["grid_alpha"])
            style_axes(plot)
            plot.setLabel("bottom", "Forcing frequency", units="Hz")
            plot.setLabel("left", "Force transmissibility |T|")
            legend = plot.addLegend(offset=(10, -10), brush=(255, 255, 255, 220), labelTextColor=PALETTE["foreground"])
            self.single_stage_curve = plot.plot(
                pen=pg.mkPen(PALETTE["reference"], width=LINE_WIDTH["design"], style=QtCore.Qt.PenStyle.DashLine),
                name="single stage (machine mounts on the floor)")
            self.two_stage_curve = plot.plot(pen=pg.mkPen(PALETTE["design"], width=LINE_WIDTH["design"]),
                                             name="two-stage")
            self.two_stage_speed = pg.InfiniteLine(angle=90, movable=False,
                                                   pen=pg.mkPen(PALETTE["operating"], width=1.5))
            plot.addItem(self.two_stage_speed, ignoreBounds=True)
            legend.addItem(pg.PlotDataItem(pen=pg.mkPen(PALETTE["operating"], width=1.5)), "lowest operating speed")
            tab.content_layout.addWidget(self.two_stage_plot, 1)
            tab.content_layout.addWidget(caution_label())
        self._later("two_stage", views)
        return tab

    # ------------------------------------------------------------------ scheduling
    def schedule(self) -> None:
        """Update the studies after a pause in the edits (see the module docstring).

        The comparison curve is redrawn at once, with the design curve it sits beside.
        """
        self.refresh_comparison()
        if not self._timer.isActive():
            self._burst.start()
            self._timer.start()
        elif self._burst.elapsed() + STUDY_DELAY_MS <= STUDY_MAX_WAIT_MS:
            self._timer.start()            # restart: wait for the pause

    @property
    def pending(self) -> bool:
        return self._timer.isActive()

    def _cached(self, name: str, key, compute):
        """``compute()`` once per ``key``; a MountsmithError is kept and raised again for the same key."""
        found = self._cache.get(name)
        if found is None or found[0] != key:
            try:
                found = (key, ("ok", compute()))
            except MountsmithError as error:
                found = (key, ("error", error))
            self._cache[name] = found
        kind, value = found[1]
        if kind == "error":
            raise value
        return value

    # ------------------------------------------------------------------ computing (core only)
    def _passage(self, design, result, study):
        def compute():
            simulated = studies.simulate_passages(design, result, study)
            return simulated, studies.evaluate_passage(design, result, study, simulated=simulated)
        return self._cached("passage", (design, study), compute)

    def _rigid_body(self, design, result, study):
        def compute():
            body, mounts = studies.build_rigid_body(design, result, study)
            values = studies.evaluate_rigid_body(design, result, study)
            estimate = rigid_body.box_inertia(design.mass_kg, *study.box_m).inertia_kg_m2
            return (body, mounts, rigid_body.modes(body, mounts), rigid_body.static_loads(body, mounts),
                    values, estimate)
        return self._cached("rigid_body", (design, study), compute)

    def _floor(self, design, result, study):
        return self._cached("floor", (design, study), lambda: studies.floor_check(design, result, study))

    def _two_stage(self, design, result, study):
        return self._cached("two_stage", (design, study), lambda: (
            studies.evaluate_two_stage(design, result, study), studies.two_stage_curves(design, result, study)))

    def _map(self, design, result, passage):
        return self._cached("design_map", (design, passage),
                            lambda: studies.design_map_of(design, result, passage))

    # ------------------------------------------------------------------ refresh
    def refresh_now(self) -> None:
        """Update editors, results rows and the shown study tab from the model."""
        self._timer.stop()
        self.update_count += 1
        project = self.model.project
        result = self.model.result
        units = project.view.units
        for tab in self.tab_of.values():
            if hasattr(tab.editor, "refresh"):
                tab.editor.refresh()
        self.material.refresh()
        tabs = self.window.tabs
        tabs.setTabVisible(self.index_of["floor"], project.kind == "equipment" or project.studies.floor is not None)
        rows, warnings = self._results_rows(project, result, units)
        self.window.results.show_studies(rows, warnings)
        current = tabs.currentWidget()
        for name, tab in self.tab_of.items():
            if tab is current:
                self.build_views(name)
                getattr(self, f"_draw_{name}")(project, result, units)
        self.refresh_comparison()

    def _results_rows(self, project, result, units):
        """Study rows for the results panel (label, text) and study warnings, from core."""
        rows, warnings = [], []
        if result is None:
            return rows, warnings
        design, found = project.design, project.studies
        if found.passage is not None:
            try:
                _, values = self._passage(design, result, found.passage)
            except MountsmithError as error:
                rows.append(("Start and stop", f"not computed: {error}"))
            else:
                for prefix, word in (("startup", "Start-up"), ("shutdown", "Shutdown")):
                    text = (f"{values[f'{prefix}_amplification']:.3g}× the motion at speed, peak at "
                            f"{format_value(values[f'{prefix}_peak_speed_rpm'], 'speed', units)}")
                    if values[f"{prefix}_peak_displacement_mm"] is not None:
                        text += f", {format_value(values[f'{prefix}_peak_displacement_mm'] * 1e-3, 'length', units)}"
                    rows.append((word, text))
                warnings += values["passage_warnings"]
        if found.rigid_body is not None:
            try:
                values = self._rigid_body(design, result, found.rigid_body)[4]
            except MountsmithError as error:
                rows.append(("Rigid body", f"not computed: {error}"))
            else:
                rows.append(("Rigid-body modes", ", ".join(f"{f:.3g}" for f in values["rigid_body_frequencies_hz"])
                             + " Hz"))
                warnings += values["rigid_body_warnings"]
        if found.floor is not None:
            try:
                check = self._floor(design, result, found.floor)[0]
            except MountsmithError as error:
                rows.append(("Floor criterion", f"not computed: {error}"))
            else:
                rows.append(("Floor criterion",
                             f"{'meets' if check.passed else 'exceeds'} {check.criterion}, worst margin "
                             f"{check.worst_margin_db:.3g} dB at {check.worst_band_nominal_hz:g} Hz"))
        if found.two_stage is not None:
            try:
                values = self._two_stage(design, result, found.two_stage)[0]
            except MountsmithError as error:
                rows.append(("Two-stage", f"not computed: {error}"))
            else:
                rows.append(("Two-stage |T|", f"{values['two_stage_transmissibility']:.3g} against "
                             f"{values['single_stage_transmissibility']:.3g} single, gain "
                             f"{values['two_stage_gain_db']:.3g} dB"))
        return rows, warnings

    def _no_result(self, tab: StudyTab, result) -> bool:
        if result is None:
            tab.show_message(f"No result for the design: {self.model.evaluate().error}")
            return True
        return False

    def _draw_passage(self, project, result, units) -> None:
        tab, study = self.start_stop, project.studies.passage
        views = (self.runup_view, self.rundown_view)
        tab.show_off(None if study is not None else
                     "Start and stop is off: tick “Simulate start and stop” to see the run-up and coast-down.")
        for view in views:
            view.setVisible(study is not None and result is not None)
        if study is None or self._no_result(tab, result):
            return
        try:
            (up, down), _values = self._passage(project.design, result, study)
        except MountsmithError as error:
            tab.show_message(str(error))
            for view in views:
                view.setVisible(False)
            return
        tab.show_message(None)
        if self._drawn.get("passage") is not up:
            self._drawn["passage"] = up
            self.runup_view.show_result(up)
            self.rundown_view.show_result(down)
            # Short titles that fit side by side; the system's fn and damping go in the header once.
            for view, run, word in ((self.runup_view, up, "Run-up to"), (self.rundown_view, down, "Coast-down from")):
                view.displacement_plot.setTitle(f"{word} {format_value(run.operating_speed_rpm, 'speed', units)}",
                                                color=PALETTE["foreground"])
            equivalent = " (equivalent viscous at speed)" if project.design.damping.model == "hysteretic" else ""
            self.passage_header.setText(
                f"Machine on its mounts: fn = {format_value(up.natural_frequency_hz, 'frequency', units)}, "
                f"ζ = {up.damping_ratio:.3g}{equivalent}; run-up {study.runup_s:g} s, coast-down "
                f"{study.rundown_s:g} s (linear speed ramps). Solid: envelope during the passage; dashed: "
                "steady state at that speed; dot: peak.")

    def _draw_rigid_body(self, project, result, units) -> None:
        tab, study = self.rigid_body, project.studies.rigid_body
        if self.rigid_body_view.unit_system != units:
            old = self.rigid_body_view
            self.rigid_body_view = RigidBodyView(units)
            tab.content_layout.replaceWidget(old, self.rigid_body_view)
            old.deleteLater()
            self._drawn.pop("rigid_body", None)
        tab.show_off(None if study is not None else
                     "Rigid body is off: tick the box to start from the design's mount layout.")
        self.rigid_body_view.setVisible(study is not None and result is not None)
        if study is None or self._no_result(tab, result):
            return
        try:
            body, mounts, found, loads, values, estimate = self._rigid_body(project.design, result, study)
        except MountsmithError as error:
            tab.show_message(f"{error}  (use “Reset layout from the design” after changing the mount count)")
            self.rigid_body_view.setVisible(False)
            return
        tab.show_message(None)
        editor = tab.editor
        editor.current_stiffness = [tuple(float(v) for v in mount.stiffness_n_per_m) for mount in mounts]
        editor.estimated_inertia = tuple(tuple(float(v) for v in row) for row in estimate)
        if self._drawn.get("rigid_body") is not found:
            self._drawn["rigid_body"] = found
            self.rigid_body_view.show_result(body, mounts, found, loads, warnings=values["rigid_body_warnings"])

    def _draw_design_map(self, project, result, units) -> None:
        tab = self.design_map
        design = project.design
        try:
            found = self._map(design, result, project.studies.passage)
        except MountsmithError as error:
            tab.show_message(str(error))
            return
        tab.show_message(None)
        hysteretic = design.damping.model == "hysteretic"
        point = None
        if result is not None and not hysteretic:
            point = (result.natural_frequency_hz, design.damping.value)
        drawn = self._drawn.get("design_map")
        if drawn is None or drawn[0] is not found or drawn[1] != point:
            self._drawn["design_map"] = (found, point)
            self.map_view.show_map(found, point)
            self.map_view.plot.getAxis("bottom").setTicks(log_ticks(found.natural_frequency_hz[0],
                                                                   found.natural_frequency_hz[-1]))
            self.map_view.plot.getAxis("left").setTicks(log_ticks(found.damping_ratio[0], found.damping_ratio[-1]))
        limits = found.limits
        ramp = ("the start-and-stop study's run-up" if project.studies.passage is not None
                else "no passage study: a default run-up")
        lines = [f"Speed {format_value(found.speed_rpm, 'speed', units)} (the lowest operating speed).",
                 f"Limits: isolation ≥ {limits.min_isolation_percent:g} % (target), static deflection ≤ "
                 f"{format_value(limits.max_static_deflection_mm * 1e-3, 'length', units)}, passage "
                 f"amplification ≤ {limits.max_passage_amplification:g}× over a run-up of {found.ramp_s:g} s "
                 f"({ramp}); dynamic/static stiffness {found.dynamic_to_static_ratio:g}.",
                 "The dark wash marks points that miss a limit."]
        if hysteretic:
            lines.append("<b>This map is for viscous damping.</b> The design uses an elastomer loss factor, so "
                         "its point is not drawn and clicks do not move it; switch the damping model to viscous "
                         "to pick a point here.")
        else:
            lines.append("Click the map to move the design there (frequency ratio and damping ratio; one undo step).")
        self.map_note.setText("<p>" + "</p><p>".join(lines) + "</p>")

    def _draw_floor(self, project, result, units) -> None:
        tab, study = self.floor, project.studies.floor
        tab.show_off(None if study is not None else
                     "The floor study is off: tick the box to start from a flat floor spectrum.")
        self.floor_view.setVisible(study is not None and result is not None)
        self.use_fn_button.setEnabled(False)
        if study is None or self._no_result(tab, result):
            return
        try:
            check, best, note = self._floor(project.design, result, study)
        except MountsmithError as error:
            tab.show_message(str(error))
            self.floor_view.setVisible(False)
            return
        tab.show_message(None)
        if self._drawn.get("floor") is not check:
            self._drawn["floor"] = check
            self.floor_view.show_result(check)
            self._fill_floor_table(check)
        if best is None:
            self.floor_inverse_label.setText(note)
        else:
            if best.bound == "criterion":
                self.floor_inverse_label.setText(
                    f"{best.criterion}: fn ≤ {format_value(best.natural_frequency_hz, 'frequency', units)}, "
                    f"static deflection {format_value(best.static_deflection_m, 'length', units)} "
                    f"(common-practice relation g/(2π fn)²).")
                self.use_fn_button.setEnabled(True)
            else:   # met up to the top of the search range: the floor alone meets the criterion
                low, high = best.search_range_hz
                self.floor_inverse_label.setText(
                    f"{best.criterion} is met by natural frequencies up to {high:g} Hz, the top of the search: "
                    "this floor needs no isolation for it" + (" (every natural frequency from "
                                                             f"{low:g} Hz passes)." if best.every_frequency_passes
                                                             else "."))
        self._floor_best = best

    def _fill_floor_table(self, check) -> None:
        table = self.floor_table
        prediction = check.prediction
        stroke = dict(zip((float(v) for v in prediction.nominal_hz), prediction.stroke_rms_m))
        table.setRowCount(len(check.nominal_hz))
        for row, band in enumerate(check.nominal_hz):
            cells = (f"{band:g}", f"{check.predicted_velocity_m_s[row] * 1e6:.3g}",
                     f"{check.limit_m_s[row] * 1e6:.3g}", f"{check.margin_db[row]:.1f}",
                     f"{stroke[float(band)] * 1e6:.3g}")
            for column, text in enumerate(cells):
                item = QtWidgets.QTableWidgetItem(text)
                item.setTextAlignment(QtCore.Qt.AlignmentFlag.AlignRight | QtCore.Qt.AlignmentFlag.AlignVCenter)
                if column == 3 and check.margin_db[row] < 0:
                    item.setForeground(pg.mkColor(PALETTE["error_text"]))
                table.setItem(row, column, item)

    def _draw_two_stage(self, project, result, units) -> None:
        tab, study = self.two_stage, project.studies.two_stage
        tab.show_off(None if study is not None else
                     "Two-stage is off: tick the box to put the machine's mounts on an intermediate mass.")
        self.two_stage_plot.setVisible(study is not None and result is not None)
        self.two_stage_label.setVisible(study is not None and result is not None)
        if study is None or self._no_result(tab, result):
            return
        try:
            values, curves = self._two_stage(project.design, result, study)
        except MountsmithError as error:
            tab.show_message(str(error))
            self.two_stage_plot.setVisible(False)
            self.two_stage_label.setVisible(False)
            return
        tab.show_message(None)
        low, high = values["two_stage_frequencies_hz"]
        self.two_stage_label.setText(
            f"Natural frequencies {format_value(low, 'frequency', units)} and "
            f"{format_value(high, 'frequency', units)} (single stage "
            f"{format_value(result.natural_frequency_hz, 'frequency', units)}).\n"
            f"|T| at {format_value(result.speeds_rpm[0], 'speed', units)}: two-stage "
            f"{values['two_stage_transmissibility']:.3g}, single stage {values['single_stage_transmissibility']:.3g}; "
            f"gain {values['two_stage_gain_db']:.3g} dB.")
        if self._drawn.get("two_stage") is not curves:
            self._drawn["two_stage"] = curves
            finite = np.isfinite(curves.two_stage) & np.isfinite(curves.single_stage)
            self.two_stage_curve.setData(curves.frequency_hz[finite], curves.two_stage[finite])
            self.single_stage_curve.setData(curves.frequency_hz[finite], curves.single_stage[finite])
            self.two_stage_speed.setValue(np.log10(curves.speed_hz))
            plot = self.two_stage_plot.getPlotItem()
            plot.enableAutoRange()
            plot.getAxis("bottom").setTicks(log_ticks(curves.frequency_hz[0], curves.frequency_hz[-1]))
            plot.getAxis("left").setTicks(log_ticks(float(np.min(curves.two_stage[finite])),
                                                    float(np.max(curves.two_stage[finite]))))

    # ------------------------------------------------------------------ actions
    def move_design_to(self, natural_frequency_hz: float, damping_ratio: float) -> bool:
        """A click on the map: the design at that natural frequency and damping ratio, one undo step."""
        design = self.model.design
        if design.damping.model == "hysteretic":
            self.window.statusBar().showMessage("The design map is for viscous damping: the click was ignored.", 5000)
            return False
        try:
            self.model.set_design(studies.design_at_map_point(design, natural_frequency_hz, damping_ratio))
        except MountsmithError as error:
            self.design_map.show_message(str(error))
            return False
        return True

    def use_floor_natural_frequency(self) -> bool:
        best = getattr(self, "_floor_best", None)
        if best is None:
            return False
        try:
            self.model.update_design(None, tuning="natural_frequency",
                                     natural_frequency_hz=float(best.natural_frequency_hz))
        except MountsmithError as error:
            self.floor.show_message(str(error))
            return False
        return True

    def refresh_comparison(self) -> None:
        """The other damping model at equal peak on the transmissibility plots, when asked for."""
        curve = None
        note = ""
        design = self.model.design
        if self.material.compare_check.isChecked():
            try:
                other = damping_with_same_peak(design.damping)
                curve = drawn_curve_family(other)[0]
            except MountsmithError as error:
                note = str(error)
        self.window.plots.show_comparison(curve)
        tip = note or "Draws the other damping model with the same resonance peak, dashed"
        if self.material.compare_check.toolTip() != tip:     # at every slider step otherwise
            self.material.compare_check.setToolTip(tip)

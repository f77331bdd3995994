"""Floor vibration view: floor, predicted and criterion spectra, and an editable band table.

A standalone widget. It draws a :class:`core.floor.CriterionCheck` and lets the
user edit the floor spectrum; every number comes from ``core.floor`` (the
table text is parsed and validated there). Velocities are shown in µm/s, the
core works in m/s.
"""
from __future__ import annotations

import math

import PySide6  # noqa: F401  (import before pyqtgraph so it binds to PySide6)
from PySide6 import QtCore, QtWidgets

import pyqtgraph as pg

from app.style import FIELD_ERROR_STYLE, LINE_WIDTH, MARKER_SIZE, PALETTE, caution_label, style_axes
from core.errors import InputError
from core.floor import CriterionCheck, FloorSpectrum, parse_floor_rows

#: µm/s per m/s, for display only.
UM_S_PER_M_S = 1e6
#: Relative difference below which two floor spectra count as the same (table refresh).
_SAME_RELATIVE = 1e-9

#: Curve colours of this view, from the application palette: the floor (input) a
#: mid slate grey, dashed; the prediction the dark design blue, solid; the limit
#: the dark purple of target lines, dash-dot; the worst band the bright orange of
#: the operating point. Lightness differs as well as hue, so colour-blind viewers
#: and greyscale prints keep them apart; the line styles repeat the distinction.
FLOOR_COLOUR = "#5f6b7a"
PREDICTED_COLOUR = PALETTE["design"]
LIMIT_COLOUR = PALETTE["target"]
WORST_COLOUR = PALETTE["operating"]

_TABLE_HEADERS = ("Band (Hz)", "Floor (µm/s)")
#: Labelled axis ticks (log mode takes positions as log10 of the value).
_FREQUENCY_TICKS_HZ = tuple(m * 10.0 ** e for e in range(-1, 5) for m in (1, 2, 5))
_VELOCITY_DECADES_UM_S = tuple(10.0 ** e for e in range(-4, 7))


def _log_ticks(major, minor=()):
    """pyqtgraph tick spec for a log axis: labelled majors, unlabelled minors."""
    return [[(math.log10(v), f"{v:g}") for v in major], [(math.log10(v), "") for v in minor]]


class FloorView(QtWidgets.QWidget):
    """Plot of a criterion check beside an editable floor-spectrum table.

    Signals
    -------
    floorSpectrumEdited(list)
        After a valid table edit: a list of ``(band_hz, velocity_m_s)`` tuples,
        ``band_hz`` the exact one-third-octave centre (Hz), ``velocity_m_s``
        the RMS band velocity (m/s), ascending. An invalid table emits nothing
        and shows the core's message beside the table.
    """

    floorSpectrumEdited = QtCore.Signal(list)

    def __init__(self, parent: QtWidgets.QWidget | None = None):
        super().__init__(parent)
        self._plot = pg.PlotWidget(background=PALETTE["background"])
        self._build_plot()

        self.verdict_label = QtWidgets.QLabel("No result yet")
        self.verdict_label.setObjectName("verdict")
        self.verdict_label.setWordWrap(True)

        self.table = QtWidgets.QTableWidget(0, len(_TABLE_HEADERS))
        self.table.setHorizontalHeaderLabels(list(_TABLE_HEADERS))
        self.table.verticalHeader().setVisible(False)
        self.table.horizontalHeader().setSectionResizeMode(QtWidgets.QHeaderView.ResizeMode.Stretch)
        self.table.itemChanged.connect(self._table_edited)

        self.message_label = QtWidgets.QLabel("")
        self.message_label.setObjectName("tableMessage")
        self.message_label.setStyleSheet(FIELD_ERROR_STYLE)
        self.message_label.setWordWrap(True)

        self.add_button = QtWidgets.QPushButton("Add band")
        self.remove_button = QtWidgets.QPushButton("Remove band")
        self.add_button.clicked.connect(self._add_row)
        self.remove_button.clicked.connect(self._remove_row)

        caution = caution_label()

        buttons = QtWidgets.QHBoxLayout()
        buttons.addWidget(self.add_button)
        buttons.addWidget(self.remove_button)
        side = QtWidgets.QVBoxLayout()
        side.addWidget(QtWidgets.QLabel("Floor spectrum, one-third-octave RMS velocity"))
        side.addWidget(self.table, 1)
        side.addLayout(buttons)
        side.addWidget(self.message_label)
        left = QtWidgets.QVBoxLayout()
        left.addWidget(self.verdict_label)
        left.addWidget(self._plot, 1)
        row = QtWidgets.QHBoxLayout()
        row.addLayout(left, 3)
        row.addLayout(side, 1)
        layout = QtWidgets.QVBoxLayout(self)
        layout.addLayout(row, 1)
        layout.addWidget(caution)

    # ------------------------------------------------------------------ plot

    def _build_plot(self) -> None:
        plot = self._plot.getPlotItem()
        plot.setLogMode(x=True, y=True)
        plot.showGrid(x=True, y=True, alpha=PALETTE["grid_alpha"])
        style_axes(plot)
        plot.getAxis("bottom").setTicks(_log_ticks(_FREQUENCY_TICKS_HZ))
        plot.getAxis("left").setTicks(_log_ticks(
            _VELOCITY_DECADES_UM_S, [m * d for d in _VELOCITY_DECADES_UM_S for m in (2, 5)]))
        plot.setLabel("bottom", "One-third-octave band centre", units="Hz")
        plot.setLabel("left", "RMS velocity", units="µm/s")
        plot.addLegend(offset=(10, -10), labelTextColor=PALETTE["foreground"])
        width = LINE_WIDTH["design"]
        self.floor_curve = plot.plot(
            [], [], name="Floor", symbol="s", symbolSize=6, symbolBrush=FLOOR_COLOUR,
            symbolPen=FLOOR_COLOUR,
            pen=pg.mkPen(FLOOR_COLOUR, width=width * 0.6, style=QtCore.Qt.PenStyle.DashLine))
        self.predicted_curve = plot.plot(
            [], [], name="Predicted equipment", symbol="o", symbolSize=6,
            symbolBrush=PREDICTED_COLOUR, symbolPen=PREDICTED_COLOUR,
            pen=pg.mkPen(PREDICTED_COLOUR, width=width))
        self.limit_curve = plot.plot(
            [], [], name="Criterion",
            pen=pg.mkPen(LIMIT_COLOUR, width=LINE_WIDTH["target"],
                         style=QtCore.Qt.PenStyle.DashDotLine))
        self.worst_marker = plot.plot(
            [], [], name="Worst band", pen=None, symbol="d", symbolSize=MARKER_SIZE + 4,
            symbolBrush=WORST_COLOUR, symbolPen=pg.mkPen(PALETTE["foreground"], width=1))

    def show_result(self, check: CriterionCheck) -> None:
        """Draw a criterion check: floor, predicted, limit, worst band; verdict; table."""
        prediction = check.prediction
        self.floor_curve.setData(prediction.band_hz, prediction.floor_velocity_m_s * UM_S_PER_M_S)
        self.predicted_curve.setData(prediction.band_hz,
                                     prediction.equipment_velocity_m_s * UM_S_PER_M_S)
        self.limit_curve.setData(check.band_hz, check.limit_m_s * UM_S_PER_M_S)
        self.worst_marker.setData([check.worst_band_hz],
                                  [check.worst_predicted_velocity_m_s * UM_S_PER_M_S])
        self._show_verdict(check)
        floor = FloorSpectrum(prediction.band_hz, prediction.nominal_hz,
                              prediction.floor_velocity_m_s)
        if not self._table_shows(floor):
            self.set_floor_spectrum(floor)

    def _show_verdict(self, check: CriterionCheck) -> None:
        where = f"{check.worst_band_nominal_hz:g} Hz"
        if check.passed:
            text = (f"✓ Meets {check.criterion}: worst margin {check.worst_margin_db:.1f} dB "
                    f"below the limit, at {where}")
            colour = PALETTE["ok_text"]
        else:
            text = (f"✗ Exceeds {check.criterion} by {-check.worst_margin_db:.1f} dB at {where}")
            colour = PALETTE["error_text"]
        prediction = check.prediction
        text += (f"\nIsolator fn = {prediction.natural_frequency_hz:.3g} Hz, "
                 f"{prediction.damping.label}, band rule: {prediction.band_rule}")
        if check.unassessed_band_hz:
            text += f" (bands outside the criterion not assessed: {len(check.unassessed_band_hz)})"
        self.verdict_label.setText(text)
        self.verdict_label.setStyleSheet(f"color: {colour}; font-weight: bold;")

    # ------------------------------------------------------------------ table

    def set_floor_spectrum(self, floor: FloorSpectrum) -> None:
        """Fill the table from a floor spectrum (nominal Hz, µm/s) without emitting."""
        blocker = QtCore.QSignalBlocker(self.table)
        self.table.setRowCount(len(floor.band_hz))
        for row, (nominal, velocity) in enumerate(zip(floor.nominal_hz, floor.velocity_um_s)):
            self.table.setItem(row, 0, QtWidgets.QTableWidgetItem(f"{nominal:g}"))
            self.table.setItem(row, 1, QtWidgets.QTableWidgetItem(f"{velocity:.10g}"))
        del blocker
        self.message_label.setText("")

    def _rows(self) -> list[tuple[str, str]]:
        def text(row: int, column: int) -> str:
            item = self.table.item(row, column)
            return item.text() if item is not None else ""
        return [(text(row, 0), text(row, 1)) for row in range(self.table.rowCount())]

    def _parsed_table(self) -> FloorSpectrum:
        return parse_floor_rows(self._rows(), field="floor table")

    def _table_shows(self, floor: FloorSpectrum) -> bool:
        try:
            shown = self._parsed_table()
        except InputError:
            return False
        return (shown.band_hz.shape == floor.band_hz.shape
                and bool((abs(shown.band_hz - floor.band_hz) <= _SAME_RELATIVE * floor.band_hz).all())
                and bool((abs(shown.velocity_m_s - floor.velocity_m_s)
                          <= _SAME_RELATIVE * floor.velocity_m_s).all()))

    def _table_edited(self, _item=None) -> None:
        try:
            floor = self._parsed_table()
        except InputError as error:
            self.message_label.setText(str(error))
            return
        self.message_label.setText("")
        self.floorSpectrumEdited.emit(
            [(float(f), float(v)) for f, v in zip(floor.band_hz, floor.velocity_m_s)])

    def _add_row(self) -> None:
        blocker = QtCore.QSignalBlocker(self.table)
        self.table.insertRow(self.table.rowCount())
        del blocker
        self._table_edited()

    def _remove_row(self) -> None:
        row = self.table.currentRow()
        if row < 0:
            row = self.table.rowCount() - 1
        if row >= 0:
            self.table.removeRow(row)
            self._table_edited()

    @property
    def plot_widget(self) -> pg.PlotWidget:
        """The plot (for exports and tests)."""
        return self._plot

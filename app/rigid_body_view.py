"""Standalone view of a machine on several mounts: layout, six rigid-body modes, static loads.

It draws what :mod:`core.rigid_body` computed and computes nothing itself:
``RigidBodyView.show_result(body, mounts, modes_result, loads)``.
Run ``python -m app.rigid_body_view`` for an invented example.
"""
from __future__ import annotations

import sys
from typing import Sequence

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QAbstractItemView,
    QApplication,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

import pyqtgraph as pg  # after PySide6, so that pyqtgraph binds to it

from app.style import FONT_POINTS, PALETTE, caution_label, style_axes
from core.errors import InputError
from core.rigid_body import COORDINATES, Mount, RigidBody, RigidBodyModes, StaticLoads
from core.units import to_display, unit_symbol

#: Marker sizes (pixels) of the lightest and the most heavily loaded mount.
SMALLEST_MARKER_PX, LARGEST_MARKER_PX = 9.0, 24.0
CG_MARKER_PX = 20.0
#: Smallest height of the plan and side plots (px); below it the tab scrolls.
PLOT_MIN_HEIGHT = 260
#: Rows a table shows without scrolling inside it (the six modes; mounts beyond scroll).
TABLE_ROWS_SHOWN = 6
#: Table cells keep the unrounded SI value under this role (tests and copy/export read it).
VALUE_ROLE = Qt.ItemDataRole.UserRole

_MOUNT_BRUSH = PALETTE["design"]          # dark blue: a mount in compression
_TENSION_BRUSH = PALETTE["operating"]     # orange, drawn as a downward triangle: a mount pulled up
_CG_BRUSH = PALETTE["target"]             # dark purple cross: the centre of gravity


def _item(text: str, value: float | None = None) -> QTableWidgetItem:
    """A read-only table cell; numbers are right-aligned and keep their SI value."""
    cell = QTableWidgetItem(text)
    cell.setFlags(Qt.ItemFlag.ItemIsSelectable | Qt.ItemFlag.ItemIsEnabled)
    if value is not None:
        cell.setData(VALUE_ROLE, float(value))
        cell.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
    return cell


def _number(value: float) -> str:
    return f"{value:.4g}"


#: Decimals shown per kind of table value and unit system (round-off noise shows as 0).
DECIMALS = {
    ("position", "SI"): 1, ("position", "US"): 2,      # mm, in
    ("force", "SI"): 1, ("force", "US"): 1,            # N, lbf
    ("deflection", "SI"): 2, ("deflection", "US"): 3,  # mm, in
    ("share", "SI"): 1, ("share", "US"): 1,            # %
}


def _fixed(value: float, decimals: int) -> str:
    """Fixed-point text without a "-0.0"."""
    return f"{round(float(value), decimals) + 0.0:.{decimals}f}"


def _joined_labels(points: np.ndarray, names: Sequence[str]) -> list[str]:
    """One label per spot: mounts drawn on the same spot share a label on the first of them."""
    labels, first_at = [], {}
    for index, point in enumerate(points):
        spot = tuple(np.round(point, 6))
        if spot in first_at:
            labels.append("")
            labels[first_at[spot]] += f", {names[index]}"
        else:
            first_at[spot] = index
            labels.append(f" {names[index]}")
    return labels


class _LayoutPlot(pg.PlotWidget):
    """One view of the layout: mounts (sized by load) and the CG, equal axis scales."""

    def __init__(self, title: str, vertical_axis: str, length_symbol: str):
        super().__init__(background=PALETTE["background"])
        self.setTitle(title, color=PALETTE["foreground"], size=f"{FONT_POINTS + 1}pt")
        style_axes(self)
        for side, name in (("bottom", "x"), ("left", vertical_axis)):
            self.setLabel(side, f"{name} ({length_symbol})")
        self.showGrid(x=True, y=True, alpha=PALETTE["grid_alpha"])
        self.setAspectLocked(True)
        self.setMenuEnabled(False)
        legend = self.addLegend(offset=(8, 8), labelTextColor=PALETTE["foreground"])
        legend.setBrush(pg.mkBrush(255, 255, 255, 200))
        self.mounts = pg.ScatterPlotItem(pen=pg.mkPen(PALETTE["foreground"], width=1), name="mount (size: load)")
        self.cg = pg.ScatterPlotItem(
            symbol="+", size=CG_MARKER_PX, pen=pg.mkPen(PALETTE["foreground"], width=1),
            brush=pg.mkBrush(_CG_BRUSH), name="centre of gravity",
        )
        self.addItem(self.mounts)
        self.addItem(self.cg)
        self.label_items: list[pg.TextItem] = []

    def show_points(self, points, cg, sizes, tension, labels: Sequence[str]) -> None:
        """Place the mounts at ``points`` (n, 2) and the CG at ``cg`` (2,), display units."""
        brushes = [pg.mkBrush(_TENSION_BRUSH if pulled else _MOUNT_BRUSH) for pulled in tension]
        symbols = ["t" if pulled else "o" for pulled in tension]
        self.mounts.setData(x=points[:, 0], y=points[:, 1], size=sizes, brush=brushes, symbol=symbols)
        self.cg.setData(x=[cg[0]], y=[cg[1]])
        while len(self.label_items) < len(labels):
            label = pg.TextItem(color=PALETTE["foreground"], anchor=(0.0, 1.0))
            self.addItem(label)
            self.label_items.append(label)
        for index, label in enumerate(self.label_items):
            label.setVisible(index < len(labels))
            if index < len(labels):
                label.setText(labels[index])
                label.setPos(float(points[index, 0]), float(points[index, 1]))
        every = np.vstack([points, cg])
        low, high = every.min(axis=0), every.max(axis=0)
        margin = 0.25 * max(float(np.max(high - low)), 1e-9)
        self.setRange(xRange=(low[0] - margin, high[0] + margin), yRange=(low[1] - margin, high[1] + margin),
                      padding=0.0)


class RigidBodyView(QWidget):
    """Plan and side views of a mount layout with the CG, a table of the six modes and of the static loads.

    Parameters
    ----------
    unit_system : {"SI", "US"}, optional
        Display units of lengths and forces (``core.units``); frequencies are in Hz.
    parent : QWidget, optional
    """

    MODE_HEADERS = ("Mode", "Frequency (Hz)", "Main motion") + tuple(f"{name} (%)" for name in COORDINATES)

    def __init__(self, unit_system: str = "SI", parent: QWidget | None = None):
        super().__init__(parent)
        self.unit_system = unit_system
        self._length = unit_symbol("length", unit_system)
        self._force = unit_symbol("force", unit_system)
        self.setWindowTitle("Machine on mounts: rigid-body modes and static loads")

        self.plan_plot = _LayoutPlot("Plan (x–y)", "y", self._length)
        self.side_plot = _LayoutPlot("Side (x–z)", "z", self._length)
        plots = QHBoxLayout()
        plots.addWidget(self.plan_plot)
        plots.addWidget(self.side_plot)

        self.modes_table = self._table(self.MODE_HEADERS)
        self.loads_table = self._table(
            ("Mount", f"x ({self._length})", f"y ({self._length})", f"z ({self._length})",
             f"Vertical load ({self._force})", f"Fx ({self._force})", f"Fy ({self._force})",
             f"Fz ({self._force})", f"Deflection z ({self._length})")
        )
        # The modes first, the layout plots, then the loads, one above the other (side by side,
        # a window of common size left each table a header row only); the tab scrolls.
        for plot in (self.plan_plot, self.side_plot):
            plot.setMinimumHeight(PLOT_MIN_HEIGHT)

        self.note_label = QLabel()
        self.note_label.setWordWrap(True)
        self.caution_label = caution_label()

        layout = QVBoxLayout(self)
        layout.addWidget(self._group("Rigid-body modes (kinetic-energy share per coordinate)", self.modes_table))
        layout.addLayout(plots, stretch=1)
        layout.addWidget(self._group("Static loads from the machine's weight", self.loads_table))
        layout.addWidget(self.note_label)
        layout.addWidget(self.caution_label)

    @staticmethod
    def _table(headers: Sequence[str]) -> QTableWidget:
        table = QTableWidget(0, len(headers))
        table.setHorizontalHeaderLabels(list(headers))
        table.verticalHeader().setVisible(False)
        table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        table.setAlternatingRowColors(True)
        return table

    @staticmethod
    def _group(title: str, widget: QWidget) -> QGroupBox:
        group = QGroupBox(title)
        inner = QVBoxLayout(group)
        inner.addWidget(widget)
        return group

    def show_result(
        self,
        body: RigidBody,
        mounts: Sequence[Mount],
        modes_result: RigidBodyModes,
        loads: StaticLoads,
        warnings: Sequence[str] = (),
    ) -> None:
        """Show a layout and what the core computed for it.

        Parameters
        ----------
        body : RigidBody
        mounts : sequence of Mount
        modes_result : RigidBodyModes
            From ``core.rigid_body.modes(body, mounts)``.
        loads : StaticLoads
            From ``core.rigid_body.static_loads(body, mounts)``.
        warnings : sequence of str, optional
            Messages to show, e.g. from ``core.rigid_body.mode_warnings``.
        """
        mounts = tuple(mounts)
        if len(loads.vertical_load_n) != len(mounts):
            raise InputError("loads", f"must hold one load per mount ({len(mounts)})", len(loads.vertical_load_n))
        names = [mount.label or str(index + 1) for index, mount in enumerate(mounts)]
        self._show_layout(body, mounts, loads, names)
        self._show_modes(modes_result)
        self._show_loads(mounts, loads, names)
        notes = list(warnings)
        if modes_result.inertia_is_estimate or body.inertia_is_estimate:
            notes.append("Inertia is an estimate (uniform box): the rocking frequencies are approximate.")
        if loads.mounts_in_tension:
            pulled = ", ".join(names[index] for index in loads.mounts_in_tension)
            notes.append(f"Mount(s) {pulled} are pulled upward: the CG lies outside the mount layout.")
        self.note_label.setText("\n".join(notes))
        self.note_label.setVisible(bool(notes))

    def _show_layout(self, body, mounts, loads, names) -> None:
        positions = to_display(np.array([mount.position_m for mount in mounts]), "length", self.unit_system)
        cg = to_display(np.asarray(body.cg_m), "length", self.unit_system)
        load = np.abs(np.asarray(loads.vertical_load_n))
        heaviest = float(load.max()) if load.max() > 0 else 1.0
        sizes = SMALLEST_MARKER_PX + (LARGEST_MARKER_PX - SMALLEST_MARKER_PX) * load / heaviest
        tension = np.asarray(loads.vertical_load_n) < 0
        shown_loads = to_display(np.asarray(loads.vertical_load_n), "force", self.unit_system)
        labels = [f" {name}: {_number(value)} {self._force}" for name, value in zip(names, shown_loads)]
        self.plan_plot.show_points(positions[:, [0, 1]], cg[[0, 1]], sizes, tension, labels)
        side = positions[:, [0, 2]]
        self.side_plot.show_points(side, cg[[0, 2]], sizes, tension, _joined_labels(side, names))

    def _show_modes(self, result: RigidBodyModes) -> None:
        table = self.modes_table
        table.setRowCount(len(result.frequencies_hz))
        for row, frequency in enumerate(result.frequencies_hz):
            table.setItem(row, 0, _item(str(row + 1)))
            table.setItem(row, 1, _item(_number(frequency), frequency))
            table.setItem(row, 2, _item(result.dominant[row]))
            for column, share in enumerate(result.energy_share[row]):
                table.setItem(row, 3 + column, _item(_fixed(100.0 * share, DECIMALS["share", "SI"]), share))
        table.resizeColumnsToContents()
        _fit_rows(table)

    def _show_loads(self, mounts, loads: StaticLoads, names) -> None:
        table = self.loads_table
        table.setRowCount(len(mounts))
        system = self.unit_system
        for row, mount in enumerate(mounts):
            table.setItem(row, 0, _item(names[row]))
            values = [
                (mount.position_m[0], "length", "position"), (mount.position_m[1], "length", "position"),
                (mount.position_m[2], "length", "position"), (loads.vertical_load_n[row], "force", "force"),
                (loads.force_n[row, 0], "force", "force"), (loads.force_n[row, 1], "force", "force"),
                (loads.force_n[row, 2], "force", "force"), (-loads.deflection_m[row, 2], "length", "deflection"),
            ]
            for column, (value, kind, style) in enumerate(values, start=1):
                text = _fixed(to_display(value, kind, system), DECIMALS[style, system])
                table.setItem(row, column, _item(text, value))
        table.resizeColumnsToContents()
        _fit_rows(table)


def _fit_rows(table: QTableWidget) -> None:
    """Make ``table`` tall enough for its rows, up to TABLE_ROWS_SHOWN (more rows scroll inside it)."""
    rows = min(table.rowCount(), TABLE_ROWS_SHOWN)
    height = table.horizontalHeader().height() + 2 * table.frameWidth() + sum(
        table.rowHeight(row) for row in range(rows))
    if table.horizontalScrollBar().isVisible() or table.horizontalScrollBar().maximum() > 0:
        height += table.horizontalScrollBar().sizeHint().height()
    table.setMinimumHeight(height)


def main() -> int:
    """Show an invented example: a 1.2 t pump skid on six mounts."""
    from core.rigid_body import box_inertia, mode_warnings, modes, static_loads

    app = QApplication.instance() or QApplication(sys.argv)
    inertia = box_inertia(1200.0, 2.4, 1.1, 1.0)
    body = RigidBody(1200.0, inertia.inertia_kg_m2, (0.15, 0.02, 0.45), inertia_is_estimate=True)
    mounts = [
        Mount((x, y, 0.0), (6e5, 6e5, 1.5e6), label=f"{side}{index + 1}")
        for index, x in enumerate((-1.1, 0.0, 1.1)) for side, y in (("L", 0.5), ("R", -0.5))
    ]
    result = modes(body, mounts)
    view = RigidBodyView()
    view.show_result(body, mounts, result, static_loads(body, mounts),
                     warnings=mode_warnings(result.frequencies_hz, 1480 / 60, labels=result.dominant))
    view.resize(1200, 800)
    view.show()
    return app.exec()


if __name__ == "__main__":
    sys.exit(main())

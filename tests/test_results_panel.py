"""The results panel's value widgets: wrapping, steady row heights, copy as text (offscreen)."""
from __future__ import annotations

import pytest
from PySide6 import QtCore, QtWidgets

from app.results_panel import ResultsPanel, ValueText
from tests.conftest import ROOT
from tests.qt_events import EventCounter

pytestmark = pytest.mark.gui

LONG = "115.7, 152.2, 115.7, 152.2, 115.7, 152.2 N/mm"
SHORT = "116 N/mm"


def _shown_value(qtbot, text: str, width: int) -> tuple[QtWidgets.QWidget, ValueText]:
    holder = QtWidgets.QWidget()
    layout = QtWidgets.QVBoxLayout(holder)
    value = ValueText(text)
    layout.addWidget(value)
    layout.addStretch(1)
    qtbot.addWidget(holder)
    holder.resize(width, 400)
    holder.show()
    qtbot.waitExposed(holder)
    return holder, value


def test_a_long_value_wraps_and_keeps_its_height_until_told(qtbot):
    _holder, value = _shown_value(qtbot, SHORT, 160)
    line = value.fontMetrics().height()
    assert value.heightForWidth(value.width()) == line
    value.setText(LONG)
    qtbot.waitUntil(lambda: value.height() >= 2 * line)       # wrapped onto more lines
    tall = value.height()
    value.setText(SHORT)                                       # a slider step back
    QtWidgets.QApplication.processEvents()
    assert value.height() == tall                              # the row does not jump
    value.forget_height()                                      # a new project or other units
    qtbot.waitUntil(lambda: value.height() == line)


def test_units_with_a_slash_stay_on_one_line(qtbot):
    # Unicode line breaking allows a break after "/"; the drawn text joins it to its neighbours.
    # At a width that holds "N/" but not "N/mm" a unit alone stays one (overlong) line.
    _holder, value = _shown_value(qtbot, "N/mm", 400)
    metrics = value.fontMetrics()
    width = metrics.horizontalAdvance("N/") + 1
    assert width < metrics.horizontalAdvance("N/mm")
    assert value.heightForWidth(width) == metrics.height()
    value.setText("12.5 N/mm")               # a number and its unit still break at the space
    assert value.heightForWidth(width) > metrics.height()


def test_copy_results_gives_each_shown_row_as_text(main_window):
    panel: ResultsPanel = main_window(ROOT / "demo_projects" / "rooftop_air_handler.json").results
    text = panel.as_text()
    assert "Natural frequency fn: " + panel.value_labels["natural_frequency"].text() in text
    assert "licensed engineer" in text
    copy = [action for action in panel.actions() if action.text() == "Copy results"]
    assert len(copy) == 1
    copy[0].trigger()
    assert QtWidgets.QApplication.clipboard().text() == text


def test_a_new_text_of_the_same_height_asks_for_no_layout(qtbot):
    holder, value = _shown_value(qtbot, "93.4 N", 300)
    QtWidgets.QApplication.processEvents()       # the layout of the first show
    requests = EventCounter(QtCore.QEvent.Type.LayoutRequest)
    holder.installEventFilter(requests)
    for number in range(20):                     # a drag: new numbers, one line each
        value.setText(f"{93.4 + number / 10:.4g} N")
        QtWidgets.QApplication.processEvents()
    assert requests.count == 0
    value.setText(LONG * 3)                      # more lines: the layout must grow the row
    QtWidgets.QApplication.processEvents()
    assert requests.count >= 1


def test_warnings_shrink_at_once_and_change_without_a_layout(main_window):
    panel: ResultsPanel = main_window(ROOT / "demo_projects" / "rooftop_air_handler.json").results
    warnings = panel.warnings_label
    line = warnings.fontMetrics().height()
    requests = EventCounter(QtCore.QEvent.Type.LayoutRequest)
    panel.installEventFilter(requests)
    panel._design_warnings = ("Per-mount loads differ by 27.3 % of the mean.",)
    panel._show_warnings()
    for _ in range(3):                           # the panel's layout, then the scroll area's
        QtWidgets.QApplication.processEvents()
    before = requests.count
    panel._design_warnings = ("Per-mount loads differ by 27.4 % of the mean.",)
    panel._show_warnings()
    QtWidgets.QApplication.processEvents()
    assert warnings.text() == "• Per-mount loads differ by 27.4 % of the mean."
    assert requests.count == before              # same height: no new layout of the panel
    panel._design_warnings = tuple(f"Warning number {n} with a few words." for n in range(6))
    panel._show_warnings()
    QtWidgets.QApplication.processEvents()
    assert warnings.height() >= 6 * line
    panel._design_warnings = ()
    panel._show_warnings()
    QtWidgets.QApplication.processEvents()
    assert warnings.text() == "none" and warnings.height() < 2 * line   # no blank rows left behind


def test_a_larger_font_is_measured_again(qtbot):
    _holder, value = _shown_value(qtbot, SHORT, 300)
    small = value.heightForWidth(value.width())
    font = value.font()
    font.setPointSizeF(font.pointSizeF() * 2)
    value.setFont(font)
    value.forget_height()
    assert value.heightForWidth(value.width()) > small

"""The results panel's value widgets: wrapping, steady row heights, copy as text (offscreen)."""
from __future__ import annotations

import pytest
from PySide6 import QtWidgets

from app.results_panel import ResultsPanel, ValueText
from tests.conftest import ROOT

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

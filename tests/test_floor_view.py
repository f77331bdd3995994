"""Floor view: plotted data equal the core's results; table edits go through the core's parser."""
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pytest  # noqa: E402

pytest.importorskip("PySide6")

from app.floor_view import FloorView  # noqa: E402
from core.errors import InputError  # noqa: E402
from core.floor import check_criterion, parse_floor_csv, parse_floor_rows  # noqa: E402

pytestmark = pytest.mark.gui

# Invented survey of a laboratory slab bay (µm/s per one-third-octave band).
SURVEY = "Hz,um/s\n1,4\n2,6\n4,9\n8,18\n16,30\n31.5,22\n63,12\n80,8\n"


@pytest.fixture
def view(qtbot):
    widget = FloorView()
    qtbot.addWidget(widget)
    widget.resize(900, 500)
    widget.show()
    return widget


@pytest.fixture
def failing_check():
    return check_criterion(parse_floor_csv(SURVEY), "VC-C", 6.0, damping_ratio=0.05)


def _original(curve):
    x, y = curve.getOriginalDataset()
    return np.asarray(x), np.asarray(y)


def test_plotted_data_equal_core_data(view, failing_check):
    # Reference: the core's CriterionCheck itself (the view must draw exactly those numbers, in µm/s).
    view.show_result(failing_check)
    prediction = failing_check.prediction
    x, y = _original(view.floor_curve)
    assert np.array_equal(x, prediction.band_hz)
    assert np.allclose(y, prediction.floor_velocity_m_s * 1e6, rtol=1e-15)
    x, y = _original(view.predicted_curve)
    assert np.array_equal(x, prediction.band_hz)
    assert np.allclose(y, prediction.equipment_velocity_m_s * 1e6, rtol=1e-15)
    x, y = _original(view.limit_curve)
    assert np.array_equal(x, failing_check.band_hz)
    assert np.allclose(y, 12.5, rtol=1e-12)  # VC-C, 12.5 µm/s (B. Davis 2008 note, REFERENCES §4)
    x, y = _original(view.worst_marker)
    assert x.tolist() == [failing_check.worst_band_hz]
    assert y[0] == pytest.approx(failing_check.worst_predicted_velocity_m_s * 1e6, rel=1e-15)
    assert not failing_check.passed
    assert view.verdict_label.text().startswith("✗ Exceeds VC-C")
    assert "fn = 6 Hz, ζ = 0.05" in view.verdict_label.text()
    assert f"{-failing_check.worst_margin_db:.1f} dB" in view.verdict_label.text()
    assert [view.table.item(r, 0).text() for r in range(view.table.rowCount())] == \
        ["1", "2", "4", "8", "16", "31.5", "63", "80"]


def test_log_axes_without_si_prefix(view, failing_check):
    view.show_result(failing_check)
    plot = view.plot_widget.getPlotItem()
    assert plot.ctrl.logXCheck.isChecked() and plot.ctrl.logYCheck.isChecked()
    left, bottom = plot.getAxis("left"), plot.getAxis("bottom")
    assert not left.autoSIPrefix and not bottom.autoSIPrefix
    assert left.labelUnits == "µm/s" and bottom.labelUnits == "Hz"


def test_pass_verdict(view):
    check = check_criterion(parse_floor_csv(SURVEY), "VC-A", 1.0, damping_ratio=0.1)
    # Resonant 1 Hz band: 4 µm/s x |T|(r = 1, zeta = 0.1) = 5.099 (Vigran eq. 2.33, REFERENCES
    # §1) = 20 µm/s < VC-A 50;
    # every higher band is isolated (r >= 2, |T| < 0.36) or already below 50 µm/s.
    assert check.passed
    view.show_result(check)
    assert view.verdict_label.text().startswith("✓ Meets VC-A")


def test_invalid_cell_shows_core_message_and_emits_nothing(view, failing_check, qtbot):
    view.show_result(failing_check)
    with qtbot.assertNotEmitted(view.floorSpectrumEdited):
        view.table.item(1, 1).setText("-3")
    rows = [(view.table.item(r, 0).text(), view.table.item(r, 1).text())
            for r in range(view.table.rowCount())]
    with pytest.raises(InputError) as info:
        parse_floor_rows(rows, field="floor table")
    assert view.message_label.text() == str(info.value)
    assert "floor table row 2, velocity (µm/s)" in view.message_label.text()
    with qtbot.assertNotEmitted(view.floorSpectrumEdited):
        view.table.item(2, 0).setText("4.5")  # not a band centre
    assert view.message_label.text().startswith("floor table row 2")  # first bad row reported


def test_valid_edit_emits_core_parsed_spectrum(view, failing_check, qtbot):
    view.show_result(failing_check)
    with qtbot.waitSignal(view.floorSpectrumEdited, timeout=1000) as blocker:
        view.table.item(3, 1).setText("7.5")
    emitted = blocker.args[0]
    assert view.message_label.text() == ""
    assert [f for f, _ in emitted] == pytest.approx([10 ** (n / 10) for n in (0, 3, 6, 9, 12, 15, 18, 19)],
                                                   rel=1e-12)  # IEC 61260-1 exact centres
    assert [v for _, v in emitted] == pytest.approx([4e-6, 6e-6, 9e-6, 7.5e-6, 30e-6, 22e-6, 12e-6, 8e-6],
                                                   rel=1e-12)


def test_fixing_an_invalid_cell_clears_the_message(view, failing_check, qtbot):
    view.show_result(failing_check)
    view.table.item(0, 0).setText("1.5")
    assert "nearest centre is 1.6 Hz" in view.message_label.text()
    with qtbot.waitSignal(view.floorSpectrumEdited, timeout=1000):
        view.table.item(0, 0).setText("1.6")
    assert view.message_label.text() == ""


def test_show_result_does_not_emit_and_keeps_equal_table(view, failing_check, qtbot):
    with qtbot.assertNotEmitted(view.floorSpectrumEdited):
        view.show_result(failing_check)
        view.show_result(failing_check)
    item = view.table.item(0, 1)
    view.show_result(failing_check)
    assert view.table.item(0, 1) is item  # same spectrum: the table is left alone


def test_add_and_remove_band(view, failing_check, qtbot):
    view.show_result(failing_check)
    with qtbot.assertNotEmitted(view.floorSpectrumEdited):
        view.add_button.click()
    assert "floor table row 9" in view.message_label.text()
    with qtbot.waitSignal(view.floorSpectrumEdited, timeout=1000) as blocker:
        view.table.setCurrentCell(8, 0)
        view.remove_button.click()
    assert len(blocker.args[0]) == 8

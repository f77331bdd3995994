"""Functional tests of the design window, driven through its widgets (pytest-qt, offscreen).

Reference values: REFERENCES.md §1, viscous abs T table (T.E. Vigran, *Building
Acoustics* (2008) eq. 2.33; Harris' *Shock and Vibration Handbook* ch. 30),
hysteretic abs T (Snowdon, NBS Handbook 128; Vinokur 2023), phase lag
(Rao, *Mechanical Vibrations*, from memory), and §2 static deflection
fn = (1/2π) sqrt(g/δ). Closed forms are written out here, independently of core/.
"""
from __future__ import annotations

import json
import math

import numpy as np
import pytest
from PySide6 import QtCore, QtGui, QtWidgets

from app.settings import AppSettings
from core.curves import DAMPING_GRID, RATIO_GRID
from core.project import load_project
from core.synthesis import synthesize
from core.units import format_value
from tests.conftest import demo_project_params

pytestmark = pytest.mark.gui

G = 9.80665  # standard gravity, m/s² (CGPM 1901)
LB = 0.45359237  # kg per lb, exact (international pound, 1959)
LBF_PER_IN = 4.4482216152605 / 0.0254  # N/m per lbf/in, exact from the lbf and inch definitions


def closed_form_magnitude(r, model, value):
    """abs T: viscous sqrt((1+(2ζr)²)/((1−r²)²+(2ζr)²)) (Vigran eq. 2.33); hysteretic
    sqrt((1+η²)/((1−r²)²+η²)) (Snowdon, NBS Handbook 128)."""
    r = np.asarray(r, dtype=float)
    loss = 2.0 * value * r if model == "viscous" else value
    return np.sqrt((1.0 + loss ** 2) / ((1.0 - r * r) ** 2 + loss ** 2))


def settle(qtbot, window):
    """Wait for the coalesced redraw to run."""
    qtbot.waitUntil(lambda: not window.redraw_pending, timeout=3000)


def curve_xy(item):
    x, y = item.getOriginalDataset()
    return np.asarray(x, dtype=float), np.asarray(y, dtype=float)


def type_into(qtbot, edit: QtWidgets.QLineEdit, text: str) -> None:
    """Replace the field's text as a user would: select all, then type (each key is validated)."""
    edit.setFocus()
    edit.selectAll()
    qtbot.keyClick(edit, QtCore.Qt.Key.Key_Backspace)
    qtbot.keyClicks(edit, text)


def paste_into(qtbot, edit: QtWidgets.QLineEdit, text: str) -> None:
    """Replace the field's text in one user edit (paste over a selection)."""
    QtWidgets.QApplication.clipboard().setText(text)
    edit.setFocus()
    edit.selectAll()
    qtbot.keyClick(edit, QtCore.Qt.Key.Key_V, QtCore.Qt.KeyboardModifier.ControlModifier)
    assert edit.text() == text


# ---------------------------------------------------------------------- opening the demo projects
@pytest.mark.parametrize("path", demo_project_params())
def test_window_opens_demo_project_and_shows_core_results(main_window, qtbot, path):
    window = main_window(path)
    project = load_project(path)
    assert project.name in window.windowTitle() and path.name in window.windowTitle()
    assert not window.isWindowModified()
    expected = synthesize(project.design)
    system = project.view.units
    labels = window.results.value_labels
    assert labels["static_deflection"].text() == format_value(expected.static_deflection_m, "length", system)
    assert labels["transmissibility"].text() == f"{expected.transmissibility:.4g}"
    assert labels["natural_frequency"].text().startswith(
        format_value(expected.natural_frequency_hz, "frequency", system))
    # Design curve against the closed form (independent of core/).
    damping = project.design.damping
    x, y = curve_xy(window.plots.design_magnitude)
    ratio = x if window.plots._x_axis == "ratio" else x / (
        expected.natural_frequency_hz * (60.0 if window.plots._x_axis == "rpm" else 1.0))
    want = closed_form_magnitude(ratio, damping.model, damping.value)
    if project.view.magnitude_scale == "db":
        want = 20.0 * np.log10(want)
    np.testing.assert_allclose(y, want, rtol=1e-9, atol=1e-9)
    # Operating point on the curve at the design ratio.
    _, marker_y = window.plots.operating_magnitude.points()
    t_low = float(closed_form_magnitude(expected.frequency_ratio, damping.model, damping.value))
    first = marker_y[0] if project.view.magnitude_scale == "ratio" else 10 ** (marker_y[0] / 20.0)
    assert first == pytest.approx(t_low, rel=1e-9)
    # The symbol is drawn there: its item sits at the point in the view's (log10) coordinates.
    marker = window.plots.operating_magnitude.items[0]
    assert marker.isVisible()
    at = marker.pos()   # in its parent's coordinates: the view's (log10) data coordinates
    x_shown = expected.frequency_ratio * (1.0 if window.plots._x_axis == "ratio" else
                                          expected.natural_frequency_hz * (60.0 if window.plots._x_axis == "rpm" else 1.0))
    assert at.x() == pytest.approx(math.log10(x_shown), abs=1e-9)
    y_shown = math.log10(t_low) if project.view.magnitude_scale == "ratio" else 20.0 * math.log10(t_low)
    assert at.y() == pytest.approx(y_shown, abs=1e-9)
    assert window.caution_label.isVisible() and "licensed engineer" in window.caution_label.text()
    panel = window.design_panel
    assert panel.tuning_combo.currentData() == project.design.tuning
    assert panel.damping_combo.currentData() == damping.model
    assert panel.layout_combo.currentData() == project.design.load_layout
    assert panel.excitation_combo.currentData() == project.design.excitation.kind
    for label in labels.values():
        assert "nan" not in label.text().lower()


# ---------------------------------------------------------------------- sliders
@pytest.mark.parametrize("path", demo_project_params())
def test_damping_slider_moves_curves_and_results(main_window, qtbot, path):
    window = main_window(path)
    slider = window.operating.damping_slider
    for index in (0, 137, DAMPING_GRID.steps):
        slider.setValue(index)
        settle(qtbot, window)
        value = DAMPING_GRID.value(index)
        design = window.model.design
        assert design.damping.value == value
        expected = synthesize(design)
        x, y = curve_xy(window.plots.design_magnitude)
        if window.model.view.magnitude_scale == "db":
            y = 10 ** (y / 20.0)
        ratio = x if window.plots._x_axis == "ratio" else x / (
            expected.natural_frequency_hz * (60.0 if window.plots._x_axis == "rpm" else 1.0))
        np.testing.assert_allclose(y, closed_form_magnitude(ratio, design.damping.model, value), rtol=1e-9)
        t_expected = float(closed_form_magnitude(expected.frequency_ratio, design.damping.model, value))
        assert window.results.value_labels["transmissibility"].text() == f"{t_expected:.4g}"
        assert window.operating.damping_spin.value() == pytest.approx(value, abs=5e-5)
    assert DAMPING_GRID.value(0) == 0.005 and DAMPING_GRID.value(DAMPING_GRID.steps) == 1.0


@pytest.mark.parametrize("path", demo_project_params())
def test_ratio_slider_moves_natural_frequency_and_every_result(main_window, qtbot, path):
    window = main_window(path)
    window.set_view_option("units", "SI")
    design0 = window.model.design
    for index in (0, 250, RATIO_GRID.steps):
        window.operating.ratio_slider.setValue(index)
        settle(qtbot, window)
        ratio = RATIO_GRID.value(index)
        design = window.model.design
        assert design.tuning == "frequency_ratio" and design.frequency_ratio == ratio
        assert design.mass_kg == design0.mass_kg and design.speed_rpm == design0.speed_rpm
        fn = design.speed_rpm / 60.0 / ratio  # r = ω/ωn at the lowest speed
        labels = window.results.value_labels
        assert labels["natural_frequency"].text().startswith(f"{fn:.4g} Hz")
        # δ = g / ωn² for the static stiffness K_dyn / ratio (REFERENCES.md §2: fn = (1/2π) sqrt(g/δ)).
        deflection_mm = G * design.dynamic_stiffness_ratio / (2 * math.pi * fn) ** 2 * 1e3
        assert labels["static_deflection"].text() == f"{deflection_mm:.4g} mm"
        k_total = design.mass_kg * (2 * math.pi * fn) ** 2  # k = m ωn²
        assert labels["stiffness_total"].text() == f"{k_total / 1e3:.4g} N/mm"
        _, marker_y = window.plots.operating_magnitude.points()
        t = float(closed_form_magnitude(ratio, design.damping.model, design.damping.value))
        shown = marker_y[0] if window.model.view.magnitude_scale == "ratio" else 10 ** (marker_y[0] / 20)
        assert shown == pytest.approx(t, rel=1e-9)
    assert RATIO_GRID.value(0) == 0.1 and RATIO_GRID.value(RATIO_GRID.steps) == 10.0


@pytest.mark.parametrize("zeta, ratio, expected", [
    (0.1, 2.0, "0.3559"), (0.3, 5.0, "0.1307"), (0.5, 1.5, "0.9233"), (0.01, 2.0, "0.3336"),
])
def test_results_match_published_viscous_table(main_window, qtbot, zeta, ratio, expected):
    """abs T from the table of REFERENCES.md §1 (Vigran eq. 2.33), 4 significant figures."""
    window = main_window()
    window.operating.damping_spin.setValue(zeta)
    window.operating.ratio_spin.setValue(ratio)
    settle(qtbot, window)
    assert window.model.design.damping.model == "viscous"
    assert window.results.value_labels["transmissibility"].text() == expected


@pytest.mark.parametrize("eta, ratio, expected", [(0.05, 2.0, "0.3337"), (0.5, 2.0, "0.3676"),
                                                  (0.5, 5.0, "0.04657")])
def test_results_match_published_hysteretic_values(main_window, qtbot, eta, ratio, expected):
    """Hysteretic abs T, REFERENCES.md §1 (Snowdon, NBS Handbook 128)."""
    window = main_window()
    window.design_panel.damping_combo.setCurrentIndex(window.design_panel.damping_combo.findData("hysteretic"))
    window.operating.damping_spin.setValue(eta)
    window.operating.ratio_spin.setValue(ratio)
    settle(qtbot, window)
    assert window.model.design.damping.model == "hysteretic"
    assert window.results.value_labels["transmissibility"].text() == expected
    assert "equivalent viscous" in window.results.row_labels["damping"].text()


def test_crosshair_readout_gives_published_phase(main_window, qtbot):
    """Phase lag for ζ = 0.05 at r = 2 is 164.9° (REFERENCES.md §1, Rao, from memory)."""
    window = main_window()
    window.operating.damping_spin.setValue(0.05)
    settle(qtbot, window)
    value = window.plots.show_crosshair_at(math.log10(2.0))
    assert value.ratio == pytest.approx(2.0)
    assert f"{-value.phase_deg:.4g}" == "164.9"
    assert "phase = -164.9°" in window.readout_label.text()
    assert value.magnitude == pytest.approx(float(closed_form_magnitude(2.0, "viscous", 0.05)), rel=1e-12)


def test_slider_keyboard_and_wheel_reach_both_ends(main_window, qtbot):
    window = main_window()
    slider = window.operating.damping_slider
    slider.setFocus()
    qtbot.keyClick(slider, QtCore.Qt.Key.Key_End)
    assert window.model.design.damping.value == 1.0
    qtbot.keyClick(slider, QtCore.Qt.Key.Key_Home)
    assert window.model.design.damping.value == 0.005
    qtbot.keyClick(slider, QtCore.Qt.Key.Key_Right)
    assert window.model.design.damping.value == DAMPING_GRID.value(1)
    before = slider.value()
    centre = QtCore.QPointF(slider.width() / 2, slider.height() / 2)
    wheel = QtGui.QWheelEvent(centre, slider.mapToGlobal(centre), QtCore.QPoint(0, 0), QtCore.QPoint(0, 120),
                              QtCore.Qt.MouseButton.NoButton, QtCore.Qt.KeyboardModifier.NoModifier,
                              QtCore.Qt.ScrollPhase.NoScrollPhase, False)
    QtWidgets.QApplication.sendEvent(slider, wheel)
    assert slider.value() != before
    assert window.model.design.damping.value == DAMPING_GRID.value(slider.value())


def test_redraws_are_coalesced(main_window, qtbot):
    window = main_window()
    count = window.redraw_count
    for index in range(10, 60):
        window.operating.ratio_slider.setValue(index)
    assert window.redraw_pending
    settle(qtbot, window)
    assert window.redraw_count == count + 1
    assert window.model.design.frequency_ratio == RATIO_GRID.value(59)


# ---------------------------------------------------------------------- entry validation
def test_invalid_entries_are_refused_with_the_allowed_range(main_window, qtbot):
    window = main_window()
    panel = window.design_panel
    mass = panel.fields["mass"]
    design = window.model.design
    curve_before = curve_xy(window.plots.design_magnitude)
    stiffness_before = window.results.value_labels["stiffness_total"].text()
    for text in ("-5", "abc", "2e9", "", "inf", "nan"):
        paste_into(qtbot, mass.row.editor, text)
        settle(qtbot, window)
        assert mass.row.error_label.isVisible()
        assert "from 0.001 to 1e+07 kg" in mass.row.error, mass.row.error
        assert window.model.design == design
        np.testing.assert_array_equal(curve_xy(window.plots.design_magnitude)[1], curve_before[1])
        assert window.results.value_labels["stiffness_total"].text() == stiffness_before
    type_into(qtbot, mass.row.editor, "800")
    settle(qtbot, window)
    assert not mass.row.error and window.model.design.mass_kg == 800.0
    # In US units the range is given in pounds.
    window.set_view_option("units", "US")
    type_into(qtbot, mass.row.editor, "0")
    assert "from 0.00220462 to 2.20462e+07 lb" in mass.row.error
    assert window.model.design.mass_kg == 800.0
    # A cross-field rule from core: the top of the speed range may not be below the lowest speed.
    panel.range_check.setChecked(True)
    type_into(qtbot, panel.fields["speed_max"].row.editor, "900")
    assert "at least the lowest speed" in panel.fields["speed_max"].row.error
    assert window.model.design.speed_max_rpm == window.model.design.speed_rpm
    # Loads per mount must add up to the weight (core rule), typed in the display unit (lbf here).
    panel.layout_combo.setCurrentIndex(panel.layout_combo.findData("per_mount"))
    assert window.model.design.load_layout == "per_mount"
    paste_into(qtbot, panel.fields["loads"].row.editor, "100; 100; 100; 100")
    assert "must add up to the machine weight" in panel.fields["loads"].row.error
    share = 800.0 / LB / 4  # 800 kg over four mounts, in lbf (1 lbf = 1 lb × g)
    paste_into(qtbot, panel.fields["loads"].row.editor, "; ".join([f"{share:.8g}"] * 4))
    assert not panel.fields["loads"].row.error
    assert sum(window.model.design.loads_n) == pytest.approx(800.0 * G, rel=1e-8)
    panel.layout_combo.setCurrentIndex(panel.layout_combo.findData("equal"))
    # An odd mount count does not fit a centre-of-gravity layout: the combo says so.
    panel.count_spin.setValue(5)
    panel.layout_combo.setCurrentIndex(panel.layout_combo.findData("cg_offset"))
    assert "even number" in panel.layout_row.error
    assert window.model.design.load_layout == "equal"


def test_unreachable_target_shows_message_not_numbers(main_window, qtbot):
    window = main_window()
    window.operating.damping_spin.setValue(1.0)
    type_into(qtbot, window.design_panel.fields["isolation"].row.editor, "99.9")
    settle(qtbot, window)
    assert window.model.design.tuning == "isolation"
    error = window.results.error_label
    assert error.isVisible() and "beyond the supported" in error.text()
    assert not window.results.table.isVisible()
    assert len(window.plots.operating_magnitude.points()[0]) == 0
    assert not any(item.isVisible() for item in window.plots.operating_magnitude.items)


def test_excitation_gives_transmitted_force(main_window, qtbot):
    window = main_window()
    panel = window.design_panel
    panel.excitation_combo.setCurrentIndex(panel.excitation_combo.findData("force"))
    assert "must be a number > 0 N" in panel.excitation_row.error  # no force yet
    type_into(qtbot, panel.fields["force"].row.editor, "1000")
    window.operating.damping_spin.setValue(0.1)
    window.operating.ratio_spin.setValue(2.0)
    settle(qtbot, window)
    assert window.model.design.excitation.kind == "force"
    # 1000 N × abs T(ζ = 0.1, r = 2) = 1000 × 0.3559 (REFERENCES.md §1 table)
    assert window.results.value_labels["transmitted_force"].text() == "355.9 N"


# ---------------------------------------------------------------------- units
@pytest.mark.parametrize("path", demo_project_params())
def test_unit_switch_converts_exactly_and_round_trips(main_window, qtbot, path):
    window = main_window(path)
    window.set_view_option("units", "SI")
    settle(qtbot, window)
    panel = window.design_panel
    design = window.model.design
    si_texts = {key: b.row.editor.text() for key, b in panel.fields.items()}
    si_results = {key: label.text() for key, label in window.results.value_labels.items()}
    window.set_view_option("units", "US")
    settle(qtbot, window)
    assert panel.fields["mass"].row.editor.text() == f"{design.mass_kg / LB:.6g}"
    assert panel.fields["mass"].row.unit_label.text() == "lb"
    k = synthesize(design).stiffness_total_n_per_m
    assert window.results.value_labels["stiffness_total"].text() == f"{k / LBF_PER_IN:.4g} lbf/in"
    assert window.model.design == design  # display only: the SI values are untouched
    assert AppSettings().units == "US"  # remembered between sessions
    window.set_view_option("units", "SI")
    settle(qtbot, window)
    assert {key: b.row.editor.text() for key, b in panel.fields.items()} == si_texts
    assert {key: label.text() for key, label in window.results.value_labels.items()} == si_results
    assert window.model.design == design


def test_value_typed_in_us_units_is_stored_in_si(main_window, qtbot, tmp_path):
    window = main_window()
    window.set_view_option("units", "US")
    type_into(qtbot, window.design_panel.fields["mass"].row.editor, "1000")
    assert window.model.design.mass_kg == pytest.approx(453.59237, rel=1e-15)
    path = tmp_path / "us.msproj.json"
    assert window.save_as(str(path))
    stored = json.loads(path.read_text())
    assert stored["design"]["machine"]["mass_kg"] == pytest.approx(453.59237, rel=1e-15)
    assert stored["view"]["units"] == "US"


# ---------------------------------------------------------------------- projects
@pytest.mark.parametrize("path", demo_project_params())
def test_save_and_reopen_restores_the_same_state(main_window, qtbot, path, tmp_path):
    window = main_window(path)
    window.operating.damping_slider.setValue(200)
    window.operating.ratio_slider.setValue(300)
    window.set_view_option("units", "US")
    window.set_view_option("magnitude_scale", "db")
    window.set_view_option("x_axis", "hz")
    type_into(qtbot, window.design_panel.name_edit, "Reopened design")
    settle(qtbot, window)
    assert window.isWindowModified()
    target = tmp_path / "copy.msproj.json"
    assert window.save_as(str(target))
    assert not window.isWindowModified() and "copy.msproj.json" in window.windowTitle()
    again = main_window(target)
    assert again.model.project == window.model.project
    assert again.operating.damping_slider.value() == 200
    assert again.operating.ratio_slider.value() == 300
    assert again.view_actions[("units", "US")].isChecked()
    assert again.view_actions[("magnitude_scale", "db")].isChecked()
    assert again.view_actions[("x_axis", "hz")].isChecked()
    assert {k: b.row.editor.text() for k, b in again.design_panel.fields.items()} == \
        {k: b.row.editor.text() for k, b in window.design_panel.fields.items()}
    np.testing.assert_array_equal(curve_xy(again.plots.design_magnitude)[1],
                                  curve_xy(window.plots.design_magnitude)[1])
    assert str(target.resolve()) in AppSettings().recent_files


def test_bad_file_shows_core_message_and_keeps_design(main_window, qtbot, tmp_path):
    window = main_window()
    window.operating.ratio_slider.setValue(123)
    project = window.model.project
    bad = tmp_path / "broken.json"
    bad.write_text("{not json", encoding="utf-8")
    assert not window.open_file(str(bad))
    assert len(window.errors) == 1 and str(bad) in window.errors[0] and "not valid JSON" in window.errors[0]
    wrong = tmp_path / "wrong.json"
    wrong.write_text(json.dumps({"format": "mountsmith-project", "schema_version": 1,
                                 "design": {"machine": {"mass_kg": -1}}}), encoding="utf-8")
    assert not window.open_file(str(wrong))
    assert "design.mounts" in window.errors[1] or "mass" in window.errors[1]
    assert window.model.project == project
    assert window.operating.ratio_slider.value() == 123


def test_unsaved_changes_prompt_guards_new_and_open(main_window, qtbot):
    window = main_window()
    window.operating.ratio_slider.setValue(50)
    assert window.isWindowModified() and window.windowTitle().endswith("[*] — Mountsmith")
    changed = window.model.project
    window.ask_save_changes = lambda: "cancel"
    assert not window.new_design()
    assert window.model.project == changed
    window.ask_save_changes = lambda: "discard"
    assert window.new_design()
    assert not window.isWindowModified() and window.model.design.tuning == "isolation"


# ---------------------------------------------------------------------- undo
def test_a_slider_drag_is_one_undo_step_and_keys_one_each(main_window, qtbot):
    window = main_window()
    slider = window.operating.ratio_slider
    original = window.model.design
    slider.setSliderDown(True)  # emits sliderPressed
    for index in range(100, 180, 5):
        slider.setValue(index)
    slider.setSliderDown(False)  # emits sliderReleased
    dragged = window.model.design
    assert dragged.frequency_ratio == RATIO_GRID.value(175)
    window.actions["undo"].trigger()
    assert window.model.design == original
    assert slider.value() == RATIO_GRID.index(synthesize(original).frequency_ratio)
    window.actions["redo"].trigger()
    assert window.model.design == dragged
    slider.setFocus()
    for _ in range(3):
        qtbot.keyClick(slider, QtCore.Qt.Key.Key_Right)
    assert window.model.design.frequency_ratio == RATIO_GRID.value(178)
    for expected in (177, 176, 175):
        window.actions["undo"].trigger()
        assert window.model.design.frequency_ratio == RATIO_GRID.value(expected)
        assert slider.value() == expected
    settle(qtbot, window)
    assert window.results.value_labels["frequency_ratio"].text().startswith(f"{RATIO_GRID.value(175):.4g}")


# ---------------------------------------------------------------------- view options
def test_db_scale_and_absolute_frequency_axis(main_window, qtbot):
    window = main_window()
    window.operating.damping_spin.setValue(0.2)
    window.set_view_option("magnitude_scale", "db")
    settle(qtbot, window)
    x, y = curve_xy(window.plots.design_magnitude)
    np.testing.assert_allclose(y, 20 * np.log10(closed_form_magnitude(x, "viscous", 0.2)), rtol=1e-9, atol=1e-9)
    window.set_view_option("x_axis", "rpm")
    settle(qtbot, window)
    fn_rpm = synthesize(window.model.design).natural_frequency_rpm
    x2, _ = curve_xy(window.plots.design_magnitude)
    np.testing.assert_allclose(x2, x * fn_rpm, rtol=1e-12)
    marker_x, _ = window.plots.operating_magnitude.points()
    assert marker_x[0] == pytest.approx(window.model.design.speed_rpm, rel=1e-12)
    # The √2 line sits at √2 fn (log10 position on the log axis).
    assert window.plots.crossover_lines[0].value() == pytest.approx(math.log10(math.sqrt(2) * fn_rpm))


def test_safety_notes_and_caution_are_present(main_window, qtbot, monkeypatch):
    window = main_window()
    shown = []
    monkeypatch.setattr(QtWidgets.QMessageBox, "information", lambda *args: shown.append(args[2]))
    window.actions["safety"].trigger()
    assert shown and "seismic" in shown[0].lower() and "licensed" in shown[0].lower()
    assert "supplier" in window.results.caution_label.text()


@pytest.mark.parametrize("path", demo_project_params()[:1])
def test_run_opens_the_window_on_a_file_and_exits_cleanly(tmp_path, path):
    """``mountsmith FILE`` calls app.main_window.run(FILE): one window on that project, exit status 0."""
    import os
    import subprocess
    import sys
    from tests.conftest import ROOT
    script = (
        "import sys\n"
        "from PySide6 import QtCore, QtWidgets\n"
        f"QtCore.QSettings.setPath(QtCore.QSettings.Format.IniFormat, QtCore.QSettings.Scope.UserScope, {str(tmp_path)!r})\n"
        "app = QtWidgets.QApplication(['mountsmith'])  # run() uses this one\n"
        "from app.main_window import MainWindow, run\n"
        "def check():\n"
        "    windows = [w for w in QtWidgets.QApplication.topLevelWidgets() if isinstance(w, MainWindow)]\n"
        "    print('windows', len(windows), windows[0].model.name, flush=True)\n"
        "    windows[0].close()\n"
        "QtCore.QTimer.singleShot(300, check)\n"
        f"sys.exit(run({str(path)!r}))\n")
    done = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True, timeout=60,
                          env=dict(os.environ, QT_QPA_PLATFORM="offscreen"))
    assert done.returncode == 0, done.stderr
    assert f"windows 1 {load_project(path).name}" in done.stdout


def test_natural_frequency_chosen_directly(main_window, qtbot):
    window = main_window()
    panel = window.design_panel
    panel.tuning_combo.setCurrentIndex(panel.tuning_combo.findData("natural_frequency"))
    field = panel.fields["natural_frequency"]
    assert field.row.isVisible()
    paste_into(qtbot, field.row.editor, "4")
    settle(qtbot, window)
    design = window.model.design
    assert design.tuning == "natural_frequency" and design.natural_frequency_hz == 4.0
    ratio = design.speed_rpm / 60.0 / 4.0  # r = ω/ωn
    assert window.results.value_labels["frequency_ratio"].text().startswith(f"{ratio:.4g}")
    assert window.operating.ratio_spin.value() == pytest.approx(ratio, abs=5e-4)
    paste_into(qtbot, field.row.editor, "600")
    assert "from 0.05 to 500 Hz" in field.row.error
    assert window.model.design.natural_frequency_hz == 4.0
    window.operating.ratio_slider.setValue(200)  # the slider takes over the tuning
    assert window.model.design.tuning == "frequency_ratio"
    assert panel.tuning_combo.currentData() == "frequency_ratio"


def test_duty_speeds_are_entered_marked_and_reported(main_window, qtbot):
    window = main_window()
    panel = window.design_panel
    window.operating.damping_spin.setValue(0.1)
    window.operating.ratio_spin.setValue(2.0)  # at 1480 r/min: ωn ↔ 740 r/min
    paste_into(qtbot, panel.fields["duty_speeds"].row.editor, "3700; 7400")
    settle(qtbot, window)
    assert window.model.design.duty_speeds_rpm == (3700.0, 7400.0)
    x, y = window.plots.duty_magnitude.points()
    np.testing.assert_allclose(x, [5.0, 10.0])  # r = n / 740 r/min
    # abs T at r = 5 with ζ = 0.1: 0.05887 (REFERENCES.md §1 table, Vigran eq. 2.33)
    assert f"{y[0]:.4g}" == "0.05887"
    assert "3700 r/min: |T| 0.05887" in window.results.value_labels["duty"].text()
    paste_into(qtbot, panel.fields["duty_speeds"].row.editor, "3700; 0")
    assert "from 1 to 1e+06 r/min" in panel.fields["duty_speeds"].row.error
    assert window.model.design.duty_speeds_rpm == (3700.0, 7400.0)


def test_typing_keeps_the_text_as_typed_while_values_apply_live(main_window, qtbot):
    window = main_window()
    mass = window.design_panel.fields["mass"].row.editor
    type_into(qtbot, mass, "1.50")  # "1" and "1." and "1.5" are valid on the way
    assert mass.text() == "1.50" and window.model.design.mass_kg == 1.5
    type_into(qtbot, window.design_panel.name_edit, "Fan deck")
    window.operating.ratio_slider.setValue(10)
    assert window.design_panel.name_edit.text() == "Fan deck" and window.model.name == "Fan deck"
    # Typing a value merges into one undo step per field.
    window.actions["undo"].trigger()  # the slider step
    window.actions["undo"].trigger()  # the name
    window.actions["undo"].trigger()  # the whole mass entry
    assert window.model.design.mass_kg == 500.0 and mass.text() == "500"


@pytest.mark.parametrize("kind, field, text", [("balance_grade", "rotor_mass", "100"),
                                               ("unbalance", "unbalance", "2005")])
def test_unbalance_and_balance_grade_give_published_force(main_window, qtbot, kind, field, text):
    """ISO 21940-11 check (REFERENCES.md §3): 100 kg rotor, 3000 r/min, G 6.3 -> U = 2005 g·mm, F = 197.9 N."""
    window = main_window()
    panel = window.design_panel
    paste_into(qtbot, panel.fields["speed"].row.editor, "3000")
    panel.excitation_combo.setCurrentIndex(panel.excitation_combo.findData(kind))
    assert panel.excitation_row.error  # refused until its value is typed
    assert window.model.design.excitation.kind == "none"
    if kind == "balance_grade":
        assert panel.grade_row.isVisible()
        panel.grade_combo.setCurrentIndex(panel.grade_combo.findData(6.3))
    paste_into(qtbot, panel.fields[field].row.editor, text)
    settle(qtbot, window)
    assert window.model.design.excitation.kind == kind and not panel.excitation_row.error
    assert window.results.value_labels["excitation_force"].text() == "197.9 N"


def test_window_layout_and_recent_files_are_remembered(main_window, qtbot, tmp_path):
    window = main_window()
    window.resize(1111, 777)
    path = tmp_path / "one.msproj.json"
    assert window.save_as(str(path))
    window.close()
    again = main_window()
    geometry, state = AppSettings().window_layout()
    assert geometry is not None and state is not None
    assert AppSettings().recent_files[0] == str(path.resolve())
    again._fill_recent_menu()
    assert str(path.resolve()) in [action.text() for action in again.recent_menu.actions()]

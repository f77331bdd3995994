"""Functional tests of the study tabs of the design window (pytest-qt, offscreen), and of the core
helpers they draw (core.studies.two_stage_curves, design_map_of, design_at_map_point;
core.transmissibility.damping_with_same_peak).

Independent references, written out here:
* viscous abs T = sqrt((1+(2ζr)²)/((1−r²)²+(2ζr)²)) (Vigran, *Building Acoustics* (2008) eq. 2.33);
  hysteretic abs T = sqrt((1+η²)/((1−r²)²+η²)) (Snowdon, NBS Handbook 128);
* exact viscous peak at r = sqrt(sqrt(1+8ζ²) − 1)/(2ζ) (Rao, from memory), hysteretic peak
  sqrt(1+η²)/η; table value ζ = 0.05 → 10.06 (REFERENCES.md §1);
* two-stage check m1 = 10 kg, k1 = 4e5 N/m, m2 = 1 kg, k2 = 4e5 N/m, undamped: abs T at 300 Hz
  = 1.463e-3 (Bies & Hansen, *Engineering Noise Control*; REFERENCES.md §7);
* a rigid body on mounts whose stiffness centre lies under the CG bounces at (1/2π) sqrt(Σk/m)
  (Harris ch. 3, Crede/Ruzicka, decoupled vertical mode);
* static deflection g/(2π fn)² (REFERENCES.md §2).
"""
from __future__ import annotations

import json
import math
import shutil

import numpy as np
import pytest
from PySide6 import QtCore

from core import rigid_body
from core.design import DesignInputs
from core.errors import InputError
from core.materials import MOUNT_MATERIALS
from core.project import load_project
from core.studies import (
    TwoStageStudy, build_rigid_body, design_at_map_point, design_map_of, simulate_passages, two_stage_curves)
from core.synthesis import synthesize
from core.transmissibility import Damping, damping_with_same_peak
from tests.conftest import ROOT

pytestmark = pytest.mark.gui

G = 9.80665  # standard gravity, m/s² (CGPM 1901)
DEMO = ROOT / "demo_projects"
ROOFTOP = DEMO / "rooftop_air_handler.json"
PUMP = DEMO / "vacuum_pump_beside_measuring_room.json"
GENERATOR = DEMO / "standby_generator_variable_speed.json"
MEASURING = DEMO / "measuring_machine_upper_floor.json"


def viscous_t(r, zeta):
    r = np.asarray(r, dtype=float)
    return np.sqrt((1 + (2 * zeta * r) ** 2) / ((1 - r * r) ** 2 + (2 * zeta * r) ** 2))


def hysteretic_t(r, eta):
    r = np.asarray(r, dtype=float)
    return np.sqrt((1 + eta ** 2) / ((1 - r * r) ** 2 + eta ** 2))


def viscous_peak(zeta):
    r = math.sqrt(math.sqrt(1 + 8 * zeta ** 2) - 1) / (2 * zeta)
    return float(viscous_t(r, zeta))


def type_into(qtbot, edit, text):
    """Replace a field's text as a user would: select all, delete, type."""
    edit.setFocus()
    edit.selectAll()
    qtbot.keyClick(edit, QtCore.Qt.Key.Key_Backspace)
    qtbot.keyClicks(edit, text)


def settle(window):
    """Run the coalesced redraw and the study update now."""
    window.refresh_now()
    window.study_tabs.refresh_now()


def show_tab(window, name):
    tabs = window.study_tabs
    window.tabs.setCurrentIndex(tabs.index_of[name])
    settle(window)
    return tabs


# ---------------------------------------------------------------------- core helpers
def test_equal_peak_counterpart_matches_the_published_peaks():
    # ζ = 0.05: exact viscous peak 10.06 (REFERENCES.md §1 table); hysteretic peak sqrt(1+η²)/η.
    other = damping_with_same_peak(Damping("viscous", 0.05))
    assert other.model == "hysteretic"
    assert math.sqrt(1 + other.value ** 2) / other.value == pytest.approx(10.06, abs=0.005)
    back = damping_with_same_peak(other)
    assert back.model == "viscous" and back.value == pytest.approx(0.05, rel=1e-9)
    # η = 2: peak sqrt(5)/2 = 1.118, reached by a viscous ratio near 1 (ζ = 1 gives 2/√3 = 1.155, exact).
    assert damping_with_same_peak(Damping("hysteretic", 2.0)).value > 1.0
    with pytest.raises(InputError, match="loss_factor"):
        damping_with_same_peak(Damping("hysteretic", 0.0))  # no damping, no finite peak


def test_two_stage_curve_matches_the_published_check_value():
    # m2 = 1 kg machine on k2 = 4e5 N/m; m1 = 10 kg block on k1 = 4e5 N/m; undamped.
    upper_fn = math.sqrt(4e5 / 1.0) / (2 * math.pi)
    lower_fn = math.sqrt(4e5 / 11.0) / (2 * math.pi)  # k1 = (m1 + m2)(2π f)²
    design = DesignInputs(mass_kg=1.0, speed_rpm=18000.0, tuning="natural_frequency",
                          natural_frequency_hz=upper_fn, damping=Damping("viscous", 0.0))
    curves = two_stage_curves(design, synthesize(design), TwoStageStudy(10.0, lower_fn, 0.0), points=2000)
    at_300 = 10 ** np.interp(math.log10(300.0), np.log10(curves.frequency_hz), np.log10(curves.two_stage))
    assert at_300 == pytest.approx(1.463e-3, rel=1e-3)  # Bies & Hansen check value
    # Single stage: undamped abs T = 1/|1 − r²| (Vigran eq. 2.33 with ζ = 0).
    r = curves.frequency_hz / upper_fn
    finite = np.abs(r - 1) > 0.05
    np.testing.assert_allclose(curves.single_stage[finite], 1 / np.abs(1 - r[finite] ** 2), rtol=1e-9)


def test_design_map_of_a_design_and_a_map_point():
    design = DesignInputs(speed_rpm=1200.0, isolation_percent=90.0)
    found = design_map_of(design, synthesize(design))
    assert found.speed_rpm == 1200.0 and found.limits.min_isolation_percent == 90.0
    assert found.limits.max_static_deflection_mm == design.limits.max_static_deflection_mm
    # |T| on the map against the closed form at one grid point.
    i, j = 40, 70
    r = 20.0 / found.natural_frequency_hz[i]
    assert found.transmissibility[i, j] == pytest.approx(float(viscous_t(r, found.damping_ratio[j])), rel=1e-12)
    moved = design_at_map_point(design, 5.0, 0.1)
    assert moved.tuning == "frequency_ratio" and moved.frequency_ratio == pytest.approx(20.0 / 5.0, rel=1e-12)
    assert moved.damping == Damping("viscous", 0.1)


# ---------------------------------------------------------------------- start and stop
@pytest.mark.parametrize("path", [ROOFTOP, PUMP], ids=["rooftop", "vacuum_pump"])
def test_start_and_stop_tab_shows_the_core_passages(main_window, path):
    window = main_window(path)
    tabs = show_tab(window, "passage")
    project = load_project(path)
    result = synthesize(project.design)
    up, down = simulate_passages(project.design, result, project.studies.passage)
    for view, run in ((tabs.runup_view, up), (tabs.rundown_view, down)):
        x, y = view.displacement_curve.getOriginalDataset()
        np.testing.assert_array_equal(x, run.displacement_envelope_speed_rpm)
        np.testing.assert_array_equal(y, run.displacement_envelope_m)
    assert "Coast-down from" in tabs.rundown_view.displacement_plot.titleLabel.text
    rows = window.results.study_value_labels
    assert rows["Start-up"].text().startswith(f"{up.displacement_amplification:.3g}×")
    assert f"{down.peak_displacement_speed_rpm:.4g} r/min" in rows["Shutdown"].text()
    if path == ROOFTOP:
        # Steady motion at speed under the balance-grade unbalance U = G m_rotor / Ω (ISO 21940-11):
        # X = (U / m) r² / sqrt((1 − r²)² + (2ζr)²) (Rao, rotating unbalance, from memory).
        omega = 1180 * 2 * math.pi / 60
        unbalance = 6.3e-3 * 120.0 / omega
        r = result.frequency_ratio
        steady = unbalance / 850.0 * r * r / math.sqrt((1 - r * r) ** 2 + (2 * 0.06 * r) ** 2)
        assert up.steady_displacement_m == pytest.approx(steady, rel=1e-6)
        assert f"{up.peak_displacement_m * 1e3:.4g} mm" in rows["Start-up"].text()


def test_passage_edits_are_one_undo_step_each_and_recompute_only_on_change(main_window, qtbot):
    window = main_window(ROOFTOP)
    tabs = show_tab(window, "passage")
    editor = tabs.start_stop.editor
    first = tabs._cache["passage"][1]
    settle(window)
    assert tabs._cache["passage"][1] is first          # same inputs: not simulated again
    field = editor.fields["runup"].editor
    type_into(qtbot, field, "80")                       # typed key by key: one merged undo step
    settle(window)
    assert window.model.project.studies.passage.runup_s == 80.0
    assert tabs._cache["passage"][1] is not first
    field.setText("80000")                              # pasted in one edit: refused by the core
    field.textEdited.emit("80000")
    assert "3600" in editor.fields["runup"].error
    assert window.model.project.studies.passage.runup_s == 80.0
    window.model.undo()
    settle(window)
    assert window.model.project.studies.passage.runup_s == 20.0
    assert editor.fields["runup"].editor.text() == "20"
    # The passage limit is a design limit, edited here too.
    type_into(qtbot, editor.limit_field.editor, "3")
    settle(window)
    assert window.model.design.limits.max_passage_amplification == 3.0
    assert any("During start-up" in line for line in window.results.warnings_label.text().split("\n"))


# ---------------------------------------------------------------------- rigid body
def test_rigid_body_tab_shows_core_modes_and_follows_a_mount_edit(main_window):
    window = main_window(ROOFTOP)
    tabs = show_tab(window, "rigid_body")
    project = load_project(ROOFTOP)
    design, result = project.design, synthesize(project.design)

    def shown_frequencies():
        table = tabs.rigid_body_view.modes_table
        return [table.item(row, 1).data(QtCore.Qt.ItemDataRole.UserRole) for row in range(table.rowCount())]

    def core_frequencies(study):
        return list(rigid_body.modes(*build_rigid_body(design, result, study)).frequencies_hz)

    np.testing.assert_allclose(shown_frequencies(), core_frequencies(project.studies.rigid_body), rtol=1e-12)
    # Independent: stiffness proportional to load puts the stiffness centre under the CG, so one mode is the
    # pure bounce (1/2π) sqrt(Σk/m).
    bounce = math.sqrt(sum(result.stiffness_per_mount_n_per_m) / design.mass_kg) / (2 * math.pi)
    assert min(abs(f - bounce) for f in shown_frequencies()) < 1e-6 * bounce

    # Move mount 1 in x from -1100 mm to -600 mm by typing in the table (display unit mm).
    table = tabs.rigid_body.editor.mount_table
    table.item(0, 0).setText("-600")
    settle(window)
    study = window.model.project.studies.rigid_body
    assert study.mounts[0].position_m == pytest.approx((-0.6, -0.7, 0.0))
    moved = core_frequencies(study)
    np.testing.assert_allclose(shown_frequencies(), moved, rtol=1e-12)
    assert not np.allclose(moved, core_frequencies(project.studies.rigid_body))
    # A stiffness override: kz of mount 2 doubled against the design's value.
    kz = result.stiffness_per_mount_n_per_m[1]
    table.item(1, 5).setText(f"{2 * kz / 1e3:.9g}")   # N/mm
    settle(window)
    override = window.model.project.studies.rigid_body.mounts[1].stiffness_n_per_m
    assert override[2] == pytest.approx(2 * kz, rel=1e-8)
    assert override[0] == pytest.approx(0.8 * kz, rel=1e-12)  # filled from the lateral ratio 0.8
    window.model.undo()
    window.model.undo()
    settle(window)
    np.testing.assert_allclose(shown_frequencies(), core_frequencies(project.studies.rigid_body), rtol=1e-12)


def test_enabling_a_study_round_trips_through_save_and_reopen(main_window, tmp_path):
    path = tmp_path / "pump.json"
    shutil.copy(PUMP, path)
    window = main_window(path)
    tabs = show_tab(window, "rigid_body")
    editor = tabs.rigid_body.editor
    assert window.model.project.studies.rigid_body is None
    editor.enable_check.click()
    settle(window)
    study = window.model.project.studies.rigid_body
    assert study is not None and len(study.mounts) == 4
    assert tabs.rigid_body_view.modes_table.rowCount() == 6
    tabs.tab_of["two_stage"].editor.enable_check.click()
    tabs.start_stop.editor.enable_check.click()          # passage off
    assert window.save()
    saved = json.loads(path.read_text())
    assert saved["studies"]["passage"] is None and saved["studies"]["two_stage"] is not None
    window.open_file(str(path))
    settle(window)
    reopened = window.model.project.studies
    assert reopened.rigid_body == study and reopened.passage is None and reopened.two_stage is not None
    assert tabs.rigid_body.editor.enable_check.isChecked()
    assert not tabs.start_stop.editor.enable_check.isChecked()
    window.model.undo()   # nothing to undo after opening
    assert window.model.project.studies.rigid_body == study


# ---------------------------------------------------------------------- design map
def test_a_click_on_the_design_map_moves_the_design_there(main_window, qtbot):
    window = main_window(ROOFTOP)
    tabs = show_tab(window, "design_map")
    view = tabs.map_view
    found = view.map_result
    assert found.speed_rpm == 1180.0 and found.limits.min_isolation_percent == 95.0
    x, y = view.marker.getData()
    result = window.model.result
    assert 10 ** x[0] == pytest.approx(result.natural_frequency_hz) and 10 ** y[0] == pytest.approx(0.06)
    clicked = []
    view.pointClicked.connect(lambda fn, zeta: clicked.append((fn, zeta)))
    target = view.plot.getViewBox().mapViewToScene(QtCore.QPointF(math.log10(8.0), math.log10(0.2)))
    qtbot.mouseClick(view.plot_widget.viewport(), QtCore.Qt.MouseButton.LeftButton,
                     pos=view.plot_widget.mapFromScene(target))
    settle(window)
    assert len(clicked) == 1
    fn, zeta = clicked[0]
    assert fn == pytest.approx(8.0, rel=0.03) and zeta == pytest.approx(0.2, rel=0.03)  # a pixel's worth
    design, result = window.model.design, window.model.result
    assert design.damping == Damping("viscous", zeta)
    assert design.frequency_ratio == pytest.approx(1180.0 / 60.0 / fn, rel=1e-12)   # r = Ω/ωn
    assert result.natural_frequency_hz == pytest.approx(fn, rel=1e-12)
    assert result.transmissibility == pytest.approx(float(viscous_t(1180 / 60 / fn, zeta)), rel=1e-9)
    window.model.undo()   # one step
    assert window.model.design == load_project(ROOFTOP).design


def test_design_map_is_for_viscous_damping_only(main_window):
    window = main_window(PUMP)          # elastomer loss factor
    tabs = show_tab(window, "design_map")
    assert "for viscous damping" in tabs.map_note.text()
    assert len(tabs.map_view.marker.getData()[0]) == 0
    before = window.model.design
    assert not tabs.move_design_to(10.0, 0.1)
    assert window.model.design == before


# ---------------------------------------------------------------------- floor
def test_floor_tab_shows_prediction_inverse_and_use_it(main_window):
    window = main_window(MEASURING)
    tabs = show_tab(window, "floor")
    assert window.tabs.isTabVisible(tabs.index_of["floor"])
    project = load_project(MEASURING)
    fn, zeta = 3.0, 0.08
    x, y = tabs.floor_view.predicted_curve.getOriginalDataset()
    # Independent: equipment velocity = floor velocity × abs T at the exact band centre (Vigran eq. 2.33).
    floor = dict(zip(project.studies.floor.band_hz, project.studies.floor.velocity_m_s))
    nominal = [float(tabs.floor_table.item(row, 0).text()) for row in range(tabs.floor_table.rowCount())]
    assert len(nominal) == 20
    for band, predicted in zip(x, y):
        nominal_band = min(floor, key=lambda b: abs(math.log10(b / band)))
        expected = floor[nominal_band] * 1e6 * float(viscous_t(band / fn, zeta))
        assert predicted == pytest.approx(expected, rel=1e-9)
    assert "Meets VC-A" in tabs.floor_view.verdict_label.text()
    assert window.results.study_value_labels["Floor criterion"].text().startswith("meets VC-A")
    text = tabs.floor_inverse_label.text()
    assert text.startswith("VC-A: fn ≤ ")
    best = float(text.split("≤ ")[1].split(" Hz")[0])
    # Static deflection shown = g/(2π fn)², in mm.
    shown_mm = float(text.split("static deflection ")[1].split(" mm")[0])
    assert shown_mm == pytest.approx(G / (2 * math.pi * best) ** 2 * 1e3, rel=1e-3)
    tabs.use_fn_button.click()
    settle(window)
    assert window.model.design.tuning == "natural_frequency"
    assert window.model.design.natural_frequency_hz == pytest.approx(best, rel=1e-3)
    # At the highest natural frequency the criterion is met with no margin to spare in the worst band.
    margins = [float(tabs.floor_table.item(row, 3).text()) for row in range(tabs.floor_table.rowCount())]
    assert min(margins) == pytest.approx(0.0, abs=0.1)


def test_floor_spectrum_from_paste_flat_level_and_criterion(main_window, tmp_path):
    window = main_window(MEASURING)
    tabs = show_tab(window, "floor")
    editor = tabs.floor.editor
    csv = tmp_path / "floor.csv"
    csv.write_text("band_hz,velocity_um_s\n4,20\n5,30\n6.3,40\n8,50\n10,60\n")
    assert editor.import_csv(str(csv))
    settle(window)
    study = window.model.project.studies.floor
    assert study.band_hz == (4.0, 5.0, 6.3, 8.0, 10.0)
    assert study.velocity_m_s == pytest.approx((20e-6, 30e-6, 40e-6, 50e-6, 60e-6))
    assert tabs.floor_view.table.rowCount() == 5
    assert not editor.paste_text("4,20\n4,30\n")          # a band twice: the core's message, nothing changes
    assert "4 Hz" in editor.message.text()
    assert window.model.project.studies.floor == study
    editor.flat_field.editor.setText("2")
    editor.flat_button.click()
    settle(window)
    flat = window.model.project.studies.floor
    assert flat.velocity_m_s == pytest.approx((2e-6,) * 20) and flat.band_hz[0] == 1.0 and flat.band_hz[-1] == 80.0
    tabs.floor_view.table.item(2, 1).setText("7")        # the 1.6 Hz band typed in the floor view's table
    settle(window)
    edited = window.model.project.studies.floor
    assert edited.velocity_m_s[2] == pytest.approx(7e-6) and edited.velocity_m_s[3] == pytest.approx(2e-6)
    assert edited.band_hz == flat.band_hz                  # nominal band centres kept
    window.model.undo()
    assert window.model.project.studies.floor == flat
    editor.criterion_combo.setCurrentIndex(editor.criterion_combo.findData("VC-E"))
    settle(window)
    assert window.model.project.studies.floor.criterion == "VC-E"
    window.model.undo()
    assert window.model.project.studies.floor.criterion == "VC-A"


def test_new_equipment_design_opens_the_floor_tab(main_window):
    window = main_window()
    settle(window)
    assert not window.tabs.isTabVisible(window.study_tabs.index_of["floor"])
    window.actions["new_equipment"].trigger()
    settle(window)
    assert window.model.project.kind == "equipment"
    assert window.tabs.currentWidget() is window.study_tabs.floor
    assert window.tabs.isTabVisible(window.study_tabs.index_of["floor"])
    assert window.study_tabs.floor_view.table.rowCount() == 20


# ---------------------------------------------------------------------- two-stage and duty speeds
def test_two_stage_tab_and_duty_speeds_of_the_generator(main_window):
    window = main_window(GENERATOR)
    tabs = show_tab(window, "two_stage")
    project = load_project(GENERATOR)
    result = synthesize(project.design)
    curves = two_stage_curves(project.design, result, project.studies.two_stage)
    x, y = tabs.two_stage_curve.getOriginalDataset()
    np.testing.assert_allclose(x, curves.frequency_hz)
    np.testing.assert_allclose(y, curves.two_stage)
    # Single stage drawn = viscous closed form at r = f / fn with the design's ζ (Vigran eq. 2.33).
    _, single = tabs.single_stage_curve.getOriginalDataset()
    np.testing.assert_allclose(single, viscous_t(x / result.natural_frequency_hz, 0.08), rtol=1e-9)
    summary = tabs.two_stage_label.text()
    at_speed = float(viscous_t(1000 / 60 / result.natural_frequency_hz, 0.08))
    assert f"single stage {at_speed:.3g}" in summary and "gain" in summary
    # Duty speeds: r, |T| and isolation per speed, and the worst case over range and duty speeds.
    duty = window.results.value_labels["duty"].text().split("\n")
    for line, speed in zip(duty, (1200.0, 1500.0)):
        r = speed / result.natural_frequency_rpm
        t = float(viscous_t(r, 0.08))
        assert line == f"{speed:g} r/min: |T| {t:.4g}, isolation {(1 - t) * 100:.4g} %, r {r:.4g}"
    assert window.results.value_labels["worst"].isVisible()
    assert window.results.value_labels["worst"].text().startswith(f"{float(viscous_t(3.5, 0.08)):.4g} at 1000")


def test_study_edit_undo_and_redo(main_window):
    window = main_window(GENERATOR)
    tabs = show_tab(window, "two_stage")
    field = tabs.two_stage.editor.fields["block_mass"]
    field.editor.setText("3000")
    field.editor.textEdited.emit("3000")
    settle(window)
    assert window.model.project.studies.two_stage.block_mass_kg == 3000.0
    window.model.undo()
    settle(window)
    assert window.model.project.studies.two_stage.block_mass_kg == 6000.0
    assert field.editor.text() == "6000"
    window.model.redo()
    settle(window)
    assert field.editor.text() == "3000"


# ---------------------------------------------------------------------- elastomers
def test_material_picker_and_equal_peak_comparison(main_window):
    window = main_window(ROOFTOP)
    tabs = window.study_tabs
    tabs.material.compare_check.setChecked(True)
    settle(window)
    x, y = window.plots.comparison_magnitude.getOriginalDataset()
    eta = 1 / math.sqrt(viscous_peak(0.06) ** 2 - 1)   # hysteretic peak sqrt(1+η²)/η = viscous peak
    np.testing.assert_allclose(y, hysteretic_t(x, eta), rtol=1e-9)
    window.operating.damping_spin.setValue(0.2)          # follows the design curve at once, no study delay
    window.refresh_now()
    x, y = window.plots.comparison_magnitude.getOriginalDataset()
    np.testing.assert_allclose(y, hysteretic_t(x, 1 / math.sqrt(viscous_peak(0.2) ** 2 - 1)), rtol=1e-9)
    window.model.undo()
    rubber = next(m for m in MOUNT_MATERIALS if m.name == "Natural rubber")
    tabs.material.combo.setCurrentIndex(tabs.material.combo.findData(rubber.name))
    settle(window)
    design = window.model.design
    assert design.damping == Damping("hysteretic", math.sqrt(0.05 * 0.15))   # geometric mean of the range
    assert design.dynamic_stiffness_ratio == pytest.approx((1.1 + 1.5) / 2)
    assert "Typical values" in tabs.material.note.text() and "Harris" in tabs.material.note.toolTip()
    x, y = window.plots.comparison_magnitude.getOriginalDataset()   # now the viscous counterpart
    zeta = damping_with_same_peak(design.damping).value
    assert viscous_peak(zeta) == pytest.approx(math.sqrt(1 + design.damping.value ** 2) / design.damping.value)
    np.testing.assert_allclose(y, viscous_t(x, zeta), rtol=1e-9)
    window.model.undo()
    assert window.model.design.damping == Damping("viscous", 0.06)


# ---------------------------------------------------------------------- review sheet
def test_export_review_sheet_writes_a_pdf(main_window, tmp_path):
    window = main_window(ROOFTOP)
    out = tmp_path / "review.pdf"
    assert window.export_review_sheet(str(out)), window.errors
    assert out.read_bytes()[:5] == b"%PDF-" and out.stat().st_size > 10_000
    assert not window.export_review_sheet(str(tmp_path / "missing" / "review.pdf"))
    assert window.errors and "review.pdf" in window.errors[-1]

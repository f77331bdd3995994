"""The observable design model with undo (core/design_model.py, Qt-free)."""
from __future__ import annotations

import json
import subprocess
import sys

import pytest

from core.design import DesignInputs
from core.design_model import DesignModel, UNDO_LIMIT
from core.errors import InputError, ProjectFileError
from core.project import Project, ViewSettings, load_project
from core.transmissibility import Damping
from tests.conftest import ROOT


class Recorder:
    """Collects (event, args) of every model event."""

    def __init__(self, model: DesignModel):
        self.seen = []
        for name in ("design_changed", "view_changed", "name_changed", "path_changed", "dirty_changed",
                     "undo_changed", "project_replaced", "studies_changed"):
            getattr(model.events, name).connect(lambda *args, n=name: self.seen.append((n, args)))

    def names(self):
        return [name for name, _ in self.seen]

    def clear(self):
        self.seen.clear()


def test_model_module_does_not_import_qt():
    code = ("import sys, core.design_model, core.units, core.curves, core.cautions; "
            "bad = [m for m in sys.modules if m.split('.')[0] in ('PySide6', 'pyqtgraph', 'shiboken6', 'PyQt6')]; "
            "sys.exit(1 if bad else 0)")
    assert subprocess.run([sys.executable, "-c", code], cwd=ROOT).returncode == 0


def test_one_event_per_real_change():
    model = DesignModel()
    events = Recorder(model)
    assert model.update_design(mass_kg=800.0)
    assert events.names() == ["undo_changed", "design_changed", "dirty_changed"]
    events.clear()
    assert not model.update_design(mass_kg=800.0)  # same value: nothing fires
    assert events.seen == []
    assert model.update_view(units="US")
    assert events.names() == ["view_changed"]


def test_invalid_change_is_refused_and_nothing_changes():
    model = DesignModel()
    events = Recorder(model)
    design = model.design
    with pytest.raises(InputError) as caught:
        model.update_design(mass_kg=-1.0)
    assert caught.value.field == "machine.mass_kg"
    with pytest.raises(InputError):
        model.update_view(units="imperial")
    assert model.design == design and events.seen == [] and not model.dirty


def test_result_follows_the_design_and_errors_are_messages():
    model = DesignModel()
    model.set_frequency_ratio(4.0)
    result = model.result
    assert model.design.tuning == "frequency_ratio"
    # ωn = ω / r: 1480 r/min / 4 = 370 r/min
    assert result.natural_frequency_rpm == pytest.approx(370.0, rel=1e-12)
    model.update_design(tuning="isolation", isolation_percent=99.99, damping=Damping("viscous", 1.0))
    evaluation = model.evaluate()
    assert evaluation.result is None and "beyond the supported" in evaluation.error


def test_undo_redo_and_dirty_tracking():
    model = DesignModel()
    original = model.design
    model.update_design(mass_kg=700.0)
    model.update_design(speed_rpm=2900.0)
    assert model.dirty and model.can_undo and not model.can_redo
    assert model.undo() and model.design.speed_rpm == 1480.0 and model.design.mass_kg == 700.0
    assert model.undo() and model.design == original
    assert not model.dirty  # back to the state it started in
    assert not model.undo()
    assert model.redo() and model.design.mass_kg == 700.0 and model.dirty
    model.update_design(mass_kg=650.0)  # a new edit drops the redo branch
    assert not model.can_redo


def test_step_groups_a_drag_and_merge_key_groups_typing():
    model = DesignModel()
    original = model.design
    model.begin_step()
    for ratio in (3.1, 3.2, 3.3, 3.4):
        model.set_frequency_ratio(ratio, merge_key=None)
    model.commit_step()
    assert model.undo() and model.design == original
    for mass in (6.0, 60.0, 600.0):
        model.update_design(merge_key="field.mass", mass_kg=mass)
    model.update_design(merge_key="field.speed", speed_rpm=1000.0)
    assert model.undo() and model.design.mass_kg == 600.0
    assert model.undo() and model.design == original
    model.begin_step()
    model.commit_step()  # an empty step records nothing
    assert not model.can_undo


def test_undo_history_is_bounded():
    model = DesignModel()
    for i in range(UNDO_LIMIT + 20):
        model.update_design(mass_kg=100.0 + i)
    count = 0
    while model.undo():
        count += 1
    assert count == UNDO_LIMIT


def test_damping_model_switch_carries_value_by_eta_equals_two_zeta():
    """Equal peak at resonance: 1/(2ζ) ≈ 1/η for light damping (REFERENCES.md §1), so η = 2ζ."""
    model = DesignModel()
    model.set_damping_value(0.05)
    model.set_damping_model("hysteretic")
    assert model.design.damping == Damping("hysteretic", 0.1)
    model.set_damping_model("viscous")
    assert model.design.damping == Damping("viscous", 0.05)


def test_save_open_round_trip_and_bad_file_leaves_model(tmp_path):
    model = DesignModel()
    events = Recorder(model)
    model.update_design(mass_kg=1234.5, damping=Damping("hysteretic", 0.2), dynamic_stiffness_ratio=1.4)
    model.update_view(units="US", magnitude_scale="db", x_axis="rpm")
    model.set_name("Round trip")
    path = tmp_path / "trip.msproj.json"
    assert model.save(path) == str(path) and not model.dirty
    assert ("path_changed", (str(path),)) in events.seen
    other = DesignModel()
    other.open(path)
    assert other.project == model.project and other.path == str(path) and not other.dirty
    assert load_project(path) == model.project
    project = other.project
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps({"format": "mountsmith-project", "schema_version": 99, "design": {}}))
    with pytest.raises(ProjectFileError, match="newer than this program"):
        other.open(bad)
    assert other.project == project and other.path == str(path)


def test_save_without_path_and_new():
    model = DesignModel()
    with pytest.raises(InputError, match="Save As"):
        model.save()
    model.update_design(mass_kg=10.0)
    model.update_view(units="US")
    model.new()
    assert model.design == DesignInputs() and model.view.units == "US" and not model.dirty
    assert not model.can_undo
    model.new(Project(name="Fresh", view=ViewSettings()))
    assert model.name == "Fresh" and model.view.units == "SI"


def test_name_is_undoable():
    model = DesignModel()
    model.set_name("Pump skid")
    assert model.dirty
    assert model.undo() and model.name == "Untitled design" and not model.dirty
    with pytest.raises(InputError):
        model.set_name(None)


def test_studies_edits_are_undoable():
    from core.studies import PassageStudy, Studies
    model = DesignModel()
    events = Recorder(model)
    studies = Studies(passage=PassageStudy())
    assert model.set_studies(studies) and "studies_changed" in events.names() and model.dirty
    assert not model.set_studies(studies)
    assert model.undo() and model.project.studies == Studies() and not model.dirty
    assert model.redo() and model.project.studies == studies

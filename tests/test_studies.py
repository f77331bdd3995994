"""Studies stored in projects: wiring of design values into the analyses, keys, files, migration.

Independent references:
* rigid-beam statics (REFERENCES §5 statics; Harris ch. 3) — the 6-DOF elastic statics must give the
  same loads as the closed-form offset-CG rule for equal-deflection mounts;
* decoupled vertical mode sqrt(K/m) (REFERENCES §5) — equals the SDOF natural frequency;
* two-degree-of-freedom eigenproblem solved here with scipy.linalg.eigh (REFERENCES §7 set-up);
* Vigran (2008) eq. 2.33 at band centres for the floor study;
* Lewis (1932) / Zhi et al. (2022) trends: a slower run-up amplifies more (REFERENCES §6).
"""
import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import scipy.linalg

from core.design import DesignInputs
from core.errors import InputError, ProjectFileError
from core.evaluate import evaluate_project
from core.excitation import Excitation
from core.project import Project, load_project, parse_project, project_to_text, save_project
from core.studies import (FloorStudy, MountPlacement, PassageStudy, RigidBodyStudy, Studies, TwoStageStudy,
                          default_rigid_body_study)
from core.synthesis import synthesize
from core.transmissibility import Damping

ROOT = Path(__file__).parent.parent
DEMO_FILES = sorted((ROOT / "demo_projects").glob("*.json"))


def _machine(**changes) -> DesignInputs:
    base = dict(mass_kg=900.0, speed_rpm=1450.0, mount_count=4, load_layout="cg_offset", cg_offset_m=(0.12, -0.05),
                span_m=(1.8, 1.1), damping=Damping("viscous", 0.06), tuning="isolation", isolation_percent=94.0,
                excitation=Excitation("unbalance", unbalance_g_mm=900.0))
    base.update(changes)
    return DesignInputs(**base)


def test_rigid_body_loads_equal_offset_cg_statics_and_vertical_mode_equals_sdof():
    design = _machine()
    result = synthesize(design)
    study = default_rigid_body_study(design, cg_height_m=0.0)  # CG in the mount plane: vertical decouples
    values = Project(design=design, studies=Studies(rigid_body=study)).studies.evaluate(design, result)
    np.testing.assert_allclose(values["rigid_body_mount_loads_n"], result.load_per_mount_n, rtol=1e-9)
    assert min(abs(np.array(values["rigid_body_frequencies_hz"]) - result.natural_frequency_hz)) < 1e-9
    assert len(values["rigid_body_frequencies_hz"]) == 6
    assert values["rigid_body_frequencies_hz"] == sorted(values["rigid_body_frequencies_hz"])
    for shares in values["rigid_body_energy_share"]:
        assert sum(shares) == pytest.approx(1.0, abs=1e-9)
    assert len(values["rigid_body_transmitted_force_n"]) == 4


def test_rigid_body_study_checks_mount_count_and_fields():
    design = _machine()
    study = default_rigid_body_study(design)
    short = replace(study, mounts=study.mounts[:3])
    with pytest.raises(InputError, match="one entry per mount"):
        Studies(rigid_body=short).evaluate(design, synthesize(design))
    data = study.to_dict()
    data["mounts"][1]["position_m"] = [0.0, "x", 0.0]
    with pytest.raises(InputError) as caught:
        RigidBodyStudy.from_dict(data)
    assert caught.value.field == "studies.rigid_body.mounts[1].position_m"


def test_two_stage_frequencies_against_hand_built_eigenproblem():
    design = _machine(load_layout="equal")
    result = synthesize(design)
    study = TwoStageStudy(block_mass_kg=2500.0, lower_natural_frequency_hz=2.0, lower_damping_ratio=0.05)
    values = Studies(two_stage=study).evaluate(design, result)
    m1, m2 = 2500.0, 900.0
    k1 = (m1 + m2) * (2 * np.pi * 2.0) ** 2
    k2 = result.stiffness_total_n_per_m
    eig = scipy.linalg.eigh(np.array([[k1 + k2, -k2], [-k2, k2]]), np.diag([m1, m2]), eigvals_only=True)
    np.testing.assert_allclose(values["two_stage_frequencies_hz"], np.sqrt(eig) / (2 * np.pi), rtol=1e-9)
    assert values["single_stage_transmissibility"] == pytest.approx(result.transmissibility, rel=1e-9)
    assert values["two_stage_transmissibility"] < values["single_stage_transmissibility"]
    assert values["two_stage_gain_db"] == pytest.approx(
        20 * np.log10(values["single_stage_transmissibility"] / values["two_stage_transmissibility"]))


def test_floor_study_predicts_floor_times_closed_form_transmissibility():
    bands = [4.0, 8.0, 16.0, 31.5]
    floor = [2e-6, 5e-6, 20e-6, 40e-6]
    design = DesignInputs(mass_kg=1200.0, speed_rpm=1500.0, damping=Damping("viscous", 0.1),
                          tuning="natural_frequency", natural_frequency_hz=3.0)
    values = Studies(floor=FloorStudy("VC-B", tuple(bands), tuple(floor))).evaluate(design, synthesize(design))
    centres = 10 ** (np.round(10 * np.log10(bands)) / 10)  # exact base-10 band centres (IEC 61260-1)
    r = centres / 3.0
    t = np.sqrt((1 + (0.2 * r) ** 2) / ((1 - r**2) ** 2 + (0.2 * r) ** 2))  # Vigran eq. 2.33
    np.testing.assert_allclose(values["predicted_velocity_um_s"], np.array(floor) * 1e6 * t, rtol=1e-9)
    assert values["criterion"] == "VC-B"
    margins = 20 * np.log10(25.0 / (np.array(floor) * 1e6 * t))  # VC-B 25 µm/s (REFERENCES §4)
    assert values["criterion_worst_margin_db"] == pytest.approx(margins.min(), rel=1e-9)
    assert values["criterion_pass"] is bool(margins.min() >= 0)
    assert values["max_natural_frequency_for_criterion_hz"] > 3.0


def test_passage_study_keys_and_slower_runup_amplifies_more():
    design = _machine(load_layout="equal", damping=Damping("viscous", 0.03))
    result = synthesize(design)
    fast = Studies(passage=PassageStudy(runup_s=2.0, rundown_s=2.0)).evaluate(design, result)
    slow = Studies(passage=PassageStudy(runup_s=60.0, rundown_s=60.0)).evaluate(design, result)
    assert slow["startup_amplification"] > fast["startup_amplification"]
    # Peak over the steady value at speed: steady unbalance peak 1/(2ζ sqrt(1−ζ²)) (Rao) times the sweep
    # fraction A = 1 − exp(−2.86 η_s^−0.455), η_s = Q² (df/dt) / fn² (Zhi et al. 2022, REFERENCES §6; the fit
    # is for a constant force, here the unbalance force grows with speed squared, so 5 % is allowed).
    r = result.frequency_ratio
    steady_at_speed = r**2 / abs(1 - r**2 + 2j * 0.03 * r)
    steady_peak = 1 / (2 * 0.03 * np.sqrt(1 - 0.03**2))
    fn = result.natural_frequency_hz
    sweep = (1 / 0.06) ** 2 * (1450 / 60 / 60.0) / fn**2
    fraction = 1 - np.exp(-2.86 * sweep ** -0.455)
    assert slow["startup_amplification"] == pytest.approx(fraction * steady_peak / steady_at_speed, rel=0.05)
    assert slow["startup_peak_speed_rpm"] == pytest.approx(result.natural_frequency_rpm, rel=0.1)
    assert slow["startup_peak_displacement_mm"] > 0
    assert any("start-up" in w for w in slow["study_warnings"])


def test_studies_round_trip_through_a_file(tmp_path):
    design = _machine()
    studies = Studies(passage=PassageStudy(12.5, 40.0), rigid_body=replace(default_rigid_body_study(design),
                      inertia_kg_m2=((300.0, 0.0, 5.0), (0.0, 500.0, 0.0), (5.0, 0.0, 600.0))),
                      two_stage=TwoStageStudy(1500.0, 2.5, 0.04),
                      floor=FloorStudy("VC-C", (8.0, 16.0), (3e-6, 9e-6)))
    project = Project(name="round trip", design=design, studies=studies, kind="equipment")
    path = tmp_path / "p.json"
    save_project(project, path)
    assert load_project(path) == project


def test_version_1_files_migrate_to_the_current_schema():
    data = Project(design=_machine()).to_dict()
    data["schema_version"] = 1
    del data["kind"], data["studies"]
    del data["design"]["machine"]["duty_speeds_rpm"]
    data["design"]["tuning"].pop("natural_frequency_hz")
    migrated = parse_project(json.dumps(data))
    assert migrated.kind == "machine" and migrated.studies == Studies()
    assert migrated.design == _machine()


@pytest.mark.parametrize("change, field", [
    (lambda d: d["studies"].__setitem__("passage", {"runup_s": -1}), "studies.passage.runup_s"),
    (lambda d: d["studies"].__setitem__("two_stage", {"block_mass_kg": 10}),
     "studies.two_stage.lower_natural_frequency_hz"),
    (lambda d: d["studies"].__setitem__("floor", {"criterion": "VC-Z", "band_hz": [8], "velocity_m_s": [1e-6]}),
     "studies.floor.criterion"),
    (lambda d: d["studies"].__setitem__("wind", {}), "studies"),
    (lambda d: d.__setitem__("kind", "spaceship"), "kind"),
])
def test_bad_study_fields_are_named(change, field):
    data = Project(design=_machine()).to_dict()
    change(data)
    with pytest.raises(ProjectFileError) as caught:
        parse_project(json.dumps(data), "s.json")
    assert caught.value.field == field


@pytest.mark.parametrize("path", DEMO_FILES, ids=lambda p: p.name)
def test_demo_projects_exercise_the_studies(path):
    project = load_project(path)
    values = evaluate_project(project)
    assert project_to_text(project) == path.read_text(encoding="utf-8")
    if project.studies.passage:
        assert {"startup_peak_displacement_mm", "startup_amplification", "startup_peak_speed_rpm"} <= set(values)
    if project.studies.rigid_body:
        assert len(values["rigid_body_frequencies_hz"]) == 6
        assert len(values["rigid_body_mount_loads_n"]) == project.design.mount_count
    if project.studies.floor:
        assert {"criterion", "criterion_pass", "criterion_worst_margin_db", "criterion_worst_band_hz",
                "max_natural_frequency_for_criterion_hz"} <= set(values)
    if project.studies.two_stage:
        assert len(values["two_stage_frequencies_hz"]) == 2
    json.dumps(values, allow_nan=False)


def test_demo_set_covers_every_study():
    studies = [load_project(p).studies for p in DEMO_FILES]
    for name in ("passage", "rigid_body", "floor", "two_stage"):
        assert any(getattr(s, name) is not None for s in studies), name


def test_mount_placement_defaults():
    placement = MountPlacement(position_m=(0.0, 0.0, 0.0))
    assert placement.to_dict()["stiffness_n_per_m"] is None


def test_elastomer_passage_uses_damping_at_resonance():
    # Hysteretic damping at resonance equals viscous ζ = η/2 (equal peak height 1/η ≈ 1/(2ζ),
    # REFERENCES §1), so an elastomer design passes resonance like a viscous one with ζ = η/2.
    elastomer = _machine(load_layout="equal", damping=Damping("hysteretic", 0.12), tuning="frequency_ratio",
                         frequency_ratio=5.0)
    viscous = replace(elastomer, damping=Damping("viscous", 0.06))
    study = Studies(passage=PassageStudy(runup_s=10.0, rundown_s=10.0))
    a = study.evaluate(elastomer, synthesize(elastomer))
    b = study.evaluate(viscous, synthesize(viscous))
    assert a["startup_peak_displacement_mm"] == pytest.approx(b["startup_peak_displacement_mm"], rel=1e-9)

"""Project files: round trip, validation messages, migrations, atomic save under injected failures."""
import json
import os
from pathlib import Path

import pytest

from core import project as project_module
from core.design import DesignInputs
from core.errors import InputError, ProjectFileError
from core.evaluate import evaluate_project
from core.excitation import Excitation
from core.project import (MAX_FILE_BYTES, SCHEMA_VERSION, Project, ViewSettings, load_project, parse_project,
                          project_to_text, save_project)
from core.transmissibility import Damping

DEMO_FILES = sorted((Path(__file__).parent.parent / "demo_projects").glob("*.json"))


def _sample() -> Project:
    return Project(name="Test rig on air springs – ünïcode", notes="line one\nline two",
                   design=DesignInputs(mass_kg=1234.5, speed_rpm=987.6, speed_max_rpm=1500.25, mount_count=8,
                                       damping=Damping("hysteretic", 0.137), dynamic_stiffness_ratio=1.37,
                                       tuning="frequency_ratio", frequency_ratio=3.3333333333333335,
                                       excitation=Excitation("unbalance", unbalance_g_mm=123.456)),
                   view=ViewSettings(units="US", magnitude_scale="db", x_axis="hz",
                                     reference_damping=(0.02, 0.3)))


def test_demo_projects_exist_and_evaluate():
    assert len(DEMO_FILES) >= 3
    for path in DEMO_FILES:
        values = evaluate_project(load_project(path))
        assert values["isolation_percent"] > 80, path.name
        assert len(values["load_per_mount_n"]) == load_project(path).design.mount_count


def test_round_trip_is_exact(tmp_path):
    original = _sample()
    path = tmp_path / "rig.json"
    save_project(original, path)
    assert load_project(path) == original
    first = path.read_bytes()
    save_project(load_project(path), path)
    assert path.read_bytes() == first


def test_file_is_human_readable_json_with_format_and_version(tmp_path):
    path = tmp_path / "rig.json"
    save_project(_sample(), path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["format"] == "mountsmith-project"
    assert data["schema_version"] == SCHEMA_VERSION
    assert data["design"]["machine"]["mass_kg"] == 1234.5
    assert "\n  " in path.read_text(encoding="utf-8")


def _text_with(change) -> str:
    data = _sample().to_dict()
    change(data)
    return json.dumps(data)


@pytest.mark.parametrize("change, field, reason", [
    (lambda d: d["design"]["machine"].__setitem__("mass_kg", -3), "design.machine.mass_kg", "from 0.001"),
    (lambda d: d["design"]["machine"].__setitem__("mass_kg", "heavy"), "design.machine.mass_kg", "number"),
    (lambda d: d["design"]["machine"].pop("speed_rpm"), "design.machine.speed_rpm", "missing"),
    (lambda d: d["design"]["mounts"].__setitem__("count", 2.5), "design.mounts.count", "whole"),
    (lambda d: d["design"]["damping"].__setitem__("model", "magic"), "design.damping.model", "viscous"),
    (lambda d: d["design"].__setitem__("tuning", []), "design.tuning", "object"),
    (lambda d: d["view"].__setitem__("units", "furlongs"), "view.units", "SI"),
    (lambda d: d.__setitem__("format", "something-else"), "format", "not a Mountsmith project"),
    (lambda d: d.__setitem__("schema_version", SCHEMA_VERSION + 1), "schema_version", "newer"),
    (lambda d: d.__setitem__("schema_version", "1"), "schema_version", "whole number"),
    (lambda d: d.pop("design"), "design", "missing"),
])
def test_bad_fields_are_reported_with_file_field_and_reason(change, field, reason):
    with pytest.raises(ProjectFileError) as caught:
        parse_project(_text_with(change), "rig.json")
    assert caught.value.field == field
    assert reason in caught.value.reason
    assert str(caught.value).startswith("rig.json")


@pytest.mark.parametrize("text, reason", [
    ("", "not valid JSON"),
    ('{"format": "mountsmith-project", "schema_version": 1, ', "not valid JSON"),
    ('{"a": NaN}', "not valid JSON"),
    ('{"a": Infinity}', "not valid JSON"),
    ("[1, 2, 3]", "JSON object"),
    ("[" * 100_000 + "]" * 100_000, "nested too deeply"),
])
def test_damaged_text_is_refused(text, reason):
    with pytest.raises(ProjectFileError, match=reason):
        parse_project(text, "broken.json")


def test_damaged_files_are_refused_and_left_unchanged(tmp_path):
    cases = {"truncated.json": project_to_text(_sample())[:150].encode(),
             "binary.json": bytes(range(256)) * 4,
             "huge.json": b" " * (MAX_FILE_BYTES + 10) + b"{}"}
    for name, content in cases.items():
        path = tmp_path / name
        path.write_bytes(content)
        with pytest.raises(ProjectFileError):
            load_project(path)
        assert path.read_bytes() == content
    with pytest.raises(ProjectFileError, match="no such file"):
        load_project(tmp_path / "missing.json")
    with pytest.raises(ProjectFileError, match="folder"):
        load_project(tmp_path)


def test_migration_step_runs_for_older_versions(monkeypatch):
    # A registered migration from version 1 is applied when the program is at version 2.
    monkeypatch.setattr(project_module, "SCHEMA_VERSION", 2)
    calls = []

    def one_to_two(data):
        calls.append(data["schema_version"])
        data["notes"] = data["notes"] + " (migrated)"
        return data

    monkeypatch.setitem(project_module.MIGRATIONS, 1, one_to_two)
    old = project_to_text(_sample()).replace('"schema_version": 2', '"schema_version": 1')
    migrated = parse_project(old)
    assert calls == [1]
    assert migrated.notes.endswith("(migrated)")


@pytest.mark.parametrize("failing", ["write", "flush", "fsync", "replace"])
def test_failed_save_leaves_previous_file_byte_identical(tmp_path, monkeypatch, failing):
    path = tmp_path / "rig.json"
    save_project(_sample(), path)
    before = path.read_bytes()
    changed = _sample().with_design(DesignInputs(mass_kg=1.0))

    def boom(*args, **kwargs):
        raise OSError(28, "No space left on device")

    if failing == "fsync":
        monkeypatch.setattr(os, "fsync", boom)
    elif failing == "replace":
        monkeypatch.setattr(os, "replace", boom)
    else:
        real_fdopen = os.fdopen

        def fdopen(*args, **kwargs):
            stream = real_fdopen(*args, **kwargs)

            class Failing:
                def __init__(self, inner):
                    self.inner = inner

                def __enter__(self):
                    return self

                def __exit__(self, *exc):
                    self.inner.close()
                    return False

                def write(self, text):
                    if failing == "write":
                        boom()
                    return self.inner.write(text)

                def flush(self):
                    if failing == "flush":
                        boom()
                    return self.inner.flush()

                def fileno(self):
                    return self.inner.fileno()

            return Failing(stream)

        monkeypatch.setattr(os, "fdopen", fdopen)
    with pytest.raises(ProjectFileError, match="previous file is unchanged"):
        save_project(changed, path)
    assert path.read_bytes() == before
    assert not [p.name for p in tmp_path.iterdir() if p.name.startswith(".rig.json")]  # no temporary left


def test_save_into_read_only_folder_reports_cleanly(tmp_path, monkeypatch):
    folder = tmp_path / "locked"
    folder.mkdir()
    path = folder / "rig.json"
    save_project(_sample(), path)
    before = path.read_bytes()
    folder.chmod(0o500)
    try:
        if os.access(folder, os.W_OK):
            # Root may write anywhere: make creating the temporary file fail as a read-only folder would.
            def refuse(*args, **kwargs):
                raise PermissionError(13, "Permission denied")
            monkeypatch.setattr(project_module.tempfile, "mkstemp", refuse)
        with pytest.raises(ProjectFileError, match="Permission denied"):
            save_project(_sample().with_design(DesignInputs(mass_kg=2.0)), path)
        assert path.read_bytes() == before
    finally:
        folder.chmod(0o700)


def test_save_into_missing_folder_reports_cleanly(tmp_path):
    with pytest.raises(ProjectFileError, match="was not saved"):
        save_project(_sample(), tmp_path / "no-such-folder" / "rig.json")


@pytest.mark.parametrize("value, ok", [(2.5, True), ("2.5", True), (0.0, True), (10.0, True), (True, False),
                                       (float("nan"), False), (float("inf"), False), ("x", False), (None, False),
                                       (10 ** 400, False), (-0.1, False), (10.1, False)])
def test_finite_number_takes_numbers_and_numeric_text_in_range_only(value, ok):
    from core.errors import finite_number
    if ok:
        assert finite_number("f", value, "must be a number from 0 to 10", 0.0, 10.0) == float(value)
    else:
        with pytest.raises(InputError) as caught:
            finite_number("f", value, "must be a number from 0 to 10", 0.0, 10.0)
        assert caught.value.field == "f" and "from 0 to 10" in str(caught.value)

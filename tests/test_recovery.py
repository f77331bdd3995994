"""Recovery copies: where they live, atomic writing, finding orphans of crashed programs, discarding.

The crash test at the end starts the real window in a subprocess, makes an unsaved change,
waits for the recovery copy, kills the process with SIGKILL and restores from the copy.
"""
import json
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from core import recovery as recovery_module
from core.design import DesignInputs
from core.errors import ProjectFileError
from core.project import Project, load_project, save_project
from core.recovery import RECOVERY_DIR_ENV, discard_recovery, find_recovery, recovery_dir, write_recovery
from core.transmissibility import Damping

ROOT = Path(__file__).parent.parent
DEMO = ROOT / "demo_projects" / "rooftop_air_handler.json"


@pytest.fixture
def folder(tmp_path, monkeypatch):
    target = tmp_path / "recovery"
    monkeypatch.setenv(RECOVERY_DIR_ENV, str(target))
    return target


def _changed_demo() -> Project:
    project = load_project(DEMO)
    return project.with_design(project.design.with_changes(damping=Damping("viscous", 0.123), mass_kg=901.5))


def _child(code: str, env_folder: Path, wait: bool = True):
    """Run ``code`` in another Python process that uses the same recovery folder."""
    env = dict(os.environ, **{RECOVERY_DIR_ENV: str(env_folder)})
    process = subprocess.Popen([sys.executable, "-c", textwrap.dedent(code)], cwd=ROOT, env=env,
                               stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    if wait:
        out, err = process.communicate(timeout=60)
        assert process.returncode == 0, err
    return process


WRITE_AND_EXIT = """
    from core.project import load_project
    from core.recovery import write_recovery
    from core.transmissibility import Damping
    p = load_project('demo_projects/rooftop_air_handler.json')
    p = p.with_design(p.design.with_changes(damping=Damping('viscous', 0.123), mass_kg=901.5))
    write_recovery(p, 'demo_projects/rooftop_air_handler.json')
"""


def test_folder_follows_the_environment_variable(folder):
    assert recovery_dir() == folder


def test_default_folder_is_per_user(monkeypatch, tmp_path):
    monkeypatch.delenv(RECOVERY_DIR_ENV, raising=False)
    monkeypatch.setenv("HOME", str(tmp_path))
    monkeypatch.delenv("XDG_STATE_HOME", raising=False)
    monkeypatch.setattr(sys, "platform", "linux")
    assert recovery_dir() == tmp_path / ".local" / "state" / "mountsmith" / "recovery"
    monkeypatch.setenv("XDG_STATE_HOME", str(tmp_path / "state"))
    assert recovery_dir() == tmp_path / "state" / "mountsmith" / "recovery"
    monkeypatch.setattr(sys, "platform", "darwin")
    assert recovery_dir() == tmp_path / "Library" / "Application Support" / "Mountsmith" / "Recovery"
    monkeypatch.setattr(sys, "platform", "win32")
    monkeypatch.setenv("LOCALAPPDATA", str(tmp_path / "local"))
    assert recovery_dir() == tmp_path / "local" / "Mountsmith" / "Recovery"


def test_own_copy_round_trips_exactly_and_is_an_ordinary_project_file(folder):
    project = _changed_demo()
    before = time.time()
    written = write_recovery(project, DEMO)
    after = time.time()
    assert written.parent == folder
    assert load_project(written) == project
    # Own copy is hidden by default: a running program must not offer its own autosave back.
    assert find_recovery() is None
    found = find_recovery(include_own=True)
    assert found.project == project
    assert found.source_path == str(DEMO)
    assert before <= found.saved_at <= after
    assert found.project_path == written
    assert sorted(p.name for p in folder.iterdir()) == [f"recovery-{os.getpid()}.json",
                                                        f"recovery-{os.getpid()}.msproj.json"]


def test_new_design_without_a_file_records_no_source(folder):
    write_recovery(Project(), None)
    assert find_recovery(include_own=True).source_path is None


def test_copy_of_a_program_that_exited_is_found_and_discarded(folder):
    _child(WRITE_AND_EXIT, folder)
    found = find_recovery()
    assert found is not None
    assert found.project == _changed_demo()
    assert found.source_path == "demo_projects/rooftop_air_handler.json"
    discard_recovery(found)
    assert list(folder.iterdir()) == []
    assert find_recovery() is None


def test_copy_of_a_program_still_running_is_left_alone(folder):
    process = _child(WRITE_AND_EXIT + "\n    import sys, time\n    print('ok', flush=True)\n"
                     "    sys.stdin.read()\n", folder, wait=False)
    try:
        assert process.stdout.readline().strip() == "ok"
        assert find_recovery() is None   # another window is still working on it
    finally:
        process.kill()
        process.communicate(timeout=30)
    assert find_recovery().project == _changed_demo()


def test_newest_orphan_wins_and_damaged_copies_are_skipped(folder):
    _child(WRITE_AND_EXIT, folder)
    time.sleep(0.05)
    _child(WRITE_AND_EXIT.replace("0.123", "0.321"), folder)
    (folder / "recovery-999999999.msproj.json").write_text('{"format": "mountsmith-project", "sch')
    (folder / "recovery-notapid.msproj.json").write_text("{}")
    found = find_recovery()
    assert found.project.design.damping.value == 0.321


def test_missing_info_file_falls_back_to_file_time(folder):
    _child(WRITE_AND_EXIT, folder)
    for info in folder.glob("recovery-*[0-9].json"):
        info.write_text("[not the info format]")
    found = find_recovery()
    assert found.source_path is None
    assert found.saved_at == pytest.approx(found.project_path.stat().st_mtime)


def test_discard_removes_only_own_copy(folder):
    _child(WRITE_AND_EXIT, folder)
    write_recovery(_changed_demo(), DEMO)
    discard_recovery()
    assert not (folder / f"recovery-{os.getpid()}.msproj.json").exists()
    assert find_recovery() is not None
    discard_recovery()  # nothing left of ours: no error


def test_failed_write_keeps_previous_copy_and_leaves_no_temporary(folder, monkeypatch):
    first = _changed_demo()
    path = write_recovery(first, DEMO)
    before = path.read_bytes()

    def full(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", full)
    with pytest.raises(ProjectFileError, match="No space left"):
        write_recovery(first.with_design(DesignInputs(mass_kg=3.0)), DEMO)
    monkeypatch.undo()
    assert path.read_bytes() == before
    assert not [p for p in folder.iterdir() if p.name.endswith(".tmp")]


def test_unusable_folder_is_reported_not_raised_as_traceback(tmp_path, monkeypatch):
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder")
    monkeypatch.setenv(RECOVERY_DIR_ENV, str(blocker / "recovery"))
    with pytest.raises(ProjectFileError, match="recovery folder"):
        write_recovery(Project(), None)
    assert find_recovery() is None


# ------------------------------------------------------------------ crash test with the real window

CRASH_CHILD = """
import os, sys
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
sys.path.insert(0, {root!r})
from app import main_window
from PySide6 import QtCore, QtWidgets
app = QtWidgets.QApplication.instance() or QtWidgets.QApplication([])
window = main_window.MainWindow({demo!r})
window.show()
app.processEvents()
window.model.set_damping_value(0.137)
window.model.update_design(mass_kg=777.25)
print("changed", flush=True)
app.exec()
"""


@pytest.mark.gui
def test_kill_after_unsaved_change_leaves_a_copy_equal_to_the_changed_design(tmp_path):
    pytest.importorskip("app.main_window", reason="design window not built yet")
    from app import recovery_prompt  # noqa: F401  (the autosave wiring must exist)
    folder = tmp_path / "recovery"
    source = tmp_path / "fan.json"
    source.write_bytes(DEMO.read_bytes())
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", **{RECOVERY_DIR_ENV: str(folder),
                                                         "MOUNTSMITH_AUTOSAVE_SECONDS": "0.5"})
    code = CRASH_CHILD.format(root=str(ROOT), demo=str(source))
    process = subprocess.Popen([sys.executable, "-c", code], cwd=ROOT, env=env, stdout=subprocess.PIPE,
                               stderr=subprocess.PIPE, text=True)
    try:
        assert process.stdout.readline().strip() == "changed", process.stderr.read()
        deadline = time.monotonic() + 30
        copy = folder / f"recovery-{process.pid}.msproj.json"
        while not copy.exists():
            assert process.poll() is None, process.stderr.read()
            assert time.monotonic() < deadline, "no recovery copy within 30 s"
            time.sleep(0.1)
        time.sleep(0.3)
        os.kill(process.pid, signal.SIGKILL)
    finally:
        if process.poll() is None:
            process.kill()
        process.communicate(timeout=30)
    assert process.returncode == -signal.SIGKILL
    found_env = {RECOVERY_DIR_ENV: str(folder)}
    script = ("from core.recovery import find_recovery; import json; r = find_recovery(); "
              "print(json.dumps([r.project.to_dict(), r.source_path]))")
    out = subprocess.run([sys.executable, "-c", script], cwd=ROOT, env=dict(os.environ, **found_env),
                         capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    design, source_path = json.loads(out.stdout)
    expected = load_project(source).design.with_changes(damping=Damping("viscous", 0.137), mass_kg=777.25)
    assert design["design"] == expected.to_dict()
    assert source_path == str(source)
    assert source.read_bytes() == DEMO.read_bytes()  # the original file was never touched

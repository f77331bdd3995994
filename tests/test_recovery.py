"""Recovery copies: where they live, atomic writing, finding orphans of crashed programs, discarding.

The crash test at the end starts the real window in a subprocess, makes an unsaved change,
waits for the recovery copy, kills the process with SIGKILL and restores from the copy.
"""
import errno
import json
import os
import select
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

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


def test_failed_write_keeps_previous_copy_and_leaves_no_temporary(folder):
    first = _changed_demo()
    path = write_recovery(first, DEMO)
    before = path.read_bytes()

    def full(*args, **kwargs):
        raise OSError(28, "No space left on device")

    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(os, "replace", full)
        with pytest.raises(ProjectFileError, match="No space left"):
            write_recovery(first.with_design(DesignInputs(mass_kg=3.0)), DEMO)
    assert path.read_bytes() == before
    assert not [p for p in folder.iterdir() if p.name.endswith(".tmp")]


def test_unusable_folder_is_reported_not_raised_as_traceback(tmp_path, monkeypatch):
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder")
    monkeypatch.setenv(RECOVERY_DIR_ENV, str(blocker / "recovery"))
    with pytest.raises(ProjectFileError, match="recovery folder"):
        write_recovery(Project(), None)
    assert find_recovery() is None


# ------------------------------------------------------------------ faults injected into saving
# Each fault is raised where the operating system would raise it: creating the temporary
# file (read-only folder, no permission, quota), writing, flushing, fsync, closing, renaming.

FAULTS = {"ENOSPC": (errno.ENOSPC, "No space left on device"), "EDQUOT": (errno.EDQUOT, "Disk quota exceeded"),
          "EIO": (errno.EIO, "Input/output error"), "EROFS": (errno.EROFS, "Read-only file system"),
          "EACCES": (errno.EACCES, "Permission denied")}
STAGES = ("mkstemp", "write", "flush", "fsync", "close", "replace")


class _FaultyStream:
    """A text stream that fails at one stage and is otherwise the real file."""

    def __init__(self, inner, stage, fault):
        self.inner, self.stage, self.fault = inner, stage, fault

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.inner.close()
        if self.stage == "close" and exc[0] is None:
            raise self.fault
        return False

    def write(self, text):
        if self.stage == "write":
            self.inner.write(text[: len(text) // 2])   # half the bytes reach the disk, then it is full
            self.inner.flush()
            raise self.fault
        return self.inner.write(text)

    def flush(self):
        if self.stage == "flush":
            raise self.fault
        return self.inner.flush()

    def fileno(self):
        return self.inner.fileno()


def _inject(monkeypatch, stage, fault):
    from core import project as project_module
    if stage == "mkstemp":
        def refuse(*args, **kwargs):
            raise fault
        monkeypatch.setattr(project_module.tempfile, "mkstemp", refuse)
    elif stage == "fsync":
        def refuse(*args, **kwargs):
            raise fault
        monkeypatch.setattr(os, "fsync", refuse)
    elif stage == "replace":
        def refuse(*args, **kwargs):
            raise fault
        monkeypatch.setattr(os, "replace", refuse)
    else:
        real_fdopen = os.fdopen
        monkeypatch.setattr(os, "fdopen", lambda *a, **k: _FaultyStream(real_fdopen(*a, **k), stage, fault))


@pytest.mark.parametrize("stage", STAGES)
@pytest.mark.parametrize("fault_name", sorted(FAULTS))
@pytest.mark.parametrize("existing", [True, False], ids=["over-existing", "new-file"])
def test_save_fault_leaves_previous_file_and_no_temporary(tmp_path, monkeypatch, stage, fault_name, existing):
    code, text = FAULTS[fault_name]
    tmp_path = tmp_path / "work"   # a folder of its own: nothing else may appear in it
    tmp_path.mkdir()
    path = tmp_path / "pump.msproj.json"
    if existing:
        save_project(load_project(DEMO), path)
    before = path.read_bytes() if existing else None
    _inject(monkeypatch, stage, OSError(code, text))
    with pytest.raises(ProjectFileError) as caught:
        save_project(_changed_demo(), path)
    monkeypatch.undo()
    message = str(caught.value)
    assert text in message and "was not saved" in message and "\n" not in message
    if existing:
        assert path.read_bytes() == before
    else:
        assert not path.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == (["pump.msproj.json"] if existing else [])


@pytest.mark.parametrize("stage", STAGES)
def test_recovery_write_fault_keeps_previous_copy(folder, stage):
    path = write_recovery(load_project(DEMO), DEMO)
    before = path.read_bytes()
    with pytest.MonkeyPatch.context() as patch:
        _inject(patch, stage, OSError(errno.ENOSPC, "No space left on device"))
        with pytest.raises(ProjectFileError, match="No space left"):
            write_recovery(_changed_demo(), DEMO)
    assert path.read_bytes() == before
    assert not [p for p in folder.iterdir() if p.name.endswith(".tmp")]
    assert find_recovery(include_own=True).project == load_project(DEMO)


FILE_SIZE_LIMIT_CHILD = """
import os, resource, signal, sys
from core.project import load_project, save_project
from core.errors import ProjectFileError
signal.signal(signal.SIGXFSZ, signal.SIG_IGN)      # the write then fails with EFBIG instead of killing us
resource.setrlimit(resource.RLIMIT_FSIZE, (600, 600))
project = load_project('demo_projects/rooftop_air_handler.json')
try:
    save_project(project, sys.argv[1])
except ProjectFileError as error:
    print(error)
    sys.exit(3)
"""


def test_real_file_size_limit_during_write(tmp_path):
    # A real kernel-side fault, no mock: RLIMIT_FSIZE makes the write fail part-way (EFBIG),
    # as a full disk would. The previous file stays byte-identical and no temporary remains.
    tmp_path = tmp_path / "work"
    tmp_path.mkdir()
    path = tmp_path / "small.msproj.json"
    path.write_text("previous contents\n")
    completed = subprocess.run([sys.executable, "-c", FILE_SIZE_LIMIT_CHILD, str(path)], cwd=ROOT,
                               capture_output=True, text=True, timeout=60)
    assert completed.returncode == 3, completed.stderr
    assert "was not saved" in completed.stdout and "previous file is unchanged" in completed.stdout
    assert path.read_text() == "previous contents\n"
    assert [p.name for p in tmp_path.iterdir()] == ["small.msproj.json"]


def test_really_read_only_folder(tmp_path):
    folder = tmp_path / "locked"
    folder.mkdir()
    path = folder / "rig.msproj.json"
    save_project(load_project(DEMO), path)
    before = path.read_bytes()
    folder.chmod(0o500)
    try:
        if os.access(folder, os.W_OK):
            pytest.skip("running as a user who may write anywhere; the mocked EACCES/EROFS cases cover it")
        with pytest.raises(ProjectFileError, match="Permission denied"):
            save_project(_changed_demo(), path)
        assert path.read_bytes() == before
        assert [p.name for p in folder.iterdir()] == ["rig.msproj.json"]
    finally:
        folder.chmod(0o700)


# ------------------------------------------------------------------ crash test with the real window

CRASH_CHILD = """
import os, sys
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
sys.path.insert(0, {root!r})
from PySide6 import QtCore, QtWidgets
app = QtWidgets.QApplication([])   # the window's run() uses this instance


def change():
    windows = [w for w in app.topLevelWidgets() if type(w).__name__ == "MainWindow" and w.model.path]
    if not windows:
        QtCore.QTimer.singleShot(20, change)
        return
    window = windows[0]
    if getattr(window, "autosave", None) is None:
        print("the window has no autosave attached", flush=True)
        os._exit(4)
    window.model.set_damping_value(0.137)
    window.model.update_design(mass_kg=777.25)
    print("changed", flush=True)


QtCore.QTimer.singleShot(0, change)
{install}
from app.cli import main
sys.exit(main([{demo!r}]))   # exactly what `mountsmith FILE` runs
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
    code = CRASH_CHILD.format(root=str(ROOT), demo=str(source), install="")
    process = subprocess.Popen([sys.executable, "-c", code], cwd=ROOT, env=env, stdout=subprocess.PIPE,
                               stderr=subprocess.PIPE, text=True)
    try:
        ready, _, _ = select.select([process.stdout], [], [], 60)
        assert ready, "the window did not start within 60 s"
        line = process.stdout.readline().strip()
        assert line == "changed", line
        deadline = time.monotonic() + 30
        copy = folder / f"recovery-{process.pid}.msproj.json"
        while not copy.exists():
            assert process.poll() is None, "the window exited before writing a recovery copy"
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


# ------------------------------------------------------------------ the window side (autosave, restore offer)

ORPHAN_CHILD = """
import sys
from core.project import load_project
from core.recovery import write_recovery
from core.transmissibility import Damping
p = load_project('demo_projects/rooftop_air_handler.json')
p = p.with_design(p.design.with_changes(damping=Damping('viscous', 0.0875), mass_kg=612.0))
p = type(p)(**{**p.__dict__, 'name': 'renamed before the crash'})
write_recovery(p, sys.argv[1] if len(sys.argv) > 1 else None)
"""


def _orphan(folder: Path, source) -> None:
    args = [] if source is None else [str(source)]
    completed = subprocess.run([sys.executable, "-c", ORPHAN_CHILD, *args], cwd=ROOT, capture_output=True,
                               text=True, timeout=60, env=dict(os.environ, **{RECOVERY_DIR_ENV: str(folder)}))
    assert completed.returncode == 0, completed.stderr


@pytest.mark.gui
def test_autosave_writes_while_modified_and_a_save_removes_it(main_window, folder, tmp_path):
    from app import recovery_prompt
    source = tmp_path / "fan.msproj.json"
    source.write_bytes(DEMO.read_bytes())
    window = main_window(source)
    autosave = recovery_prompt.install(window, offer=False)
    own = folder / f"recovery-{os.getpid()}.msproj.json"
    assert autosave.write_if_modified() is False and not own.exists()      # nothing unsaved yet
    window.model.set_damping_value(0.0425)
    assert autosave.write_if_modified() is True
    assert load_project(own) == window.model.project
    assert autosave.write_if_modified() is False                         # unchanged since the copy
    window.model.save()
    assert not own.exists()                                              # saved: nothing to recover
    assert source.read_bytes() != DEMO.read_bytes()


@pytest.mark.gui
@pytest.mark.parametrize("answer", [True, False])
def test_restore_offer_puts_the_copy_back_as_unsaved_changes(main_window, folder, tmp_path, monkeypatch, answer):
    from app import recovery_prompt
    source = tmp_path / "fan.msproj.json"
    source.write_bytes(DEMO.read_bytes())
    _orphan(folder, source)
    asked = []
    monkeypatch.setattr(recovery_prompt, "ask_restore", lambda window, found: asked.append(found) or answer)
    window = main_window()
    assert recovery_prompt.offer_restore(window) is answer
    assert len(asked) == 1 and asked[0].source_path == str(source)
    assert find_recovery() is None                                        # offered once, then removed
    if answer:
        assert window.model.path == str(source)
        assert window.model.dirty
        assert window.model.design.damping.value == 0.0875 and window.model.design.mass_kg == 612.0
        assert window.model.name == "renamed before the crash"
        assert window.model.undo()                                        # undo goes back to the file
    else:
        assert window.model.path is None and not window.model.dirty
    assert source.read_bytes() == DEMO.read_bytes()


@pytest.mark.gui
def test_restore_without_the_original_file_gives_an_unsaved_new_design(main_window, folder, monkeypatch):
    from app import recovery_prompt
    _orphan(folder, None)
    monkeypatch.setattr(recovery_prompt, "ask_restore", lambda window, found: True)
    window = main_window()
    assert recovery_prompt.offer_restore(window)
    assert window.model.path is None and window.model.dirty
    assert window.model.design.mass_kg == 612.0
    assert window.model.name == "renamed before the crash"


@pytest.mark.gui
def test_headless_start_keeps_the_copy_instead_of_asking(main_window, folder, monkeypatch):
    # Offscreen nobody can answer: no question, and the copy waits for a start with a screen.
    from app import recovery_prompt
    _orphan(folder, None)
    monkeypatch.setattr(recovery_prompt, "ask_restore", lambda window, found: pytest.fail("asked headless"))
    window = main_window()
    recovery_prompt.install(window)
    assert find_recovery() is not None and not window.model.dirty

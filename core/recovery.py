"""Recovery copies of unsaved work, so a crash loses at most a few seconds of edits; Qt-free.

While a design has unsaved changes the window calls :func:`write_recovery`
every few seconds. Each running program writes its own pair of files in the
per-user recovery folder (see :func:`recovery_dir`)::

    recovery-<pid>.msproj.json   the project, written by core.project.save_project (atomic)
    recovery-<pid>.json          which file it came from, when, which process

On start the window asks :func:`find_recovery` for the newest copy left by a
program that is no longer running, offers to restore it, and removes it with
:func:`discard_recovery`. A clean exit or a save removes the program's own copy.

A recovery copy is an ordinary project file: it is read with
:func:`core.project.load_project` and nothing in it is ever executed.
"""
from __future__ import annotations

import json
import os
import sys
import time
from pathlib import Path
from typing import NamedTuple

from core.errors import ProjectFileError
from core.project import Project, load_project, save_project, write_text_atomically

#: Environment variable that moves the recovery folder (tests, portable installs).
RECOVERY_DIR_ENV = "MOUNTSMITH_RECOVERY_DIR"
INFO_FORMAT = "mountsmith-recovery-info"
_PREFIX = "recovery-"
_PROJECT_SUFFIX = ".msproj.json"
_INFO_SUFFIX = ".json"


class Recovery(NamedTuple):
    """A recovery copy found on disk.

    Attributes
    ----------
    project : Project
        The unsaved design as it was at ``saved_at``.
    source_path : str or None
        The project file it was opened from or last saved to (None for a new design).
    saved_at : float
        When the copy was written, seconds since the epoch (UTC).
    project_path : Path
        The recovery copy itself.
    """

    project: Project
    source_path: str | None
    saved_at: float
    project_path: Path


def recovery_dir() -> Path:
    """The per-user folder of recovery copies (not created here).

    ``$MOUNTSMITH_RECOVERY_DIR`` if set; otherwise ``%LOCALAPPDATA%\\Mountsmith\\Recovery``
    on Windows, ``~/Library/Application Support/Mountsmith/Recovery`` on macOS and
    ``$XDG_STATE_HOME/mountsmith/recovery`` (default ``~/.local/state``) elsewhere.
    """
    override = os.environ.get(RECOVERY_DIR_ENV)
    if override:
        return Path(override)
    if sys.platform.startswith("win"):
        base = os.environ.get("LOCALAPPDATA") or str(Path.home() / "AppData" / "Local")
        return Path(base) / "Mountsmith" / "Recovery"
    if sys.platform == "darwin":
        return Path.home() / "Library" / "Application Support" / "Mountsmith" / "Recovery"
    base = os.environ.get("XDG_STATE_HOME") or str(Path.home() / ".local" / "state")
    return Path(base) / "mountsmith" / "recovery"


def _paths(pid: int, folder: Path | None = None) -> tuple[Path, Path]:
    folder = recovery_dir() if folder is None else folder
    return folder / f"{_PREFIX}{pid}{_PROJECT_SUFFIX}", folder / f"{_PREFIX}{pid}{_INFO_SUFFIX}"


def write_recovery(project: Project, source_path: str | os.PathLike | None) -> Path:
    """Write this program's recovery copy of ``project``; return the copy's path.

    The project goes through :func:`core.project.save_project` (temporary file,
    fsync, atomic replace); the small info file beside it goes through
    :func:`core.project.write_text_atomically`. Raises ProjectFileError if the
    folder cannot be written.
    """
    folder = recovery_dir()
    try:
        folder.mkdir(parents=True, exist_ok=True, mode=0o700)
    except OSError as error:
        raise ProjectFileError(str(folder), f"recovery folder cannot be made ({error.strerror or error})") from None
    project_path, info_path = _paths(os.getpid(), folder)
    save_project(project, project_path)
    info = {"format": INFO_FORMAT, "source_path": None if source_path is None else str(source_path),
            "saved_at": time.time(), "pid": os.getpid()}
    write_text_atomically(info_path, json.dumps(info, ensure_ascii=False) + "\n")
    return project_path


def _process_running(pid: int) -> bool:
    """True if process ``pid`` still runs (always False on platforms where we cannot tell)."""
    if pid == os.getpid():
        return True
    if sys.platform.startswith("win") or pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return False
    return True


def _read_info(info_path: Path) -> dict:
    """The info file as a dict with checked types; {} when missing or damaged."""
    try:
        data = json.loads(info_path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    if not isinstance(data, dict) or data.get("format") != INFO_FORMAT:
        return {}
    checked = {}
    if isinstance(data.get("source_path"), str):
        checked["source_path"] = data["source_path"]
    saved_at = data.get("saved_at")
    if isinstance(saved_at, (int, float)) and not isinstance(saved_at, bool) and saved_at == saved_at:
        checked["saved_at"] = float(saved_at)
    return checked


def _pid_of(project_path: Path) -> int | None:
    stem = project_path.name[len(_PREFIX):-len(_PROJECT_SUFFIX)]
    return int(stem) if stem.isdigit() else None


def find_recovery(include_own: bool = False) -> Recovery | None:
    """The newest readable recovery copy left by a program that no longer runs, or None.

    Copies of programs still running (another open window) are skipped, and so is
    this program's own copy unless ``include_own``. A damaged copy is skipped, not
    raised: recovery must never stop the program from starting.
    """
    folder = recovery_dir()
    try:
        candidates = sorted(folder.glob(f"{_PREFIX}*{_PROJECT_SUFFIX}"))
    except OSError:
        return None
    found = []
    for project_path in candidates:
        pid = _pid_of(project_path)
        if pid is None:
            continue
        if pid == os.getpid():
            if not include_own:
                continue
        elif _process_running(pid):
            continue
        try:
            project = load_project(project_path)
            modified = project_path.stat().st_mtime
        except (ProjectFileError, OSError):
            continue
        info = _read_info(_paths(pid, folder)[1])
        found.append(Recovery(project, info.get("source_path"), info.get("saved_at", modified), project_path))
    if not found:
        return None
    return max(found, key=lambda recovery: recovery.saved_at)


def discard_recovery(recovery: Recovery | None = None) -> None:
    """Remove a recovery copy: the one given, or else this program's own. Missing files are fine."""
    if recovery is None:
        paths = _paths(os.getpid())
    else:
        pid = _pid_of(recovery.project_path)
        paths = (recovery.project_path,) if pid is None else _paths(pid, recovery.project_path.parent)
    for path in paths:
        try:
            path.unlink()
        except OSError:  # already gone, or a folder we may not write: nothing to recover from there
            pass

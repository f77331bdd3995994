"""Project files: versioned JSON, validated on load, saved by atomic replace.

A project file is one JSON object::

    {"format": "mountsmith-project", "schema_version": 2, "kind": "machine",
     "name": "...", "notes": "...", "design": {...}, "studies": {...}, "view": {...}}

``kind`` is ``"machine"`` (a running machine excites the floor) or
``"equipment"`` (the floor moves, sensitive equipment must stay still).
``design`` is :meth:`core.design.DesignInputs.to_dict`; ``studies`` holds the
optional studies of :mod:`core.studies`; ``view`` holds how the window shows
the design (display units, plot options). Values are SI.

Schema history: 1 — design and view; 2 — adds ``kind``, ``studies`` and the
design's duty speeds and natural-frequency tuning (migration fills defaults).

Loading never executes anything from the file, refuses files over
:data:`MAX_FILE_BYTES`, and reports file, field and reason in a
:class:`~core.errors.ProjectFileError`. Older schema versions are migrated
step by step; a newer one is refused. Saving writes a temporary file in the
same folder, flushes and fsyncs it, then replaces the target, so a failed
save leaves the previous file byte-identical.
"""
from __future__ import annotations

import json
import math
import os
import stat
import tempfile
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any, Callable

from core.design import DesignInputs
from core.errors import InputError, ProjectFileError
from core.studies import Studies

FORMAT_NAME = "mountsmith-project"
SCHEMA_VERSION = 2
MAX_FILE_BYTES = 5 * 1024 * 1024
FILE_SUFFIX = ".msproj.json"

UNIT_SYSTEMS = ("SI", "US")
MAGNITUDE_SCALES = ("ratio", "db")
X_AXES = ("ratio", "hz", "rpm")
PROJECT_KINDS = ("machine", "equipment")


@dataclass(frozen=True)
class ViewSettings:
    """How the window presents a design; stored with the project.

    Attributes
    ----------
    units : {"SI", "US"}
        Display unit system (files always store SI).
    magnitude_scale : {"ratio", "db"}
        Transmissibility axis: ratio on a log axis, or dB.
    x_axis : {"ratio", "hz", "rpm"}
        Frequency axis: ratio omega/omega_n, or absolute frequency.
    reference_damping : tuple of float
        Damping values of the faint reference curves.
    """

    units: str = "SI"
    magnitude_scale: str = "ratio"
    x_axis: str = "ratio"
    reference_damping: tuple[float, ...] = (0.01, 0.05, 0.1, 0.2, 0.5, 1.0)

    def validate(self) -> "ViewSettings":
        for name, value, allowed in (("view.units", self.units, UNIT_SYSTEMS),
                                     ("view.magnitude_scale", self.magnitude_scale, MAGNITUDE_SCALES),
                                     ("view.x_axis", self.x_axis, X_AXES)):
            if value not in allowed:
                raise InputError(name, "must be one of " + ", ".join(allowed), value)
        if len(self.reference_damping) > 20:
            raise InputError("view.reference_damping", "must hold at most 20 values",
                             len(self.reference_damping))
        for value in self.reference_damping:
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) \
                    or not 0.001 <= value <= 2.0:
                raise InputError("view.reference_damping", "every value must be a number from 0.001 to 2", value)
        return self

    def to_dict(self) -> dict:
        return {"units": self.units, "magnitude_scale": self.magnitude_scale, "x_axis": self.x_axis,
                "reference_damping": list(self.reference_damping)}

    @classmethod
    def from_dict(cls, data: Any) -> "ViewSettings":
        if not isinstance(data, dict):
            raise InputError("view", "must be an object", type(data).__name__)
        defaults = cls()
        damping = data.get("reference_damping", list(defaults.reference_damping))
        if not isinstance(damping, list):
            raise InputError("view.reference_damping", "must be a list of numbers", type(damping).__name__)
        return cls(units=data.get("units", defaults.units),
                   magnitude_scale=data.get("magnitude_scale", defaults.magnitude_scale),
                   x_axis=data.get("x_axis", defaults.x_axis),
                   reference_damping=tuple(damping)).validate()


@dataclass(frozen=True)
class Project:
    """A saved design: kind, name, notes, inputs, studies and view settings."""

    name: str = "Untitled design"
    notes: str = ""
    design: DesignInputs = field(default_factory=DesignInputs)
    view: ViewSettings = field(default_factory=ViewSettings)
    kind: str = "machine"
    studies: Studies = field(default_factory=Studies)

    def to_dict(self) -> dict:
        """The whole file as JSON types."""
        return {"format": FORMAT_NAME, "schema_version": SCHEMA_VERSION, "kind": self.kind, "name": self.name,
                "notes": self.notes, "design": self.design.to_dict(), "studies": self.studies.to_dict(),
                "view": self.view.to_dict()}

    @classmethod
    def from_dict(cls, data: Any) -> "Project":
        """Validate a current-version object; raise InputError naming the field."""
        if not isinstance(data, dict):
            raise InputError("(top level)", "must be a JSON object", type(data).__name__)
        name = data.get("name", "Untitled design")
        notes = data.get("notes", "")
        for key, value in (("name", name), ("notes", notes)):
            if not isinstance(value, str) or len(value) > 100_000:
                raise InputError(key, "must be text of at most 100000 characters", type(value).__name__)
        if "design" not in data:
            raise InputError("design", "is missing")
        kind = data.get("kind", "machine")
        if kind not in PROJECT_KINDS:
            raise InputError("kind", "must be one of " + ", ".join(PROJECT_KINDS), kind)
        return cls(name=name, notes=notes, design=DesignInputs.from_dict(data["design"]),
                   view=ViewSettings.from_dict(data.get("view", {})), kind=kind,
                   studies=Studies.from_dict(data.get("studies", {})))

    def with_design(self, design: DesignInputs) -> "Project":
        return replace(self, design=design)

    def with_studies(self, studies: Studies) -> "Project":
        return replace(self, studies=studies)


def _version_1_to_2(data: dict) -> dict:
    """Schema 2 adds the project kind, the studies and the design's duty speeds."""
    data.setdefault("kind", "machine")
    data.setdefault("studies", {})
    design = data.get("design")
    if isinstance(design, dict) and isinstance(design.get("machine"), dict):
        design["machine"].setdefault("duty_speeds_rpm", [])
    return data


#: Migrations: MIGRATIONS[v] turns a version-v object into a version-(v+1) object.
MIGRATIONS: dict[int, Callable[[dict], dict]] = {1: _version_1_to_2}


def migrate(data: dict) -> dict:
    """Bring a parsed project object up to :data:`SCHEMA_VERSION`.

    Raises InputError for a missing, wrong or newer format or version.
    """
    if data.get("format") != FORMAT_NAME:
        raise InputError("format", f"must be {FORMAT_NAME!r}: this is not a Mountsmith project",
                         data.get("format"))
    version = data.get("schema_version")
    if isinstance(version, bool) or not isinstance(version, int) or version < 1:
        raise InputError("schema_version", "must be a whole number from 1", version)
    if version > SCHEMA_VERSION:
        raise InputError("schema_version",
                         f"is newer than this program understands (up to {SCHEMA_VERSION}); "
                         "update Mountsmith to open it", version)
    while version < SCHEMA_VERSION:
        data = MIGRATIONS[version](dict(data))
        version += 1
        data["schema_version"] = version
    return data


def _refuse_constant(name: str):
    raise ValueError(f"{name} is not a number JSON allows")


def _parse_int(text: str):
    """A JSON integer; one beyond the float range becomes ±inf, so validation names its field."""
    value = int(text)
    try:
        float(value)
    except OverflowError:
        return math.inf if value > 0 else -math.inf
    return value


def parse_project(text: str, path: str = "(text)") -> Project:
    """Parse and validate project JSON text; raise ProjectFileError naming the field."""
    try:
        data = json.loads(text, parse_constant=_refuse_constant, parse_int=_parse_int)
    except RecursionError:
        raise ProjectFileError(path, "is nested too deeply to be a project file") from None
    except ValueError as error:
        raise ProjectFileError(path, f"is not valid JSON ({error})") from None
    try:
        if not isinstance(data, dict):
            raise InputError("(top level)", "must be a JSON object", type(data).__name__)
        return Project.from_dict(migrate(data))
    except InputError as error:
        raise ProjectFileError(path, f"{error.reason}" + ("" if error.value is None else f" (got {error.value!r})"),
                               field=error.field) from None
    except RecursionError:
        raise ProjectFileError(path, "is nested too deeply to be a project file") from None


def load_project(path: str | os.PathLike) -> Project:
    """Read a project file; never changes it. Raise ProjectFileError on any problem."""
    path = Path(path)
    try:
        status = path.stat()
        if not stat.S_ISREG(status.st_mode) and not stat.S_ISDIR(status.st_mode):
            # A pipe or device could block the read forever or never end.
            raise ProjectFileError(str(path), "is not a regular file (a pipe, device or socket)")
        size = status.st_size
        if size > MAX_FILE_BYTES:
            raise ProjectFileError(str(path), f"is {size / 1e6:.1f} MB, more than the "
                                   f"{MAX_FILE_BYTES / 1e6:.0f} MB a project file may be")
        with open(path, "rb") as handle:
            raw = handle.read(MAX_FILE_BYTES + 1)
    except FileNotFoundError:
        raise ProjectFileError(str(path), "no such file") from None
    except IsADirectoryError:
        raise ProjectFileError(str(path), "is a folder, not a project file") from None
    except OSError as error:
        raise ProjectFileError(str(path), f"cannot be read ({error.strerror or error})") from None
    if len(raw) > MAX_FILE_BYTES:
        raise ProjectFileError(str(path), "grew beyond the size a project file may be while reading")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as error:
        raise ProjectFileError(str(path), f"is not UTF-8 text (byte {error.start})") from None
    return parse_project(text, str(path))


def project_to_text(project: Project) -> str:
    """The file text of a project (indented JSON, trailing newline)."""
    return json.dumps(project.to_dict(), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def save_project(project: Project, path: str | os.PathLike) -> None:
    """Write a project by atomic replace: temporary file, flush, fsync, replace.

    On any failure the previous file at ``path`` is left byte-identical, the
    temporary file is removed, and ProjectFileError says what went wrong.
    """
    path = Path(path)
    try:
        text = project_to_text(project)
    except (TypeError, ValueError) as error:
        raise ProjectFileError(str(path), f"design cannot be written ({error})") from None
    write_text_atomically(path, text)


def write_text_atomically(path: str | os.PathLike, text: str) -> None:
    """Write UTF-8 text by atomic replace: temporary file in the same folder, flush, fsync, replace.

    On any failure the previous file at ``path`` is left byte-identical, the
    temporary file is removed, and ProjectFileError says what went wrong.
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    temporary = None
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
            stream.write(text)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
        temporary = None
        _fsync_folder(folder)
    except OSError as error:
        raise ProjectFileError(str(path), f"was not saved ({error.strerror or error}); "
                               "the previous file is unchanged") from None
    finally:
        if temporary is not None:
            try:
                os.unlink(temporary)
            except OSError:
                pass


def _fsync_folder(folder: Path) -> None:
    """Make the rename durable where the platform allows it."""
    try:
        descriptor = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(descriptor)
    except OSError:
        pass
    finally:
        os.close(descriptor)

"""The observable design model behind the window, with undo; Qt-free.

:class:`DesignModel` holds one :class:`~core.project.Project` (name, design
inputs, view settings), the file it came from, and whether it has unsaved
changes. Views change it only through its setters; each setter validates
through core (``DesignInputs.validate``), changes nothing on error, and
fires one event per changed part, only when the value really changed:

========================  ==================================================
event                     arguments
========================  ==================================================
``design_changed``        new :class:`~core.design.DesignInputs`
``view_changed``          new :class:`~core.project.ViewSettings`
``name_changed``          new name
``path_changed``          new path (str or None)
``dirty_changed``         bool
``undo_changed``          (can_undo, can_redo)
``project_replaced``      new project (after New / Open)
``studies_changed``       new studies (:class:`core.project.Studies`)
========================  ==================================================

Undo covers the design inputs, the name and the studies. A drag of a slider is one step:
call :meth:`begin_step` when it starts and :meth:`commit_step` when it ends;
edits between them merge into one entry. Consecutive edits with the same
``merge_key`` (typing in one field) also merge.
"""
from __future__ import annotations

import os
from dataclasses import dataclass, replace
from typing import Callable

from core.design import DesignInputs
from core.errors import InputError, MountsmithError
from core.project import Project, ViewSettings, load_project, save_project
from core.synthesis import DesignResult, synthesize
from core.transmissibility import Damping

#: Most undo steps kept.
UNDO_LIMIT = 200


class Signal:
    """A list of callbacks; ``emit`` calls each with the given arguments."""

    def __init__(self):
        self._callbacks: list[Callable] = []

    def connect(self, callback: Callable) -> None:
        if callback not in self._callbacks:
            self._callbacks.append(callback)

    def disconnect(self, callback: Callable) -> None:
        if callback in self._callbacks:
            self._callbacks.remove(callback)

    def emit(self, *args) -> None:
        for callback in list(self._callbacks):
            callback(*args)


class ModelEvents:
    """The model's events (see the module docstring)."""

    def __init__(self):
        self.design_changed = Signal()
        self.view_changed = Signal()
        self.name_changed = Signal()
        self.path_changed = Signal()
        self.dirty_changed = Signal()
        self.undo_changed = Signal()
        self.project_replaced = Signal()
        self.studies_changed = Signal()


@dataclass(frozen=True)
class Evaluation:
    """Synthesis of the current design: a result, or the message that replaces it."""

    result: DesignResult | None
    error: str | None


@dataclass(frozen=True)
class _Snapshot:
    design: DesignInputs
    name: str
    studies: object


class DesignModel:
    """Observable project state with undo/redo and save/open.

    Parameters
    ----------
    project : Project, optional
        Starting project (a new default design if omitted).
    path : str, optional
        File the project came from.
    """

    def __init__(self, project: Project | None = None, path: str | None = None):
        self.events = ModelEvents()
        self._project = project or Project()
        self._project.design.validate()
        self._project.view.validate()
        self._path = None if path is None else str(path)
        self._dirty = False
        self._undo: list[_Snapshot] = []
        self._redo: list[_Snapshot] = []
        self._step_depth = 0
        self._step_start: _Snapshot | None = None
        self._merge_key: str | None = None
        self._evaluation: Evaluation | None = None
        self._clean_project = self._project

    # ------------------------------------------------------------ state
    @property
    def project(self) -> Project:
        return self._project

    @property
    def design(self) -> DesignInputs:
        return self._project.design

    @property
    def view(self) -> ViewSettings:
        return self._project.view

    @property
    def name(self) -> str:
        return self._project.name

    @property
    def path(self) -> str | None:
        return self._path

    @property
    def dirty(self) -> bool:
        """True when the project differs from what was last opened, saved or created."""
        return self._dirty

    @property
    def can_undo(self) -> bool:
        return bool(self._undo)

    @property
    def can_redo(self) -> bool:
        return bool(self._redo)

    def evaluate(self) -> Evaluation:
        """Synthesis of the current design (cached until the design changes)."""
        if self._evaluation is None:
            try:
                self._evaluation = Evaluation(synthesize(self.design), None)
            except MountsmithError as error:
                self._evaluation = Evaluation(None, str(error))
        return self._evaluation

    @property
    def result(self) -> DesignResult | None:
        return self.evaluate().result

    # ------------------------------------------------------------ design edits
    def set_design(self, design: DesignInputs, merge_key: str | None = None) -> bool:
        """Replace the design inputs after validating them; True if anything changed.

        Raises
        ------
        InputError
            A field is out of range; the model is unchanged.
        """
        design.validate()
        if design == self.design:
            return False
        self._record(merge_key)
        self._apply(replace(self._project, design=design))
        return True

    def update_design(self, merge_key: str | None = None, **changes) -> bool:
        """Change some design fields (names of :class:`DesignInputs`); see :meth:`set_design`."""
        return self.set_design(self.design.with_changes(**changes), merge_key)

    def set_damping_value(self, value: float, merge_key: str | None = "damping.value") -> bool:
        """Set the damping ratio (viscous) or loss factor (hysteretic)."""
        return self.update_design(merge_key, damping=Damping(self.design.damping.model, float(value)))

    def set_damping_model(self, model: str) -> bool:
        """Switch damping model, carrying the value across by eta = 2 zeta (equal at resonance)."""
        current = self.design.damping
        if model == current.model:
            return False
        value = current.value * 2.0 if model == "hysteretic" else current.value / 2.0
        return self.update_design(None, damping=Damping(model, min(value, 2.0)))

    def set_frequency_ratio(self, ratio: float, merge_key: str | None = "tuning.frequency_ratio") -> bool:
        """Fix the natural frequency by the frequency ratio at the lowest speed (tuning by ratio)."""
        return self.update_design(merge_key, tuning="frequency_ratio", frequency_ratio=float(ratio))

    def set_name(self, name: str) -> bool:
        if not isinstance(name, str) or len(name) > 100_000:
            raise InputError("name", "must be text of at most 100000 characters", type(name).__name__)
        if name == self.name:
            return False
        self._record("name")
        self._apply(replace(self._project, name=name))
        return True

    def set_studies(self, studies, merge_key: str | None = None) -> bool:
        """Replace the project's studies (undoable); True if anything changed."""
        if studies == self._project.studies:
            return False
        self._record(merge_key)
        self._apply(replace(self._project, studies=studies))
        return True

    # ------------------------------------------------------------ view edits (not undone)
    def update_view(self, **changes) -> bool:
        """Change view settings (validated; not part of undo); True if anything changed."""
        view = replace(self.view, **changes).validate()
        if view == self.view:
            return False
        self._apply(replace(self._project, view=view))
        return True

    # ------------------------------------------------------------ undo
    def begin_step(self) -> None:
        """Start one undo step that gathers every edit until :meth:`commit_step`."""
        if self._step_depth == 0:
            self._step_start = self._snapshot()
        self._step_depth += 1

    def commit_step(self) -> None:
        """Close the undo step; nothing is recorded if nothing changed."""
        if self._step_depth == 0:
            return
        self._step_depth -= 1
        if self._step_depth == 0:
            start, self._step_start = self._step_start, None
            if start is not None and start != self._snapshot():
                self._push_undo(start)
            self._merge_key = None

    def undo(self) -> bool:
        if self._step_depth:
            self._step_depth = 1
            self.commit_step()
        if not self._undo:
            return False
        self._redo.append(self._snapshot())
        self._restore(self._undo.pop())
        return True

    def redo(self) -> bool:
        if not self._redo:
            return False
        self._undo.append(self._snapshot())
        self._restore(self._redo.pop())
        return True

    # ------------------------------------------------------------ files
    def new(self, project: Project | None = None) -> None:
        """Start a new, unsaved project (clears undo)."""
        self._replace(project or Project(view=self.view), None)

    def open(self, path: str | os.PathLike) -> None:
        """Load a project file; on ProjectFileError the model is unchanged."""
        project = load_project(path)
        self._replace(project, str(path))

    def save(self, path: str | os.PathLike | None = None) -> str:
        """Save to ``path`` (or the current file) by atomic replace; return the path.

        Raises ProjectFileError; the model stays dirty then.
        """
        target = path if path is not None else self._path
        if target is None:
            raise InputError("path", "no file chosen: use Save As")
        save_project(self._project, target)
        self._clean_project = self._project
        if str(target) != self._path:
            self._path = str(target)
            self.events.path_changed.emit(self._path)
        self._set_dirty(False)
        return self._path

    # ------------------------------------------------------------ internals
    def _snapshot(self) -> _Snapshot:
        return _Snapshot(self._project.design, self._project.name, self._project.studies)

    def _record(self, merge_key: str | None) -> None:
        """Remember the state before an edit, unless it merges with the previous edit."""
        if self._step_depth:
            return
        if merge_key is not None and merge_key == self._merge_key and self._undo:
            return
        self._push_undo(self._snapshot())
        self._merge_key = merge_key

    def _push_undo(self, snapshot: _Snapshot) -> None:
        self._undo.append(snapshot)
        del self._undo[:-UNDO_LIMIT]
        self._redo.clear()
        self.events.undo_changed.emit(self.can_undo, self.can_redo)

    def _restore(self, snapshot: _Snapshot) -> None:
        self._merge_key = None
        self._apply(replace(self._project, design=snapshot.design, name=snapshot.name, studies=snapshot.studies))
        self.events.undo_changed.emit(self.can_undo, self.can_redo)

    def _apply(self, project: Project) -> None:
        old = self._project
        self._project = project
        if project.design != old.design:
            self._evaluation = None
            self.events.design_changed.emit(project.design)
        if project.view != old.view:
            self.events.view_changed.emit(project.view)
        if project.name != old.name:
            self.events.name_changed.emit(project.name)
        if project.studies != old.studies:
            self.events.studies_changed.emit(project.studies)
        self._set_dirty(project != self._clean_project)

    def _replace(self, project: Project, path: str | None) -> None:
        project.design.validate()
        project.view.validate()
        self._project = project
        self._clean_project = project
        self._evaluation = None
        self._undo.clear()
        self._redo.clear()
        self._step_depth = 0
        self._step_start = None
        self._merge_key = None
        if path != self._path:
            self._path = path
            self.events.path_changed.emit(path)
        self.events.project_replaced.emit(project)
        self.events.design_changed.emit(project.design)
        self.events.view_changed.emit(project.view)
        self.events.name_changed.emit(project.name)
        self.events.undo_changed.emit(False, False)
        self._set_dirty(False)

    def _set_dirty(self, dirty: bool) -> None:
        if dirty != self._dirty:
            self._dirty = dirty
            self.events.dirty_changed.emit(dirty)

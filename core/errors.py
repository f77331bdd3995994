"""Error types that carry a field name and the allowed range.

Every bad input in Mountsmith ends as one of these, never as a traceback:
the command line prints ``str(error)`` and exits with status 2, the window
shows it beside the field or in a dialog.
"""
from __future__ import annotations


class MountsmithError(Exception):
    """Base class of every error the program reports to a user."""


class InputError(MountsmithError, ValueError):
    """A value outside its allowed range.

    Parameters
    ----------
    field : str
        Dotted name of the field, e.g. ``"machine.mass_kg"``.
    reason : str
        What is allowed, e.g. ``"must be a number > 0 kg"``.
    value : object, optional
        The offending value, shown in the message.
    """

    def __init__(self, field: str, reason: str, value: object = None):
        self.field = field
        self.reason = reason
        self.value = value
        shown = "" if value is None else f" (got {value!r})"
        super().__init__(f"{field}: {reason}{shown}")


class TargetUnreachable(MountsmithError, ValueError):
    """A design target that no frequency ratio in the supported range can meet."""

    def __init__(self, field: str, reason: str):
        self.field = field
        self.reason = reason
        self.value = None
        super().__init__(f"{field}: {reason}")


class ProjectFileError(MountsmithError):
    """A project file that cannot be read, with file, field and reason."""

    def __init__(self, path: str, reason: str, field: str | None = None):
        self.path = str(path)
        self.field = field
        self.reason = reason
        where = f" [{field}]" if field else ""
        super().__init__(f"{self.path}{where}: {reason}")

"""Error types that carry a field name and the allowed range.

Every bad input in Mountsmith ends as one of these, never as a traceback:
the command line prints ``str(error)`` and exits with status 2, the window
shows it beside the field or in a dialog.
"""
from __future__ import annotations

import math


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


def finite_number(field: str, value: object, reason: str, low: float = -math.inf,
                  high: float = math.inf) -> float:
    """``value`` as a float from ``low`` to ``high`` (inclusive), else InputError(field, reason, value).

    Numbers and numeric text are accepted; booleans, other objects, NaN and infinities are not.
    """
    if isinstance(value, bool):
        raise InputError(field, reason, value)
    try:
        number = float(value)
    except (TypeError, ValueError, OverflowError):
        raise InputError(field, reason, value) from None
    if not math.isfinite(number) or not low <= number <= high:
        raise InputError(field, reason, value)
    return number


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

"""Evaluate a whole project: the numbers of ``mountsmith evaluate --json``.

:func:`evaluate_project` runs the design synthesis and every analysis the
project asks for, and returns one JSON-ready dict (SI, unit in each key).
The window, the command line and the exports all read these numbers.
"""
from __future__ import annotations

from core.project import Project
from core.synthesis import synthesize


def evaluate_project(project: Project) -> dict:
    """All results of a project as a JSON-ready dict.

    Raises InputError or TargetUnreachable for a design that cannot be evaluated.
    """
    result = synthesize(project.design)
    values = {"name": project.name, "kind": project.kind}
    values.update(result.to_json_dict())
    studies = project.studies.evaluate(project.design, result)
    values["warnings"] = values["warnings"] + studies.pop("study_warnings")
    values.update(studies)
    return values

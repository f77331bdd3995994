"""Safety cautions shown by the window, written on every export and quoted by the CLI/README.

Kept in one place so every surface says the same thing.
"""
from __future__ import annotations

#: One line, short enough for a status bar and the foot of an exported image.
CAUTION_LINE = ("Preliminary values: mount supplier data, seismic restraint and local codes govern; "
                "a licensed engineer must review before installation.")

#: Title of the safety notes.
SAFETY_TITLE = "Safety notes"

#: The safety notes as paragraphs (plain text).
SAFETY_NOTES = (
    "Mountsmith gives preliminary, catalog-neutral values from a single-degree-of-freedom model: "
    "natural frequency, stiffness, damping, static deflection and loads per mount. Real machines rock, "
    "sway and couple modes; real mounts are non-linear, drift and age.",
    "Choose actual mounts from the supplier's rated data (load range, stiffness, deflection, damping, "
    "temperature and oil resistance). Supplier data governs over the values shown here.",
    "A machine on resilient mounts can move, walk or fall when it is started, stopped, struck or shaken "
    "by an earthquake. Seismic and wind restraint, snubbers, travel limits and anchorage are designed "
    "separately, to the local building code, and govern.",
    "Heavy machines hurt people when they shift. Have a licensed professional engineer review the "
    "design, the mount selection and the restraint before installation and operation.",
)


def safety_text() -> str:
    """The safety notes as one block of text, paragraphs separated by blank lines."""
    return "\n\n".join(SAFETY_NOTES)

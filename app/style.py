"""Colours and line widths of the window and exports.

Our own palette for print (white background) and colour-blind viewers: the
design curve and the operating point differ in lightness as well as hue
(dark blue against bright orange), which stays apart under protanopia,
deuteranopia and tritanopia and in greyscale; reference curves are a pale
grey-blue; the target line is a dark purple, dashed; the isolation region a
very light green-blue wash.
"""
from __future__ import annotations

from PySide6 import QtGui, QtWidgets

from core.cautions import CAUTION_LINE

#: Plot colours (hex RGB) and fill colours (RGBA tuples).
PALETTE = {
    "background": "#ffffff",
    "foreground": "#222222",
    "grid_alpha": 0.18,
    "design": "#12407a",          # dark blue, the current damping curve
    "reference": "#9aa8ba",       # pale grey-blue, faint reference family
    "operating": "#e8790c",       # orange, the operating point
    "operating_band": (232, 121, 12, 45),
    "crossover": "#555555",       # grey, the √2 line
    "isolation_fill": (64, 160, 150, 28),
    "isolation_text": "#2f7f76",
    "target": "#6b2c91",          # dark purple, target transmissibility
    "crosshair": "#888888",
    "error_text": "#b00020",
    "ok_text": "#1b5e20",
    "caution_text": "#7a4a00",
}

#: Line widths in pixels at the window's own size; exports scale them.
LINE_WIDTH = {"design": 2.6, "reference": 1.0, "crossover": 1.2, "target": 1.4, "crosshair": 0.8}
#: Operating-point marker size (pixels) at the window's own size.
MARKER_SIZE = 11
#: Base font size (points) of plot labels at the window's own size.
FONT_POINTS = 10

#: Style sheet for the message shown beside a refused entry.
FIELD_ERROR_STYLE = f"color: {PALETTE['error_text']};"
CAUTION_STYLE = f"color: {PALETTE['caution_text']};"


def style_axes(plot, names=("left", "bottom"), no_prefix=("left", "bottom")) -> None:
    """Give a pyqtgraph plot's axes our look: foreground-coloured lines and text.

    Axes named in ``no_prefix`` get no automatic SI prefix (set before their
    labels, so a label never reads "x1e3"); the others keep it.
    """
    for name in names:
        axis = plot.getAxis(name)
        if name in no_prefix:
            axis.enableAutoSIPrefix(False)
        axis.setPen(PALETTE["foreground"])
        axis.setTextPen(PALETTE["foreground"])


def caution_label(name: str | None = None, wrap: bool = True) -> QtWidgets.QLabel:
    """The one-line safety caution as a label in the caution colour (every view shows it)."""
    label = QtWidgets.QLabel(CAUTION_LINE)
    label.setWordWrap(wrap)
    label.setStyleSheet(CAUTION_STYLE)
    if name:
        label.setObjectName(name)
    return label


def unshaped_font() -> QtGui.QFont:
    """A font that sets only Qt's PreferNoShaping strategy; everything else is inherited.

    Latin text then skips the shaping engine (kerning and ligatures, cosmetic in Latin script):
    measuring a new value (results, slider boxes) takes about a third of the time and drawing
    it four fifths (measured).
    """
    font = QtGui.QFont()
    font.setStyleStrategy(QtGui.QFont.StyleStrategy.PreferNoShaping)
    return font

"""Exports: PNG of the plots with a title block and the caution line, clipboard, CSV; headless plot command.

The figure is a widget laid out at the exact pixel size (shown with
``WA_DontShowOnScreen`` so nothing flashes on screen, and so offscreen Qt
does not fall back to 640x480), then rendered into a QImage of that size.
Line widths, markers and fonts scale with the height; the DPI is written
into the PNG.
"""
from __future__ import annotations

import datetime
import os
import sys
import tempfile
from pathlib import Path

from core.cautions import CAUTION_LINE
from core.curves import curve_family, ratio_axis, curves_csv
from core.design_model import DesignModel
from core.errors import InputError, MountsmithError
from core.units import format_value, format_values

DEFAULT_SIZE = (1800, 1200)
SIZE_LIMITS = (200, 10000)
DEFAULT_DPI = 150.0
#: Window-size height the plot styles are drawn for; exports scale by height / this.
REFERENCE_HEIGHT = 600.0


def ensure_headless_platform() -> None:
    """Use the offscreen Qt platform when there is no display (before any QApplication)."""
    if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY") \
            and sys.platform.startswith("linux"):
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


def check_size(width, height) -> tuple[int, int]:
    """Validate an export size in pixels; raise InputError naming the field and range."""
    low, high = SIZE_LIMITS
    checked = []
    for name, value in (("width", width), ("height", height)):
        if isinstance(value, bool) or not isinstance(value, int) or not low <= value <= high:
            raise InputError(name, f"must be a whole number of pixels from {low} to {high}", value)
        checked.append(value)
    return checked[0], checked[1]


def title_lines(model: DesignModel, date: datetime.date | None = None) -> list[str]:
    """Title block text: name and date, operating point, performance at speed, stiffness."""
    design, view = model.design, model.view
    system = view.units
    date = date or datetime.date.today()
    evaluation = model.evaluate()
    result = evaluation.result
    damping = design.damping
    symbol = "ζ" if damping.model == "viscous" else "η"
    lines = [f"{model.name} — {date.isoformat()}"]
    if result is None:
        lines.append(f"{symbol} = {damping.value:.4g}; no operating point: {evaluation.error}")
        return lines
    low, high = result.speeds_rpm
    speed = format_value(low, "speed", system) if high <= low else \
        f"{low:.5g} to {format_value(high, 'speed', system)}"
    ratio = f"{result.frequency_ratio:.4g}" + (f" to {result.frequency_ratio_max:.4g}" if high > low else "")
    stiffness = format_values(result.stiffness_per_mount_n_per_m, "stiffness", system)
    lines.append(f"Operating point r = {ratio}, {symbol} = {damping.value:.4g}; "
                 f"fn = {format_value(result.natural_frequency_hz, 'frequency', system)} "
                 f"({format_value(result.natural_frequency_rpm, 'speed', system)}); speed {speed}")
    lines.append(f"At speed: transmissibility {result.transmissibility:.4g}, isolation "
                 f"{result.isolation_percent:.4g} % ({result.isolation_db:.3g} dB); "
                 f"stiffness per mount {stiffness}")
    return lines


def _qt():
    """Import Qt lazily (PySide6 first, then pyqtgraph via app.plots)."""
    from PySide6 import QtCore, QtGui, QtWidgets
    from app import plots
    return QtCore, QtGui, QtWidgets, plots


class ExportFigure:
    """A laid-out figure (title block, plots, caution) of one exact pixel size."""

    def __init__(self, model: DesignModel, width: int, height: int, date=None):
        QtCore, QtGui, QtWidgets, plots = _qt()
        self.width, self.height = check_size(width, height)
        self.scale = self.height / REFERENCE_HEIGHT
        widget = QtWidgets.QWidget()
        widget.setAttribute(QtCore.Qt.WidgetAttribute.WA_DontShowOnScreen, True)
        widget.setStyleSheet("background: white; color: #222222;")
        layout = QtWidgets.QVBoxLayout(widget)
        margin = round(14 * self.scale)
        layout.setContentsMargins(margin, margin, margin, margin)
        layout.setSpacing(round(4 * self.scale))
        lines = title_lines(model, date)
        self.title = QtWidgets.QLabel(lines[0])
        self.title.setFont(self._font(16, bold=True))
        self.details = QtWidgets.QLabel("\n".join(lines[1:]))
        self.details.setFont(self._font(11))
        self.details.setWordWrap(True)
        self.plots = plots.TransmissibilityPlots(scale=self.scale, interactive=False)
        self.caution = QtWidgets.QLabel(CAUTION_LINE)
        self.caution.setFont(self._font(10))
        self.caution.setStyleSheet("color: #7a4a00;")
        self.caution.setWordWrap(True)
        layout.addWidget(self.title)
        layout.addWidget(self.details)
        layout.addWidget(self.plots, 1)
        layout.addWidget(self.caution)
        self.widget = widget
        widget.resize(self.width, self.height)
        widget.show()
        self.plots.show_design(model.design, model.evaluate(), model.view)
        QtWidgets.QApplication.processEvents()

    def _font(self, pixels_at_reference: float, bold: bool = False):
        _, QtGui, _, _ = _qt()
        font = QtGui.QFont()
        font.setPixelSize(max(6, round(pixels_at_reference * 1.3 * self.scale)))
        font.setBold(bold)
        return font

    def render(self, dpi: float = DEFAULT_DPI):
        """The figure as a QImage of exactly ``width`` x ``height`` pixels with the DPI set."""
        QtCore, QtGui, _, _ = _qt()
        if self.widget.size() != QtCore.QSize(self.width, self.height):
            self.widget.resize(self.width, self.height)
        image = QtGui.QImage(self.width, self.height, QtGui.QImage.Format.Format_ARGB32)
        image.fill(QtGui.QColor("white"))
        dots_per_meter = round(dpi / 0.0254)
        image.setDotsPerMeterX(dots_per_meter)
        image.setDotsPerMeterY(dots_per_meter)
        self.widget.render(image)
        return image

    def close(self) -> None:
        self.widget.close()
        self.widget.deleteLater()


def render_image(model: DesignModel, width: int = DEFAULT_SIZE[0], height: int = DEFAULT_SIZE[1],
                 dpi: float = DEFAULT_DPI, date=None):
    """Render the model's plots with title block and caution to a QImage."""
    figure = ExportFigure(model, width, height, date)
    try:
        return figure.render(dpi)
    finally:
        figure.close()


def save_image(image, path: str | os.PathLike) -> None:
    """Write a QImage as PNG by atomic replace; raise MountsmithError on failure."""
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".png", dir=folder)
    except OSError as error:
        raise MountsmithError(f"{path}: was not written ({error.strerror or error})") from None
    os.close(handle)
    try:
        if not image.save(temporary, "PNG"):
            raise MountsmithError(f"{path}: was not written (the image could not be encoded)")
        os.replace(temporary, path)
    except OSError as error:
        raise MountsmithError(f"{path}: was not written ({error.strerror or error})") from None
    finally:
        if os.path.exists(temporary):
            os.unlink(temporary)


def export_png(model: DesignModel, path, width: int = DEFAULT_SIZE[0], height: int = DEFAULT_SIZE[1],
               dpi: float = DEFAULT_DPI) -> None:
    """Render and save a PNG of the plots."""
    save_image(render_image(model, width, height, dpi), path)


def curves_csv_text(model: DesignModel) -> str:
    """CSV of the plotted curves (design and reference family), with title and caution as comments."""
    curves = curve_family(model.design.damping, model.view.reference_damping, ratio_axis())
    return curves_csv(curves, title_lines(model) + [CAUTION_LINE])


def export_csv(model: DesignModel, path) -> None:
    """Write the curves CSV by atomic replace."""
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    text = curves_csv_text(model)
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
            stream.write(text)
        os.replace(temporary, path)
    except OSError as error:
        raise MountsmithError(f"{path}: was not written ({error.strerror or error})") from None


def plot_command(path: str, out: str, width: int | None = None, height: int | None = None) -> int:
    """``mountsmith plot FILE --out PNG``: render a project's plots without a display.

    Returns 0 on success; on a bad file, size or output prints one line
    ``mountsmith: <message>`` to stderr and returns 2.
    """
    ensure_headless_platform()
    width = DEFAULT_SIZE[0] if width is None else width
    height = DEFAULT_SIZE[1] if height is None else height
    try:
        check_size(width, height)
        model = DesignModel()
        model.open(path)
        from PySide6 import QtWidgets
        app = QtWidgets.QApplication.instance() or QtWidgets.QApplication(["mountsmith"])
        export_png(model, out, width, height)
        del app
    except MountsmithError as error:
        print(f"mountsmith: {error}", file=sys.stderr)
        return 2
    print(f"wrote {out} ({width}×{height} px)")
    return 0

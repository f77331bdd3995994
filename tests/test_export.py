"""Exports: PNG size, content, line scaling, DPI, title block and caution; CSV; headless plot command."""
from __future__ import annotations

import csv
import datetime
import io
import os
import subprocess
import sys

import numpy as np
import pytest
from PySide6 import QtGui, QtWidgets

from app import export
from app.style import PALETTE
from core.cautions import CAUTION_LINE
from core.design_model import DesignModel
from core.project import Project
from tests.conftest import ROOT, demo_project_params

pytestmark = pytest.mark.gui


def closed_form_viscous(r, zeta):
    """abs T = sqrt((1+(2ζr)²)/((1−r²)²+(2ζr)²)), Vigran, Building Acoustics (2008) eq. 2.33."""
    return np.sqrt((1 + (2 * zeta * r) ** 2) / ((1 - r * r) ** 2 + (2 * zeta * r) ** 2))


def pixels(image: QtGui.QImage) -> np.ndarray:
    """(height, width, 3) uint8 RGB array of a QImage."""
    image = image.convertToFormat(QtGui.QImage.Format.Format_RGB888)
    width, height, stride = image.width(), image.height(), image.bytesPerLine()
    data = np.frombuffer(image.constBits(), dtype=np.uint8, count=stride * height).reshape(height, stride)
    return data[:, : width * 3].reshape(height, width, 3).copy()


def colour_count(array: np.ndarray, hex_colour: str, tolerance: int = 40) -> int:
    """Pixels within ``tolerance`` (per channel) of a colour."""
    target = np.array([int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)])
    return int(np.all(np.abs(array.astype(int) - target) <= tolerance, axis=2).sum())


@pytest.fixture
def demo_model():
    return DesignModel(Project(name="Export check"))


@pytest.mark.parametrize("size", [(1800, 1200), (640, 480), (1200, 1600)])
def test_png_has_requested_size_dpi_and_is_not_blank(qtbot, tmp_path, demo_model, size):
    path = tmp_path / "plot.png"
    export.export_png(demo_model, path, *size)
    image = QtGui.QImage(str(path))
    assert (image.width(), image.height()) == size
    assert image.dotsPerMeterX() == round(150 / 0.0254) == image.dotsPerMeterY()
    array = pixels(image)
    non_white = np.any(array < 235, axis=2).mean()
    assert 0.02 < non_white < 0.6  # curves, text, shading: neither blank nor black
    assert colour_count(array, PALETTE["design"]) > 200
    assert colour_count(array, PALETTE["operating"], 30) > 20


def test_line_thickness_scales_with_export_size(qtbot, demo_model):
    small = pixels(export.render_image(demo_model, 900, 600))
    large = pixels(export.render_image(demo_model, 1800, 1200))
    # Twice the size: the design curve is twice as long AND twice as thick -> about 4x the pixels
    # (2x if only the length scaled).
    ratio = colour_count(large, PALETTE["design"]) / colour_count(small, PALETTE["design"])
    assert 3.0 < ratio < 5.5, ratio


def test_title_block_names_project_operating_point_and_caution(qtbot, demo_model):
    lines = export.title_lines(demo_model, datetime.date(2026, 3, 1))
    result = demo_model.result
    assert lines[0] == "Export check — 2026-03-01"
    text = "\n".join(lines)
    assert f"r = {result.frequency_ratio:.4g}" in text and "ζ = 0.05" in text
    assert f"fn = {result.natural_frequency_hz:.4g} Hz" in text
    assert f"isolation {result.isolation_percent:.4g} %" in text
    assert f"stiffness per mount {result.stiffness_per_mount_n_per_m[0] / 1e3:.4g} N/mm" in text
    figure = export.ExportFigure(demo_model, 1800, 1200)
    try:
        assert figure.caution.text() == CAUTION_LINE
        assert figure.caution.isVisible() and figure.caution.geometry().bottom() <= 1200
        assert figure.title.text().startswith("Export check")
    finally:
        figure.close()


def test_copy_to_clipboard(main_window, qtbot):
    window = main_window()
    window.copy_image()
    image = QtWidgets.QApplication.clipboard().image()
    assert (image.width(), image.height()) == export.DEFAULT_SIZE


def test_csv_holds_every_plotted_curve(qtbot, tmp_path, demo_model):
    path = tmp_path / "curves.csv"
    export.export_csv(demo_model, path)
    text = path.read_text(encoding="utf-8")
    assert CAUTION_LINE in text
    rows = list(csv.reader(io.StringIO("\n".join(l for l in text.splitlines() if not l.startswith("#")))))
    header, data = rows[0], np.array(rows[1:], dtype=float)
    references = demo_model.view.reference_damping
    assert len(header) == 1 + 2 * (1 + len(references))
    assert header[1] == "transmissibility ζ = 0.05 (design)"
    r = data[:, 0]
    np.testing.assert_allclose(data[:, 1], closed_form_viscous(r, 0.05), rtol=1e-7)
    for i, zeta in enumerate(references):
        np.testing.assert_allclose(data[:, 3 + 2 * i], closed_form_viscous(r, zeta), rtol=1e-7)


def test_export_refuses_bad_size(demo_model, tmp_path):
    with pytest.raises(export.InputError, match="width: must be a whole number of pixels from 200 to 10000"):
        export.export_png(demo_model, tmp_path / "x.png", 50, 600)


def _run_plot(args, tmp_path):
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    code = ("import sys; from app.export import plot_command; "
            f"sys.exit(plot_command(*{args!r}))")
    return subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=env, capture_output=True, text=True,
                          timeout=60)


@pytest.mark.parametrize("path", demo_project_params()[:1])
def test_headless_plot_command(tmp_path, path):
    out = tmp_path / "demo.png"
    done = _run_plot([str(path), str(out), 1000, 700], tmp_path)
    assert done.returncode == 0, done.stderr
    image = QtGui.QImage(str(out))
    assert (image.width(), image.height()) == (1000, 700)
    bad = tmp_path / "bad.json"
    bad.write_text("[]", encoding="utf-8")
    failed = _run_plot([str(bad), str(tmp_path / "no.png"), None, None], tmp_path)
    assert failed.returncode == 2
    lines = [line for line in failed.stderr.splitlines() if "propagateSizeHints" not in line]
    assert len(lines) == 1 and lines[0].startswith("mountsmith: ") and str(bad) in lines[0]
    assert not (tmp_path / "no.png").exists()

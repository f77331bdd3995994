"""Design-review sheet: its text against the evaluation and handbook relations, its pages, its command.

The sheet's content is a data structure (``app.review_sheet.sheet_content``);
most checks read it. Independent references: static deflection and natural
frequency δ = g/ωn² (fn[Hz] = 15.761/sqrt(δ[mm]), REFERENCES §2, coefficient
from g), Hooke's law per mount δ = W/k_static, and the weight m·g shared by the
mounts (statics). The page checks use the A4 size of ISO 216 (210 mm × 297 mm).
"""
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")

import datetime  # noqa: E402
import importlib.metadata  # noqa: E402
import json  # noqa: E402
import math  # noqa: E402
import re  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
from dataclasses import replace  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

from app import review_sheet  # noqa: E402
from app.review_sheet import (  # noqa: E402
    CONTENT_BOTTOM, CONTENT_TOP, FOOTER_TOP, PAGE_HEIGHT, Paragraphs, Rows, Table, sheet_content)
from core.cautions import CAUTION_LINE, SAFETY_NOTES  # noqa: E402
from core.errors import MountsmithError  # noqa: E402
from core.evaluate import evaluate_project  # noqa: E402
from core.project import load_project  # noqa: E402
from core.summary import summary_rows  # noqa: E402
from tests.conftest import DEMO_PROJECTS, ROOT, demo_project_params  # noqa: E402

G = 9.80665  # standard gravity, m/s² (CGPM 1901)
A4_RATIO = 297.0 / 210.0  # ISO 216
DATE = datetime.date(2026, 3, 14)
NUMBER = re.compile(r"[-+]?\d+(?:\.\d+)?(?:e[-+]?\d+)?")


def _content(path):
    project = load_project(path)
    values = evaluate_project(project)
    return project, values, sheet_content(project, values, path.name, DATE, "test")


def _rows(sheet) -> dict[str, str]:
    return {label: text for block in sheet.blocks if isinstance(block, Rows) for label, text in block.rows}


def _number(text: str) -> float:
    return float(NUMBER.search(text).group())


def _close(shown: float, value: float, digits: int = 4) -> bool:
    """Whether ``shown`` is ``value`` rounded to ``digits`` significant digits."""
    return math.isclose(shown, value, rel_tol=0.51 * 10.0 ** (1 - digits), abs_tol=1e-12)


# ------------------------------------------------------------------ content (no drawing)
@pytest.mark.parametrize("path", demo_project_params())
def test_sheet_shows_the_evaluation_rows_warnings_and_cautions(path):
    project, values, sheet = _content(path)
    shown = [row for block in sheet.blocks if isinstance(block, Rows) for row in block.rows]
    for row in summary_rows(values):          # the same rows the command line prints
        assert row in shown
    texts = sheet.texts()
    for warning in values["warnings"]:
        assert warning in texts
    safety = sheet.block("Safety notes in full")
    assert isinstance(safety, Paragraphs) and safety.paragraphs == SAFETY_NOTES
    assert sheet.footer == CAUTION_LINE
    assert sheet.title == project.name
    assert dict(sheet.title_rows)["project file"] == path.name
    assert dict(sheet.title_rows)["date"] == "2026-03-14"
    expected = {"passage": "Passage through resonance", "rigid_body": "Machine as a rigid body on its mounts",
                "floor": "Floor vibration against a criterion", "two_stage": "Two-stage isolation"}
    for study, heading in expected.items():
        assert (heading in sheet.headings()) == (getattr(project.studies, study) is not None)


@pytest.mark.parametrize("path", demo_project_params())
def test_mount_table_agrees_with_statics_and_hookes_law(path):
    project, values, sheet = _content(path)
    table = sheet.block("Mount values")
    assert isinstance(table, Table) and len(table.rows) == project.design.mount_count
    loads = np.array([float(row[1]) for row in table.rows])
    stiffness_n_per_mm = np.array([float(row[2]) for row in table.rows])
    deflection_mm = np.array([float(row[4]) for row in table.rows])
    # The mounts carry the weight m·g between them (statics).
    assert loads.sum() == pytest.approx(project.design.mass_kg * G, rel=2e-4)
    # Hooke's law per mount with the static stiffness k/ratio: δ = W ratio / k.
    ratio = project.design.dynamic_stiffness_ratio
    assert loads * ratio / stiffness_n_per_mm == pytest.approx(deflection_mm, rel=2e-3)
    # δ = g/ωn² with the dynamic natural frequency fn = sqrt(ratio) fn,static (REFERENCES §2).
    fn_hz = _number(_rows(sheet)["natural frequency"])
    assert deflection_mm == pytest.approx(ratio * (15.761 / fn_hz) ** 2, rel=2e-3)
    for index, row in enumerate(table.rows):
        assert row[0] == str(index + 1)
        assert _close(float(row[1]), values["load_per_mount_n"][index], 5)
        assert _close(float(row[2]), values["stiffness_per_mount_n_per_m"][index] * 1e-3)
        assert _close(float(row[3]), values["damping_per_mount_n_s_per_m"][index])
        assert _close(float(row[4]), values["static_deflection_mm"])
        if "transmitted_force_per_mount_n" in values:
            assert _close(float(row[5]), values["transmitted_force_per_mount_n"][index])


@pytest.mark.parametrize("path", demo_project_params())
def test_study_numbers_equal_the_evaluation(path):
    project, values, sheet = _content(path)
    rows = _rows(sheet)
    if project.studies.passage is not None:
        for word, prefix in (("start-up", "startup"), ("shutdown", "shutdown")):
            motion = NUMBER.findall(rows[f"{word}: peak motion"])
            assert _close(float(motion[0]), values[f"{prefix}_amplification"])
            assert _close(float(motion[1]), values[f"{prefix}_peak_speed_rpm"])
            assert _close(_number(rows[f"{word}: peak force into floor"]), values[f"{prefix}_force_amplification"])
            if values[f"{prefix}_peak_displacement_mm"] is not None:
                assert _close(_number(rows[f"{word}: peak displacement"]), values[f"{prefix}_peak_displacement_mm"])
    if project.studies.rigid_body is not None:
        modes = sheet.block("Rigid-body modes (kinetic-energy share per coordinate)")
        assert len(modes.rows) == 6
        for row, frequency, dominant, shares in zip(modes.rows, values["rigid_body_frequencies_hz"],
                                                    values["rigid_body_mode_dominant"],
                                                    values["rigid_body_energy_share"]):
            assert _close(float(row[1]), frequency) and row[2] == dominant
            assert [float(cell) for cell in row[3:]] == pytest.approx([100 * s for s in shares], abs=0.051)
            assert sum(float(cell) for cell in row[3:]) == pytest.approx(100.0, abs=0.35)  # shares sum to 1
    if project.studies.floor is not None:
        bands = sheet.block("One-third-octave bands")
        assert [float(row[0]) for row in bands.rows] == values["floor_band_hz"]
        for row, index in zip(bands.rows, range(len(bands.rows))):
            assert _close(float(row[2]), values["predicted_velocity_um_s"][index], 3)
            assert _close(float(row[3]), values["criterion_limit_um_s"][index], 3)
            assert float(row[4]) == pytest.approx(values["criterion_margin_db"][index], abs=0.051)
        assert rows["criterion"] == values["criterion"]
        assert rows["verdict"].startswith("meets" if values["criterion_pass"] else "exceeds")
    if project.studies.two_stage is not None:
        low, high = NUMBER.findall(rows["natural frequencies of the pair"])
        assert _close(float(low), values["two_stage_frequencies_hz"][0])
        assert _close(float(high), values["two_stage_frequencies_hz"][1])
        assert _close(_number(rows["gain of the second stage"]), values["two_stage_gain_db"])


def _known_numbers(project, values) -> np.ndarray:
    """Every number of the evaluation and the project file, and the unit changes the sheet makes."""
    found = []

    def walk(item):
        if isinstance(item, bool) or item is None:
            return
        if isinstance(item, (int, float)):
            found.append(float(item))
        elif isinstance(item, dict):
            for value in item.values():
                walk(value)
        elif isinstance(item, (list, tuple)):
            for value in item:
                walk(value)
    walk(values)
    walk(project.to_dict()["design"])
    walk(project.to_dict()["studies"])
    base = np.array(found)
    # N/m → N/mm, mm → µm, share → %, r/min → Hz, a margin below zero shown as an excess
    return np.concatenate([base, base * 1e-3, base * 1e3, base * 100.0, base / 60.0, -base])


@pytest.mark.parametrize("path", demo_project_params())
def test_every_number_on_the_sheet_comes_from_the_project_or_its_evaluation(path):
    project, values, sheet = _content(path)
    known = _known_numbers(project, values)
    texts = []
    for block in sheet.blocks:
        if isinstance(block, Rows):
            texts += [text for row in block.rows for text in row]
        elif isinstance(block, Table):
            texts += [cell for row in block.rows for cell in row[1:]]   # column 0 counts rows
        elif isinstance(block, Paragraphs) and block.title != "Notes":     # notes are the user's own text
            texts += list(block.paragraphs)
    fixed_terms = ("ISO 21940-11", "0-to-peak", "20 log10", "√2")
    checked = 0
    for text in texts:
        for term in fixed_terms:
            text = text.replace(term, "")
        for match in NUMBER.findall(text):
            shown = float(match)
            digits = max(len(match.lstrip("+-").split("e")[0].replace(".", "").lstrip("0")), 1)
            tolerance = 0.51 * 10.0 ** (1 - min(digits, 4)) * max(abs(shown), 1e-12)
            assert np.any(np.abs(known - shown) <= tolerance + 1e-12), f"{match!r} in {text!r}"
            checked += 1
    assert checked > 40


def test_long_hostile_name_and_notes_are_cut_not_spilled(qapp):
    project = load_project(DEMO_PROJECTS[0])
    project = replace(project, name="Å" * 5000, notes="very long notes " * 6000)
    sheet = sheet_content(project, evaluate_project(project), None, DATE, "test")
    assert len(sheet.title) == review_sheet.MAX_NAME_CHARS and sheet.title.endswith("…")
    assert len(sheet.block("Notes").paragraphs[0]) <= review_sheet.MAX_NOTES_CHARS
    assert dict(sheet.title_rows)["project file"] == "not saved"
    renderer = review_sheet.SheetRenderer(sheet, project)
    try:
        _assert_inside_pages(renderer)
    finally:
        renderer.close()


def test_program_version_from_metadata_or_the_source_tree(monkeypatch):
    import tomllib
    monkeypatch.setattr(importlib.metadata, "version", lambda name: "9.8.7")
    assert review_sheet.program_version() == "9.8.7"

    def missing(name):
        raise importlib.metadata.PackageNotFoundError(name)
    monkeypatch.setattr(importlib.metadata, "version", missing)
    declared = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]["version"]
    assert review_sheet.program_version() == f"{declared} (source tree, not installed)"


# ------------------------------------------------------------------ pages
def _assert_inside_pages(renderer):
    """Every piece within the content area, none overlapping; the foot line fits under it."""
    for page in renderer.pages:
        assert page, "an empty page"
        bottom = CONTENT_TOP
        for piece, y in page:
            assert y >= bottom - 1e-6, f"{piece.kind} overlaps the piece above it"
            assert y + piece.height <= CONTENT_BOTTOM + 1e-6, f"{piece.kind} runs into the foot"
            bottom = y + piece.height
    assert FOOTER_TOP + renderer.footer_height() <= PAGE_HEIGHT - 60  # ≥ 6 mm blank at the foot


@pytest.fixture(scope="module")
def written(tmp_path_factory, qapp):
    """Every demo written once: files, the renderer's pages, and the plot views."""
    results = {}
    for path in DEMO_PROJECTS:
        project, values, sheet = _content(path)
        renderer = review_sheet.SheetRenderer(sheet, project)
        layout = {"pages": renderer.page_count,
                  "views": [(view.width(), view.height(), view.centralWidget.geometry())
                            for views in renderer.figures.views.values() for view in views]}
        _assert_inside_pages(renderer)
        renderer.close()
        out = tmp_path_factory.mktemp(path.stem) / "review.pdf"
        files = review_sheet.export_review_sheet(project, out, path.name, png=True)
        results[path.stem] = (project, layout, files)
    return results


@pytest.mark.parametrize("path", demo_project_params())
def test_pdf_and_png_pages(path, written):
    from PySide6 import QtGui
    project, layout, files = written[path.stem]
    pdf, pngs = files[0], files[1:]
    data = pdf.read_bytes()
    assert data.startswith(b"%PDF-")
    pages = len(re.findall(rb"/Type\s*/Page(?![s\w])", data))
    assert pages == layout["pages"] == len(pngs)
    studies = sum(study is not None for study in (project.studies.passage, project.studies.rigid_body,
                                                  project.studies.floor, project.studies.two_stage))
    assert pages >= 2 if studies else pages >= 1
    for box in re.findall(rb"/MediaBox\s*\[([^\]]*)\]", data):   # A4 in points: 595.3 × 841.9
        x0, y0, x1, y1 = (float(v) for v in box.split())
        assert (x1 - x0, y1 - y0) == pytest.approx((595.3, 841.9), abs=1.0)
    assert [p.name for p in pngs] == [f"review_p{i + 1}.png" for i in range(pages)]
    for png in pngs:
        image = QtGui.QImage(str(png))
        assert not image.isNull()
        assert image.height() / image.width() == pytest.approx(A4_RATIO, rel=0.01)
        assert image.dotsPerMeterX() == round(150 / 0.0254)
        grey = image.convertToFormat(QtGui.QImage.Format.Format_Grayscale8)
        pixels = np.frombuffer(grey.constBits(), np.uint8).reshape(grey.height(), grey.bytesPerLine())
        pixels = pixels[:, :grey.width()]
        assert pixels.std() > 10.0                       # not blank
        assert (pixels < 128).mean() > 0.005             # some dark ink: text and lines
        assert (pixels[:, :40] > 250).all() and (pixels[:, -40:] > 250).all()  # margins stay white
    for width, height, central in layout["views"]:         # every plot laid out whole, none cut off
        assert central.width() <= width + 0.5 and central.height() <= height + 0.5


def test_failed_write_keeps_the_previous_sheet_and_no_widget_is_left(tmp_path, qapp, monkeypatch):
    from PySide6 import QtWidgets
    shown_before = {id(w) for w in QtWidgets.QApplication.topLevelWidgets() if w.isVisible()}
    project = load_project(DEMO_PROJECTS[1])
    out = tmp_path / "review.pdf"
    assert review_sheet.export_review_sheet(project, out, None) == [out]
    before = out.read_bytes()
    left = [w for w in QtWidgets.QApplication.topLevelWidgets() if w.isVisible() and id(w) not in shown_before]
    assert not left, f"plot widgets left open after an export: {left}"

    def broken(self, path, title=""):
        raise OSError(28, "No space left on device")
    monkeypatch.setattr(review_sheet.SheetRenderer, "write_pdf", broken)
    with pytest.raises(MountsmithError, match="No space left on device"):
        review_sheet.export_review_sheet(project, out, None)
    assert out.read_bytes() == before
    assert sorted(p.name for p in tmp_path.glob("*review.pdf*")) == ["review.pdf"]   # no temporary file left


# ------------------------------------------------------------------ the command
def _report(*args):
    return subprocess.run([sys.executable, "-m", "app.cli", "report", *args], cwd=ROOT, capture_output=True,
                          text=True, timeout=120, env={**os.environ, "QT_QPA_PLATFORM": "offscreen"})


def _one_line_failure(completed):
    assert completed.returncode == 2
    lines = completed.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("mountsmith: "), completed.stderr
    assert "Traceback" not in completed.stderr
    return lines[0]


def test_report_command_writes_pdf_and_pages(tmp_path):
    out = tmp_path / "review.pdf"
    completed = _report(str(DEMO_PROJECTS[-1]), "--out", str(out), "--png")
    assert completed.returncode == 0, completed.stderr
    assert out.read_bytes().startswith(b"%PDF-")
    pages = sorted(tmp_path.glob("review_p*.png"))
    assert pages and str(out) in completed.stdout and f"{len(pages)} PNG" in completed.stdout


def test_report_command_refuses_bad_files_in_one_line(tmp_path):
    broken = tmp_path / "broken.json"
    broken.write_text("{not json", encoding="utf-8")
    assert "not valid JSON" in _one_line_failure(_report(str(broken), "--out", str(tmp_path / "a.pdf")))
    assert "no such file" in _one_line_failure(_report(str(tmp_path / "none.json"), "--out",
                                                       str(tmp_path / "b.pdf")))
    # A file that loads but cannot be evaluated: a rigid-body layout with one mount too few.
    data = json.loads(DEMO_PROJECTS[1].read_text(encoding="utf-8"))
    assert data["studies"]["rigid_body"] is not None
    data["studies"]["rigid_body"]["mounts"] = data["studies"]["rigid_body"]["mounts"][:3]
    odd = tmp_path / "odd.json"
    odd.write_text(json.dumps(data), encoding="utf-8")
    line = _one_line_failure(_report(str(odd), "--out", str(tmp_path / "c.pdf")))
    assert "studies.rigid_body.mounts" in line and str(odd) in line
    assert not any(tmp_path.glob("*.pdf"))


def test_report_command_refuses_an_unwritable_output_in_one_line(tmp_path):
    demo = str(DEMO_PROJECTS[0])
    line = _one_line_failure(_report(demo, "--out", str(tmp_path / "missing" / "review.pdf")))
    assert "was not written" in line
    line = _one_line_failure(_report(demo, "--out", str(tmp_path)))      # a folder, not a file
    assert "was not written" in line

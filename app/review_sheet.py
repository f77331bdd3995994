"""Design-review sheet: an A4 PDF (and PNG pages) of a project for print and sign-off.

Two layers:

* :func:`sheet_content` — a pure function (no Qt) from a project and its
  evaluation (:func:`core.evaluate.evaluate_project`) to a :class:`Sheet`: a
  title block and a list of blocks (headings, label/value rows, tables,
  paragraphs, figures) holding the exact text the pages show. Tests assert on it.
* :class:`SheetRenderer` — lays the blocks out on A4 pages and paints them with
  QPainter: into a QPdfWriter (text and plot lines stay vector) and into
  QImages for the PNG pages. Plots are the app's own views, laid out at a
  fixed pixel size and drawn with ``QGraphicsScene.render``.

The layout works in tenths of a millimetre on the page, so the PDF and the
PNG pages break at the same places. Every number comes from ``core``; this
module only formats and places it.
"""
from __future__ import annotations

import datetime
import importlib.metadata
import math
import os
import re
import sys
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

from core.cautions import CAUTION_LINE, SAFETY_NOTES, SAFETY_TITLE
from core.errors import MountsmithError, ProjectFileError
from core.evaluate import evaluate_project
from core.project import Project, load_project
from core.summary import _list as values_text
from core.summary import summary_rows

# ------------------------------------------------------------------ page geometry (0.1 mm units)
#: A4 portrait in tenths of a millimetre.
PAGE_WIDTH, PAGE_HEIGHT = 2100, 2970
MARGIN_LEFT = MARGIN_RIGHT = 150
CONTENT_TOP = 150
CONTENT_BOTTOM = 2770
FOOTER_TOP = 2795
CONTENT_WIDTH = PAGE_WIDTH - MARGIN_LEFT - MARGIN_RIGHT
#: Resolution of the PNG pages (dots per inch).
DEFAULT_DPI = 150.0
#: Plot widgets are laid out at this many pixels per millimetre of the page (0.25 mm a pixel).
FIGURE_PX_PER_MM = 4.0
#: Longest project name and notes printed (a file may hold 100 000 characters).
MAX_NAME_CHARS = 160
MAX_NOTES_CHARS = 2400

#: Section headings of the sheet, in order (tests and the window refer to them).
SECTIONS = ("Inputs", "Operating point", "Values per mount (catalog-neutral)", "Results at the operating point",
            "Warnings", "Transmissibility", "Passage through resonance", "Machine as a rigid body on its mounts",
            "Floor vibration against a criterion", "Two-stage isolation", SAFETY_TITLE)


# ------------------------------------------------------------------ content model (pure)
@dataclass(frozen=True)
class Heading:
    """A section heading; kept on the page of what follows it."""

    text: str


@dataclass(frozen=True)
class Rows:
    """Label/value rows, in one or two columns; ``key`` names the block for look-ups (not printed)."""

    rows: tuple[tuple[str, str], ...]
    key: str = ""
    columns: int = 1


@dataclass(frozen=True)
class Table:
    """A table: header texts, rows of cell texts, and an optional note under it."""

    headers: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    title: str = ""
    note: str = ""
    key: str = ""


@dataclass(frozen=True)
class Paragraphs:
    """Running text; ``tone`` is "plain", "warning" (bulleted, red) or "caution" (brown)."""

    paragraphs: tuple[str, ...]
    title: str = ""
    tone: str = "plain"
    key: str = ""


@dataclass(frozen=True)
class Figure:
    """A plot drawn by one of the app's views.

    ``kind`` is "transmissibility", "passage", "rigid_body" or "floor".
    """

    kind: str
    title: str
    height_mm: float
    caption: str = ""


Block = Heading | Rows | Table | Paragraphs | Figure


@dataclass(frozen=True)
class Sheet:
    """Everything the pages show, as text."""

    title: str
    title_rows: tuple[tuple[str, str], ...]
    blocks: tuple[Block, ...]
    footer: str = CAUTION_LINE

    def texts(self) -> list[str]:
        """Every text of the sheet, in reading order (for searches and tests)."""
        out = [self.title] + [text for row in self.title_rows for text in row]
        for block in self.blocks:
            if isinstance(block, Heading):
                out.append(block.text)
            elif isinstance(block, Rows):
                out += [text for row in block.rows for text in row]
            elif isinstance(block, Table):
                out += [block.title, *block.headers] + [text for row in block.rows for text in row] + [block.note]
            elif isinstance(block, Paragraphs):
                out += [block.title, *block.paragraphs]
            elif isinstance(block, Figure):
                out += [block.title, block.caption]
        out.append(self.footer)
        return [text for text in out if text]

    def headings(self) -> list[str]:
        return [block.text for block in self.blocks if isinstance(block, Heading)]

    def block(self, name: str) -> Block:
        """The first Rows/Table/Paragraphs/Figure block with this key or printed title."""
        for block in self.blocks:
            if not isinstance(block, Heading) and name in (getattr(block, "key", ""), getattr(block, "title", "")):
                return block
        raise KeyError(name)


def program_version() -> str:
    """The installed package's version; from pyproject.toml for a source tree that is not installed."""
    try:
        return importlib.metadata.version("mountsmith")
    except importlib.metadata.PackageNotFoundError:
        pass
    pyproject = Path(__file__).resolve().parent.parent / "pyproject.toml"
    try:
        import tomllib
        version = tomllib.loads(pyproject.read_text(encoding="utf-8"))["project"]["version"]
        return f"{version} (source tree, not installed)"
    except (ImportError, OSError, KeyError, TypeError, ValueError):
        return "unknown (not installed)"


def _g(value: float, digits: int = 4) -> str:
    return f"{value:.{digits}g}"


def _clipped(text: str, limit: int) -> str:
    return text if len(text) <= limit else text[: limit - 1].rstrip() + "…"


def _input_rows(project: Project) -> tuple[tuple[str, str], ...]:
    """The design inputs as label/value rows (SI)."""
    design = project.design
    low, high = design.speed_range_rpm
    rows = [("machine mass", f"{design.mass_kg:.6g} kg"),
            ("operating speed", f"{low:.6g} r/min" if high == low else f"{low:.6g} to {high:.6g} r/min")]
    if design.duty_speeds_rpm:
        rows.append(("duty speeds", ", ".join(f"{v:.6g}" for v in design.duty_speeds_rpm) + " r/min"))
    rows.append(("mounts", f"{design.mount_count}"))
    if design.load_layout == "equal":
        rows.append(("load sharing", "equal shares of the weight"))
    elif design.load_layout == "per_mount":
        rows.append(("load sharing", "given per mount: " + ", ".join(f"{v:.5g}" for v in design.loads_n) + " N"))
    else:
        (x, y), (length, width) = design.cg_offset_m, design.span_m
        rows.append(("load sharing", f"CG offset ({x:g}, {y:g}) m on a {length:g} m × {width:g} m layout"))
    damping = design.damping
    rows.append(("damping", f"viscous, damping ratio ζ = {damping.value:.4g}" if damping.model == "viscous"
                 else f"hysteretic, loss factor η = {damping.value:.4g}"))
    rows.append(("dynamic / static stiffness", f"{design.dynamic_stiffness_ratio:.4g}"))
    tuning = {"isolation": f"target isolation {design.isolation_percent:.4g} % at the lowest speed",
              "frequency_ratio": f"chosen frequency ratio ω/ωn = {design.frequency_ratio:.4g}",
              "natural_frequency": f"chosen natural frequency {design.natural_frequency_hz:.4g} Hz"}
    rows.append(("tuning", tuning[design.tuning]))
    excitation = design.excitation
    rows.append(("excitation", {
        "none": "none given",
        "force": f"force {excitation.force_n:.5g} N (0-to-peak)",
        "unbalance": f"rotating unbalance {excitation.unbalance_g_mm:.5g} g·mm",
        "balance_grade": f"balance grade G {excitation.balance_grade_mm_s:g} mm/s, "
                         f"rotor {excitation.rotor_mass_kg:.5g} kg (ISO 21940-11)",
    }[excitation.kind]))
    limits = design.limits
    rows += [("limit: static deflection", f"{limits.max_static_deflection_mm:g} mm"),
             ("limit: load spread", f"{limits.max_load_spread_percent:g} % of the mean"),
             ("limit: passage amplification", f"{limits.max_passage_amplification:g}×")]
    return tuple(rows)


#: Labels of :func:`core.summary.summary_rows` that describe the operating point.
_OPERATING_LABELS = ("operating speed", "natural frequency", "frequency ratio ω/ωn")


def _mount_table(values: dict) -> Table:
    loads = values["load_per_mount_n"]
    forces = values.get("transmitted_force_per_mount_n")
    headers = ["Mount", "Static load (N)", "Stiffness (N/mm)", "Damping (N·s/m)", "Static deflection (mm)"]
    if forces is not None:
        headers.append("Force into floor at speed (N)")
    rows = []
    for index, load in enumerate(loads):
        row = [str(index + 1), _g(load, 5), _g(values["stiffness_per_mount_n_per_m"][index] * 1e-3),
               _g(values["damping_per_mount_n_s_per_m"][index]), _g(values["static_deflection_mm"])]
        if forces is not None:
            row.append(_g(forces[index]))
        rows.append(tuple(row))
    note = ("Stiffness is the dynamic value at speed; every mount deflects the same under its load, "
            f"so the machine sits level. Static stiffness, all mounts: "
            f"{values['static_stiffness_total_n_per_m'] * 1e-3:.5g} N/mm.")
    if values["damping_is_equivalent_viscous"]:
        note += " Damping is the viscous equivalent of the loss factor at operating speed."
    return Table(tuple(headers), tuple(rows), note=note, key="Mount values")


def _duty_table(values: dict) -> Table | None:
    if not values["duty_points"]:
        return None
    rows = tuple((f"{point['speed_rpm']:.6g}", _g(point["frequency_ratio"]), _g(point["transmissibility"]),
                  _g(point["isolation_percent"]), _g(point["phase_deg"])) for point in values["duty_points"])
    return Table(("Duty speed (r/min)", "ω/ωn", "Transmissibility", "Isolation (%)", "Phase (°)"), rows,
                 title="Duty speeds")


def _passage_blocks(project: Project, values: dict) -> list[Block]:
    study = project.studies.passage
    rows = [("run-up time to the lowest speed", f"{study.runup_s:g} s"),
            ("coast-down time to rest", f"{study.rundown_s:g} s")]
    for word, prefix in (("start-up", "startup"), ("shutdown", "shutdown")):
        rows.append((f"{word}: peak motion",
                     f"{_g(values[f'{prefix}_amplification'])}× the steady amplitude at speed, "
                     f"at {values[f'{prefix}_peak_speed_rpm']:.4g} r/min"))
        rows.append((f"{word}: peak force into floor",
                     f"{_g(values[f'{prefix}_force_amplification'])}× the steady force at speed"))
        if values[f"{prefix}_peak_displacement_mm"] is not None:
            rows.append((f"{word}: peak displacement",
                         f"{_g(values[f'{prefix}_peak_displacement_mm'])} mm (0-to-peak)"))
            rows.append((f"{word}: peak force total", f"{_g(values[f'{prefix}_peak_force_n'])} N (0-to-peak)"))
    caption = ("Envelope of the response while the speed ramps (solid), steady state at each speed (dashed), "
               "peak (dot).")
    if values["startup_peak_displacement_mm"] is None:
        caption += " No excitation is given: amplitudes are drawn for a nominal unbalance; the ratios hold."
    return [Heading("Passage through resonance"), Rows(tuple(rows), key="Passage results"),
            Figure("passage", "Run-up (left) and coast-down (right)", 95.0, caption)]


def _rigid_body_blocks(project: Project, values: dict) -> list[Block]:
    from core.rigid_body import COORDINATES

    study = project.studies.rigid_body
    rows = [("centre of gravity", "(" + ", ".join(f"{v:g}" for v in study.cg_m) + ") m"),
            ("inertia", "estimated from a uniform box " + " × ".join(f"{v:g}" for v in study.box_m) + " m"
             if values["rigid_body_inertia_is_estimate"] else "given in the project"),
            ("lateral / vertical mount stiffness", f"{study.lateral_stiffness_ratio:g}"),
            ("mount loads from the layout", values_text(values["rigid_body_mount_loads_n"], digits=5) + " N")]
    if "rigid_body_transmitted_force_n" in values:
        rows.append(("force per mount at speed (rotating unbalance)",
                     values_text(values["rigid_body_transmitted_force_n"]) + " N (0-to-peak)"))
    modes = tuple(
        (str(index + 1), _g(frequency), values["rigid_body_mode_dominant"][index],
         *(f"{100.0 * share + 0.0:.1f}" for share in values["rigid_body_energy_share"][index]))
        for index, frequency in enumerate(values["rigid_body_frequencies_hz"]))
    table = Table(("Mode", "Frequency (Hz)", "Main motion", *(f"{name} (%)" for name in COORDINATES)), modes,
                  title="Rigid-body modes (kinetic-energy share per coordinate)",
                  note=f"Running speed {values['speed_rpm'] / 60.0:.4g} Hz"
                       + ("" if values["speed_max_rpm"] == values["speed_rpm"]
                          else f" to {values['speed_max_rpm'] / 60.0:.4g} Hz") + ".")
    caption = "Mounts drawn larger for larger loads; a downward triangle marks a mount pulled upward; + the CG."
    return [Heading("Machine as a rigid body on its mounts"), Rows(tuple(rows), key="Rigid-body inputs and loads"),
            table, Figure("rigid_body", "Mount layout: plan and side", 72.0, caption)]


def _floor_blocks(values: dict) -> list[Block]:
    verdict = (f"meets {values['criterion']}: worst margin {values['criterion_worst_margin_db']:.4g} dB below "
               f"the limit, in the {values['criterion_worst_band_hz']:g} Hz band") if values["criterion_pass"] else (
               f"exceeds {values['criterion']} by {-values['criterion_worst_margin_db']:.4g} dB "
               f"in the {values['criterion_worst_band_hz']:g} Hz band")
    rows = [("criterion", values["criterion"]), ("verdict", verdict)]
    if values["max_natural_frequency_for_criterion_hz"] is not None:
        rows.append(("highest natural frequency that meets it",
                     f"{_g(values['max_natural_frequency_for_criterion_hz'])} Hz (static deflection "
                     f"{_g(values['max_natural_frequency_static_deflection_mm'])} mm)"))
    if values.get("criterion_note"):
        rows.append(("note", values["criterion_note"]))
    bands = tuple((f"{band:g}", _g(floor, 3), _g(predicted, 3), _g(limit, 3), f"{margin:.1f}", _g(stroke * 1e3, 3))
                  for band, floor, predicted, limit, margin, stroke in zip(
                      values["floor_band_hz"], values["floor_velocity_um_s"], values["predicted_velocity_um_s"],
                      values["criterion_limit_um_s"], values["criterion_margin_db"], values["mount_stroke_rms_mm"]))
    table = Table(("Band (Hz)", "Floor (µm/s RMS)", "Equipment (µm/s RMS)", "Limit (µm/s RMS)", "Margin (dB)",
                   "Mount stroke (µm RMS)"), bands, title="One-third-octave bands",
                  note="Margin = 20 log10(limit / equipment velocity); positive is below the limit.")
    caption = ("Floor velocity (dashed), predicted equipment velocity on the mounts (solid), criterion (dash-dot), "
               "worst band (diamond).")
    return [Heading("Floor vibration against a criterion"), Rows(tuple(rows), key="Criterion check"),
            Figure("floor", "One-third-octave velocity spectra", 88.0, caption), table]


def _two_stage_blocks(project: Project, values: dict) -> list[Block]:
    study = project.studies.two_stage
    low, high = values["two_stage_frequencies_hz"]
    rows = (("intermediate mass", f"{study.block_mass_kg:.6g} kg"),
            ("lower stage natural frequency (alone)", f"{study.lower_natural_frequency_hz:.4g} Hz"),
            ("lower stage damping ratio", f"{study.lower_damping_ratio:.4g}"),
            ("natural frequencies of the pair", f"{_g(low)} Hz and {_g(high)} Hz"),
            ("transmissibility at speed, two stages", _g(values["two_stage_transmissibility"])),
            ("transmissibility at speed, single stage", _g(values["single_stage_transmissibility"])),
            ("gain of the second stage", f"{_g(values['two_stage_gain_db'])} dB"))
    return [Heading("Two-stage isolation"), Rows(rows, key="Two-stage results")]


def sheet_content(project: Project, values: dict, source_name: str | None = None,
                  date: datetime.date | None = None, version: str | None = None) -> Sheet:
    """The review sheet of a project as text blocks.

    Parameters
    ----------
    project : Project
    values : dict
        ``core.evaluate.evaluate_project(project)``.
    source_name : str or None
        File name of the project ("not saved" when None).
    date : datetime.date, optional
        Date printed (today when omitted).
    version : str, optional
        Program version printed (:func:`program_version` when omitted).
    """
    date = date or datetime.date.today()
    kind = ("machine — it excites the structure it stands on" if project.kind == "machine"
            else "equipment — the floor moves, the equipment must stay still")
    title_rows = (("date", date.isoformat()), ("program", f"Mountsmith {version or program_version()}"),
                  ("project file", source_name or "not saved"), ("project kind", kind),
                  ("units", "SI; amplitudes 0-to-peak unless marked RMS"))
    blocks: list[Block] = []
    if project.notes.strip():
        blocks.append(Paragraphs((_clipped(project.notes.strip(), MAX_NOTES_CHARS),), title="Notes"))
    blocks += [Heading("Inputs"), Rows(_input_rows(project), key="Design inputs", columns=2)]

    rows = summary_rows(values)
    damping = project.design.damping
    symbol = "ζ" if damping.model == "viscous" else "η"
    operating = [row for row in rows if row[0] in _OPERATING_LABELS]
    operating.append(("damping", f"{symbol} = {damping.value:.4g}"))
    blocks += [Heading("Operating point"), Rows(tuple(operating), key="Operating point", columns=2)]
    blocks += [Heading("Values per mount (catalog-neutral)"), _mount_table(values)]
    blocks += [Heading("Results at the operating point"),
               Rows(tuple(row for row in rows if row[0] not in _OPERATING_LABELS), key="Results")]
    duty = _duty_table(values)
    if duty is not None:
        blocks.append(duty)
    blocks += [Heading("Warnings"),
               Paragraphs(tuple(values["warnings"]) or ("No warnings for this design.",), key="Design warnings",
                          tone="warning" if values["warnings"] else "plain")]
    low, high = project.design.speed_range_rpm
    caption = (f"Design curve {damping.label} (bold), reference damping (faint), "
               + ("operating points at the lowest and highest speed (orange) with the speed range between "
                  "(orange band), " if high > low else "operating point (orange), ")
               + ("duty speeds (open diamonds), " if project.design.duty_speeds_rpm else "")
               + f"isolation above ω/ωn = √2 (shaded), target {project.design.isolation_percent:g} % (dash-dot).")
    blocks += [Heading("Transmissibility"),
               Figure("transmissibility", "Transmissibility magnitude and phase", 120.0, caption)]
    studies = project.studies
    if studies.passage is not None:
        blocks += _passage_blocks(project, values)
    if studies.rigid_body is not None:
        blocks += _rigid_body_blocks(project, values)
    if studies.floor is not None:
        blocks += _floor_blocks(values)
    if studies.two_stage is not None:
        blocks += _two_stage_blocks(project, values)
    blocks += [Heading(SAFETY_TITLE), Paragraphs(SAFETY_NOTES, tone="caution", key="Safety notes in full")]
    return Sheet(title=_clipped(project.name, MAX_NAME_CHARS) or "Untitled design", title_rows=title_rows,
                 blocks=tuple(blocks))


# ------------------------------------------------------------------ rendering (Qt)
def _qt():
    """PySide6 first, then pyqtgraph binds to it."""
    os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
    from PySide6 import QtCore, QtGui, QtWidgets
    return QtCore, QtGui, QtWidgets


def _points(value: float) -> int:
    """A font size in points as a pixel size in page units (0.1 mm)."""
    return max(1, round(value * 25.4 / 72.0 * 10.0))


#: Font sizes (points) of the sheet.
FONT_POINTS = {"title": 16.0, "heading": 11.5, "subheading": 9.5, "body": 9.0, "table": 8.5, "small": 8.0,
               "footer": 7.5}


@dataclass
class _Piece:
    """A unit the paginator places whole: a height and a painter callback at (x, y)."""

    height: float
    draw: Callable
    keep_with_next: bool = False
    header: "_Piece | None" = None
    gap_after: float = 0.0
    kind: str = ""


class _FigureSource:
    """The app's views laid out at fixed pixel sizes, ready to draw into a page rectangle."""

    def __init__(self, project: Project, sheet: Sheet):
        from core.design_model import Evaluation
        from core.synthesis import synthesize

        self.project = project
        self.result = synthesize(project.design)
        self.evaluation = Evaluation(self.result, None)
        self._widgets = []      # top-level widgets to close
        self.views: dict[str, list] = {}
        for block in sheet.blocks:
            if isinstance(block, Figure) and block.kind not in self.views:
                self.views[block.kind] = getattr(self, f"_build_{block.kind}")(block.height_mm)
        _, _, QtWidgets = _qt()
        QtWidgets.QApplication.processEvents()

    def _place(self, widget, width_mm: float, height_mm: float):
        """Lay a widget out alone at the pixel size of a page rectangle, without a window on screen."""
        QtCore, _, _ = _qt()
        widget.setParent(None)
        widget.setAttribute(QtCore.Qt.WidgetAttribute.WA_DontShowOnScreen, True)
        widget.resize(round(width_mm * FIGURE_PX_PER_MM), round(height_mm * FIGURE_PX_PER_MM))
        widget.show()
        self._widgets.append(widget)
        return widget

    @staticmethod
    def _fit(*views) -> None:
        """Enlarge laid-out plots (same aspect, one factor for all of a figure) until each scene layout
        gets at least its minimum size.

        The page rectangle stays the same, so the plots' text comes out a
        little smaller instead of being cut off at the right or bottom.
        """
        QtCore, _, QtWidgets = _qt()
        QtWidgets.QApplication.processEvents()
        factor = 1.0
        for view in views:
            need = view.centralWidget.effectiveSizeHint(QtCore.Qt.SizeHint.MinimumSize)
            factor = max(factor, need.width() / max(view.width(), 1), need.height() / max(view.height(), 1))
        if factor > 1.0:
            for view in views:
                view.resize(math.ceil(view.width() * factor) + 2, math.ceil(view.height() * factor) + 2)
            QtWidgets.QApplication.processEvents()

    def _build_transmissibility(self, height_mm: float):
        from app.plots import TransmissibilityPlots
        plots = self._place(TransmissibilityPlots(interactive=False), CONTENT_WIDTH / 10.0, height_mm)
        plots.show_design(self.project.design, self.evaluation, self.project.view)
        self._fit(plots)
        return [plots]

    def _build_passage(self, height_mm: float):
        from app.passage_view import PassageView
        from app.style import PALETTE
        from core.studies import simulate_passages
        views = []
        for run in simulate_passages(self.project.design, self.result, self.project.studies.passage):
            view = PassageView()
            self._keep(view)
            plots = self._place(view.plots, (CONTENT_WIDTH / 10.0 - 4.0) / 2.0, height_mm)
            view.show_result(run)
            # A short title, so the plot keeps its width: the sheet's rows carry the numbers.
            view.displacement_plot.setTitle("Run-up from rest" if run.direction == "up" else "Coast-down to rest",
                                            color=PALETTE["foreground"])
            legend = view.displacement_plot.legend
            if legend is not None:      # it would cover the peak; the caption names the lines
                legend.setVisible(False)
            views.append(plots)
        self._fit(*views)
        return views

    def _build_rigid_body(self, height_mm: float):
        from app.rigid_body_view import RigidBodyView
        from core import rigid_body
        from core.studies import build_rigid_body
        body, mounts = build_rigid_body(self.project.design, self.result, self.project.studies.rigid_body)
        view = RigidBodyView("SI")
        self._keep(view)
        plan = self._place(view.plan_plot, (CONTENT_WIDTH / 10.0 - 4.0) / 2.0, height_mm)
        side = self._place(view.side_plot, (CONTENT_WIDTH / 10.0 - 4.0) / 2.0, height_mm)
        view.show_result(body, mounts, rigid_body.modes(body, mounts), rigid_body.static_loads(body, mounts))
        for plot in (plan, side):
            self._make_room_for_labels(plot)
        self._fit(plan, side)
        return [plan, side]

    @staticmethod
    def _make_room_for_labels(plot) -> None:
        """Widen the view to the right so mount labels beside the rightmost mounts stay inside the plot.

        The legend is hidden: the caption under the figure explains the markers.
        """
        item = plot.getPlotItem()
        if item.legend is not None:
            item.legend.setVisible(False)
        (x0, x1), (y0, y1) = item.getViewBox().viewRange()
        item.getViewBox().setRange(xRange=(x0, x1 + 0.4 * (x1 - x0)), yRange=(y0, y1), padding=0.0)

    def _build_floor(self, height_mm: float):
        from app.floor_view import FloorView
        from core import floor
        design, study = self.project.design, self.project.studies.floor
        damping = ({"damping_ratio": design.damping.value} if design.damping.model == "viscous"
                   else {"loss_factor": design.damping.value})
        check = floor.check_criterion(study.spectrum(), study.criterion, self.result.natural_frequency_hz, **damping)
        view = FloorView()
        self._keep(view)
        plot = self._place(view.plot_widget, CONTENT_WIDTH / 10.0, height_mm)
        view.show_result(check)
        self._fit(plot)
        # Headroom (log10 units) so a criterion line or a floor peak at the top is not drawn on the frame.
        box = plot.getPlotItem().getViewBox()
        (x0, x1), (y0, y1) = box.viewRange()
        box.setRange(xRange=(x0, x1), yRange=(y0 - 0.1, y1 + 0.25), padding=0.0)
        return [plot]

    def _keep(self, widget) -> None:
        """A parent view whose plots are drawn: kept alive, never shown."""
        self._widgets.append(widget)

    def draw(self, kind: str, painter, rect) -> None:
        """Draw the views of a figure side by side into ``rect`` (page units), as vectors where Qt allows."""
        QtCore, _, _ = _qt()
        views = self.views[kind]
        gap = 40.0 if len(views) > 1 else 0.0
        width = (rect.width() - gap * (len(views) - 1)) / len(views)
        for index, view in enumerate(views):
            target = QtCore.QRectF(rect.left() + index * (width + gap), rect.top(), width, rect.height())
            source = QtCore.QRectF(0.0, 0.0, view.width(), view.height())
            view.scene().render(painter, target, source, QtCore.Qt.AspectRatioMode.IgnoreAspectRatio)

    def close(self) -> None:
        for widget in reversed(self._widgets):
            widget.close()
            widget.deleteLater()
        self._widgets.clear()


class SheetRenderer:
    """Lays a :class:`Sheet` out on A4 pages and paints them.

    ``pages`` holds, per page, the placed pieces as ``(piece, y)`` in page units
    (0.1 mm); every piece lies between :data:`CONTENT_TOP` and :data:`CONTENT_BOTTOM`.
    Call :meth:`close` when done (the plot widgets are released).
    """

    def __init__(self, sheet: Sheet, project: Project):
        self.sheet = sheet
        self.figures = _FigureSource(project, sheet)
        self._fonts = {}
        self.pages = self._paginate(self._pieces())

    # ---- fonts and text
    def font(self, role: str, bold: bool = False, italic: bool = False):
        key = (role, bold, italic)
        if key not in self._fonts:
            _, QtGui, _ = _qt()
            font = QtGui.QFont()
            font.setPixelSize(_points(FONT_POINTS[role]))
            font.setBold(bold)
            font.setItalic(italic)
            font.setHintingPreference(QtGui.QFont.HintingPreference.PreferNoHinting)
            self._fonts[key] = font
        return self._fonts[key]

    @staticmethod
    def _flags(align_right: bool = False):
        QtCore, _, _ = _qt()
        align = QtCore.Qt.AlignmentFlag
        return int((align.AlignRight if align_right else align.AlignLeft) | align.AlignTop) \
            | int(QtCore.Qt.TextFlag.TextWordWrap) | int(QtCore.Qt.TextFlag.TextDontClip)

    def text_height(self, font, width: float, text: str) -> float:
        """Height of wrapped text; measured a little narrower than drawn, so the drawing never needs more lines."""
        QtCore, QtGui, _ = _qt()
        metrics = QtGui.QFontMetricsF(font)
        box = metrics.boundingRect(QtCore.QRectF(0, 0, width * 0.97, 1e7), self._flags(), _typeset(text))
        return max(box.height(), metrics.height())

    def text_width(self, font, text: str) -> float:
        _, QtGui, _ = _qt()
        return QtGui.QFontMetricsF(font).horizontalAdvance(_typeset(text))

    def _draw_text(self, painter, font, colour: str, x, y, width, height, text, align_right=False):
        QtCore, QtGui, _ = _qt()
        text = _typeset(text)
        painter.setFont(font)
        painter.setPen(QtGui.QColor(colour))
        painter.drawText(QtCore.QRectF(x, y, width, height + 20), self._flags(align_right), text)

    # ---- pieces
    def _pieces(self) -> list[_Piece]:
        pieces = [self._title_piece()]
        builders = {Heading: self._heading_pieces, Rows: self._rows_pieces, Table: self._table_pieces,
                    Paragraphs: self._paragraph_pieces, Figure: self._figure_pieces}
        for block in self.sheet.blocks:
            pieces += builders[type(block)](block)
        return pieces

    def _title_piece(self) -> _Piece:
        from app.style import PALETTE
        title_font = self.font("title", bold=True)
        title_height = self.text_height(title_font, CONTENT_WIDTH, self.sheet.title)
        kicker = "Mountsmith design review sheet"
        kicker_height = self.text_height(self.font("small"), CONTENT_WIDTH, kicker)
        rows = self._rows_pieces(Rows(self.sheet.title_rows, columns=1), label_share=0.2)
        rows_height = sum(piece.height for piece in rows)
        height = kicker_height + 10 + title_height + 25 + rows_height + 20

        def draw(painter, x, y):
            self._draw_text(painter, self.font("small"), PALETTE["design"], x, y, CONTENT_WIDTH, kicker_height, kicker)
            top = y + kicker_height + 10
            self._draw_text(painter, title_font, PALETTE["foreground"], x, top, CONTENT_WIDTH, title_height,
                            self.sheet.title)
            top += title_height + 12
            self._rule(painter, x, top, CONTENT_WIDTH, PALETTE["design"], 6)
            top += 13
            for piece in rows:
                piece.draw(painter, x, top)
                top += piece.height
            self._rule(painter, x, top + 8, CONTENT_WIDTH, PALETTE["reference"], 3)
        return _Piece(height, draw, gap_after=20, kind="title")

    def _rule(self, painter, x, y, width, colour, thickness):
        QtCore, QtGui, _ = _qt()
        painter.fillRect(QtCore.QRectF(x, y, width, thickness), QtGui.QColor(colour))

    def _heading_pieces(self, block: Heading) -> list[_Piece]:
        from app.style import PALETTE
        font = self.font("heading", bold=True)
        text_height = self.text_height(font, CONTENT_WIDTH, block.text)

        def draw(painter, x, y):
            self._draw_text(painter, font, PALETTE["design"], x, y + 20, CONTENT_WIDTH, text_height, block.text)
            self._rule(painter, x, y + 20 + text_height + 4, CONTENT_WIDTH, PALETTE["design"], 3)
        return [_Piece(20 + text_height + 18, draw, keep_with_next=True, kind="heading")]

    def _subtitle_piece(self, text: str) -> _Piece:
        from app.style import PALETTE
        font = self.font("subheading", bold=True)
        height = self.text_height(font, CONTENT_WIDTH, text)

        def draw(painter, x, y):
            self._draw_text(painter, font, PALETTE["foreground"], x, y, CONTENT_WIDTH, height, text)
        return _Piece(height + 8, draw, keep_with_next=True, kind="subtitle")

    def _rows_pieces(self, block: Rows, label_share: float | None = None) -> list[_Piece]:
        from app.style import PALETTE
        columns = max(1, block.columns)
        gap = 60.0
        column_width = (CONTENT_WIDTH - gap * (columns - 1)) / columns
        share = label_share if label_share is not None else (0.36 if columns == 1 else 0.42)
        label_width = column_width * share
        value_width = column_width - label_width - 12
        label_font, value_font = self.font("body"), self.font("body")
        per_column = math.ceil(len(block.rows) / columns)
        pieces = []
        for line in range(per_column):
            cells = [block.rows[column * per_column + line] for column in range(columns)
                     if column * per_column + line < len(block.rows)]
            height = max(max(self.text_height(label_font, label_width, label),
                             self.text_height(value_font, value_width, value)) for label, value in cells) + 9

            def draw(painter, x, y, cells=cells, height=height):
                for column, (label, value) in enumerate(cells):
                    left = x + column * (column_width + gap)
                    self._draw_text(painter, label_font, "#555555", left, y + 3, label_width, height, label)
                    self._draw_text(painter, value_font, PALETTE["foreground"], left + label_width + 12, y + 3,
                                    value_width, height, value)
            pieces.append(_Piece(height, draw, kind="row"))
        if pieces:
            pieces[-1].gap_after = 15
        return pieces

    def _table_pieces(self, block: Table) -> list[_Piece]:
        from app.style import PALETTE
        QtCore, QtGui, _ = _qt()
        header_font, cell_font = self.font("table", bold=True), self.font("table")
        padding = 14.0
        count = len(block.headers)
        natural = []
        for column in range(count):
            cells = [row[column] for row in block.rows]
            widest_cell = max([self.text_width(cell_font, cell) for cell in cells] or [0.0])
            widest_word = max(self.text_width(header_font, word) for word in block.headers[column].split())
            natural.append(max(widest_cell, widest_word) + 2 * padding)
        spare = CONTENT_WIDTH - sum(natural)
        if spare >= 0:
            widths = [width + spare / count for width in natural]
        else:
            widths = [width * CONTENT_WIDTH / sum(natural) for width in natural]
        numeric = [column > 0 and all(_looks_numeric(row[column]) for row in block.rows) for column in range(count)]
        lefts = [sum(widths[:column]) for column in range(count)]
        header_height = max(self.text_height(header_font, widths[c] - 2 * padding, block.headers[c])
                            for c in range(count)) + 2 * padding * 0.7

        def draw_header(painter, x, y):
            painter.fillRect(QtCore.QRectF(x, y, CONTENT_WIDTH, header_height), QtGui.QColor("#e6ebf2"))
            for c in range(count):
                self._draw_text(painter, header_font, PALETTE["foreground"], x + lefts[c] + padding,
                                y + padding * 0.7, widths[c] - 2 * padding, header_height, block.headers[c],
                                align_right=numeric[c])
            self._rule(painter, x, y + header_height - 3, CONTENT_WIDTH, PALETTE["design"], 3)
        header = _Piece(header_height, draw_header, keep_with_next=True, kind="table-header")
        pieces = [self._subtitle_piece(block.title)] if block.title else []
        pieces.append(header)
        for index, row in enumerate(block.rows):
            height = max(self.text_height(cell_font, widths[c] - 2 * padding, row[c]) for c in range(count)) \
                + padding * 0.9

            def draw_row(painter, x, y, row=row, height=height, shaded=index % 2 == 1):
                if shaded:
                    painter.fillRect(QtCore.QRectF(x, y, CONTENT_WIDTH, height), QtGui.QColor("#f4f6f9"))
                for c in range(count):
                    self._draw_text(painter, cell_font, PALETTE["foreground"], x + lefts[c] + padding,
                                    y + padding * 0.45, widths[c] - 2 * padding, height, row[c],
                                    align_right=numeric[c])
            pieces.append(_Piece(height, draw_row, header=header, kind="table-row"))
        pieces[-1].gap_after = 10
        if block.note:
            pieces[-1].keep_with_next = True
            pieces += self._paragraph_pieces(Paragraphs((block.note,), tone="note"))
        else:
            pieces[-1].gap_after = 20
        return pieces

    def _paragraph_pieces(self, block: Paragraphs) -> list[_Piece]:
        from app.style import PALETTE
        colour = {"plain": PALETTE["foreground"], "warning": PALETTE["error_text"],
                  "caution": PALETTE["caution_text"], "note": "#444444"}[block.tone]
        font = self.font("small", italic=True) if block.tone == "note" else self.font("body")
        bullet = "• " if block.tone == "warning" else ""
        indent = 30.0 if bullet else 0.0
        pieces = [self._subtitle_piece(block.title)] if block.title else []
        for text in block.paragraphs:
            height = self.text_height(font, CONTENT_WIDTH - indent, text)

            def draw(painter, x, y, text=text, height=height):
                if bullet:
                    self._draw_text(painter, font, colour, x, y, indent, height, bullet.strip())
                self._draw_text(painter, font, colour, x + indent, y, CONTENT_WIDTH - indent, height, text)
            pieces.append(_Piece(height + 12, draw, gap_after=4, kind="paragraph",
                                 keep_with_next=block.tone == "caution"))
        pieces[-1].keep_with_next = False    # the safety notes stay together; nothing else binds
        pieces[-1].gap_after = 20
        return pieces

    def _figure_pieces(self, block: Figure) -> list[_Piece]:
        from app.style import PALETTE
        QtCore, _, _ = _qt()
        title_font, caption_font = self.font("subheading", bold=True), self.font("small", italic=True)
        title_height = self.text_height(title_font, CONTENT_WIDTH, block.title)
        caption_height = self.text_height(caption_font, CONTENT_WIDTH, block.caption) if block.caption else 0.0
        plot_height = block.height_mm * 10.0
        height = title_height + 8 + plot_height + 8 + caption_height

        def draw(painter, x, y):
            self._draw_text(painter, title_font, PALETTE["foreground"], x, y, CONTENT_WIDTH, title_height, block.title)
            top = y + title_height + 8
            painter.save()
            painter.setClipRect(QtCore.QRectF(x, top, CONTENT_WIDTH, plot_height))
            self.figures.draw(block.kind, painter, QtCore.QRectF(x, top, CONTENT_WIDTH, plot_height))
            painter.restore()
            if block.caption:
                self._draw_text(painter, caption_font, "#444444", x, top + plot_height + 8, CONTENT_WIDTH,
                                caption_height, block.caption)
        return [_Piece(height, draw, gap_after=25, kind="figure")]

    # ---- pages
    @staticmethod
    def _paginate(pieces: list[_Piece]) -> list[list[tuple[_Piece, float]]]:
        pages: list[list[tuple[_Piece, float]]] = [[]]
        y = float(CONTENT_TOP)
        for index, piece in enumerate(pieces):
            need, follower = piece.height, index
            while pieces[follower].keep_with_next and follower + 1 < len(pieces):
                follower += 1
                need += pieces[follower - 1].gap_after + pieces[follower].height
            if y + need > CONTENT_BOTTOM and pages[-1] and (y + piece.height > CONTENT_BOTTOM or need <=
                                                              CONTENT_BOTTOM - CONTENT_TOP):
                pages.append([])
                y = float(CONTENT_TOP)
                if piece.header is not None:
                    pages[-1].append((piece.header, y))
                    y += piece.header.height
            pages[-1].append((piece, y))
            y += piece.height + piece.gap_after
        return pages

    @property
    def page_count(self) -> int:
        return len(self.pages)

    def paint_page(self, painter, index: int, width_px: float, height_px: float) -> None:
        """Paint page ``index`` onto a device of ``width_px`` x ``height_px`` (the whole A4 page)."""
        from app.style import PALETTE
        QtCore, QtGui, _ = _qt()
        painter.save()
        painter.setRenderHint(QtGui.QPainter.RenderHint.Antialiasing, True)
        painter.setRenderHint(QtGui.QPainter.RenderHint.TextAntialiasing, True)
        painter.scale(width_px / PAGE_WIDTH, height_px / PAGE_HEIGHT)
        painter.fillRect(QtCore.QRectF(0, 0, PAGE_WIDTH, PAGE_HEIGHT), QtGui.QColor("white"))
        if index > 0:
            small = self.font("small")
            self._draw_text(painter, small, "#555555", MARGIN_LEFT, 80, CONTENT_WIDTH * 0.8, 40,
                            f"Mountsmith design review — {self.sheet.title}"[:120])
            self._rule(painter, MARGIN_LEFT, 122, CONTENT_WIDTH, PALETTE["reference"], 2)
        for piece, y in self.pages[index]:
            piece.draw(painter, MARGIN_LEFT, y)
        self._rule(painter, MARGIN_LEFT, FOOTER_TOP - 10, CONTENT_WIDTH, PALETTE["caution_text"], 3)
        footer = self.font("footer")
        page_text = f"page {index + 1} of {self.page_count}"
        page_width = self.text_width(footer, page_text) + 10
        self._draw_text(painter, footer, PALETTE["caution_text"], MARGIN_LEFT, FOOTER_TOP,
                        CONTENT_WIDTH - page_width - 40, 80, self.sheet.footer)
        self._draw_text(painter, footer, "#555555", MARGIN_LEFT + CONTENT_WIDTH - page_width, FOOTER_TOP,
                        page_width, 40, page_text, align_right=True)
        painter.restore()

    def footer_height(self) -> float:
        """Height of the wrapped caution line at the page foot (page units)."""
        footer = self.font("footer")
        page_width = self.text_width(footer, f"page {self.page_count} of {self.page_count}") + 10
        return self.text_height(footer, CONTENT_WIDTH - page_width - 40, self.sheet.footer)

    def page_image(self, index: int, dpi: float = DEFAULT_DPI):
        """Page ``index`` as a QImage of A4 at ``dpi`` (DPI written into the image)."""
        _, QtGui, _ = _qt()
        width, height = round(210.0 / 25.4 * dpi), round(297.0 / 25.4 * dpi)
        image = QtGui.QImage(width, height, QtGui.QImage.Format.Format_ARGB32)
        image.fill(QtGui.QColor("white"))
        _set_dpi(image, _scene_dpi())   # while painting: see _scene_dpi
        painter = QtGui.QPainter(image)
        try:
            self.paint_page(painter, index, width, height)
        finally:
            painter.end()
        _set_dpi(image, dpi)
        return image

    def write_pdf(self, path: str | os.PathLike, title: str = "") -> None:
        """Write every page to a PDF file (A4 portrait, no printer margins: the layout has its own)."""
        QtCore, QtGui, _ = _qt()
        writer = QtGui.QPdfWriter(str(path))
        writer.setResolution(_scene_dpi())
        writer.setPageSize(QtGui.QPageSize(QtGui.QPageSize.PageSizeId.A4))
        writer.setPageOrientation(QtGui.QPageLayout.Orientation.Portrait)
        writer.setPageMargins(QtCore.QMarginsF(0, 0, 0, 0), QtGui.QPageLayout.Unit.Millimeter)
        writer.setTitle(title or f"Design review — {self.sheet.title}")
        writer.setCreator("Mountsmith")
        painter = QtGui.QPainter()
        if not painter.begin(writer):
            raise MountsmithError(f"{path}: was not written (the PDF could not be started)")
        try:
            for index in range(self.page_count):
                if index:
                    writer.newPage()
                self.paint_page(painter, index, writer.width(), writer.height())
        finally:
            painter.end()

    def close(self) -> None:
        self.figures.close()


_NUMBER_BEFORE_UNIT = re.compile(r"(?<=\d) (?=[A-Za-zµ%°×])")


def _typeset(text: str) -> str:
    """Keep "ζ = 0.06", "2.2 m", "N/mm" and "N·s/m" on one line.

    No-break spaces around "=" and between a number and its unit, a word joiner after "/".
    """
    text = _NUMBER_BEFORE_UNIT.sub("\u00a0", text.replace(" = ", "\u00a0=\u00a0"))
    return text.replace("/", "/\u2060")


def _scene_dpi() -> int:
    """Logical DPI the plot scenes were laid out and recorded at (the screen's).

    pyqtgraph records axes and curves in QPictures, which Qt scales by the
    target device's DPI over the recording DPI when played back; painting into
    a device of the same logical DPI keeps plots and their text where the
    widget laid them out. Our own text uses pixel-sized fonts in page units,
    which do not depend on the DPI.
    """
    _, QtGui, _ = _qt()
    return QtGui.QPicture().logicalDpiX()


def _set_dpi(image, dpi: float) -> None:
    dots_per_meter = round(dpi / 0.0254)
    image.setDotsPerMeterX(dots_per_meter)
    image.setDotsPerMeterY(dots_per_meter)


def _looks_numeric(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


# ------------------------------------------------------------------ files
def page_png_paths(pdf_path: str | os.PathLike, count: int) -> list[Path]:
    """PNG page files beside a PDF: ``review.pdf`` → ``review_p1.png``, ``review_p2.png``, ..."""
    pdf_path = Path(pdf_path)
    return [pdf_path.with_name(f"{pdf_path.stem}_p{index + 1}.png") for index in range(count)]


class _PdfFile:
    """The sheet's PDF in the shape :func:`app.export.save_image` writes atomically (``save(path, format)``)."""

    def __init__(self, renderer: SheetRenderer):
        self.renderer = renderer

    def save(self, path: str, _format: str) -> bool:
        self.renderer.write_pdf(path)
        return os.path.getsize(path) > 0


def export_review_sheet(project: Project, path: str | os.PathLike, source_name: str | None,
                        png: bool = False, dpi: float = DEFAULT_DPI,
                        date: datetime.date | None = None) -> list[Path]:
    """Write the review sheet of a project as PDF (and PNG pages when ``png``); return the files written.

    Needs a QApplication. Raises :class:`~core.errors.MountsmithError` (a clear
    one-line message) for a design that cannot be evaluated or a file that
    cannot be written; a failed write leaves any previous file unchanged.
    """
    return _write_sheet(project, evaluate_project(project), path, source_name, png, dpi, date)


def _write_sheet(project: Project, values: dict, path, source_name, png: bool, dpi: float, date) -> list[Path]:
    from app.export import save_image

    path = Path(path)
    renderer = SheetRenderer(sheet_content(project, values, source_name, date), project)
    try:
        save_image(_PdfFile(renderer), path)    # temporary file beside it, then replace
        written = [path]
        if png:
            for index, png_path in enumerate(page_png_paths(path, renderer.page_count)):
                save_image(renderer.page_image(index, dpi), png_path)
                written.append(png_path)
    finally:
        renderer.close()
    return written


def report_command(path: str, out: str, png: bool = False) -> int:
    """``mountsmith report FILE --out review.pdf [--png]``: the review sheet without a display.

    Returns 0 on success; a bad project file or an output that cannot be
    written prints one line ``mountsmith: <message>`` to stderr and returns 2.
    """
    from app.export import ensure_headless_platform

    ensure_headless_platform()
    try:
        project = load_project(path)
        values = evaluate_project(project)
    except ProjectFileError as error:
        return _fail(str(error))
    except MountsmithError as error:
        return _fail(f"{path}: {error}")
    _, _, QtWidgets = _qt()
    app = QtWidgets.QApplication.instance() or QtWidgets.QApplication(["mountsmith"])  # noqa: F841 (kept alive)
    try:
        written = _write_sheet(project, values, out, Path(path).name, png, DEFAULT_DPI, None)
    except MountsmithError as error:
        return _fail(str(error))
    pages = len(written) - 1
    print(f"wrote {written[0]}" + (f" and {pages} PNG page(s)" if pages else ""))
    return 0


def _fail(message: str) -> int:
    print(f"mountsmith: {message}", file=sys.stderr)
    return 2

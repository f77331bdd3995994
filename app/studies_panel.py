"""Editors of the studies a project holds (core.studies), and the mount-material picker.

Each editor edits the model only: a change builds a new study, validates it
through the core (``Study.from_dict(study.to_dict())``, so a refusal names the
field and the allowed range), and hands it to :meth:`DesignModel.set_studies`
as one undo step (typing in one field merges into one step). Model -> widget
runs inside :func:`app.design_panel.signals_blocked`, only for values that differ.
"""
from __future__ import annotations

from dataclasses import replace
from typing import Callable

from PySide6 import QtCore, QtWidgets

from app.design_panel import FieldRow, _error_text, message_label, signals_blocked
from app.style import CAUTION_STYLE
from core.design_model import DesignModel
from core.errors import InputError
from core.floor import CRITERIA, flat_floor_spectrum, floor_spectrum, parse_floor_csv
from core.materials import MOUNT_MATERIALS
from core.studies import (
    AXES, FloorStudy, PassageStudy, RigidBodyStudy, TwoStageStudy, default_rigid_body_study)
from core.transmissibility import Damping
from core.units import from_display, parse_number, to_display, unit_symbol

#: Starting floor level of a new floor study: flat 20 µm/s RMS per band (an invented, lively floor,
#: above VC-C so that the mounts have work to do).
DEFAULT_FLOOR_VELOCITY_M_S = 20e-6


def set_study(model: DesignModel, name: str, study, merge_key: str | None = None) -> bool:
    """Put ``study`` (or None) in the project's studies after the core validated it; one undo step."""
    if study is not None:
        study = type(study).from_dict(study.to_dict(), f"studies.{name}")
    return model.set_studies(replace(model.project.studies, **{name: study}), merge_key)


def default_floor_study(criterion: str = "VC-C") -> FloorStudy:
    """A floor study on a flat floor spectrum (1 to 80 Hz, core.floor.flat_floor_spectrum)."""
    spectrum = flat_floor_spectrum(DEFAULT_FLOOR_VELOCITY_M_S)
    return FloorStudy(criterion=criterion, band_hz=tuple(float(v) for v in spectrum.nominal_hz),
                      velocity_m_s=tuple(float(v) for v in spectrum.velocity_m_s))


class StudyField(FieldRow):
    """One number of a study in display units; ``apply(si_value)`` edits the model.

    ``kind`` is a unit kind of :mod:`core.units` (None: a plain number, ``unit`` names it).
    An empty text gives None when ``optional``.
    """

    def __init__(self, name: str, kind: str | None, apply: Callable[[float | None], None], unit: str = "",
                 optional: bool = False, tooltip: str = ""):
        super().__init__(QtWidgets.QLineEdit(), unit)
        self.name = name
        self.kind = kind
        self.unit = unit
        self.apply = apply
        self.optional = optional
        self.show_unit = True          # False: the unit label stays empty (a field of a triplet)
        self.units = "SI"
        self.shown = object()
        self.editor.setObjectName(name)
        self.editor.setToolTip(tooltip)
        self.editor.textEdited.connect(self._edited)

    def parse(self, text: str) -> float | None:
        if self.optional and not text.strip():
            return None
        symbol = unit_symbol(self.kind, self.units) if self.kind else self.unit
        shown = parse_number(text, self.name, f"must be a number{' in ' + symbol if symbol else ''}")
        return float(from_display(shown, self.kind, self.units)) if self.kind else shown

    def _edited(self, text: str) -> None:
        try:
            value = self.parse(text)
            self.shown = value        # keep the text as typed while the value applies
            self.apply(value)
        except InputError as error:
            self.set_error(_error_text(error))
            return
        self.set_error(None)

    def show_value(self, value: float | None, units: str) -> None:
        """Show an SI value (signals blocked) unless the field already shows it."""
        if units != self.units:
            self.units = units
            self.shown = object()
            if self.kind and self.show_unit:
                self.unit_label.setText(unit_symbol(self.kind, units))
        if value == self.shown:
            return
        text = "" if value is None else f"{to_display(value, self.kind, units) if self.kind else value:.6g}"
        with signals_blocked(self.editor):
            self.editor.setText(text)
        self.set_error(None)
        self.shown = value


def _form_group(title: str) -> tuple[QtWidgets.QGroupBox, QtWidgets.QFormLayout]:
    box = QtWidgets.QGroupBox(title)
    form = QtWidgets.QFormLayout(box)
    form.setFieldGrowthPolicy(QtWidgets.QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
    form.setContentsMargins(6, 4, 6, 4)
    form.setVerticalSpacing(3)
    return box, form


def _note(text: str = "") -> QtWidgets.QLabel:
    label = QtWidgets.QLabel(text)
    label.setWordWrap(True)
    return label


class _RowLayout(QtWidgets.QHBoxLayout):
    """A one-line form: ``addRow(label, widget)`` puts the label and the widget side by side."""

    def addRow(self, label, widget=None) -> None:  # noqa: N802  (the QFormLayout name)
        if widget is None:
            label, widget = None, label
        if label is not None:
            self.addWidget(QtWidgets.QLabel(label) if isinstance(label, str) else label)
        if isinstance(widget, QtWidgets.QLayout):
            self.addLayout(widget)
        else:
            self.addWidget(widget)


class StudyEditor(QtWidgets.QWidget):
    """Base of the study editors: an enable box, fields, the core's refusal message.

    ``compact`` lays everything out on one line (an editor above a wide view).
    """

    study_name = ""
    title = ""

    def __init__(self, model: DesignModel, parent=None, compact: bool = False):
        super().__init__(parent)
        self.model = model
        self.units = model.view.units
        self.fields: dict[str, StudyField] = {}
        #: Input widgets outside ``box`` that follow the enable box too.
        self.extra_inputs: list[QtWidgets.QWidget] = []
        self.compact = compact
        outer = QtWidgets.QVBoxLayout(self)
        outer.setContentsMargins(4, 4, 4, 4)
        self.layout_ = _RowLayout() if compact else outer
        if compact:
            outer.addLayout(self.layout_)
        self.enable_check = QtWidgets.QCheckBox(self.title)
        self.enable_check.setObjectName(f"enable_{self.study_name}")
        self.enable_check.toggled.connect(self._enable_toggled)
        self.layout_.addWidget(self.enable_check)
        if compact:
            self.box = QtWidgets.QWidget()
            self.form = _RowLayout(self.box)
            self.form.setContentsMargins(12, 0, 0, 0)
        else:
            self.box, self.form = _form_group("Inputs")
        self.layout_.addWidget(self.box)
        self.message = message_label()
        outer.addWidget(self.message)

    @property
    def study(self):
        return getattr(self.model.project.studies, self.study_name)

    def new_study(self):
        """The study the enable box creates."""
        raise NotImplementedError

    def _enable_toggled(self, checked: bool) -> None:
        self._try(lambda: set_study(self.model, self.study_name, self.new_study() if checked else None))

    def _try(self, action: Callable[[], object]) -> bool:
        """Run an edit; show the core's refusal instead of raising."""
        try:
            action()
        except InputError as error:
            self.message.setText(str(error))
            self.message.setVisible(True)
            self.refresh()
            return False
        self.message.setVisible(False)
        return True

    def add_field(self, key: str, label: str, kind: str | None, change: Callable[[object, float], object],
                  unit: str = "", tooltip: str = "", form: QtWidgets.QFormLayout | None = None,
                  optional: bool = False) -> StudyField:
        """A field whose value ``change(study, value)`` turns into the new study."""
        def apply(value):
            set_study(self.model, self.study_name, change(self.study, value), merge_key=f"study.{key}")
        field = StudyField(key, kind, apply, unit, optional, tooltip)
        (form or self.form).addRow(label, field)
        self.fields[key] = field
        return field

    def add_triplet(self, key: str, label: str, kind: str | None, change: Callable[[object, int, float], object],
                    unit: str = "", tooltip: str = "") -> list[StudyField]:
        """Three fields on one row (x, y, z); ``change(study, index, value)`` gives the new study."""
        row = QtWidgets.QWidget()
        line = QtWidgets.QHBoxLayout(row)
        line.setContentsMargins(0, 0, 0, 0)
        line.setSpacing(3)
        fields = []
        for index, axis in enumerate(AXES):
            def apply(value, i=index, name=f"{key}_{axis}"):
                set_study(self.model, self.study_name, change(self.study, i, value), merge_key=f"study.{name}")
            field = StudyField(f"{key}_{axis}", kind, apply, unit if index == 2 else "",
                               tooltip=f"{tooltip} ({axis})".strip())
            field.editor.setPlaceholderText(axis)
            field.unit_label.setMinimumWidth(0)       # three fields share the width evenly
            field.show_unit = index == 2
            line.addWidget(field, 1)
            self.fields[f"{key}_{axis}"] = field
            fields.append(field)
        self.form.addRow(label, row)
        return fields

    def refresh(self) -> None:
        """Show the model's study (signals blocked)."""
        self.units = self.model.view.units
        study = self.study
        with signals_blocked(self.enable_check):
            self.enable_check.setChecked(study is not None)
        self.box.setEnabled(study is not None)
        for widget in self.extra_inputs:
            widget.setEnabled(study is not None)
        if study is not None:
            self.show_study(study)

    def show_study(self, study) -> None:
        raise NotImplementedError


class PassageEditor(StudyEditor):
    """Run-up and coast-down times, and the design's limit on the passage amplification."""

    study_name = "passage"
    title = "Simulate start and stop"

    def __init__(self, model: DesignModel, parent=None, compact: bool = False):
        super().__init__(model, parent, compact)
        self.add_field("runup", "Run-up time", None, lambda s, v: replace(s, runup_s=v), "s",
                       "From rest to the lowest operating speed")
        self.add_field("rundown", "Coast-down time", None, lambda s, v: replace(s, rundown_s=v), "s",
                       "From the lowest operating speed to rest")
        self.limit_field = StudyField("max_passage_amplification", None, self._limit_edited, "×",
                                      tooltip="Design limit: warn when the motion passing resonance exceeds this "
                                              "many times the steady motion at speed (10, common practice)")
        if compact:
            self.layout_.addSpacing(16)
            self.layout_.addRow("Passage limit (design)", self.limit_field)
        else:
            limits_box, limits_form = _form_group("Limit (design)")
            limits_form.addRow("Largest passage amplification", self.limit_field)
            self.layout_.insertWidget(2, limits_box)
        self.layout_.addStretch(1)
        self.refresh()

    def new_study(self):
        return PassageStudy()

    def _limit_edited(self, value: float) -> None:
        design = self.model.design
        if value is None:
            raise InputError("limits.max_passage_amplification", "must be a number")
        self.model.update_design("study.passage_limit", limits=replace(design.limits, max_passage_amplification=value))

    def refresh(self) -> None:
        super().refresh()
        self.limit_field.show_value(self.model.design.limits.max_passage_amplification, self.units)

    def show_study(self, study: PassageStudy) -> None:
        self.fields["runup"].show_value(study.runup_s, self.units)
        self.fields["rundown"].show_value(study.rundown_s, self.units)


class TwoStageEditor(StudyEditor):
    """Intermediate mass and the lower stage of a two-stage mounting."""

    study_name = "two_stage"
    title = "Two-stage mounting (intermediate mass)"

    def __init__(self, model: DesignModel, parent=None):
        super().__init__(model, parent)
        self.add_field("block_mass", "Intermediate mass", "mass", lambda s, v: replace(s, block_mass_kg=v),
                       tooltip="Inertia block or floating slab between the two sets of mounts")
        self.add_field("lower_fn", "Lower natural frequency", "frequency",
                       lambda s, v: replace(s, lower_natural_frequency_hz=v),
                       tooltip="Machine plus block on the lower mounts alone")
        self.add_field("lower_damping", "Lower damping ratio ζ", None,
                       lambda s, v: replace(s, lower_damping_ratio=v))
        self.layout_.addStretch(1)
        self.refresh()

    def new_study(self):
        return TwoStageStudy()

    def show_study(self, study: TwoStageStudy) -> None:
        self.fields["block_mass"].show_value(study.block_mass_kg, self.units)
        self.fields["lower_fn"].show_value(study.lower_natural_frequency_hz, self.units)
        self.fields["lower_damping"].show_value(study.lower_damping_ratio, self.units)


#: Mount table columns: (header kind, index into position or stiffness).
MOUNT_COLUMNS = (("x", "length", 0), ("y", "length", 1), ("z", "length", 2),
                 ("kx", "stiffness", 0), ("ky", "stiffness", 1), ("kz", "stiffness", 2))


class RigidBodyEditor(StudyEditor):
    """Centre of gravity, inertia, lateral stiffness, shaft axis and the mount positions.

    The mount table holds x, y, z and, optionally, kx, ky, kz along the mount's
    axes; empty stiffness cells take the design's per-mount stiffness (vertical)
    and the lateral ratio. Typing one stiffness of a row fills the other two
    with the values the core uses now.
    """

    study_name = "rigid_body"
    title = "Rigid body on its mounts (six modes)"

    def __init__(self, model: DesignModel, parent=None):
        super().__init__(model, parent)
        self.add_triplet("cg", "CG x, y, z", "length", lambda s, i, v: replace(s, cg_m=_with(s.cg_m, i, v)),
                         tooltip="Centre of gravity in the machine frame; z is up from the mounts' reference")
        self.inertia_combo = QtWidgets.QComboBox()
        self.inertia_combo.setObjectName("inertia_source")
        self.inertia_combo.addItem("Estimate from a box (uniform)", "box")
        self.inertia_combo.addItem("Principal moments given", "given")
        self.inertia_combo.currentIndexChanged.connect(self._inertia_source_changed)
        self.form.addRow("Inertia", self.inertia_combo)
        self.add_triplet("box", "Box length, width, height", "length",
                         lambda s, i, v: replace(s, box_m=_with(s.box_m, i, v)),
                         tooltip="Outer size of the machine for the inertia estimate (a uniform box)")
        self.add_triplet("inertia", "Ixx, Iyy, Izz about CG", None,
                         lambda s, i, v: replace(s, inertia_kg_m2=_diagonal_with(s.inertia_kg_m2, i, v)),
                         unit="kg·m²", tooltip="Principal moments of inertia about axes through the CG")
        self.add_field("lateral_ratio", "Lateral / vertical stiffness", None,
                       lambda s, v: replace(s, lateral_stiffness_ratio=v),
                       tooltip="For mounts without their own kx, ky, kz")
        self.axis_combo = QtWidgets.QComboBox()
        self.axis_combo.setObjectName("shaft_axis")
        for axis in AXES:
            self.axis_combo.addItem(axis, axis)
        self.axis_combo.currentIndexChanged.connect(
            lambda _i: self._try(lambda: set_study(self.model, "rigid_body",
                                                   replace(self.study, shaft_axis=self.axis_combo.currentData()))))
        self.form.addRow("Shaft axis", self.axis_combo)

        self.mounts_box = QtWidgets.QGroupBox("Mounts")
        inner = QtWidgets.QVBoxLayout(self.mounts_box)
        inner.setContentsMargins(4, 4, 4, 4)
        inner.addWidget(_note("Position of each mount's elastic centre; stiffness along its axes, "
                              "empty: from the design (vertical) and the lateral ratio."))
        self.mount_table = QtWidgets.QTableWidget(0, len(MOUNT_COLUMNS))
        self.mount_table.setObjectName("mount_table")
        self.mount_table.verticalHeader().setDefaultSectionSize(22)
        # Columns as wide as their numbers (the table scrolls sideways) rather than squeezed to "-1…".
        self.mount_table.horizontalHeader().setSectionResizeMode(QtWidgets.QHeaderView.ResizeMode.ResizeToContents)
        self.mount_table.setMinimumHeight(110)
        self.mount_table.itemChanged.connect(self._cell_edited)
        self.mount_table.setHorizontalHeaderLabels([f"{name}\n{unit_symbol(kind, self.units)}"
                                                    for name, kind, _ in MOUNT_COLUMNS])
        self.extra_inputs.append(self.mounts_box)
        inner.addWidget(self.mount_table)
        self.reset_button = QtWidgets.QPushButton("Reset layout from the design")
        self.reset_button.setObjectName("reset_rigid_body")
        self.reset_button.setToolTip("Rectangular layout of the design's spans, CG above the mounts")
        self.reset_button.clicked.connect(lambda: self._try(
            lambda: set_study(self.model, "rigid_body", default_rigid_body_study(self.model.design))))
        inner.addWidget(self.reset_button)
        columns = QtWidgets.QHBoxLayout()      # inputs beside the mount table
        self.layout_.removeWidget(self.box)
        columns.addWidget(self.box, 1)
        columns.addWidget(self.mounts_box, 1)
        self.layout_.insertLayout(1, columns)
        self.layout_.addStretch(1)
        #: Per-mount stiffness (N/m) the core uses now, set by the rigid-body tab (typing fills from it).
        self.current_stiffness: list | None = None
        self._table_key = None
        self.refresh()

    def new_study(self):
        return default_rigid_body_study(self.model.design)

    def _inertia_source_changed(self, _index: int) -> None:
        study = self.study
        if study is None:
            return
        if self.inertia_combo.currentData() == "box":
            new = replace(study, inertia_kg_m2=None)
        else:
            new = replace(study, inertia_kg_m2=self.estimated_inertia or ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0),
                                                                           (0.0, 0.0, 1.0)))
        self._try(lambda: set_study(self.model, "rigid_body", new))

    #: Inertia (3x3, kg m²) of the core's current estimate, set by the rigid-body tab.
    estimated_inertia = None

    def _cell_edited(self, item: QtWidgets.QTableWidgetItem) -> None:
        row, column = item.row(), item.column()
        study = self.study
        name, kind, index = MOUNT_COLUMNS[column]
        placement = study.mounts[row]
        text = item.text().strip()
        try:
            if kind == "length":
                value = parse_number(text, f"studies.rigid_body.mounts[{row}].position_m.{name}",
                                     f"must be a number in {unit_symbol('length', self.units)}")
                new = replace(placement, position_m=_with(placement.position_m, index,
                                                          float(from_display(value, "length", self.units))))
            elif not text:
                new = replace(placement, stiffness_n_per_m=None)
            else:
                value = parse_number(text, f"studies.rigid_body.mounts[{row}].stiffness_n_per_m.{name}",
                                     f"must be a number in {unit_symbol('stiffness', self.units)}, or empty")
                start = placement.stiffness_n_per_m
                if start is None:
                    start = tuple(self.current_stiffness[row]) if self.current_stiffness else (0.0, 0.0, 0.0)
                new = replace(placement, stiffness_n_per_m=_with(
                    start, index, float(from_display(value, "stiffness", self.units))))
            mounts = list(study.mounts)
            mounts[row] = new
            set_study(self.model, "rigid_body", replace(study, mounts=tuple(mounts)),
                      merge_key=f"study.mount.{row}.{column}")
        except InputError as error:
            self.message.setText(str(error))
            self.message.setVisible(True)
            return
        self.message.setVisible(False)

    def show_study(self, study: RigidBodyStudy) -> None:
        for index, axis in enumerate(AXES):
            self.fields[f"cg_{axis}"].show_value(study.cg_m[index], self.units)
            self.fields[f"box_{axis}"].show_value(study.box_m[index], self.units)
            given = study.inertia_kg_m2
            self.fields[f"inertia_{axis}"].show_value(None if given is None else given[index][index], self.units)
            self.fields[f"box_{axis}"].setEnabled(given is None)
            self.fields[f"inertia_{axis}"].setEnabled(given is not None)
        self.fields["lateral_ratio"].show_value(study.lateral_stiffness_ratio, self.units)
        with signals_blocked(self.inertia_combo, self.axis_combo):
            self.inertia_combo.setCurrentIndex(0 if study.inertia_kg_m2 is None else 1)
            self.axis_combo.setCurrentIndex(AXES.index(study.shaft_axis))
        key = (study.mounts, self.units)
        if key == self._table_key:
            return
        self._table_key = key
        table = self.mount_table
        with signals_blocked(table):
            table.setRowCount(len(study.mounts))
            table.setHorizontalHeaderLabels([f"{name}\n{unit_symbol(kind, self.units)}"
                                             for name, kind, _ in MOUNT_COLUMNS])
            table.setVerticalHeaderLabels([str(i + 1) for i in range(len(study.mounts))])
            for row, placement in enumerate(study.mounts):
                for column, (_name, kind, index) in enumerate(MOUNT_COLUMNS):
                    source = placement.position_m if kind == "length" else placement.stiffness_n_per_m
                    text = "" if source is None else f"{to_display(source[index], kind, self.units):.6g}"
                    table.setItem(row, column, QtWidgets.QTableWidgetItem(text))


def _with(values, index: int, value: float) -> tuple:
    items = list(values)
    items[index] = float(value)
    return tuple(items)


def _diagonal_with(inertia, index: int, value: float):
    rows = [list(row) for row in (inertia or ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)))]
    rows[index][index] = float(value)
    return tuple(tuple(row) for row in rows)


class FloorEditor(StudyEditor):
    """Criterion, floor spectrum sources (CSV file, clipboard, flat level)."""

    study_name = "floor"
    title = "Floor vibration against a criterion"

    def __init__(self, model: DesignModel, parent=None):
        super().__init__(model, parent)
        self.criterion_combo = QtWidgets.QComboBox()
        self.criterion_combo.setObjectName("criterion")
        for criterion in CRITERIA:
            self.criterion_combo.addItem(criterion.name, criterion.name)
            self.criterion_combo.setItemData(self.criterion_combo.count() - 1, criterion.source,
                                             QtCore.Qt.ItemDataRole.ToolTipRole)
        self.criterion_combo.currentIndexChanged.connect(
            lambda _i: self._try(lambda: set_study(self.model, "floor", replace(
                self.study, criterion=self.criterion_combo.currentData()))))
        self.form.addRow("Criterion", self.criterion_combo)
        self.flat_field = StudyField("flat_level", None, lambda _v: None, "µm/s",
                                     tooltip="RMS velocity in every band from 1 to 80 Hz")
        self.flat_field.editor.setText(f"{DEFAULT_FLOOR_VELOCITY_M_S * 1e6:g}")
        self.flat_button = QtWidgets.QPushButton("Set flat floor")
        self.flat_button.setObjectName("set_flat_floor")
        self.flat_button.clicked.connect(self._set_flat)
        flat_row = QtWidgets.QHBoxLayout()
        flat_row.addWidget(self.flat_field, 1)
        flat_row.addWidget(self.flat_button)
        self.form.addRow("Flat level", flat_row)
        buttons = QtWidgets.QHBoxLayout()
        self.import_button = QtWidgets.QPushButton("Import CSV…")
        self.import_button.setObjectName("import_floor_csv")
        self.import_button.setToolTip("Two columns: band centre (Hz), RMS velocity (µm/s); a header row is allowed")
        self.import_button.clicked.connect(lambda: self.import_csv())
        self.paste_button = QtWidgets.QPushButton("Paste table")
        self.paste_button.setObjectName("paste_floor")
        self.paste_button.setToolTip("Band centre (Hz) and RMS velocity (µm/s) per line, from a spreadsheet")
        self.paste_button.clicked.connect(lambda: self.paste_text(QtWidgets.QApplication.clipboard().text()))
        buttons.addWidget(self.import_button)
        buttons.addWidget(self.paste_button)
        self.form.addRow(buttons)
        self.layout_.addStretch(1)
        self.refresh()

    def new_study(self):
        return default_floor_study()

    def choose_csv_path(self) -> str | None:
        path, _ = QtWidgets.QFileDialog.getOpenFileName(self, "Import floor spectrum", "",
                                                        "CSV (*.csv *.txt);;All files (*)")
        return path or None

    def import_csv(self, path: str | None = None) -> bool:
        path = path or self.choose_csv_path()
        if not path:
            return False
        try:
            with open(path, encoding="utf-8-sig") as handle:
                text = handle.read(2_000_000)
        except (OSError, UnicodeDecodeError) as error:
            self.message.setText(f"{path}: cannot be read ({error})")
            self.message.setVisible(True)
            return False
        return self.paste_text(text, field=path)

    def paste_text(self, text: str, field: str = "pasted table") -> bool:
        """Replace the floor spectrum by CSV text (parsed by core.floor.parse_floor_csv)."""
        def apply():
            spectrum = parse_floor_csv(text, field=field)
            set_study(self.model, "floor", self._with_spectrum(spectrum))
        return self._try(apply)

    def _with_spectrum(self, spectrum) -> FloorStudy:
        base = self.study or default_floor_study()
        return replace(base, band_hz=tuple(float(v) for v in spectrum.nominal_hz),
                       velocity_m_s=tuple(float(v) for v in spectrum.velocity_m_s))

    def _set_flat(self) -> None:
        def apply():
            level = self.flat_field.parse(self.flat_field.editor.text())
            set_study(self.model, "floor", self._with_spectrum(flat_floor_spectrum(level * 1e-6)))
        self._try(apply)

    def set_bands(self, bands: list) -> None:
        """The floor view's table was edited: ``[(band_hz, velocity_m_s), ...]``."""
        study = self.study
        if study is None:
            return
        self._try(lambda: set_study(self.model, "floor", self._with_spectrum(floor_spectrum(
            [b for b, _ in bands], [v for _, v in bands], field="floor table"))))

    def show_study(self, study: FloorStudy) -> None:
        with signals_blocked(self.criterion_combo):
            self.criterion_combo.setCurrentIndex(self.criterion_combo.findData(study.criterion))


class MaterialEditor(QtWidgets.QWidget):
    """Mount material picker: fills loss factor and dynamic-to-static ratio with typical values.

    Also holds the switch for the comparison curve (the other damping model at equal peak).
    """

    def __init__(self, model: DesignModel, parent=None):
        super().__init__(parent)
        self.model = model
        layout = QtWidgets.QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(2)
        self.combo = QtWidgets.QComboBox()
        self.combo.setObjectName("mount_material")
        self.combo.addItem("(own values)", None)
        for material in MOUNT_MATERIALS:
            self.combo.addItem(material.name, material.name)
            self.combo.setItemData(self.combo.count() - 1, material.source, QtCore.Qt.ItemDataRole.ToolTipRole)
        self.combo.setSizeAdjustPolicy(QtWidgets.QComboBox.SizeAdjustPolicy.AdjustToMinimumContentsLengthWithIcon)
        self.combo.setMinimumContentsLength(10)
        self.combo.currentIndexChanged.connect(self._picked)
        layout.addWidget(self.combo)
        self.note = _note("")
        self.note.setObjectName("material_note")
        self.note.setStyleSheet(CAUTION_STYLE)
        layout.addWidget(self.note)
        self.compare_check = QtWidgets.QCheckBox("Compare at equal peak")
        self.compare_check.setObjectName("compare_models")
        self.compare_check.setToolTip("Draws the other damping model (viscous or elastomer) with the same "
                                      "resonance peak, dashed")
        layout.addWidget(self.compare_check)
        self.refresh()

    @staticmethod
    def material(name: str | None):
        return next((m for m in MOUNT_MATERIALS if m.name == name), None)

    def _picked(self, _index: int) -> None:
        material = self.material(self.combo.currentData())
        if material is None:
            self.refresh()
            return
        self.model.update_design(None, damping=Damping("hysteretic", material.typical_loss_factor),
                                 dynamic_stiffness_ratio=material.typical_dynamic_stiffness_ratio)
        self.refresh()

    def refresh(self) -> None:
        """Select the material whose typical values the design holds (else "own values")."""
        design = self.model.design
        matching = next((m for m in MOUNT_MATERIALS if design.damping.model == "hysteretic"
                         and design.damping.value == m.typical_loss_factor
                         and design.dynamic_stiffness_ratio == m.typical_dynamic_stiffness_ratio), None)
        with signals_blocked(self.combo):
            self.combo.setCurrentIndex(0 if matching is None else self.combo.findData(matching.name))
        if matching is None:
            self.note.setText("")
            self.note.setVisible(False)
            self.combo.setToolTip("Typical starting values of a mount material")
            return
        low, high = matching.loss_factor
        ratio_low, ratio_high = matching.dynamic_stiffness_ratio
        self.note.setText(f"Typical values: η {matching.typical_loss_factor:.3g} (range {low:g}–{high:g}), "
                          f"dynamic/static {matching.typical_dynamic_stiffness_ratio:.3g} "
                          f"(range {ratio_low:g}–{ratio_high:g}); the supplier's data govern.")
        self.note.setToolTip(matching.source)
        self.combo.setToolTip(matching.source)
        self.note.setVisible(True)

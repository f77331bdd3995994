"""The design panel: entry fields for the design inputs and the two operating-point sliders.

Binding idiom (one for every widget):

* widget -> model: a user edit parses the text in display units through
  :func:`core.units.parse_display` / :func:`core.units.parse_number`, sets the
  model, and on :class:`~core.errors.InputError` shows the core's message beside
  the field; the model (and so the plots) never sees the refused value;
* model -> widget: inside :func:`signals_blocked`, and only when the model
  value differs from what the widget last showed.
"""
from __future__ import annotations

import contextlib
from dataclasses import dataclass, replace
from typing import Callable

from PySide6 import QtCore, QtWidgets

from app.style import FIELD_ERROR_STYLE, unshaped_font
from core.curves import DAMPING_GRID, RATIO_GRID
from core.design import LIMITS, DesignInputs
from core.design_model import DesignModel
from core.errors import InputError
from core.excitation import BALANCE_GRADES_MM_S
from core.synthesis import mount_loads
from core.transmissibility import MAX_DAMPING
from core.units import from_display, parse_display, parse_number, to_display, unit_symbol


@contextlib.contextmanager
def signals_blocked(*widgets):
    """Block the signals of ``widgets`` for the duration of the block."""
    previous = [widget.blockSignals(True) for widget in widgets]
    try:
        yield
    finally:
        for widget, old in zip(widgets, previous):
            widget.blockSignals(old)


def _error_text(error: InputError) -> str:
    shown = "" if error.value is None else f" (got {error.value})"
    return f"{error.reason}{shown}"


def message_label() -> QtWidgets.QLabel:
    """A hidden, word-wrapped label for a refusal or error message."""
    label = QtWidgets.QLabel("")
    label.setWordWrap(True)
    label.setStyleSheet(FIELD_ERROR_STYLE)
    label.setVisible(False)
    return label


class FieldRow(QtWidgets.QWidget):
    """An input widget, its unit and, below, the message for a refused value."""

    def __init__(self, editor: QtWidgets.QWidget, unit: str = "", parent=None):
        super().__init__(parent)
        self.editor = editor
        layout = QtWidgets.QGridLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setHorizontalSpacing(4)
        layout.setVerticalSpacing(1)
        layout.addWidget(editor, 0, 0)
        self.unit_label = QtWidgets.QLabel(unit)
        self.unit_label.setMinimumWidth(44)
        layout.addWidget(self.unit_label, 0, 1)
        self.error_label = message_label()
        layout.addWidget(self.error_label, 1, 0, 1, 2)

    def set_error(self, message: str | None) -> None:
        self.error_label.setText(message or "")
        self.error_label.setVisible(bool(message))
        self.editor.setProperty("refused", bool(message))
        self.editor.setStyleSheet("border: 1px solid #b00020;" if message else "")

    @property
    def error(self) -> str:
        return self.error_label.text() if self.error_label.isVisible() else ""


@dataclass
class NumberBinding:
    """One numeric entry field bound to a design value.

    ``get`` reads the SI value from a design; ``changes`` turns a parsed SI
    value into keyword changes for :meth:`DesignInputs.with_changes`.
    """

    key: str
    label: str
    kind: str
    limit: str | None
    get: Callable[[DesignInputs], float | None]
    changes: Callable[[float], dict]
    integer: bool = False
    is_list: bool = False
    row: FieldRow | None = None
    shown: object = None


class DesignPanel(QtWidgets.QWidget):
    """Entry fields for the design. Emits nothing of its own: it edits the model.

    Attributes
    ----------
    fields : dict of str to NumberBinding
        The numeric fields by key (e.g. ``"mass"``, ``"speed"``), for tests.
    """

    def __init__(self, model: DesignModel, parent=None):
        super().__init__(parent)
        self.model = model
        self.units = model.view.units
        self.fields: dict[str, NumberBinding] = {}
        self._shown: dict[str, object] = {}
        self._editing: str | None = None
        self._visibility_shown = None   # (shown rows, excitation kind) last applied
        outer = QtWidgets.QVBoxLayout(self)
        outer.setContentsMargins(6, 6, 6, 6)

        # ---- project
        self.name_edit = QtWidgets.QLineEdit()
        self.name_edit.setObjectName("project_name")
        self.name_edit.textEdited.connect(self._name_edited)
        project_box, project_form = self._group("Project", outer)
        project_form.addRow("Name", self.name_edit)

        # ---- machine
        machine_box, form = self._group("Machine", outer)
        self._add_number(form, NumberBinding(
            "mass", "Mass", "mass", "machine.mass_kg", lambda d: d.mass_kg, lambda v: {"mass_kg": v}))
        self._add_number(form, NumberBinding(
            "speed", "Operating speed", "speed", "machine.speed_rpm", lambda d: d.speed_rpm,
            lambda v: {"speed_rpm": v}))
        self.range_check = QtWidgets.QCheckBox("Speed range up to")
        self.range_check.setObjectName("speed_range")
        self.range_check.toggled.connect(self._range_toggled)
        self._add_number(form, NumberBinding(
            "speed_max", "", "speed", "machine.speed_rpm",
            lambda d: d.speed_max_rpm, lambda v: {"speed_max_rpm": v}), label_widget=self.range_check)
        self._add_number(form, NumberBinding(
            "duty_speeds", "Duty speeds", "speed", "machine.duty_speeds_rpm", lambda d: d.duty_speeds_rpm,
            lambda v: {"duty_speeds_rpm": v}, is_list=True),
            tooltip="Further speeds the machine runs at for long, separated by spaces or semicolons (optional)")

        # ---- mounts
        mounts_box, form = self._group("Mounts", outer)
        low, high = LIMITS["mounts.count"]
        self.count_spin = QtWidgets.QSpinBox()
        self.count_spin.setObjectName("mount_count")
        self.count_spin.setRange(int(low), int(high))
        self.count_spin.setKeyboardTracking(False)
        self.count_row = FieldRow(self.count_spin)
        self.count_spin.valueChanged.connect(self._count_changed)
        form.addRow("Number of mounts", self.count_row)
        self.layout_combo = self._combo("load_layout", (("Equal load", "equal"),
                                                        ("Centre-of-gravity offset", "cg_offset"),
                                                        ("Load per mount", "per_mount")), self._layout_changed)
        self.layout_row = FieldRow(self.layout_combo)
        form.addRow("Load sharing", self.layout_row)
        for axis, index in (("x", 0), ("y", 1)):
            self._add_number(form, NumberBinding(
                f"span_{axis}", f"Span along {axis}", "length", None,
                lambda d, i=index: d.span_m[i], lambda v, i=index: {"span_m": self._pair("span_m", i, v)}))
        for axis, index in (("x", 0), ("y", 1)):
            self._add_number(form, NumberBinding(
                f"cg_{axis}", f"CG offset {axis}", "length", None,
                lambda d, i=index: d.cg_offset_m[i],
                lambda v, i=index: {"cg_offset_m": self._pair("cg_offset_m", i, v)}))
        self._add_number(form, NumberBinding(
            "loads", "Loads", "force", None, lambda d: d.loads_n,
            lambda v: {"load_layout": "per_mount", "loads_n": v}, is_list=True),
            tooltip="One static load per mount, separated by spaces or semicolons")
        self.loads_row = self.fields["loads"].row
        self.loads_edit = self.loads_row.editor

        # ---- damping
        damping_box, form = self._group("Damping", outer)
        self.damping_form = form
        self.damping_combo = self._combo("damping_model", (("Viscous (damping ratio ζ)", "viscous"),
                                                           ("Elastomer (loss factor η)", "hysteretic")),
                                         self._damping_model_changed)
        form.addRow("Model", self.damping_combo)
        self._add_number(form, NumberBinding(
            "dynamic_ratio", "Dynamic/static stiffness", "ratio", "damping.dynamic_stiffness_ratio",
            lambda d: d.dynamic_stiffness_ratio, lambda v: {"dynamic_stiffness_ratio": v}))

        # ---- tuning
        tuning_box, form = self._group("Tuning", outer)
        self.tuning_combo = self._combo("tuning", (("From target isolation", "isolation"),
                                                   ("From frequency ratio (slider)", "frequency_ratio"),
                                                   ("Chosen directly", "natural_frequency")),
                                        self._tuning_changed)
        form.addRow("Natural frequency", self.tuning_combo)
        self._add_number(form, NumberBinding(
            "natural_frequency", "Natural frequency fn", "frequency", "tuning.natural_frequency_hz",
            lambda d: d.natural_frequency_hz, lambda v: {"natural_frequency_hz": v, "tuning": "natural_frequency"}))
        self._add_number(form, NumberBinding(
            "isolation", "Target isolation", "percent", "tuning.isolation_percent",
            lambda d: d.isolation_percent, lambda v: {"isolation_percent": v}))

        # ---- excitation
        excitation_box, form = self._group("Excitation (optional)", outer)
        self.excitation_combo = self._combo("excitation_kind", (("None", "none"), ("Force amplitude", "force"),
                                                                ("Unbalance", "unbalance"),
                                                                ("Balance grade", "balance_grade")),
                                            self._excitation_changed)
        self.excitation_row = FieldRow(self.excitation_combo)
        form.addRow("Kind", self.excitation_row)
        self._add_number(form, NumberBinding(
            "force", "Force (0-peak)", "force", None, lambda d: d.excitation.force_n or None,
            lambda v: {"excitation": self._excitation(force_n=v)}))
        self._add_number(form, NumberBinding(
            "unbalance", "Unbalance", "unbalance", None, lambda d: d.excitation.unbalance_g_mm or None,
            lambda v: {"excitation": self._excitation(unbalance_g_mm=v)}))
        self.grade_combo = self._combo("balance_grade", tuple((f"G {g:g}", g) for g in BALANCE_GRADES_MM_S),
                                       self._grade_changed)
        self.grade_label = QtWidgets.QLabel("Balance grade")
        self.grade_row = FieldRow(self.grade_combo, "mm/s")
        form.addRow(self.grade_label, self.grade_row)
        self._add_number(form, NumberBinding(
            "rotor_mass", "Rotor mass", "mass", None, lambda d: d.excitation.rotor_mass_kg or None,
            lambda v: {"excitation": self._excitation(rotor_mass_kg=v)}))
        outer.addStretch(1)

        self.refresh(force=True)

    # ------------------------------------------------------------------ building
    def _group(self, title: str, outer: QtWidgets.QVBoxLayout):
        box = QtWidgets.QGroupBox(title)
        form = QtWidgets.QFormLayout(box)
        form.setFieldGrowthPolicy(QtWidgets.QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        form.setContentsMargins(6, 4, 6, 4)
        form.setVerticalSpacing(3)
        outer.addWidget(box)
        return box, form

    @staticmethod
    def _combo(name: str, items, handler) -> QtWidgets.QComboBox:
        """A combo box of (text, data) items calling ``handler`` on a user change."""
        combo = QtWidgets.QComboBox()
        combo.setObjectName(name)
        for text, data in items:
            combo.addItem(text, data)
        combo.currentIndexChanged.connect(handler)
        return combo

    def _add_number(self, form: QtWidgets.QFormLayout, binding: NumberBinding, label_widget=None,
                    tooltip: str = "") -> None:
        edit = QtWidgets.QLineEdit()
        edit.setObjectName(binding.key)
        edit.setToolTip(tooltip)
        binding.row = FieldRow(edit, unit_symbol(binding.kind, self.units))
        edit.textEdited.connect(lambda text, b=binding: self._number_edited(b, text))
        self.fields[binding.key] = binding
        label = label_widget if label_widget is not None else QtWidgets.QLabel(binding.label)
        binding.row.setProperty("form_label", label)
        form.addRow(label, binding.row)

    # ------------------------------------------------------------------ widget -> model
    def _parse(self, binding: NumberBinding, text: str) -> float:
        """One typed number in display units to SI (range-checked where core gives a range)."""
        if binding.limit is not None:
            return parse_display(text, binding.limit, binding.kind, self.units, binding.integer)
        symbol = unit_symbol(binding.kind, self.units)
        shown = parse_number(text, binding.key, f"must be a number{' in ' + symbol if symbol else ''}")
        return float(from_display(shown, binding.kind, self.units))

    def _number_edited(self, binding: NumberBinding, text: str) -> None:
        try:
            if binding.is_list:
                parts = text.replace(";", " ").replace(",", " ").split()
                value = tuple(self._parse(binding, part) for part in parts)
            else:
                value = self._parse(binding, text)
            changes = binding.changes(value)
            self._editing = binding.key  # the field being typed in keeps its text as typed
            self.model.update_design(merge_key=f"field.{binding.key}", **changes)
        except InputError as error:
            binding.row.set_error(_error_text(error))
            return
        finally:
            self._editing = None
        binding.shown = binding.get(self.model.design)
        binding.row.set_error(None)
        self._clear_pending_errors()

    def _apply(self, row: FieldRow | None, merge_key: str | None = None, **changes) -> bool:
        """Apply design changes from a combo or spin box; show a refusal beside ``row``."""
        try:
            self.model.update_design(merge_key=merge_key, **changes)
        except InputError as error:
            if row is not None:
                row.set_error(_error_text(error))
            return False
        if row is not None:
            row.set_error(None)
        self._clear_pending_errors()
        return True

    def _clear_pending_errors(self) -> None:
        """Once an edit is accepted, combos refused earlier may now fit: retry them quietly."""
        for row in (self.layout_row, self.excitation_row, self.count_row):
            if row.error:
                row.set_error(None)
        self._update_visibility()

    def _name_edited(self, text: str) -> None:
        self._shown["name"] = text
        self.model.set_name(text)

    def _range_toggled(self, checked: bool) -> None:
        design = self.model.design
        top = (design.speed_max_rpm or design.speed_rpm) if checked else None
        self._apply(self.fields["speed_max"].row, speed_max_rpm=top)
        self._update_visibility()

    def _count_changed(self, count: int) -> None:
        changes = {"mount_count": count, "load_layout": self.layout_combo.currentData()}
        if changes["load_layout"] == "per_mount":
            changes["loads_n"] = self._equal_loads(count)
        self._apply(self.count_row, **changes)

    def _layout_changed(self, _index: int) -> None:
        layout = self.layout_combo.currentData()
        changes = {"load_layout": layout}
        if layout == "per_mount":
            design = self.model.design
            changes["loads_n"] = tuple(float(v) for v in mount_loads(design))
        self._apply(self.layout_row, **changes)
        self._update_visibility()

    def _equal_loads(self, count: int) -> tuple:
        design = self.model.design.with_changes(mount_count=count, load_layout="equal")
        return tuple(float(v) for v in mount_loads(design))

    def _damping_model_changed(self, _index: int) -> None:
        self.model.set_damping_model(self.damping_combo.currentData())

    def _tuning_changed(self, _index: int) -> None:
        self._update_visibility()
        method = self.tuning_combo.currentData()
        changes = {"tuning": method}
        result = self.model.result
        # Keep the natural frequency where it is: start from the values the previous method gave.
        if method == "frequency_ratio" and result is not None:
            changes["frequency_ratio"] = self._clamp("tuning.frequency_ratio", result.frequency_ratio)
        if method == "natural_frequency" and result is not None:
            changes["natural_frequency_hz"] = self._clamp("tuning.natural_frequency_hz",
                                                          result.natural_frequency_hz)
        self._apply(None, **changes)

    @staticmethod
    def _clamp(field: str, value: float) -> float:
        low, high = LIMITS[field]
        return min(max(value, low), high)

    def _excitation(self, **values):
        kind = self.excitation_combo.currentData()
        return replace(self.model.design.excitation, kind=kind, **values)

    def _excitation_changed(self, _index: int) -> None:
        self._update_visibility()
        self._apply(self.excitation_row, excitation=self._excitation())

    def _grade_changed(self, _index: int) -> None:
        self._apply(self.excitation_row, excitation=self._excitation(balance_grade_mm_s=self.grade_combo.currentData()))

    def _pair(self, name: str, index: int, value: float) -> tuple:
        pair = list(getattr(self.model.design, name))
        pair[index] = value
        return tuple(pair)

    # ------------------------------------------------------------------ model -> widgets
    def set_units(self, system: str) -> None:
        """Show every value in another unit system (the model is unchanged)."""
        if system == self.units:
            return
        self.units = system
        for binding in self.fields.values():
            binding.row.unit_label.setText(unit_symbol(binding.kind, system))
        self.refresh(force=True)

    def refresh(self, force: bool = False) -> None:
        """Show the model's values in the widgets that do not already show them."""
        design = self.model.design
        for binding in self.fields.values():
            value = binding.get(design)
            if binding.key == self._editing and not force:
                binding.shown = value
                continue
            if force or value != binding.shown:
                edit = binding.row.editor
                values = () if value is None else value if binding.is_list else (value,)
                text = "; ".join(f"{to_display(v, binding.kind, self.units):.6g}" for v in values)
                with signals_blocked(edit):
                    edit.setText(text)
                binding.row.set_error(None)
                binding.shown = value
        self._sync("name", self.model.name, force, lambda v: self.name_edit.setText(v), self.name_edit)
        self._sync("range", design.speed_max_rpm is not None, force, self.range_check.setChecked, self.range_check)
        self._sync("count", design.mount_count, force, self.count_spin.setValue, self.count_spin, self.count_row)
        self._sync("layout", design.load_layout, force, lambda v: self._select(self.layout_combo, v),
                   self.layout_combo, self.layout_row)
        self._sync("damping_model", design.damping.model, force,
                   lambda v: self._select(self.damping_combo, v), self.damping_combo)
        self._sync("tuning", design.tuning, force, lambda v: self._select(self.tuning_combo, v), self.tuning_combo)
        self._sync("excitation", design.excitation.kind, force,
                   lambda v: self._select(self.excitation_combo, v), self.excitation_combo, self.excitation_row)
        self._sync("grade", design.excitation.balance_grade_mm_s, force,
                   lambda v: self._select(self.grade_combo, v), self.grade_combo)
        self._update_visibility()

    def _sync(self, key: str, value, force: bool, setter, widget, row: FieldRow | None = None) -> None:
        if not force and self._shown.get(key, object()) == value:
            return
        with signals_blocked(widget):
            setter(value)
        if row is not None:
            row.set_error(None)
        self._shown[key] = value

    @staticmethod
    def _select(combo: QtWidgets.QComboBox, data) -> None:
        index = combo.findData(data)
        if index >= 0:
            combo.setCurrentIndex(index)

    def _update_visibility(self) -> None:
        layout = self.layout_combo.currentData()
        kind = self.excitation_combo.currentData()
        shown = {
            "speed_max": self.range_check.isChecked(),
            "span_x": layout == "cg_offset", "span_y": layout == "cg_offset",
            "cg_x": layout == "cg_offset", "cg_y": layout == "cg_offset",
            "natural_frequency": self.tuning_combo.currentData() == "natural_frequency",
            "loads": layout == "per_mount",
            "force": kind == "force", "unbalance": kind == "unbalance", "rotor_mass": kind == "balance_grade",
        }
        state = (tuple(shown.values()), kind)
        if state == self._visibility_shown:   # every design event refreshes the panel
            return
        self._visibility_shown = state
        for key, visible in shown.items():
            row = self.fields[key].row
            if key == "speed_max":
                row.editor.setEnabled(visible)
                continue
            row.setVisible(visible)
            label = row.property("form_label")
            if label is not None:
                label.setVisible(visible)
        for widget in (self.grade_row, self.grade_label):
            widget.setVisible(kind == "balance_grade")


class OperatingPointControls(QtWidgets.QGroupBox):
    """Damping and frequency-ratio sliders, each with an exact-entry spin box.

    The sliders hold integer positions on the log grids of :mod:`core.curves`
    (``DAMPING_GRID``, ``RATIO_GRID``). ``valueChanged`` stays live; a drag
    (sliderPressed .. sliderReleased) is one undo step, each keyboard or
    wheel step is one.
    """

    def __init__(self, model: DesignModel, parent=None):
        super().__init__("Operating point", parent)
        self._shown = None   # (model values, widget values) of the last refresh
        self.model = model
        grid = QtWidgets.QGridLayout(self)
        grid.setContentsMargins(6, 4, 6, 4)
        self.damping_label = QtWidgets.QLabel("Damping ratio ζ")
        self.damping_slider = self._slider(DAMPING_GRID.steps, "damping_slider")
        self.damping_spin = QtWidgets.QDoubleSpinBox()
        self.damping_spin.setObjectName("damping_spin")
        self.damping_spin.setDecimals(4)
        self.damping_spin.setRange(0.0, MAX_DAMPING)
        self.damping_spin.setSingleStep(0.005)
        self.ratio_label = QtWidgets.QLabel("Frequency ratio r = ω/ωn")
        self.ratio_slider = self._slider(RATIO_GRID.steps, "ratio_slider")
        self.ratio_spin = QtWidgets.QDoubleSpinBox()
        self.ratio_spin.setObjectName("ratio_spin")
        self.ratio_spin.setDecimals(3)
        self.ratio_spin.setRange(*LIMITS["tuning.frequency_ratio"])
        self.ratio_spin.setSingleStep(0.05)
        for spin in (self.damping_spin, self.ratio_spin):
            spin.setKeyboardTracking(False)
            spin.setMinimumWidth(84)
            spin.setFont(unshaped_font())   # a new number at every slider step
        for widget in (self.damping_slider, self.ratio_slider, self.damping_spin, self.ratio_spin):
            # Filled with the window colour, they count as opaque: a new value repaints them
            # alone, not the group box, dock and window beneath.
            widget.setAutoFillBackground(True)
        grid.addWidget(self.damping_label, 0, 0, 1, 2)
        grid.addWidget(self.damping_slider, 1, 0)
        grid.addWidget(self.damping_spin, 1, 1)
        grid.addWidget(self.ratio_label, 2, 0, 1, 2)
        grid.addWidget(self.ratio_slider, 3, 0)
        grid.addWidget(self.ratio_spin, 3, 1)
        self.message = message_label()
        grid.addWidget(self.message, 4, 0, 1, 2)

        self.damping_slider.valueChanged.connect(self._damping_slider_moved)
        self.ratio_slider.valueChanged.connect(self._ratio_slider_moved)
        self.damping_spin.valueChanged.connect(self._damping_spin_changed)
        self.ratio_spin.valueChanged.connect(self._ratio_spin_changed)
        for slider in (self.damping_slider, self.ratio_slider):
            slider.sliderPressed.connect(model.begin_step)
            slider.sliderReleased.connect(model.commit_step)
        self.refresh()

    @staticmethod
    def _slider(steps: int, name: str) -> QtWidgets.QSlider:
        slider = QtWidgets.QSlider(QtCore.Qt.Orientation.Horizontal)
        slider.setObjectName(name)
        slider.setRange(0, steps)
        slider.setSingleStep(1)
        slider.setPageStep(max(1, steps // 20))
        slider.setTracking(True)
        slider.setFocusPolicy(QtCore.Qt.FocusPolicy.StrongFocus)
        return slider

    def _set(self, setter, value) -> None:
        try:
            setter(value, merge_key=None)
        except InputError as error:
            self.message.setText(_error_text(error))
            self.message.setVisible(True)
            self.refresh()
            return
        self.message.setVisible(False)

    def _damping_slider_moved(self, index: int) -> None:
        self._set(self.model.set_damping_value, DAMPING_GRID.value(index))

    def _ratio_slider_moved(self, index: int) -> None:
        self._set(self.model.set_frequency_ratio, RATIO_GRID.value(index))

    def _damping_spin_changed(self, value: float) -> None:
        self._set(self.model.set_damping_value, value)

    def _ratio_spin_changed(self, value: float) -> None:
        self._set(self.model.set_frequency_ratio, value)

    def shown_ratio(self) -> float:
        """The ratio at the lowest speed: from the synthesis, or the chosen one if it failed."""
        result = self.model.result
        return result.frequency_ratio if result is not None else self.model.design.frequency_ratio

    def refresh(self) -> None:
        """Show the model's damping and ratio (signals blocked; equal values left alone)."""
        damping = self.model.design.damping
        shown = (damping, self.shown_ratio())
        widgets = (self.damping_slider.value(), self.damping_spin.value(), self.ratio_slider.value(),
                   self.ratio_spin.value())
        if (shown, widgets) == self._shown:   # the window refreshes after every design event too
            return
        symbol = "Damping ratio ζ" if damping.model == "viscous" else "Loss factor η"
        if self.damping_label.text() != symbol:
            self.damping_label.setText(symbol)
        self._show(self.damping_slider, self.damping_spin, DAMPING_GRID, damping.value)
        self._show(self.ratio_slider, self.ratio_spin, RATIO_GRID, shown[1])
        self._shown = (shown, (self.damping_slider.value(), self.damping_spin.value(),
                               self.ratio_slider.value(), self.ratio_spin.value()))

    @staticmethod
    def _show(slider: QtWidgets.QSlider, spin: QtWidgets.QDoubleSpinBox, grid, value: float) -> None:
        index = grid.index(value)
        if slider.value() != index and grid.value(slider.value()) != value:
            with signals_blocked(slider):
                slider.setValue(index)
        if abs(spin.value() - value) > 0.5 * 10 ** -spin.decimals():
            with signals_blocked(spin):
                spin.setValue(value)

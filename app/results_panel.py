"""The results panel: the synthesis of the current design, in display units.

Every number is a field of :class:`core.synthesis.DesignResult`, converted by
:func:`core.units.format_value`. When synthesis fails the core's message
replaces the numbers.

The values are :class:`ValueText` widgets, not QLabels: a QLabel asks its layout for a new
geometry at every new text, and the scroll area around the panel then measures every
word-wrapped row again (about 2 ms per slider step, measured). A ValueText asks only when
it needs more lines than it has had (rows keep their height during a drag). The context menu
copies all rows as text.
"""
from __future__ import annotations

from PySide6 import QtCore, QtGui, QtWidgets

from app.design_panel import message_label
from app.style import caution_label, unshaped_font
from core.design import DesignInputs
from core.design_model import Evaluation
from core.units import format_value, format_values

#: Rows of the results panel: key, label.
ROWS = (
    ("natural_frequency", "Natural frequency fn"),
    ("frequency_ratio", "Frequency ratio r"),
    ("transmissibility", "Transmissibility |T|"),
    ("isolation", "Isolation"),
    ("phase", "Phase of T"),
    ("stiffness_total", "Stiffness, total (dynamic)"),
    ("stiffness_per_mount", "Stiffness per mount"),
    ("damping", "Damping per mount"),
    ("static_deflection", "Static deflection"),
    ("load_per_mount", "Load per mount"),
    ("peak", "Resonance peak"),
    ("worst", "Worst over speed range"),
    ("duty", "Duty speeds"),
    ("excitation_force", "Exciting force"),
    ("transmitted_force", "Transmitted force, total"),
    ("transmitted_per_mount", "Transmitted force per mount"),
    ("motion", "Machine motion"),
)

EXCITATION_ROWS = ("excitation_force", "transmitted_force", "transmitted_per_mount", "motion")


class ValueText(QtWidgets.QWidget):
    """One word-wrapped, plain-text result value.

    It repaints itself for a new text and calls ``updateGeometry`` only when its height
    changes. With ``keep_height`` (the default) a value never shrinks while its width stays
    (until :meth:`forget_height`), so rows do not jump up and down during a slider drag, and
    the panel is not laid out again at every step. The width hint is fixed
    (``HINT_CHARACTERS`` average characters): the layout gives a value the width of its column.

    A slider step sets about ten values, so the per-text work is kept small: the drawn text,
    the font key and the two colours are kept between paints, and a one-line text that fits is
    measured by its advance instead of a word-wrapped layout.
    """

    #: Width hint in average character widths.
    HINT_CHARACTERS = 26
    #: Drawn text: a word joiner on both sides of "/" keeps units such as N/mm on one line
    #: (Unicode line breaking allows a break after a slash).
    _UNBROKEN = str.maketrans({"/": "\u2060/\u2060"})
    _FLAGS = int(QtCore.Qt.TextFlag.TextWordWrap) | int(QtCore.Qt.AlignmentFlag.AlignLeft) | \
        int(QtCore.Qt.AlignmentFlag.AlignTop)
    #: Events after which the kept font key and colours are read again.
    _RESTYLE = frozenset({QtCore.QEvent.Type.FontChange, QtCore.QEvent.Type.PaletteChange,
                          QtCore.QEvent.Type.StyleChange, QtCore.QEvent.Type.ApplicationFontChange,
                          QtCore.QEvent.Type.ApplicationPaletteChange})

    def __init__(self, text: str = "", parent=None, keep_height: bool = True):
        super().__init__(parent)
        self._text = text
        self._drawn = text.translate(self._UNBROKEN)
        self._keep_height = keep_height
        self._style = None         # (font key, font metrics, background, text colour)
        self._height_for = None    # (text, width, font key), height
        self._tallest = None       # (width, font key), the most height the texts needed there
        policy = QtWidgets.QSizePolicy(QtWidgets.QSizePolicy.Policy.Preferred,
                                       QtWidgets.QSizePolicy.Policy.Preferred)
        policy.setHeightForWidth(True)
        self.setSizePolicy(policy)
        # It paints its whole rectangle (background too), so Qt need not repaint the panel
        # beneath it for a new value.
        self.setAttribute(QtCore.Qt.WidgetAttribute.WA_OpaquePaintEvent)
        self.setFont(unshaped_font())

    def text(self) -> str:
        return self._text

    def setText(self, text: str) -> None:  # noqa: N802 (Qt naming, as QLabel)
        if text == self._text:
            return
        width = self.width()
        before = self.heightForWidth(width)
        self._text = text
        self._drawn = text.translate(self._UNBROKEN)
        if self.heightForWidth(width) != before:
            self.updateGeometry()
        self.update()

    def hasHeightForWidth(self) -> bool:  # noqa: N802
        return True

    def forget_height(self) -> None:
        """Let the value shrink to what its text needs (a new project, other units)."""
        if self._tallest is not None:
            self._tallest = None
            self.updateGeometry()

    def changeEvent(self, event) -> None:  # noqa: N802
        if event.type() in self._RESTYLE:
            self._style = None
        super().changeEvent(event)

    def _styled(self) -> tuple:
        if self._style is None:
            palette = self.palette()
            self._style = (self.font().key(), self.fontMetrics(),
                           palette.color(QtGui.QPalette.ColorRole.Window),
                           palette.color(QtGui.QPalette.ColorRole.WindowText))
        return self._style

    def heightForWidth(self, width: int) -> int:  # noqa: N802
        font, metrics = self._styled()[:2]
        key = (self._text, width, font)
        if self._height_for is None or self._height_for[0] != key:   # layouts ask many times
            line = metrics.height()
            if "\n" in self._drawn or metrics.horizontalAdvance(self._drawn) > width:
                bounds = metrics.boundingRect(QtCore.QRect(0, 0, max(width, 1), 1 << 20), self._FLAGS,
                                              self._drawn)
                line = max(bounds.height(), line)
            self._height_for = (key, line)
        height = self._height_for[1]
        if self._keep_height and width == self.width():   # never less than it has needed there
            if self._tallest is not None and self._tallest[0] == (width, font):
                height = max(height, self._tallest[1])
            self._tallest = ((width, font), height)
        return height

    def sizeHint(self) -> QtCore.QSize:  # noqa: N802
        width = self.fontMetrics().averageCharWidth() * self.HINT_CHARACTERS
        return QtCore.QSize(width, self.heightForWidth(width))

    def minimumSizeHint(self) -> QtCore.QSize:  # noqa: N802
        metrics = self.fontMetrics()
        return QtCore.QSize(metrics.averageCharWidth() * 8, metrics.height())

    def paintEvent(self, _event) -> None:  # noqa: N802
        background, colour = self._styled()[2:]
        painter = QtGui.QPainter(self)
        rect = self.rect()
        painter.fillRect(rect, background)
        painter.setPen(colour)
        painter.drawText(rect, self._FLAGS, self._drawn)
        painter.end()


def result_texts(design: DesignInputs, evaluation: Evaluation, system: str) -> dict[str, str]:
    """Display text of every results row for a successful evaluation."""
    result = evaluation.result
    ranged = result.speeds_rpm[1] > result.speeds_rpm[0]
    texts = {
        "natural_frequency": f"{format_value(result.natural_frequency_hz, 'frequency', system)}  "
                             f"({format_value(result.natural_frequency_rpm, 'speed', system)})",
        "frequency_ratio": f"{result.frequency_ratio:.4g}" + (f" to {result.frequency_ratio_max:.4g}" if ranged else "")
                           + f"  at {format_value(result.speeds_rpm[0], 'speed', system)}",
        "transmissibility": f"{result.transmissibility:.4g}",
        "isolation": f"{result.isolation_percent:.4g} %   ({result.isolation_db:.3g} dB)",
        "phase": f"{result.phase_deg:.4g}°",
        "stiffness_total": format_value(result.stiffness_total_n_per_m, "stiffness", system),
        "stiffness_per_mount": format_values(result.stiffness_per_mount_n_per_m, "stiffness", system),
        "damping": format_values(result.damping_per_mount_n_s_per_m, "damping", system),
        "static_deflection": format_value(result.static_deflection_m, "length", system),
        "load_per_mount": format_values(result.load_per_mount_n, "force", system),
        "peak": ("unbounded (no damping)" if result.peak_transmissibility == float("inf") else
                 f"{result.peak_transmissibility:.4g}× at r = {result.peak_frequency_ratio:.4g}"),
        "worst": f"{result.worst_transmissibility:.4g} at {format_value(result.worst_speed_rpm, 'speed', system)}",
    }
    if result.duty_points:
        texts["duty"] = "\n".join(
            f"{format_value(point.speed_rpm, 'speed', system)}: |T| {point.transmissibility:.4g}, "
            f"isolation {point.isolation_percent:.4g} %, r {point.frequency_ratio:.4g}"
            for point in result.duty_points)
    if result.excitation_force_n is not None:
        texts.update({
            "excitation_force": format_value(result.excitation_force_n, "force", system),
            "transmitted_force": format_value(result.transmitted_force_n, "force", system),
            "transmitted_per_mount": format_values(result.transmitted_force_per_mount_n, "force", system),
            "motion": f"{format_value(result.machine_displacement_m, 'length', system)} and "
                      f"{format_value(result.machine_velocity_m_s, 'velocity', system)} (0-peak)",
        })
    return texts


class ResultsPanel(QtWidgets.QWidget):
    """Live synthesis results, warnings and the caution line.

    Attributes
    ----------
    value_labels : dict of str to QLabel
        The value label of each row (keys of :data:`ROWS`), for tests.
    """

    def __init__(self, parent=None):
        super().__init__(parent)
        outer = QtWidgets.QVBoxLayout(self)
        outer.setContentsMargins(6, 6, 6, 6)
        self.error_label = message_label()
        self.error_label.setObjectName("results_error")
        outer.addWidget(self.error_label)
        self.table = QtWidgets.QWidget()
        form = QtWidgets.QFormLayout(self.table)
        form.setContentsMargins(0, 0, 0, 0)
        form.setVerticalSpacing(4)
        form.setRowWrapPolicy(QtWidgets.QFormLayout.RowWrapPolicy.WrapLongRows)
        form.setFieldGrowthPolicy(QtWidgets.QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        self.value_labels: dict[str, ValueText] = {}
        self.row_labels: dict[str, QtWidgets.QLabel] = {}
        for key, text in ROWS:
            label = QtWidgets.QLabel(text)
            value = ValueText("—")
            value.setObjectName(f"result_{key}")
            form.addRow(label, value)
            self.value_labels[key] = value
            self.row_labels[key] = label
        outer.addWidget(self.table)
        self.study_title = QtWidgets.QLabel("<b>Studies</b>")
        outer.addWidget(self.study_title)
        self.study_table = QtWidgets.QWidget()
        self.study_form = QtWidgets.QFormLayout(self.study_table)
        self.study_form.setContentsMargins(0, 0, 0, 0)
        self.study_form.setVerticalSpacing(4)
        self.study_form.setRowWrapPolicy(QtWidgets.QFormLayout.RowWrapPolicy.WrapLongRows)
        self.study_form.setFieldGrowthPolicy(QtWidgets.QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        outer.addWidget(self.study_table)
        self.study_title.setVisible(False)
        self.study_table.setVisible(False)
        self.study_value_labels: dict[str, ValueText] = {}
        self._study_rows: list = []
        self._design_warnings: tuple = ()
        self._study_warnings: tuple = ()
        warnings_title = QtWidgets.QLabel("<b>Warnings</b>")
        outer.addWidget(warnings_title)
        # A warning can carry a number that changes with every slider step; as a ValueText it
        # asks for a new layout only when its height changes (a QLabel asked at every text).
        self.warnings_label = ValueText("none", keep_height=False)
        self.warnings_label.setObjectName("results_warnings")
        outer.addWidget(self.warnings_label)
        outer.addStretch(1)
        self.caution_label = caution_label("results_caution")
        outer.addWidget(self.caution_label)
        self.setContextMenuPolicy(QtCore.Qt.ContextMenuPolicy.ActionsContextMenu)
        copy = QtGui.QAction("Copy results", self)
        copy.triggered.connect(lambda: QtWidgets.QApplication.clipboard().setText(self.as_text()))
        self.addAction(copy)

    def forget_heights(self) -> None:
        """Let every value shrink to its text again (after a new project or a unit change)."""
        for label in (*self.value_labels.values(), *self.study_value_labels.values()):
            label.forget_height()

    def as_text(self) -> str:
        """The shown rows, study rows and warnings as plain text, one ``label: value`` a line."""
        lines = [self.error_label.text()] if self.error_label.isVisibleTo(self) else []
        if self.table.isVisibleTo(self):
            lines += [f"{self.row_labels[key].text()}: {label.text()}".replace("\n", " ")
                      for key, label in self.value_labels.items() if label.isVisibleTo(self)]
        lines += [f"{label}: {text}" for label, text in self._study_rows]
        lines += ["Warnings:", self.warnings_label.text(), self.caution_label.text()]
        return "\n".join(lines)

    def show_evaluation(self, design: DesignInputs, evaluation: Evaluation, system: str) -> None:
        """Show a result, or the core's message in place of the numbers."""
        if evaluation.result is None:
            self.error_label.setText(f"No result: {evaluation.error}")
            self.error_label.setVisible(True)
            self.table.setVisible(False)
            self.warnings_label.setText("—")
            return
        self.error_label.setVisible(False)
        self.table.setVisible(True)
        texts = result_texts(design, evaluation, system)
        ranged = (evaluation.result.speeds_rpm[1] > evaluation.result.speeds_rpm[0]
                  or bool(evaluation.result.duty_points))  # the worst case covers the duty speeds too
        for key, label in self.value_labels.items():
            visible = key in texts and (key != "worst" or ranged)
            label.setVisible(visible)
            self.row_labels[key].setVisible(visible)
            if visible and label.text() != texts[key]:
                label.setText(texts[key])
        self.row_labels["damping"].setText(
            "Damping per mount" + ("\n(equivalent viscous)" if evaluation.result.damping_is_equivalent else ""))
        self._design_warnings = tuple(evaluation.result.warnings)
        self._show_warnings()

    def show_studies(self, rows, warnings) -> None:
        """Rows ``(label, text)`` of the project's studies and their warnings (from core)."""
        rows = [tuple(row) for row in rows]
        if [label for label, _ in rows] == [label for label, _ in self._study_rows]:
            for label, text in rows:          # same rows: new texts only
                if self.study_value_labels[label].text() != text:
                    self.study_value_labels[label].setText(text)
            self._study_rows = rows
        else:
            self._study_rows = rows
            while self.study_form.rowCount():
                self.study_form.removeRow(0)
            self.study_value_labels = {}
            for label, text in rows:
                value = ValueText(text)
                self.study_form.addRow(QtWidgets.QLabel(label), value)
                self.study_value_labels[label] = value
        self.study_title.setVisible(bool(rows))
        self.study_table.setVisible(bool(rows))
        self._study_warnings = tuple(warnings)
        self._show_warnings()

    def _show_warnings(self) -> None:
        warnings = self._design_warnings + self._study_warnings
        text = "\n".join(f"• {w}" for w in warnings) if warnings else "none"
        self.warnings_label.setText(text)         # equal texts are left alone

"""Fit settings: C (log slider + exact field), hard margin, kernel, class weights, scaling."""

from __future__ import annotations

import itertools
import math

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (QButtonGroup, QCheckBox, QComboBox, QDoubleSpinBox, QFormLayout,
                               QHBoxLayout, QLabel, QLineEdit, QRadioButton, QSpinBox,
                               QVBoxLayout, QWidget, QGroupBox)

from solver import kernels, scaling
from solver import InputError
from solver import PARAMETERS

from app.document.class_words import caption
from app.document.document import CONFIG, METADATA, POINTS
from app.panels.path_ticks import TickedSlider

LOG_C_MIN, LOG_C_MAX = -3.0, 4.0     # the slider spans C = 1e-3 .. 1e4
SLIDER_STEPS = 700                   # 100 steps per decade
C_FIELD_TIP = "the exact value of C; press Enter to apply"
_gestures = itertools.count(1)


def slider_to_C(position: int) -> float:
    return 10.0 ** (LOG_C_MIN + (LOG_C_MAX - LOG_C_MIN) * position / SLIDER_STEPS)


def C_to_slider(C: float) -> int:
    t = (math.log10(C) - LOG_C_MIN) / (LOG_C_MAX - LOG_C_MIN)
    return int(round(min(max(t, 0.0), 1.0) * SLIDER_STEPS))


SPIN_LIMIT = 1e4      # the spin boxes' own upper end where a setting has none


def _parameter_box(name: str):
    """A spin box for one solver.parameters setting: its range, step and help."""
    spec = PARAMETERS[name]
    if spec.kind is int:
        box = QSpinBox()
        box.setRange(int(spec.low), int(min(spec.high, SPIN_LIMIT)))
    else:
        box = QDoubleSpinBox()
        box.setDecimals(spec.decimals)
        # the range includes an open lower end (gamma = 0) so that it can be typed
        # and refused with its reason in place, instead of silently reverted
        box.setRange(max(spec.low, -SPIN_LIMIT), min(spec.high, SPIN_LIMIT))
    box.setSingleStep(spec.step)
    box.setKeyboardTracking(False)
    box.setToolTip(spec.help)
    return box


class Controls(QWidget):
    """Reads the document's config and sends it SetConfig commands; no fitting here."""

    def __init__(self, document, canvas=None, parent=None):
        super().__init__(parent)
        self.document = document
        self.canvas = canvas
        self._updating = False
        self._gesture = None

        self.slider = TickedSlider(Qt.Horizontal)
        self.slider.setRange(0, SLIDER_STEPS)
        self.slider.setToolTip("C on a logarithmic scale, 0.001 to 10000")
        # no validator: a refused value stays in the field and the hint says why
        self.C_field = QLineEdit()
        self.C_field.setMaximumWidth(90)
        self.C_field.setToolTip(C_FIELD_TIP)
        self.hint = QLabel()
        self.hint.setObjectName("settings_hint")
        self.hint.setWordWrap(True)
        self.hint.setStyleSheet("color: #b00020;")
        self.hint.hide()
        self.hard = QCheckBox("hard margin (C = \u221e)")
        row = QHBoxLayout()
        row.addWidget(self.slider, 1)
        row.addWidget(self.C_field)

        # the kernel list and its parameter rows come from the kernel registry,
        # ranges and help texts from solver.parameters
        self.kernel = QComboBox()
        for kernel in kernels.REGISTRY.values():
            self.kernel.addItem(kernel.title, kernel.name)
            self.kernel.setItemData(self.kernel.count() - 1, kernel.help, Qt.ToolTipRole)
        self.kernel.setToolTip("the kernel k(x, z) of the decision function")
        self.parameter_boxes = {name: _parameter_box(name) for name in kernels.parameter_names()}
        for name, box in self.parameter_boxes.items():
            setattr(self, name, box)              # self.gamma, self.degree, self.offset
        self.weight_positive = _parameter_box("weight_positive")
        self.weight_negative = _parameter_box("weight_negative")
        self.scaling = QComboBox()
        for method, meaning in scaling.METHODS.items():
            self.scaling.addItem(scaling.TITLES[method], method)
            self.scaling.setItemData(self.scaling.count() - 1, meaning, Qt.ToolTipRole)
        self.scaling.setToolTip("feature scaling before the fit: "
                                + "; ".join(f"{scaling.TITLES[k]}: {v}"
                                            for k, v in scaling.METHODS.items())
                                + ". w and b are always shown in the original units")

        self.form = QFormLayout()
        self.form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        self.form.addRow("C", row)
        self.form.addRow("", self.hard)
        self.form.addRow("kernel", self.kernel)
        for name, box in self.parameter_boxes.items():
            self.form.addRow(PARAMETERS[name].label, box)
        self.form.addRow("scaling", self.scaling)
        self.weight_form = QFormLayout()
        self.weight_form.addRow("+1 weight", self.weight_positive)
        self.weight_form.addRow("\u22121 weight", self.weight_negative)
        weights = QGroupBox("class weights (C_i = C \u00d7 weight)")
        weights.setLayout(self.weight_form)

        self.new_class = QButtonGroup(self)
        self.add_positive = QRadioButton("+1")
        self.add_negative = QRadioButton("\u22121")
        self.add_positive.setChecked(True)
        self.new_class.addButton(self.add_positive, 1)
        self.new_class.addButton(self.add_negative, -1)
        adding = QGroupBox("a click adds (Shift: the other class)")
        adding_row = QHBoxLayout(adding)
        adding_row.addWidget(self.add_positive)
        adding_row.addWidget(self.add_negative)
        adding_row.addStretch(1)

        layout = QVBoxLayout(self)
        layout.addLayout(self.form)
        layout.addWidget(self.hint)
        layout.addWidget(weights)
        layout.addWidget(adding)
        layout.addStretch(1)

        document.paths.ready.connect(
            lambda path: self.slider.set_ticks(C_to_slider(C) for C in path.breakpoints))
        document.paths.cleared.connect(lambda: self.slider.set_ticks(()))
        self.slider.sliderPressed.connect(self._start_gesture)
        self.slider.sliderReleased.connect(self._end_gesture)
        self.slider.valueChanged.connect(self._slider_moved)
        self.C_field.editingFinished.connect(self._C_typed)
        self.hard.toggled.connect(lambda on: self._change(hard_margin=bool(on)))
        self.kernel.currentIndexChanged.connect(
            lambda index: self._change(kernel=self.kernel.itemData(index)))
        for name, box in self.parameter_boxes.items():
            kind = PARAMETERS[name].kind
            box.valueChanged.connect(lambda v, name=name, kind=kind: self._change(**{name: kind(v)}))
        self.weight_positive.valueChanged.connect(lambda v: self._change(weight_positive=float(v)))
        self.weight_negative.valueChanged.connect(lambda v: self._change(weight_negative=float(v)))
        self.scaling.currentIndexChanged.connect(
            lambda index: self._change(scaling=self.scaling.itemData(index)))
        self.new_class.idToggled.connect(self._new_class_toggled)
        document.changed.connect(self._document_changed)
        self.show_config()
        self._show_class_names()

    # -- widgets -> document -------------------------------------------------------
    def _start_gesture(self):
        self._gesture = ("C-slider", next(_gestures))

    def _end_gesture(self):
        self._gesture = None

    def _slider_moved(self, position):
        if self._updating:
            return
        C = float(f"{slider_to_C(position):.4g}")
        # one drag of the slider is one undo step
        self.document.set_C(C, merge_key=self._gesture)

    def _C_typed(self):
        text = self.C_field.text().strip()
        try:
            value = float(text)
            self.document.config.with_changes(C=value, hard_margin=False)
        except (ValueError, InputError):
            # the window's own words: here C = infinity is the hard-margin box
            self._refuse(self.C_field, f"C must be a positive number such as 0.5 or 10 "
                                       f"(for C = \u221e tick hard margin); got {text!r}")
            return
        if value == self.document.config.C and not self.document.config.hard_margin:
            self._clear_refusal()
            return
        self._change(C=value, hard_margin=False)

    def _change(self, **changes):
        if self._updating:
            return
        try:
            config = self.document.config.with_changes(**changes)
        except InputError as exc:
            field = self.C_field if "C" in changes else None
            self._refuse(field, str(exc))
            if field is None:
                self.show_config(keep_hint=True)
            return
        self._clear_refusal()
        self.document.set_config(config)

    def _refuse(self, field, reason: str):
        """Say in place why a typed value was not applied (the field keeps it)."""
        self.hint.setText(reason)
        self.hint.show()
        if field is not None:
            field.setStyleSheet("border: 1px solid #b00020;")
            field.setToolTip(reason)

    def _clear_refusal(self):
        if self.hint.isHidden():
            return              # nothing shown: no style change (each one re-polishes)
        self.hint.hide()
        self.hint.clear()
        self.C_field.setStyleSheet("")
        self.C_field.setToolTip(C_FIELD_TIP)

    def _new_class_toggled(self, sign, checked):
        if checked and self.canvas is not None:
            self.canvas.new_point_sign = sign

    # -- document -> widgets -------------------------------------------------------
    def _document_changed(self, changes):
        if CONFIG in changes:
            self.show_config()
        if changes & {POINTS, METADATA}:
            self._show_class_names()

    def show_config(self, keep_hint=False):
        config = self.document.config
        if not keep_hint:
            self._clear_refusal()
        self._updating = True
        try:
            if not self.slider.isSliderDown():
                self.slider.setValue(C_to_slider(config.C))
            self.C_field.setText(f"{config.C:.6g}")
            self.hard.setChecked(config.hard_margin)
            self.slider.setEnabled(not config.hard_margin)
            self.C_field.setEnabled(not config.hard_margin)
            self.kernel.setCurrentIndex(self.kernel.findData(config.kernel))
            used = config.kernel_spec.parameters
            for name, box in self.parameter_boxes.items():
                box.setValue(getattr(config, name))
                self.form.setRowVisible(box, name in used)
            self.weight_positive.setValue(config.weight_positive)
            self.weight_negative.setValue(config.weight_negative)
            self.scaling.setCurrentIndex(self.scaling.findData(config.scaling))
        finally:
            self._updating = False

    def _show_class_names(self):
        positive = caption(self.document.label_for(1), 1)
        negative = caption(self.document.label_for(-1), -1)
        self.add_positive.setText(positive)
        self.add_negative.setText(negative)
        self.weight_form.labelForField(self.weight_positive).setText(positive)
        self.weight_form.labelForField(self.weight_negative).setText(negative)

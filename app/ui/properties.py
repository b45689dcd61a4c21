"""The Part panel and the in-place value editor.

Both accept values as people type them (SI prefixes, the IEC 60062 code such
as 4k7 or R47) through ``parse_value``; mm² and % as plain numbers; a cable's
cross-section also as a wire gauge (``14 AWG``); a power rating also as a
fraction (``1/4``). Anything else is refused with a message in words,
leaving the part as it was.
"""
from __future__ import annotations

import re

from PySide6.QtCore import QPoint, QSize, Qt, Signal
from PySide6.QtWidgets import (QCheckBox, QComboBox, QFormLayout, QFrame, QHBoxLayout, QLabel, QLineEdit,
                               QPushButton, QVBoxLayout, QWidget)

from ..sketch.bench_parts import (CELL_PRESETS, DROP_LIMIT_GENERAL, DROP_LIMIT_SAFETY, POWER_RATING_CHOICES,
                                  apply_cell_preset, awg_to_mm2, cable_resistance, lamp_hot_resistance,
                                  parse_awg)
from ..sketch.fileio import LABEL_MAX
from ..sketch.kinds import FLAG_LABELS, ValueField, kind_spec
from ..units import format_value
from .editor import Editor
from .theme import style_refusal
from .valuetext import field_edit_text, field_text, read_field, read_value

__all__ = ["PartPanel", "InlineValueEditor", "read_power_rating", "read_cross_section"]


def _error_label() -> QLabel:
    label = QLabel()
    label.setWordWrap(True)
    style_refusal(label)
    label.setVisible(False)
    return label


def _rating_text(watts: float) -> str:
    """A power rating as resistor makers print it: 1/8 W, 1/4 W, 1/2 W, 2 W."""
    for frac, text in ((0.125, "1/8"), (0.25, "1/4"), (0.5, "1/2")):
        if watts == frac:
            return f"{text} W"
    return "not given" if watts == 0 else field_text(watts, _POWER)


_POWER = ValueField("power_rating", "Power rating", "W", 0.0)
_FRACTION = re.compile(r"\s*(\d+)\s*/\s*(\d+)\s*(w|W)?\s*")


def read_power_rating(text: str) -> float:
    """A typed power rating in W: ``1/4``, ``1/4 W``, ``0.6``, ``600m``, ``not given`` (0)."""
    t = text.strip()
    if t.lower() in ("", "not given", "none", "-"):
        return 0.0
    m = _FRACTION.fullmatch(t)
    if m:
        if int(m[2]) == 0:
            raise ValueError(f"'{t}' divides by zero; type a rating such as 1/4 or 0.6.")
        return int(m[1]) / int(m[2])
    return read_value(t, "W", "Power rating", True)


def read_cross_section(text: str, f: ValueField) -> float:
    """Cross-section in mm², typed as mm² (``1.5``) or as a wire gauge (``14 AWG``, ``2/0 AWG``)."""
    if "awg" in text.lower() or "/" in text:
        return awg_to_mm2(parse_awg(text))
    return read_field(text, f)


def _heading(text: str) -> QLabel:
    label = QLabel(f"<b>{text}</b>")
    label.setContentsMargins(0, 6, 0, 0)
    return label


def _note(text: str = "") -> QLabel:
    label = QLabel(text)
    label.setWordWrap(True)
    label.setObjectName("note")
    return label


class PartPanel(QWidget):
    """Designator, values, ratings, choices and states of the one selected part.

    Every change is one undoable step through the editor; a cell preset fills
    EMF, internal resistance and capacity in one step, and each stays open to
    be overridden.
    """

    refused = Signal(str)

    def sizeHint(self) -> QSize:  # noqa: N802 (Qt's name)
        """No wider than the panel must be: the side column follows its docks' widths, and a
        cell's long rows (its preset list, "Maximum current (0 = not given)") widened it and
        narrowed the canvas, moving the drawing under the pointer. Where a row does not fit
        beside its label, its field goes under it."""
        return QSize(self.minimumSizeHint().width(), super().sizeHint().height())

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.editor: Editor | None = None
        self.name: str | None = None
        self._fields: dict[str, QLineEdit] = {}
        self._combos: dict[str, QComboBox] = {}
        self._boxes: dict[str, QCheckBox] = {}
        self._kind = ""
        outer = QVBoxLayout(self)
        outer.setContentsMargins(8, 8, 8, 8)
        self.heading = QLabel("Select one part to see and change its values.")
        self.heading.setWordWrap(True)
        outer.addWidget(self.heading)
        self.form_host = QWidget()
        self.form = QFormLayout(self.form_host)
        self.form.setContentsMargins(0, 4, 0, 0)
        self.form.setRowWrapPolicy(QFormLayout.RowWrapPolicy.WrapLongRows)  # see ``sizeHint``
        outer.addWidget(self.form_host)
        self.derived = _note()
        outer.addWidget(self.derived)
        self.message = _error_label()
        outer.addWidget(self.message)
        row = QHBoxLayout()
        self.turn_button = QPushButton("Turn 90°")
        self.mirror_button = QPushButton("Mirror")
        row.addWidget(self.turn_button)
        row.addWidget(self.mirror_button)
        self.buttons = QWidget()
        self.buttons.setLayout(row)
        row.setContentsMargins(0, 0, 0, 0)
        outer.addWidget(self.buttons)
        outer.addStretch(1)
        self.turn_button.clicked.connect(lambda: self._turn(False))
        self.mirror_button.clicked.connect(lambda: self._turn(True))
        self.show_part(None)

    def set_editor(self, editor: Editor) -> None:
        self.editor = editor
        self.show_part(None)

    def _turn(self, mirror: bool) -> None:
        if self.editor and self.name:
            self.editor.rotate([self.name], mirror)

    def show_part(self, name: str | None) -> None:
        """Show the part called ``name`` (None: nothing or several selected)."""
        sketch = self.editor.sketch if self.editor else None
        if name is not None and self.name is not None and sketch is not None and sketch.has_part(name) \
                and self._fields and sketch.part(name).kind == self._kind:
            # a part of the kind shown: keep the widgets, show its texts (building the form
            # anew takes longer than a frame, and clicking from part to part is common)
            same = name == self.name
            if not same:
                self.name = name
                self.message.setVisible(False)
            self._refresh(sketch.part(name), keep_typing=same)
            return
        while self.form.rowCount():
            self.form.removeRow(0)
        self._fields, self._combos, self._boxes = {}, {}, {}
        self.message.setVisible(False)
        self.derived.setVisible(False)
        if name is None or sketch is None or not sketch.has_part(name):
            self.name = None
            self.heading.setText("Select one part to see and change its values.")
            self.form_host.setVisible(False)
            self.buttons.setVisible(False)
            return
        self.name = name
        part = sketch.part(name)
        self._kind = part.kind
        spec = kind_spec(part.kind)
        self.heading.setText(f"<b>{spec.title}</b>")
        self.form_host.setVisible(True)
        self.buttons.setVisible(True)
        if part.kind != "ground":
            des = QLineEdit(part.name)
            des.setObjectName("designator")
            des.editingFinished.connect(lambda e=des: self._rename(e.text()))
            self.form.addRow("Designator", des)
            self._fields["designator"] = des
            about = QLineEdit(part.label)
            about.setObjectName("description")
            about.setPlaceholderText("what it is: drive motor, tail lamp")
            about.setMaxLength(LABEL_MAX)
            about.setToolTip("Shown under the part's value on the drawing (View ▸ Part descriptions)")
            about.editingFinished.connect(lambda e=about: self._describe(e.text()))
            self.form.addRow("Description", about)
            self._fields["description"] = about
        for c in spec.choices:
            if c.key == "preset":
                self._add_choice(c, part)
        for f in spec.fields:
            self._add_field(f, part)
        for c in spec.choices:
            if c.key != "preset":
                self._add_choice(c, part)
        for flag in spec.flags:
            box = QCheckBox(FLAG_LABELS.get(flag, flag.replace("_", " ").capitalize()))
            box.setObjectName(flag)
            box.setChecked(part.flag(flag))
            box.toggled.connect(lambda on, k=flag: self.editor and self.name and self.editor.set_flag(self.name, k, on))
            self.form.addRow("", box)
            self._boxes[flag] = box
        if spec.ratings:
            self.form.addRow(_heading("Ratings"))
            for f in spec.ratings:
                if f.key == "power_rating":
                    self._add_power_rating(part)
                else:
                    self._add_field(f, part)
        self._refresh(part)

    def _add_field(self, f: ValueField, part) -> None:
        edit = QLineEdit(field_edit_text(part.value(f.key), f))
        edit.setObjectName(f.key)
        if f.key == "cross_section":
            edit.setToolTip("Type the cross-section in mm² (such as 1.5), or a wire gauge such as 14 AWG or 2/0 AWG")
        elif f.key == "drop_limit":
            edit.setToolTip(f"Common practice: {DROP_LIMIT_SAFETY:g} % for circuits that matter to safety, "
                            f"{DROP_LIMIT_GENERAL:g} % for the rest")
        elif f.prefixed:
            edit.setToolTip("Type a value such as 4.7k, 4k7, 470R, R47 or 10m")
        else:
            edit.setToolTip(f"Type a plain number of {f.unit}")
        edit.editingFinished.connect(lambda e=edit, fld=f: self._apply(fld, e))
        self.form.addRow(f"{f.label} ({f.unit})", edit)
        self._fields[f.key] = edit

    def _add_choice(self, c, part) -> None:
        combo = QComboBox()
        combo.setObjectName(c.key)
        for key, label in c.options:
            combo.addItem(label, key)
        combo.setCurrentIndex(max(combo.findData(part.choice(c.key)), 0))
        combo.activated.connect(lambda _i, cb=combo, k=c.key: self._choose(k, cb.currentData()))
        if c.key == "preset":
            combo.setToolTip("Fills the EMF, internal resistance and capacity with typical values, from memory; "
                             "change any of them afterwards")
        self.form.addRow(c.label, combo)
        self._combos[c.key] = combo

    def _add_power_rating(self, part) -> None:
        combo = QComboBox()
        combo.setObjectName("power_rating")
        combo.setEditable(True)
        combo.setInsertPolicy(QComboBox.InsertPolicy.NoInsert)
        combo.addItem("not given", 0.0)
        for w in POWER_RATING_CHOICES:
            combo.addItem(_rating_text(w), w)
        combo.setToolTip("Pick a usual rating or type one, such as 3 W or 0.6")
        combo.activated.connect(lambda i, cb=combo: self._set_rating(cb.itemData(i)))
        combo.lineEdit().editingFinished.connect(lambda cb=combo: self._typed_rating(cb))
        self.form.addRow("Power rating (W)", combo)
        self._combos["power_rating"] = combo

    def _refresh(self, part, keep_typing: bool = True) -> None:
        """Show ``part``'s values; ``keep_typing`` leaves a field being typed in as it is (the
        same part changed under it), else every field shows ``part`` (another part shown)."""
        spec = kind_spec(part.kind)
        for f in spec.value_fields:
            edit = self._fields.get(f.key)
            if edit is not None and not (keep_typing and edit.hasFocus()):
                edit.setText(field_edit_text(part.value(f.key), f))
        des = self._fields.get("designator")
        if des is not None and not (keep_typing and des.hasFocus()):
            des.setText(part.name)
        about = self._fields.get("description")
        if about is not None and not (keep_typing and about.hasFocus()):
            about.setText(part.label)
        for key, combo in self._combos.items():
            combo.blockSignals(True)
            if key == "power_rating":
                if not (keep_typing and combo.lineEdit().hasFocus()):
                    combo.setEditText(_rating_text(part.value("power_rating")))
            else:
                combo.setCurrentIndex(max(combo.findData(part.choice(key)), 0))
            combo.blockSignals(False)
        for key, box in self._boxes.items():
            box.blockSignals(True)
            box.setChecked(part.flag(key))
            box.blockSignals(False)
        text = self._derived_text(part)
        self.derived.setText(text)
        self.derived.setVisible(bool(text))

    @staticmethod
    def _derived_text(part) -> str:
        """What follows from the values: a lamp's hot resistance, a cable's resistance, a preset's note."""
        try:
            if part.kind == "lamp":
                r = lamp_hot_resistance(part.value("rated_voltage"), part.value("rated_power"))
                return (f"Modelled at its hot resistance V²/P = {format_value(r, 'Ω')}; "
                        "a cold filament is lower, so it draws more at switch-on.")
            if part.kind == "cable":
                r = cable_resistance(part.value("length"), part.value("cross_section"), part.choice("material"),
                                     part.flag("both_conductors"))
                return f"Resistance of the run: {format_value(r, 'Ω')} at 20 °C."
        except ValueError as e:
            return str(e)
        if part.kind == "cell":
            preset = CELL_PRESETS.get(part.choice("preset"))
            if preset is None:
                return ""
            changed = (part.value("emf"), part.value("internal_resistance"), part.value("capacity")) != (
                preset.emf, preset.internal_resistance, preset.capacity)
            return ("Preset values are typical, from memory; real cells vary with make, age, charge and "
                    "temperature." + (" Some values were changed since the preset was picked." if changed else ""))
        if part.kind == "voltmeter":
            return "An ideal voltmeter draws no current; a real one loads the circuit through its input resistance."
        return ""

    def field(self, key: str) -> QLineEdit:
        """The line edit of value ``key`` (or ``"designator"``, ``"description"``)."""
        return self._fields[key]

    def combo(self, key: str) -> QComboBox:
        """The list of choice ``key`` (``preset``, ``material``, ``power_rating``)."""
        return self._combos[key]

    def check_box(self, key: str) -> QCheckBox:
        """The check box of flag ``key``."""
        return self._boxes[key]

    def _refuse(self, message: str) -> None:
        self.message.setText("Not accepted: " + message)
        self.message.setVisible(True)
        self.refused.emit(message)

    def _rename(self, text: str) -> None:
        if not (self.editor and self.name) or text.strip() == self.name:
            return
        try:
            self.editor.rename(self.name, text)
        except ValueError as e:
            self._fields["designator"].setText(self.name)
            self._refuse(str(e))

    def _describe(self, text: str) -> None:
        if not (self.editor and self.name):
            return
        try:
            self.editor.describe(self.name, text)
        except ValueError as e:
            self._refuse(str(e))
        self._fields["description"].setText(self.editor.sketch.part(self.name).label)  # as kept

    def _apply(self, f, edit: QLineEdit) -> None:
        if not (self.editor and self.name):
            return
        part = self.editor.sketch.part(self.name)
        if edit.text().strip() == field_edit_text(part.value(f.key), f):
            return
        try:
            if f.key == "cross_section":
                v = read_cross_section(edit.text(), f)
            else:
                v = read_field(edit.text(), f)
        except ValueError as e:
            self._refuse(str(e))
            edit.selectAll()
            return
        self.message.setVisible(False)
        if v != part.value(f.key):
            self.editor.set_values(self.name, {f.key: v})
        else:
            edit.setText(field_edit_text(v, f))

    def _choose(self, key: str, option: str) -> None:
        if not (self.editor and self.name) or option is None:
            return
        part = self.editor.sketch.part(self.name)
        if key == "preset":
            new = apply_cell_preset(part, option)
            title = CELL_PRESETS[option].title if option in CELL_PRESETS else "custom values"
            self.editor.change(self.name, new, f"{self.name}: {title}")
        elif option != part.choice(key):
            self.editor.set_choice(self.name, key, option)

    def _set_rating(self, watts: float | None) -> None:
        if not (self.editor and self.name) or watts is None:
            return
        if watts != self.editor.sketch.part(self.name).value("power_rating"):
            self.message.setVisible(False)
            self.editor.set_values(self.name, {"power_rating": float(watts)})

    def _typed_rating(self, combo: QComboBox) -> None:
        if not (self.editor and self.name):
            return
        try:
            watts = read_power_rating(combo.currentText())
        except ValueError as e:
            self._refuse(str(e))
            return
        self._set_rating(watts)
        combo.setEditText(_rating_text(self.editor.sketch.part(self.name).value("power_rating")))


class InlineValueEditor(QFrame):
    """A small editor laid over the canvas at a part's value; Enter applies, Esc leaves."""

    closed = Signal()
    refused = Signal(str)

    def __init__(self, viewport: QWidget, editor: Editor, name: str, at: QPoint) -> None:
        super().__init__(viewport)
        self.editor = editor
        self.name = name
        part = editor.sketch.part(name)
        spec = kind_spec(part.kind)
        self.field = spec.fields[0]
        self.setFrameShape(QFrame.Shape.StyledPanel)
        self.setAutoFillBackground(True)
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.setSpacing(2)
        self.line = QLineEdit(field_edit_text(part.value(self.field.key), self.field))
        self.line.setPlaceholderText(f"{self.field.label} in {self.field.unit}")
        self.line.setMinimumWidth(140)
        self.line.selectAll()
        lay.addWidget(self.line)
        self.message = _error_label()
        self.message.setMaximumWidth(260)
        lay.addWidget(self.message)
        self.line.installEventFilter(self)
        self.move(at)
        self.adjustSize()
        self.show()
        self.line.setFocus()

    def eventFilter(self, obj, event) -> bool:
        from PySide6.QtCore import QEvent
        if obj is self.line and event.type() == QEvent.Type.KeyPress:
            if event.key() == Qt.Key.Key_Escape:
                self.dismiss()
                return True
            if event.key() in (Qt.Key.Key_Return, Qt.Key.Key_Enter):
                self.commit()  # consumed here, so the canvas does not take Enter as "edit again"
                return True
        return super().eventFilter(obj, event)

    def commit(self) -> None:
        """Apply the typed value, or say why it is refused and stay open."""
        try:
            v = (read_cross_section(self.line.text(), self.field) if self.field.key == "cross_section"
                 else read_field(self.line.text(), self.field))
        except ValueError as e:
            self.message.setText("Not accepted: " + str(e))
            self.message.setVisible(True)
            self.adjustSize()
            self.refused.emit(str(e))
            self.line.selectAll()
            return
        if self.editor.sketch.has_part(self.name):
            self.editor.set_values(self.name, {self.field.key: v})
        self.dismiss()

    def dismiss(self) -> None:
        if not self.isVisible():
            return
        self.hide()
        self.closed.emit()
        self.deleteLater()

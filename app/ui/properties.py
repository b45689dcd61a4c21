"""The Part panel and the in-place value editor.

Both accept values as people type them (SI prefixes, the IEC 60062 code such
as 4k7 or R47) through ``parse_value``, and refuse anything else with a
message in words, leaving the part as it was.
"""
from __future__ import annotations

from PySide6.QtCore import QPoint, Qt, Signal
from PySide6.QtWidgets import (QCheckBox, QFormLayout, QFrame, QHBoxLayout, QLabel, QLineEdit,
                               QPushButton, QVBoxLayout, QWidget)

from ..sketch.kinds import kind_spec
from .editor import Editor
from .valuetext import editable_text, read_value

__all__ = ["PartPanel", "InlineValueEditor"]


def _error_label() -> QLabel:
    label = QLabel()
    label.setWordWrap(True)
    label.setObjectName("refusal")
    label.setVisible(False)
    return label


class PartPanel(QWidget):
    """Designator, values and switch state of the one selected part."""

    refused = Signal(str)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.editor: Editor | None = None
        self.name: str | None = None
        self._fields: dict[str, QLineEdit] = {}
        self._kind = ""
        outer = QVBoxLayout(self)
        outer.setContentsMargins(8, 8, 8, 8)
        self.heading = QLabel("Select one part to see and change its values.")
        self.heading.setWordWrap(True)
        outer.addWidget(self.heading)
        self.form_host = QWidget()
        self.form = QFormLayout(self.form_host)
        self.form.setContentsMargins(0, 4, 0, 0)
        outer.addWidget(self.form_host)
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
        if name is not None and name == self.name and sketch is not None and sketch.has_part(name) \
                and self._fields and sketch.part(name).kind == self._kind:
            self._refresh(sketch.part(name))  # same part: update the texts, keep the widgets
            return
        while self.form.rowCount():
            self.form.removeRow(0)
        self._fields = {}
        self.message.setVisible(False)
        sketch = self.editor.sketch if self.editor else None
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
        for f in spec.fields:
            edit = QLineEdit(editable_text(part.value(f.key), f.unit))
            edit.setObjectName(f.key)
            edit.setToolTip("Type a value such as 4.7k, 4k7, 470R, R47 or 10m")
            edit.editingFinished.connect(lambda e=edit, fld=f: self._apply(fld, e))
            self.form.addRow(f"{f.label} ({f.unit})", edit)
            self._fields[f.key] = edit
        for flag in spec.flags:
            box = QCheckBox("Closed" if flag == "closed" else flag.title())
            box.setChecked(part.flag(flag))
            box.toggled.connect(lambda on, k=flag: self.editor and self.name and self.editor.set_flag(self.name, k, on))
            self.form.addRow("", box)

    def _refresh(self, part) -> None:
        for f in kind_spec(part.kind).fields:
            edit = self._fields.get(f.key)
            if edit is not None and not edit.hasFocus():
                edit.setText(editable_text(part.value(f.key), f.unit))
        des = self._fields.get("designator")
        if des is not None and not des.hasFocus():
            des.setText(part.name)

    def field(self, key: str) -> QLineEdit:
        """The line edit of value ``key`` (or ``"designator"``)."""
        return self._fields[key]

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

    def _apply(self, f, edit: QLineEdit) -> None:
        if not (self.editor and self.name):
            return
        part = self.editor.sketch.part(self.name)
        if edit.text().strip() == editable_text(part.value(f.key), f.unit):
            return
        try:
            v = read_value(edit.text(), f.unit, f.label, f.zero_ok)
        except ValueError as e:
            self._refuse(str(e))
            edit.selectAll()
            return
        self.message.setVisible(False)
        self.editor.set_values(self.name, {f.key: v})


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
        self.line = QLineEdit(editable_text(part.value(self.field.key), self.field.unit))
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
            v = read_value(self.line.text(), self.field.unit, self.field.label, self.field.zero_ok)
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

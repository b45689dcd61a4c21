"""Two bench questions asked on demand: the equivalent at two points, and preferred values.

``EquivalentDialog`` shows what the circuit looks like from two points
(Thevenin voltage and resistance, Norton current, the load that would draw
the most power).  ``PreferredValuesDialog`` lists the nearest E12, E24 and
E96 values (IEC 60063) for one resistor with what each would change, and
puts a chosen one in place as one undoable step.
"""
from __future__ import annotations

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (QAbstractItemView, QDialog, QDialogButtonBox, QHeaderView, QLabel, QPushButton,
                               QTableWidget, QTableWidgetItem, QVBoxLayout, QWidget)

from ..assess import Equivalent, Substitution
from ..units import format_value

__all__ = ["EquivalentDialog", "PreferredValuesDialog", "equivalent_lines"]


def equivalent_lines(eq: Equivalent, a: str, b: str) -> list[tuple[str, str]]:
    """The equivalent as (what, value) rows, in words; ``a`` and ``b`` name the points."""
    rows = [("Seen from", f"{a} (+) to {b}")]
    if eq.has_source:
        rows.append(("Open-circuit voltage (Thevenin)", format_value(eq.open_voltage, "V")))
    else:
        rows.append(("Open-circuit voltage", "none: no source drives these points"))
    rows.append(("Internal resistance", format_value(eq.resistance, "Ω")))
    if eq.short_current is None:
        rows.append(("Short-circuit current (Norton)",
                     "unlimited in this model: an ideal source sits right across the points"))
    elif eq.has_source:
        rows.append(("Short-circuit current (Norton)", format_value(eq.short_current, "A")))
    if eq.max_power_load is not None and eq.max_power is not None:
        rows.append(("Load for the most power", format_value(eq.max_power_load, "Ω")))
        rows.append(("Power it would draw", format_value(eq.max_power, "W")))
    return rows


def _table(headers: list[str]) -> QTableWidget:
    t = QTableWidget(0, len(headers))
    t.setHorizontalHeaderLabels(headers)
    t.verticalHeader().setVisible(False)
    t.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
    t.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
    t.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
    t.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
    t.horizontalHeader().setStretchLastSection(True)
    return t


def _cell(text: str, right: bool = False) -> QTableWidgetItem:
    item = QTableWidgetItem(text)
    if right:
        item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
    return item


class EquivalentDialog(QDialog):
    """The Thevenin and Norton equivalent between two picked points."""

    def __init__(self, eq: Equivalent, a: str, b: str, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Equivalent at two points")
        self.equivalent = eq
        lay = QVBoxLayout(self)
        self.table = _table(["", "Value"])
        self.table.horizontalHeader().setVisible(False)
        for what, value in equivalent_lines(eq, a, b):
            r = self.table.rowCount()
            self.table.insertRow(r)
            self.table.setItem(r, 0, _cell(what))
            self.table.setItem(r, 1, _cell(value))
        lay.addWidget(self.table)
        note = QLabel("Any linear DC network looks like one source and one resistance from two of its "
                      "points; a load equal to that resistance draws the most power (Jacobi's law), "
                      "at half the voltage.")
        note.setWordWrap(True)
        lay.addWidget(note)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.close)
        lay.addWidget(buttons)
        self.resize(460, 320)


class PreferredValuesDialog(QDialog):
    """Nearest preferred values for one resistor; ``chosen(value)`` when one is put in place."""

    chosen = Signal(float)

    def __init__(self, name: str, present: float, subs: list[Substitution], now: tuple[float, float, float],
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Preferred values for {name}")
        self.substitutions = subs
        lay = QVBoxLayout(self)
        i, v, p = now
        head = QLabel(f"{name} is {format_value(present, 'Ω')} now: {format_value(abs(i), 'A')}, "
                      f"{format_value(abs(v), 'V')}, {format_value(abs(p), 'W')}. "
                      "The nearest values of the IEC 60063 series, and what each would change:")
        head.setWordWrap(True)
        lay.addWidget(head)
        self.table = _table(["Series", "Value", "Off by", "Current", "Drop", "Power", "Changes most elsewhere"])
        for s in subs:
            r = self.table.rowCount()
            self.table.insertRow(r)
            elsewhere = (f"{s.most_changed} by {100 * s.most_changed_fraction:.2g} %" if s.most_changed
                         else "nothing else")
            for col, text in enumerate((s.series, format_value(s.value, "Ω"), f"{100 * s.deviation:+.2g} %",
                                        format_value(abs(s.current), "A"), format_value(abs(s.voltage), "V"),
                                        format_value(abs(s.power), "W"), elsewhere)):
                self.table.setItem(r, col, _cell(text, 0 < col < 6))
        lay.addWidget(self.table)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        self.use_button = QPushButton("Use This Value")
        self.use_button.setEnabled(False)
        buttons.addButton(self.use_button, QDialogButtonBox.ButtonRole.ActionRole)
        buttons.rejected.connect(self.close)
        self.use_button.clicked.connect(self._use)
        self.table.itemSelectionChanged.connect(
            lambda: self.use_button.setEnabled(bool(self.table.selectionModel().selectedRows())))
        lay.addWidget(buttons)
        self.resize(720, 360)

    def _use(self) -> None:
        rows = self.table.selectionModel().selectedRows()
        if rows:
            self.chosen.emit(self.substitutions[rows[0].row()].value)

"""The Readings panel: every designated part with its current, drop and power.

Rows follow the document (designators in natural order: R2 before R10);
values come from the newest solution and read "—" while there is none.
The last column says how far the meters shift the circuit from the
unmetered one: each meter's own reading against the reading of an ideal
meter, and the part whose current the meters change most.
"""
from __future__ import annotations

import re

from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt, Signal
from PySide6.QtWidgets import QAbstractItemView, QHeaderView, QTableView

from ..sketch.model import Sketch
from ..units import format_value

__all__ = ["ReadingsModel", "ReadingsView", "natural_key", "BRANCH", "EFFECT"]

COLUMNS = ("Part", "Current", "Drop", "Power", "As", "Meter effect")  # "As": the branch current's name
_UNITS = (None, "A", "V", "W")
BRANCH = 4  # the column naming the part's current by its branch (tag or automatic name)
EFFECT = 5  # the column of the meters' effect


_DISPLAY = int(Qt.ItemDataRole.DisplayRole.value)
_ALIGN = int(Qt.ItemDataRole.TextAlignmentRole.value)
_TIP = int(Qt.ItemDataRole.ToolTipRole.value)
_RIGHT = int((Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter).value)


def natural_key(name: str) -> tuple:
    """Sort key putting R2 before R10."""
    return tuple(int(t) if t.isdigit() else t for t in re.split(r"(\d+)", name))


class ReadingsModel(QAbstractTableModel):
    """Table of part, current (first terminal to second), drop and absorbed power."""

    filled = Signal()  # values arrived after a time without any (a first solution, or after an error)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.names: list[str] = []
        self.rows: dict[str, tuple[float, float, float]] = {}
        self.effects: dict[str, tuple[str, str]] = {}  # short text, full text
        self.branch_names: dict[str, str] = {}  # part -> "Ia" or "−Ia"
        self._row_of: dict[str, int] = {}
        self._drawn: list[str] = []  # the names in document order, as last seen

    def set_parts(self, sketch: Sketch) -> None:
        """Follow the document's parts (ground symbols are left out).

        The rows are sorted again only when the set of names changed (a move or a new
        value leaves them as they are).
        """
        drawn = [p.name for p in sketch.parts if p.kind != "ground"]
        if drawn == self._drawn:
            return
        self._drawn = drawn
        names = sorted(drawn, key=natural_key)
        if names != self.names:
            self.beginResetModel()
            self.rows = {}  # another set of parts: the next values are a first fill (columns refit)
            self.names = names
            self._row_of = {n: i for i, n in enumerate(names)}
            self.endResetModel()

    def set_readings(self, readings: dict[str, tuple[float, float, float]]) -> None:
        """Show new values (an empty dict shows dashes)."""
        first = readings and not self.rows
        self.rows = readings
        if first:
            self.filled.emit()
        if self.names:
            self.dataChanged.emit(self.index(0, 1), self.index(len(self.names) - 1, 3))

    def set_effects(self, effects: dict[str, tuple[str, str]]) -> None:
        """Show how the meters shift the circuit: (short, full) text per part (meters, the most shifted part)."""
        self.effects = effects
        if self.names:
            self.dataChanged.emit(self.index(0, EFFECT), self.index(len(self.names) - 1, EFFECT))

    def set_branch_names(self, names: dict[str, str]) -> None:
        """Name each part's current by its branch: ``Ia`` along the part, ``−Ia`` against it."""
        if names == self.branch_names:
            return
        self.branch_names = names
        if self.names:
            self.dataChanged.emit(self.index(0, BRANCH), self.index(len(self.names) - 1, BRANCH))

    def row_of(self, name: str) -> int:
        return self._row_of.get(name, -1)

    def rowCount(self, parent: QModelIndex | QPersistentModelIndex = QModelIndex()) -> int:
        return 0 if parent.isValid() else len(self.names)

    def columnCount(self, parent: QModelIndex | QPersistentModelIndex = QModelIndex()) -> int:
        return 0 if parent.isValid() else len(COLUMNS)

    def text(self, row: int, column: int) -> str:
        name = self.names[row]
        if column == 0:
            return name
        if column == EFFECT:
            return self.effects.get(name, ("", ""))[0]
        if column == BRANCH:
            return self.branch_names.get(name, "")
        r = self.rows.get(name)
        if r is None:
            return "—"
        return format_value(r[column - 1], _UNITS[column])

    def data(self, index: QModelIndex | QPersistentModelIndex, role: int = Qt.ItemDataRole.DisplayRole):
        # asked for every visible cell and role on each repaint: compare plain ints, not Qt enums
        if not index.isValid():
            return None
        if role == _DISPLAY:
            return self.text(index.row(), index.column())
        column = index.column()
        if role == _ALIGN:
            return _RIGHT if column > 0 else None
        if role != _TIP:
            return None
        if column == 1:
            return "Current through the part from its first terminal to its second"
        if column == 3:
            return "Power absorbed; negative means the part delivers power"
        if column == BRANCH:
            return ("The part's current by the name of its branch current (your tag, or an automatic "
                    "name): −Ia means the part's first-to-second current runs against Ia")
        if column == EFFECT:
            full = self.effects.get(self.names[index.row()], ("", ""))[1]
            return full or ("For a meter: its reading against an ideal meter's. For another part: how much the "
                    "meters change its current from the unmetered circuit")
        return None

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole and orientation == Qt.Orientation.Horizontal:
            return COLUMNS[section]
        return None


class ReadingsView(QTableView):
    """The table, selecting whole rows."""

    def __init__(self, model: ReadingsModel, parent=None) -> None:
        super().__init__(parent)
        self.setModel(model)
        self.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.verticalHeader().setVisible(False)
        self.verticalHeader().setDefaultSectionSize(22)
        header = self.horizontalHeader()
        # Columns fit their contents when the rows change, not on every new value: sizing to
        # contents on each update measured every cell of a large sketch after every edit.
        header.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        header.setStretchLastSection(True)
        header.setMinimumSectionSize(36)
        model.modelReset.connect(self._fit_columns)
        model.filled.connect(self._fit_columns)
        self.setAlternatingRowColors(True)
        self.setShowGrid(False)
        self.setWordWrap(False)

    def _fit_columns(self) -> None:
        """Size the columns to what they hold (at most the first few hundred rows are measured)."""
        self.horizontalHeader().setResizeContentsPrecision(200)
        self.resizeColumnsToContents()

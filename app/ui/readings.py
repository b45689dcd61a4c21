"""The Readings panel: every designated part with its current, drop and power.

Rows follow the document (designators in natural order: R2 before R10);
values come from the newest solution and read "—" while there is none.
The last column says how far the meters shift the circuit from the
unmetered one: each meter's own reading against the reading of an ideal
meter, and the part whose current the meters change most.
"""
from __future__ import annotations

import re

from PySide6.QtCore import (QAbstractTableModel, QElapsedTimer, QModelIndex, QPersistentModelIndex, QSize, Qt,
                            QTimer, Signal)
from PySide6.QtWidgets import QAbstractItemView, QHeaderView, QStyle, QStyleOptionViewItem, QTableView

from ..sketch.model import Sketch
from ..units import format_value

__all__ = ["ReadingsModel", "ReadingsView", "natural_key", "BRANCH", "EFFECT"]

COLUMNS = ("Part", "Current", "Drop", "Power", "As", "Meter effect")  # "As": the branch current's name
UNITS = ("A", "V", "W")  # of the value columns, 1 to 3
BRANCH = 4  # the column naming the part's current by its branch (tag or automatic name)
EFFECT = 5  # the column of the meters' effect


_DISPLAY = int(Qt.ItemDataRole.DisplayRole.value)
_ALIGN = int(Qt.ItemDataRole.TextAlignmentRole.value)
_TIP = int(Qt.ItemDataRole.ToolTipRole.value)
_RIGHT = int((Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter).value)
_NO_VALUES = ("—", "—", "—")
_MOST_CELLS = 200  # QTableView (Qt 6.11) repaints all it shows for a dataChanged of more cells


def natural_key(name: str) -> tuple:
    """Sort key putting R2 before R10."""
    return tuple(int(t) if t.isdigit() else t for t in re.split(r"(\d+)", name))


class ReadingsModel(QAbstractTableModel):
    """Table of part, current (first terminal to second), drop and absorbed power.

    The value texts of a row are formatted when a view first asks for them and kept while
    they stay the same; each new solution is held against them, and ``dataChanged`` covers
    only the rows whose texts differ, so the table repaints only those (at three significant
    figures a new value in a large sketch changes few of the texts on screen).
    """

    filled = Signal()  # values arrived after a time without any (a first solution, or after an error)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.names: list[str] = []
        self.rows: dict[str, tuple[float, float, float]] = {}
        self.effects: dict[str, tuple[str, str]] = {}  # short text, full text
        self.branch_names: dict[str, str] = {}  # part -> "Ia" or "−Ia"
        self._row_of: dict[str, int] = {}
        self._drawn: list[str] = []  # the names in document order, as last seen
        self._shown: dict[int, tuple[str, str, str]] = {}  # row -> its value texts as handed out, still current
        self._sketch: Sketch | None = None  # whose parts the rows show (their descriptions: the Part column's tooltip)

    def set_parts(self, sketch: Sketch) -> None:
        """Follow the document's parts (ground symbols are left out).

        The rows are sorted again only when the set of names changed (a move or a new
        value leaves them as they are).
        """
        self._sketch = sketch
        drawn = [p.name for p in sketch.parts if p.kind != "ground"]
        if drawn == self._drawn:
            return
        self._drawn = drawn
        names = sorted(drawn, key=natural_key)
        if names != self.names:
            self.beginResetModel()
            self.rows = {}  # another set of parts: the next values are a first fill (columns refit)
            self._shown = {}
            self.names = names
            self._row_of = {n: i for i, n in enumerate(names)}
            self.endResetModel()

    def set_readings(self, readings: dict[str, tuple[float, float, float]]) -> None:
        """Show new values (an empty dict shows dashes); only rows whose texts change are repainted.

        A row whose texts were handed out is formatted again and compared; any other row
        counts as changed when its values differ.
        """
        first = bool(readings) and not self.rows
        old, self.rows = self.rows, readings
        shown, self._shown = ({} if first else self._shown), {}  # dashes to values: every row changes
        changed: list[int] = []
        for row, name in enumerate(self.names):
            texts = shown.get(row)
            if old.get(name) != readings.get(name):
                if texts is None:
                    changed.append(row)
                    continue
                new = self._value_texts(name)
                if new != texts:
                    changed.append(row)
                    texts = new
            if texts is not None:
                self._shown[row] = texts
        if first:
            self.filled.emit()
        self._emit_rows(changed, 1, 3)

    def set_effects(self, effects: dict[str, tuple[str, str]]) -> None:
        """Show how the meters shift the circuit: (short, full) text per part (meters, the most shifted part)."""
        old, self.effects = self.effects, effects
        self._emit_names({n for n in old.keys() | effects.keys() if old.get(n) != effects.get(n)}, EFFECT)

    def set_branch_names(self, names: dict[str, str]) -> None:
        """Name each part's current by its branch: ``Ia`` along the part, ``−Ia`` against it."""
        old, self.branch_names = self.branch_names, names
        self._emit_names({n for n in old.keys() | names.keys() if old.get(n) != names.get(n)}, BRANCH)

    def _emit_names(self, names: set[str], column: int) -> None:
        self._emit_rows(sorted(self._row_of[n] for n in names if n in self._row_of), column, column)

    def _emit_rows(self, rows: list[int], first_column: int, last_column: int) -> None:
        """Tell the views which rows (ascending) changed in these columns: one signal per run of rows.

        A run is cut to at most ``_MOST_CELLS`` cells: for a larger range a table view repaints
        all it shows, changed or not.
        """
        most = max(1, _MOST_CELLS // (last_column - first_column + 1))
        start = 0
        for k in range(1, len(rows) + 1):
            if k == len(rows) or rows[k] != rows[k - 1] + 1 or k - start == most:
                self.dataChanged.emit(self.index(rows[start], first_column), self.index(rows[k - 1], last_column))
                start = k

    def keep_shown(self, first: int, last: int) -> None:
        """Forget the value texts handed out for rows outside ``first``..``last`` (off screen).

        Only a matter of speed: a forgotten row is not formatted again to be compared, and
        counts as changed when its values change.
        """
        self._shown = {r: t for r, t in self._shown.items() if first <= r <= last}

    def row_of(self, name: str) -> int:
        return self._row_of.get(name, -1)

    def rowCount(self, parent: QModelIndex | QPersistentModelIndex = QModelIndex()) -> int:
        return 0 if parent.isValid() else len(self.names)

    def columnCount(self, parent: QModelIndex | QPersistentModelIndex = QModelIndex()) -> int:
        return 0 if parent.isValid() else len(COLUMNS)

    def _value_texts(self, name: str) -> tuple[str, str, str]:
        r = self.rows.get(name)
        if r is None:
            return _NO_VALUES
        return tuple(format_value(v, unit) for v, unit in zip(r, UNITS))

    def text(self, row: int, column: int) -> str:
        """The text shown in a cell."""
        if 1 <= column <= 3:
            texts = self._shown.get(row)
            if texts is None:
                texts = self._shown[row] = self._value_texts(self.names[row])
            return texts[column - 1]
        name = self.names[row]
        if column == 0:
            return name
        if column == EFFECT:
            return self.effects.get(name, ("", ""))[0]
        return self.branch_names.get(name, "")

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
        if column == 0:
            name = self.names[index.row()]
            about = self._sketch.part(name).label if self._sketch and self._sketch.has_part(name) else ""
            return f"{name}: {about}" if about else None
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
    """The table, selecting whole rows.

    New values are repainted once the drawing pauses (``CATCH_UP_MS``), and at the latest
    ``STALE_MOST_MS`` after the first of them: while a part is dragged each step is solved
    and drawn on the canvas, and the table, off to the side, need not repaint with every
    step (a table of a large sketch costs about as much as a tenth of a 60 Hz frame).
    The model always holds the newest values: anything that repaints the table earlier
    (a scroll, a selection) shows them.
    """

    CATCH_UP_MS = 40
    STALE_MOST_MS = 500

    def __init__(self, model: ReadingsModel, parent=None) -> None:
        super().__init__(parent)
        self._late: list[tuple[int, int, int, int]] = []  # changed (rows, columns) not yet repainted
        self._late_since = QElapsedTimer()
        self._catch_up_timer = QTimer(self)
        self._catch_up_timer.setSingleShot(True)
        self._catch_up_timer.timeout.connect(self.catch_up)
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
        self.verticalScrollBar().valueChanged.connect(self._forget_hidden_rows)

    @property
    def catching_up(self) -> bool:
        """True while changed values wait for their repaint."""
        return bool(self._late)

    def dataChanged(self, top_left: QModelIndex, bottom_right: QModelIndex, roles=()) -> None:  # noqa: N802
        """Note the changed cells; they are repainted at the next pause (``catch_up``)."""
        if not self._late:
            self._late_since.start()
        self._late.append((top_left.row(), bottom_right.row(), top_left.column(), bottom_right.column()))
        if self._late_since.elapsed() >= self.STALE_MOST_MS:
            self.catch_up()
        else:
            self._catch_up_timer.start(self.CATCH_UP_MS)

    def catch_up(self) -> None:
        """Repaint the cells whose values changed since the last repaint."""
        self._catch_up_timer.stop()
        late, self._late = self._late, []
        model, rows = self.model(), self.model().rowCount()
        for r0, r1, c0, c1 in late:
            if r0 < rows:  # the rows may have gone since (a reset repainted everything)
                super().dataChanged(model.index(r0, c0), model.index(min(r1, rows - 1), c1), [])

    def sizeHintForColumn(self, column: int) -> int:  # noqa: N802 (Qt's name)
        """What a column needs: a value column at least the widest text it can show.

        The columns are fitted when the rows change, not with every new value; a table
        first filled with "0 A" would otherwise cut "−4.50 mA" short later.
        """
        hint = super().sizeHintForColumn(column)
        if 1 <= column <= len(UNITS):
            hint = max(hint, self._widest_value(UNITS[column - 1]))
        return hint

    def _widest_value(self, unit: str) -> int:
        """The width a cell needs for the widest value text in ``unit`` (three figures, a sign
        and any prefix from pico to tera), as the item's style sizes a cell (its margins too)."""
        opt = QStyleOptionViewItem()
        self.initViewItemOption(opt)
        opt.features |= QStyleOptionViewItem.ViewItemFeature.HasDisplay
        widest = 0
        for text in {format_value(-m * 10.0 ** e, unit) for e in range(-12, 13, 3) for m in (8.88, 88.8, 888.0)}:
            opt.text = text
            size = self.style().sizeFromContents(QStyle.ContentsType.CT_ItemViewItem, opt, QSize(), self)
            widest = max(widest, size.width())
        return widest

    def _fit_columns(self) -> None:
        """Size the columns to what they hold (at most the first few hundred rows are measured)."""
        self.horizontalHeader().setResizeContentsPrecision(200)
        self.resizeColumnsToContents()
        self._forget_hidden_rows()  # measuring asked for every row's texts

    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt's name)
        """Keep the one selected row in sight: selecting a part on the canvas scrolls the table to
        its row, and the part panel then growing for that part's values shortens the table."""
        super().resizeEvent(event)
        rows = self.selectionModel().selectedRows() if self.selectionModel() is not None else []
        if len(rows) == 1:
            self.scrollTo(rows[0])

    def _forget_hidden_rows(self) -> None:
        """Let the model drop the texts of rows out of sight, so a new solution compares only those on screen."""
        model = self.model()
        last = self.rowAt(self.viewport().height() - 1)
        model.keep_shown(max(self.rowAt(0), 0), last if last >= 0 else model.rowCount() - 1)

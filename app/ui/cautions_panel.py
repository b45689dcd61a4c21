"""The Cautions panel: what could hurt someone or something, most severe first.

Each entry starts with its severity in words (Danger, Warning, Note) and a
shape of its own beside it, so colour never carries the meaning alone
(WCAG 2.1, 1.4.1).  The panel always shows that the results come from an
idealised linear DC model (``app.assess.DISCLAIMER``).  Choosing an entry
asks for its parts to be selected on the canvas.
"""
from __future__ import annotations

from PySide6.QtCore import QPointF, Qt, Signal
from PySide6.QtGui import QColor, QIcon, QPainter, QPen, QPixmap, QPolygonF
from PySide6.QtWidgets import QCheckBox, QLabel, QListWidget, QListWidgetItem, QVBoxLayout, QWidget

from ..assess import DISCLAIMER, Caution
from .theme import current_theme

__all__ = ["CautionsPanel", "SEVERITY_WORDS", "most_severe_first", "caution_line"]

SEVERITY_WORDS = {"danger": "Danger", "warning": "Warning", "info": "Note"}
_ORDER = {"danger": 0, "warning": 1, "info": 2}


def most_severe_first(cautions) -> list[Caution]:
    """``cautions`` sorted most severe first (dangers, warnings, then notes)."""
    return sorted(cautions, key=lambda c: _ORDER.get(c.severity, 3))


def caution_line(c: Caution) -> str:
    """The caution as one line, its severity in words first ("Warning: …")."""
    return f"{SEVERITY_WORDS.get(c.severity, c.severity)}: {c.message}"


def _icon(severity: str) -> QIcon:
    """Filled triangle for danger, open triangle for a warning, a ringed i for a note."""
    th = current_theme()
    colour = {"danger": th.fault, "warning": th.loose}.get(severity, th.label)
    pm = QPixmap(18, 18)
    pm.fill(Qt.GlobalColor.transparent)
    p = QPainter(pm)
    p.setRenderHint(QPainter.RenderHint.Antialiasing)
    p.setPen(QPen(colour, 1.6))
    if severity in ("danger", "warning"):
        p.setBrush(colour if severity == "danger" else Qt.BrushStyle.NoBrush)
        p.drawPolygon(QPolygonF([QPointF(9, 1.5), QPointF(1.5, 16), QPointF(16.5, 16)]))
        p.setPen(QPen(QColor("white") if severity == "danger" else colour, 1.8))
        p.drawLine(QPointF(9, 6.5), QPointF(9, 11))
        p.drawPoint(QPointF(9, 13.6))
    else:
        p.drawEllipse(QPointF(9, 9), 7, 7)
        p.drawLine(QPointF(9, 8), QPointF(9, 13))
        p.drawPoint(QPointF(9, 5.5))
    p.end()
    return QIcon(pm)


class CautionsPanel(QWidget):
    """The list of cautions with the model's limits stated above it; ``partsChosen`` on a pick."""

    partsChosen = Signal(list)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        self.disclaimer = QLabel(DISCLAIMER)
        self.disclaimer.setWordWrap(True)
        self.disclaimer.setObjectName("disclaimer")
        self.disclaimer.setStyleSheet("QLabel#disclaimer { font-style: italic; }")
        lay.addWidget(self.disclaimer)
        self._entries: tuple = ()  # what the list was drawn from, to leave it alone when nothing changed
        self.list = QListWidget()
        self.list.setWordWrap(True)
        self.list.setAlternatingRowColors(True)
        self.list.setSelectionMode(QListWidget.SelectionMode.SingleSelection)
        lay.addWidget(self.list, 1)
        self.show_notes = QCheckBox("Show notes (readings, drops, lamp power, runtimes)")
        self.show_notes.setChecked(True)
        self.show_notes.toggled.connect(lambda _on: self._fill())
        lay.addWidget(self.show_notes)
        self.cautions: list[Caution] = []
        self._problem = ""
        self.list.itemSelectionChanged.connect(self._picked)

    def set_cautions(self, cautions: list[Caution], problem: str = "") -> None:
        """Show ``cautions`` (most severe first); ``problem`` says why there are none to show."""
        self.cautions = most_severe_first(cautions)
        self._problem = problem
        self._fill()

    def _fill(self) -> None:
        shown = [c for c in self.cautions if c.severity != "info" or self.show_notes.isChecked()]
        # everything the list is drawn from (the icons take the scheme's colours)
        entries = (current_theme().name, [(c.severity, c.message, tuple(c.parts)) for c in shown],
                   self._problem, not self.cautions)
        if entries == self._entries:
            return  # the same list: keep the person's selection and scroll place, and skip a repaint
        self._entries = entries
        self.list.blockSignals(True)
        self.list.clear()
        for c in shown:
            item = QListWidgetItem(_icon(c.severity), caution_line(c))
            item.setData(Qt.ItemDataRole.UserRole, list(c.parts))
            item.setToolTip(", ".join(c.parts) if c.parts else "")
            self.list.addItem(item)
        if not shown:
            item = QListWidgetItem(self._problem or ("Nothing to caution about in this circuit as drawn."
                                                     if self.cautions == [] else "Only notes; tick the box to see them."))
            item.setFlags(Qt.ItemFlag.NoItemFlags)
            self.list.addItem(item)
        self.list.blockSignals(False)

    def counts(self) -> dict[str, int]:
        """How many cautions of each severity there are."""
        out = {k: 0 for k in SEVERITY_WORDS}
        for c in self.cautions:
            out[c.severity] = out.get(c.severity, 0) + 1
        return out

    def texts(self) -> list[str]:
        """The entries as listed (for the status line and tests)."""
        return [self.list.item(i).text() for i in range(self.list.count())]

    def _picked(self) -> None:
        items = self.list.selectedItems()
        if items:
            parts = items[0].data(Qt.ItemDataRole.UserRole) or []
            if parts:
                self.partsChosen.emit(list(parts))

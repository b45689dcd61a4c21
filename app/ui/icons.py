"""Tool icons: the SVG drawings in ``assets/icons``, or the canvas symbols when those are absent."""
from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QRectF, Qt
from PySide6.QtGui import QColor, QGuiApplication, QIcon, QPainter, QPalette, QPen, QPixmap

from .symbols import IEC, paint_symbol

__all__ = ["tool_icon", "ICON_DIR"]

INK = "#27343b"  # the ink colour the SVG files are drawn in, replaced by the palette's text colour
ICON_DIR = Path(__file__).resolve().parents[2] / "assets" / "icons"


def _ink() -> QColor:
    """The text colour of the window's own palette: icons sit on the palette and panels, which
    follow the system, not on the canvas (whose scheme a person may choose apart)."""
    return QGuiApplication.palette().color(QPalette.ColorRole.WindowText)


def _painted(kind: str, style: str) -> QIcon:
    pm = QPixmap(64, 64)
    pm.fill(Qt.GlobalColor.transparent)
    p = QPainter(pm)
    p.setRenderHint(QPainter.RenderHint.Antialiasing)
    pen = QPen(_ink(), 3.0)
    p.setPen(pen)
    if kind == "ground":
        p.translate(32, 18)
        p.scale(1.4, 1.4)
    elif kind in ("select", "wire"):
        if kind == "wire":
            p.drawPolyline([QRectF(8, 16, 0, 0).topLeft(), QRectF(40, 16, 0, 0).topLeft(),
                            QRectF(40, 48, 0, 0).topLeft(), QRectF(58, 48, 0, 0).topLeft()])
        else:
            p.drawLine(16, 12, 16, 48)
            p.drawLine(16, 12, 44, 36)
        p.end()
        return QIcon(pm)
    else:
        p.translate(0, 32)
        p.scale(0.8, 0.8)
    paint_symbol(p, kind, style)
    p.end()
    return QIcon(pm)


def tool_icon(name: str, style: str = IEC) -> QIcon:
    """The icon for a tool (``select``, ``wire``) or a part kind."""
    path = ICON_DIR / f"{name}-{style}.svg"  # kinds drawn differently in the two symbol styles
    if not path.is_file():
        path = ICON_DIR / f"{name}.svg"
    if path.is_file():
        from PySide6.QtCore import QByteArray
        from PySide6.QtSvg import QSvgRenderer
        text = path.read_text(encoding="utf-8").replace(INK, _ink().name())
        renderer = QSvgRenderer(QByteArray(text.encode("utf-8")))
        if renderer.isValid():
            pm = QPixmap(64, 64)
            pm.fill(Qt.GlobalColor.transparent)
            p = QPainter(pm)
            renderer.render(p)
            p.end()
            return QIcon(pm)
    return _painted(name, style)

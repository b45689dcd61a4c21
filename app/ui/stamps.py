"""Small filled shapes drawn by copying a picture of them: arrow heads, tag boxes, loop arrows.

The reading layer draws hundreds of small antialiased shapes on every repaint. Filling
one costs Qt's raster engine about 3 µs (it rasterises the outline afresh each time);
copying a ready picture of it costs under 1 µs. A :class:`Stamper` keeps a picture of
each shape at the view's scale, one per quarter-pixel offset (``PHASES``), so a copy
lands within an eighth of a pixel of where the shape itself would be filled.

A *stamp* is ``(key, shapes, x, y)``: polygons to fill in turn (``shapes``, each with
its own colour) about the scene point (x, y); ``key`` names the shapes (equal keys,
equal shapes), so marks sharing a shape share its pictures.

Only raster painting under a zoom-and-scroll transform copies pictures; anything else
(a vector file, a turned painter) fills the polygons, as exact as before.
"""
from __future__ import annotations

import math
from collections.abc import Callable, Hashable, Sequence

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QImage, QPaintEngine, QPainter, QPixmap, QPolygonF, QTransform

__all__ = ["Stamp", "Stamper", "PHASES", "picture", "anchors", "copies", "zooms_only"]

Stamp = tuple[Hashable, Sequence[QPolygonF], float, float]
PHASES = 4  # offsets kept per device pixel, along each axis
_SCALED = QTransform.TransformationType.TxScale.value


class Stamper:
    """Draws stamps by copying pictures kept per scale, colours, shape and offset."""

    KEPT = 4096  # pictures kept per colour set before starting afresh

    def __init__(self) -> None:
        self._scale: tuple[float, float, float] | None = None
        self._kept: dict[tuple[int, ...], dict[tuple, tuple[QPixmap, int, int]]] = {}

    def draw(self, painter: QPainter, stamps: Sequence[Stamp], colours: Sequence[QColor], exact: bool = False) -> None:
        """Fill every stamp's shapes, the k-th in ``colours[k]``, as ``painter`` would fill them
        (``exact``: fill them, as for a picture file, where an eighth of a pixel matters more)."""
        if not stamps:
            return
        if exact or not copies(painter):
            for _, shapes, x, y in stamps:
                _fill(painter, shapes, colours, x, y)
            return
        t = painter.worldTransform()
        sx, sy, dpr = t.m11(), t.m22(), painter.device().devicePixelRatioF()
        if (sx, sy, dpr) != self._scale:  # a new zoom: the pictures of the last are no use
            self._scale = (sx, sy, dpr)
            self._kept.clear()
        look = tuple(c.rgba() for c in colours)
        kept = self._kept.get(look)
        if kept is None or len(kept) > self.KEPT:
            kept = self._kept[look] = {}
        whole, phase = anchors(t, dpr, np.array([(s[2], s[3]) for s in stamps], dtype=float))
        painter.save()
        painter.resetTransform()
        copy = painter.drawPixmap
        for (key, shapes, _, _), (ix, iy), (fx, fy) in zip(stamps, whole.tolist(), phase.tolist()):
            hit = kept.get((key, fx, fy))
            if hit is None:
                hit = kept[(key, fx, fy)] = picture(lambda q: _fill(q, shapes, colours), _box(shapes),
                                                    sx, sy, fx / PHASES, fy / PHASES, dpr)
            pm, left, top = hit
            if dpr == 1.0:
                copy(ix + left, iy + top, pm)
            else:
                copy(QPointF((ix + left) / dpr, (iy + top) / dpr), pm)
        painter.restore()



def _fill(painter: QPainter, shapes: Sequence[QPolygonF], colours: Sequence[QColor],
          x: float = 0.0, y: float = 0.0) -> None:
    """Fill ``shapes`` in turn, the k-th in ``colours[k]``, moved by (x, y), with no pen."""
    painter.setPen(Qt.PenStyle.NoPen)
    for shape, colour in zip(shapes, colours):
        painter.setBrush(colour)
        painter.drawPolygon(shape.translated(x, y) if x or y else shape)


def _box(shapes: Sequence[QPolygonF]) -> QRectF:
    box = shapes[0].boundingRect()
    for shape in shapes[1:]:
        box = box.united(shape.boundingRect())
    return box


def picture(draw: Callable[[QPainter], None], box: QRectF, sx: float, sy: float,
            fx: float, fy: float, dpr: float) -> tuple[QPixmap, int, int]:
    """What ``draw`` paints inside ``box`` (scene units about an origin, antialiased) at a
    zoom of ``sx``, ``sy`` on a screen of pixel ratio ``dpr``, with the origin at (fx, fy)
    within a device pixel; and where the picture's corner lies from that pixel (device pixels).

    The painter ``draw`` gets has the zoom as its transform (the pixel ratio is the
    picture's own, as on a screen), so level-of-detail tests see what a view's would."""
    kx, ky = sx * dpr, sy * dpr
    left, top = math.floor(fx + box.left() * kx) - 1, math.floor(fy + box.top() * ky) - 1
    right, bottom = math.ceil(fx + box.right() * kx) + 1, math.ceil(fy + box.bottom() * ky) + 1
    image = QImage(right - left, bottom - top, QImage.Format.Format_ARGB32_Premultiplied)
    image.fill(0)
    image.setDevicePixelRatio(dpr)
    painter = QPainter(image)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    painter.translate((fx - left) / dpr, (fy - top) / dpr)
    painter.scale(sx, sy)
    draw(painter)
    painter.end()
    return QPixmap.fromImage(image), left, top


def anchors(t: QTransform, dpr: float, xy: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For each scene point (rows of x, y) under ``t`` on a screen of pixel ratio ``dpr``: the
    device pixel it falls in, and its offset in that pixel in ``PHASES`` steps (rounded)."""
    q = np.floor((xy * (t.m11(), t.m22()) + (t.dx(), t.dy())) * (dpr * PHASES) + 0.5).astype(np.int64)
    return q // PHASES, q % PHASES


def zooms_only(t: QTransform) -> bool:
    """True when ``t`` only zooms (by positive factors) and scrolls."""
    return t.type().value <= _SCALED and t.m11() > 0 and t.m22() > 0


def copies(painter: QPainter) -> bool:
    """True when ``painter`` paints pixels under a zoom-and-scroll transform: pictures can be
    copied in (not for a vector file or a turned painter)."""
    engine = painter.paintEngine()
    return engine is not None and engine.type() == QPaintEngine.Type.Raster and zooms_only(painter.worldTransform())

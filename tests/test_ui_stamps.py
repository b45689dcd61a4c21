"""Stamps (app/ui/stamps.py): a copied picture of a shape against Qt filling the shape itself.

The reference is Qt's own antialiased polygon fill at the same place and scale; a stamp
lands within an eighth of a pixel of it, so the two may differ by a shade along edges,
never in where the shape is or how much it covers.
"""
from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QBuffer, QByteArray, QIODevice, QRectF, Qt  # noqa: E402
from PySide6.QtGui import QColor, QImage, QPainter, QTransform  # noqa: E402

import app.ui.annotations as an  # noqa: E402
from app.ui.stamps import Stamper  # noqa: E402

RED, GREY = QColor(200, 30, 30), QColor(230, 230, 225)


def _stamps() -> list:
    """One of each shape the reading layer stamps: heads four ways, a tag box, a loop arrow."""
    heads = [an._head_stamp(10.0 + 14 * k, 12.0, dx, dy) for k, (dx, dy) in enumerate(((1, 0), (0, 1), (-1, 0), (0, -1)))]
    key, shapes = an._tag_box(QRectF(-14, -6, 28, 12))
    r = 9.0
    loop = (("loop", r, True), (an._circling(r, True)[2],), 40.0, 44.0)
    return heads + [(key, shapes, 16.0, 44.0), loop]


def _image(dpr: float) -> QImage:
    image = QImage(int(90 * dpr * 2.2), int(70 * dpr * 2.2), QImage.Format.Format_ARGB32_Premultiplied)
    image.setDevicePixelRatio(dpr)
    image.fill(0)
    return image


def _coverage(image: QImage) -> np.ndarray:
    a = np.frombuffer(image.constBits(), np.uint8).reshape(image.height(), image.bytesPerLine())
    return a[:, 3:image.width() * 4:4].astype(float) / 255.0  # alpha of each pixel


def _drawn(transform: QTransform, dpr: float, stamped: bool) -> QImage:
    image = _image(dpr)
    p = QPainter(image)
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    p.setTransform(transform)
    for stamp in _stamps():
        colours = (RED, GREY) if len(stamp[1]) == 2 else (RED,)
        if stamped:
            Stamper().draw(p, [stamp], colours)
        else:  # what Qt fills: the shapes in place
            p.setPen(Qt.PenStyle.NoPen)
            for shape, colour in zip(stamp[1], colours):
                p.setBrush(colour)
                p.drawPolygon(shape.translated(stamp[2], stamp[3]))
    p.end()
    return image


@pytest.mark.parametrize("dpr", [1.0, 2.0])
@pytest.mark.parametrize("scale, dx, dy", [(1.0, 0.0, 0.0), (1.0, 0.3, 0.55), (1.0, 0.06, 0.19), (1.37, 2.875, 1.2),
                                           (2.0, 0.49, 0.51), (0.7, 0.11, 0.93)])
def test_a_stamp_covers_what_filling_its_shapes_covers(qtbot, dpr, scale, dx, dy):
    t = QTransform.fromTranslate(dx, dy).scale(scale, scale)
    stamped, filled = _coverage(_drawn(t, dpr, True)), _coverage(_drawn(t, dpr, False))
    assert filled.sum() > 100  # something was drawn
    # the same area to a hair (an eighth of a pixel's shift along the shapes' edges at most)
    assert stamped.sum() == pytest.approx(filled.sum(), rel=0.01)
    # and in the same place: a shift of at most an eighth of a pixel along each axis changes
    # a pixel's coverage by at most an eighth per axis (a quarter at a corner), plus rounding
    assert np.abs(stamped - filled).max() <= 0.25 + 2 / 255


def test_a_turned_painter_fills_the_shapes_themselves(qtbot):
    t = QTransform().rotate(30).scale(1.5, 1.5)
    assert _drawn(t, 1.0, True) == _drawn(t, 1.0, False)


def test_a_vector_file_gets_shapes_not_pictures(qtbot):
    from PySide6.QtSvg import QSvgGenerator
    data = QByteArray()
    buffer = QBuffer(data)
    buffer.open(QIODevice.OpenModeFlag.WriteOnly)
    gen = QSvgGenerator()
    gen.setOutputDevice(buffer)
    gen.setSize(_image(1.0).size())
    p = QPainter(gen)
    Stamper().draw(p, _stamps(), (RED, GREY))
    p.end()
    svg = bytes(data).decode()
    assert "<image" not in svg
    assert svg.count("<path") + svg.count("<polygon") >= len(_stamps())


def test_pictures_are_kept_per_zoom(qtbot):
    stamper = Stamper()
    image = _image(1.0)
    p = QPainter(image)
    p.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    stamps = [an._head_stamp(10.0 + 20 * k, 12.0, 1.0, 0.0) for k in range(6)]  # one shape, one phase
    stamper.draw(p, stamps, (RED,))
    assert sum(len(kept) for kept in stamper._kept.values()) == 1
    p.scale(2, 2)
    stamper.draw(p, stamps, (RED,))  # another zoom: a new picture, the old one dropped
    assert sum(len(kept) for kept in stamper._kept.values()) == 1
    p.end()

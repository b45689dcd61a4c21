"""How the reading layer draws its marks: the shapes it fills in place of stroked ones, and
new values that keep a mark's box (only the text is drawn anew).

The filled shapes are checked against Qt's own stroker: the area a pen covers is what
``QPainter`` fills when it strokes, so both are rasterised large and compared pixel by pixel.
The redrawn texts are checked against a window that draws the same circuit from scratch, and
against Ohm's law for the values.
"""
from __future__ import annotations

import os
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtCore import QPointF, QRectF, Qt  # noqa: E402
from PySide6.QtGui import QColor, QImage, QPainter, QPen, QPolygonF  # noqa: E402

from app.sketch.model import PlacedPart  # noqa: E402
from app.ui import annotations as an  # noqa: E402
from test_ui_reading_layer import divider  # noqa: E402
from ui_support import open_window, painted_canvas  # noqa: E402

SCALE = 16  # large enough that the edges' antialiasing is a thin share of the shape


def _raster(draw) -> QImage:
    """What ``draw(painter)`` covers, 48 × 48 units about the origin at ``SCALE``, antialiased
    (so each pixel holds the share of it covered, whatever the rasteriser's sampling rules)."""
    image = QImage(48 * SCALE, 48 * SCALE, QImage.Format.Format_Grayscale8)
    image.fill(255)
    p = QPainter(image)
    p.setRenderHint(QPainter.RenderHint.Antialiasing)
    p.scale(SCALE, SCALE)
    p.translate(24, 24)
    draw(p)
    p.end()
    return image


def _coverage(image: QImage) -> np.ndarray:
    rows = np.frombuffer(image.constBits(), np.uint8).reshape(image.height(), image.bytesPerLine())
    return (255 - rows[:, :image.width()].astype(float)) / 255


def _agree(stroked, filled) -> tuple[float, float]:
    """(area covered by one drawing and not the other, area covered by the stroked drawing), in pixels."""
    a, b = _coverage(_raster(stroked)), _coverage(_raster(filled))
    assert a.sum() > 100, "the reference drew nothing"
    return float(np.abs(a - b).sum()), float(a.sum())


def _stroked(polygon_or_arc, width: float, cap=Qt.PenCapStyle.SquareCap):
    def draw(p: QPainter) -> None:
        pen = QPen(QColor("black"), width)  # Qt's default join: bevel
        pen.setCapStyle(cap)
        p.setPen(pen)
        p.setBrush(QColor("black"))
        polygon_or_arc(p)
    return draw


def _filled(*shapes: QPolygonF):
    def draw(p: QPainter) -> None:
        p.setPen(Qt.PenStyle.NoPen)
        p.setBrush(QColor("black"))
        for s in shapes:
            p.drawPolygon(s)
    return draw


@pytest.mark.parametrize("direction", [(1.0, 0.0), (0.0, -1.0), (-1.0, 0.0), (0.6, 0.8)])
def test_filled_arrow_head_covers_what_a_stroked_one_does(direction):
    dx, dy = direction
    corners = QPolygonF([QPointF(x, y) for x, y in an._head_points(0.0, 0.0, dx, dy, 5.0)])
    odd, total = _agree(_stroked(lambda p: p.drawPolygon(corners), 1.4), _filled(an._arrow_head(0.0, 0.0, dx, dy)))
    assert odd < 0.01 * total  # only the flattening of curves differs


def test_filled_loop_arrow_is_the_arc_a_round_capped_pen_draws():
    # The reference is the shape's definition: the points within half the pen's width of the
    # arc (radius 9, from 120° clockwise through 300°, y up). Qt's own stroker flattens its
    # curves by up to half a pixel at this scale, so it is not exact enough to compare with.
    r, h = 9.0, an.LoopMark.PEN / 2
    band, head, arrow = an._circling(r, True)
    drawn = _coverage(_raster(_filled(band))) > 0.5
    ys, xs = np.mgrid[0:drawn.shape[0], 0:drawn.shape[1]]
    x, y = (xs + 0.5) / SCALE - 24, 24 - (ys + 0.5) / SCALE  # y up, as the angles
    along = (np.degrees(np.arctan2(y, x)) - 120.0) % 360.0  # clockwise from the start is 360 - along
    on_arc = (360.0 - along) % 360.0 <= 300.0
    ends = [(r * np.cos(np.radians(a)), r * np.sin(np.radians(a))) for a in (120.0, -180.0)]
    near_end = np.min([np.hypot(x - ex, y - ey) for ex, ey in ends], axis=0)
    beyond = np.where(on_arc, np.abs(np.hypot(x, y) - r), near_end) - h  # < 0 inside the shape
    clear = np.abs(beyond) > 0.5 / SCALE  # pixels more than half a pixel from the shape's edge
    assert clear.sum() > 0.9 * drawn.size
    assert ((beyond < 0) != drawn)[clear].sum() == 0  # all of them drawn as the definition says
    # and its area is the sector's θ·r·w plus the two half-disc caps (shoelace formula)
    pts = [(band.at(i).x(), band.at(i).y()) for i in range(band.count())]
    area = abs(sum(x0 * y1 - x1 * y0 for (x0, y0), (x1, y1) in zip(pts, pts[1:] + pts[:1]))) / 2
    assert area == pytest.approx(np.radians(300) * r * 2 * h + np.pi * h * h, rel=0.005)
    # the mark fills arc and head as one shape: the same pixels as the two filled apart
    odd, total = _agree(_filled(band, head), _filled(arrow))
    assert odd < 0.002 * total


def test_tag_box_rim_and_inside_cover_a_stroked_rounded_box():
    rect = QRectF(-20, -8, 40, 16)
    _, (edge, inside) = an._tag_box(rect)
    odd, total = _agree(_stroked(lambda p: p.drawRoundedRect(rect, 3, 3), an.PotentialTag.BORDER), _filled(edge))
    assert odd < 0.01 * total
    # the inside leaves the rim uncovered: what the pen drew inside the box's edge, as long as
    # the box's edge and as wide as the pen
    rim = (_coverage(_raster(_filled(edge))) - _coverage(_raster(_filled(inside)))).sum()
    assert rim == pytest.approx(an.PotentialTag.BORDER * SCALE * 2 * (40 + 16) * SCALE, rel=0.05)


def _pixels(win, marks) -> list[QImage]:
    """The canvas's last painted pixels under each mark's box."""
    image = painted_canvas(win)
    out = []
    for m in marks:
        left, top, right, bottom = m._scene_box
        out.append(image.copy(win.view.mapFromScene(QRectF(left, top, right - left, bottom - top)).boundingRect()))
    return out


def _marks(win):
    r1 = win.scene.part_items["R1"]
    tag = next(t for t in win.scene._tags if t.active and t.at == (8, 0))  # between R1 and R2
    return [r1.current_mark, r1.drop_mark, tag, win.scene._loops[0]]


@pytest.mark.parametrize("ohms, texts", [
    # 9 V / 6.1 kΩ = 1.475 mA; R1 drops 3.098 V, the point after it sits at 9 V × 4/6.1 = 5.902 V:
    # every text keeps its width, so only the texts are drawn anew
    (2100.0, ["1.48 mA", "3.10 V", "5.90 V"]),
    # 9 V / 10 kΩ = 900 µA (a narrower text: the arrow left of it moves), 5.40 V, 9 V × 4/10 = 3.60 V
    (6000.0, ["900 µA", "5.40 V", "3.60 V"]),
])
def test_a_new_value_is_drawn_in_place(qtbot, tmp_path, ohms, texts):
    win = open_window(qtbot, tmp_path, divider(), size=(1100, 700), centre=(160, 40))
    marks = _marks(win)
    assert [m.text for m in marks[:3]] == ["1.50 mA", "3.00 V", "6.00 V"]  # 9 V / 6 kΩ (Ohm's law)
    before = _pixels(win, marks)
    win.editor.set_values("R1", {"resistance": ohms})
    qtbot.waitUntil(lambda: not win.solver.busy)
    assert [m.text for m in marks[:3]] == texts
    assert marks[3].text.endswith(texts[0])
    after = _pixels(win, marks)
    assert all(a != b for a, b in zip(before, after))  # every mark shows its new digits
    # what the partial repaints left on screen is what a full repaint of the canvas draws: nothing
    # lost or left behind, though the layer repaints only the region of the changed texts and
    # draws the marks that meet it (ReadingLayer._areas)
    partial = painted_canvas(win)
    win.view.viewport().repaint()
    assert _differing(partial, painted_canvas(win)) == 0


def _differing(a: QImage, b: QImage) -> int:
    """How many pixels of two same-sized pictures differ."""
    rows = [np.frombuffer(im.constBits(), np.uint32).reshape(im.height(), im.bytesPerLine() // 4)[:, :im.width()]
            for im in (a, b)]
    return int((rows[0] != rows[1]).sum())


def _canvas_colour(win, scene_x: float, scene_y: float) -> QColor:
    """The canvas's last painted colour at a scene point."""
    return QColor(painted_canvas(win).pixel(win.view.mapFromScene(QPointF(scene_x, scene_y))))


def test_connection_dots_are_drawn_where_three_conductors_join(qtbot, tmp_path):
    from app.ui.theme import GRID, current_theme
    s = divider()
    # R3 from R1's right end down onto the bottom wire: three conductors meet at (8, 0),
    # and its lower end lands on the wire's middle, a T-junction at (8, 4)
    s.add_part(PlacedPart("resistor", "R3", 8, 0, 90, False, {"resistance": 1000.0}))
    win = open_window(qtbot, tmp_path, s, size=(1100, 700), centre=(160, 40))
    ink, paper = current_theme().ink, current_theme().paper

    def near(c: QColor, want: QColor) -> bool:
        return sum(abs(a - b) for a, b in zip(c.getRgb()[:3], want.getRgb()[:3])) < 60

    # the pixel 1.5 px off both conductors (lines about 1.6 px wide), well inside a dot of radius 3.6
    for x, y in ((8, 0), (8, 4)):
        assert near(_canvas_colour(win, x * GRID + 1.5, y * GRID + 1.5), ink)
    assert near(_canvas_colour(win, 4 * GRID + 1.5, 0 * GRID + 1.5), paper)  # two conductors: no dot
    win.scene.select(["R3"])
    win.editor.delete_selection()
    qtbot.waitUntil(lambda: not win.solver.busy)
    for x, y in ((8, 0), (8, 4)):
        assert near(_canvas_colour(win, x * GRID + 1.5, y * GRID + 1.5), paper)  # gone with R3


def _drawn_extent(mark, fig) -> QRectF:
    """Everything a mark's figure puts on the canvas, in scene coordinates (pens' half widths in)."""
    fm = an._fm()

    def text_box(at, st) -> QRectF:
        return QRectF(at.x(), at.y(), fm.horizontalAdvance(st.text()), fm.height())

    group = mark.GROUP
    if group < 2:
        at, st, lines, head = fig
        out = text_box(at, st)
        stamps = [head] if head is not None else []
    elif group == 2:
        leader, box, at, st = fig
        out, lines, stamps = text_box(at, st), [leader], [box]
    else:
        arrow, at, st = fig
        out, lines, stamps = text_box(at, st), [], [arrow]
    for line in lines:
        out = out.united(QRectF(line.p1(), line.p2()).normalized().adjusted(-0.75, -0.75, 0.75, 0.75))
    for _, shapes, x, y in stamps:  # a stamp's picture lands within an eighth of a pixel
        for shape in shapes:
            out = out.united(shape.boundingRect().translated(x, y).adjusted(-0.125, -0.125, 0.125, 0.125))
    return out


@pytest.mark.parametrize("parts", [20, 200])
def test_every_mark_draws_inside_the_box_it_asks_to_repaint(qtbot, tmp_path, parts):
    # A repaint covers a mark's box alone (ReadingLayer._repaint); what it draws outside that box
    # would be wiped by a neighbour's repaint and not drawn again. Antialiasing's half pixel is
    # the views' own margin (Qt repaints 2 px around every rectangle).
    sys.path.insert(0, str(Path(__file__).resolve().parent / "bench"))
    from bench_live import grid_sketch
    win = open_window(qtbot, tmp_path, grid_sketch(parts), size=(1100, 700))
    layer = win.scene._readings
    outside = []
    for table in layer.tables:
        for m in table.marks:
            if m is None or not m._visible:
                continue
            left, top, right, bottom = m._scene_box
            box = QRectF(left, top, right - left, bottom - top).adjusted(-0.5, -0.5, 0.5, 0.5)
            if not box.contains(_drawn_extent(m, m.figure())):
                outside.append((type(m).__name__, m.text, box, _drawn_extent(m, m.figure())))
    assert not outside, outside[:3]

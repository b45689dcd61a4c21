"""Showing a loop or a junction on the canvas: a broad band along its parts and wires.

The band follows the drawing: each part from terminal to terminal, and
between two parts of a loop the wires that join them (shortest run through
the node's wire pieces, from ``networkx``). A junction gets a ring and a
thinner band over the branches that meet there. The shape (band, ring) and
the label beside it carry the meaning, not the colour alone.
"""
from __future__ import annotations

from collections.abc import Iterable, Sequence

import networkx as nx
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QPainter, QPainterPath, QPainterPathStroker, QPen
from PySide6.QtWidgets import QStyleOptionGraphicsItem, QWidget

from solver import Solution

from ..sketch.netlist import Netlist
from .items import OnPaper
from .theme import GRID, current_theme, small_font

__all__ = ["Highlight", "loop_segments", "part_segments", "junction_point"]

Segment = tuple[tuple[float, float], tuple[float, float]]


def _pos(net: Netlist, point: str) -> tuple[float, float] | None:
    return net.circuit.positions.get(point)


def part_segments(net: Netlist, parts: Iterable[str]) -> list[Segment]:
    """Each part from its first terminal to its second, in grid units."""
    out = []
    for name in parts:
        if name not in net.circuit:
            continue
        p = net.circuit.part(name)
        a, b = _pos(net, p.a), _pos(net, p.b)
        if a is not None and b is not None:
            out.append((a, b))
    return out


def _wire_graph(net: Netlist) -> nx.Graph:
    g = nx.Graph()
    for p in net.circuit.parts:
        if p.is_conductor and p.name.startswith("~"):
            g.add_edge(p.a, p.b)
    return g


def loop_segments(net: Netlist, sol: Solution, parts: Sequence[str]) -> list[Segment]:
    """The parts of a loop (in order round it) and the wires joining each to the next."""
    names = [p for p in parts if p in net.circuit]
    out = part_segments(net, names)
    if len(names) < 2:
        return out
    g = _wire_graph(net)
    for p, q in zip(names, names[1:] + names[:1]):
        pp, qq = net.circuit.part(p), net.circuit.part(q)
        pairs = [(s, t) for s in (pp.a, pp.b) for t in (qq.a, qq.b) if sol.node_of(s) == sol.node_of(t)]
        best = None
        for s, t in pairs:
            if s == t:
                best = [s]
                break
            try:
                path = nx.shortest_path(g, s, t)
            except (nx.NetworkXNoPath, nx.NodeNotFound):
                continue
            if best is None or len(path) < len(best):
                best = path
        for u, v in zip(best or [], (best or [])[1:]):
            a, b = _pos(net, u), _pos(net, v)
            if a is not None and b is not None:
                out.append((a, b))
    return out


def junction_point(net: Netlist, sol: Solution, node: str) -> tuple[float, float] | None:
    """Where to ring a node: a drawn junction dot of it if there is one, else any of its points."""
    points = sol.nodes.get(node) or []
    dots = {f"{x},{y}" for x, y in net.junctions}
    for pt in sorted(points, key=lambda p: p not in dots):
        pos = _pos(net, pt)
        if pos is not None:
            return pos
    return None


class Highlight(OnPaper):
    """A band along segments (grid units) and optional rings, with a short label; under the
    ink, so painted with the paper (``OnPaper``) beneath the wires and parts."""

    def __init__(self, dashed: bool = False) -> None:
        super().__init__()
        self.dashed = dashed
        self.setZValue(0.5)  # below wires (1) and parts (2)
        self._path = QPainterPath()
        self._thin = QPainterPath()
        self._rings: list[QPointF] = []
        self._label = ""
        self._label_at = QPointF()
        self._bounds = QRectF()
        self.setVisible(False)

    def show_segments(self, segments: Sequence[Segment], label: str = "", thin: Sequence[Segment] = (),
                      rings: Sequence[tuple[float, float]] = ()) -> None:
        """Show ``segments`` as a broad band, ``thin`` as a narrow one, ``rings`` round points."""
        was = self.sceneBoundingRect()
        self.prepareGeometryChange()
        self._path = self._make(segments)
        self._thin = self._make(thin)
        self._rings = [QPointF(x * GRID, y * GRID) for x, y in rings]
        self._label = label
        pts = [QPointF(x * GRID, y * GRID) for s in list(segments) + list(thin) for x, y in s] + self._rings
        if self._rings:  # a junction: the label goes by its ring
            self._label_at = self._rings[0] + QPointF(12, -12)
        elif pts:
            top = min(pts, key=lambda p: (p.y(), p.x()))
            self._label_at = top + QPointF(6, -10)
        rect = self._path.boundingRect().united(self._thin.boundingRect())
        for r in self._rings:
            rect = rect.united(QRectF(r.x() - 14, r.y() - 14, 28, 28))
        if label and pts:
            rect = rect.united(QRectF(self._label_at.x() - 4, self._label_at.y() - 16, 12 * len(label) + 8, 22))
        self._bounds = rect.adjusted(-12, -12, 12, 12)
        self.setVisible(bool(pts))
        self.repaper(was)

    def clear(self) -> None:
        self.setVisible(False)

    @staticmethod
    def _make(segments: Sequence[Segment]) -> QPainterPath:
        path = QPainterPath()
        for (x0, y0), (x1, y1) in segments:
            path.moveTo(x0 * GRID, y0 * GRID)
            path.lineTo(x1 * GRID, y1 * GRID)
        return path

    def boundingRect(self) -> QRectF:
        return self._bounds

    def shape(self) -> QPainterPath:
        return QPainterPathStroker().createStroke(QPainterPath())  # never takes clicks

    def paint(self, painter: QPainter, option: QStyleOptionGraphicsItem, widget: QWidget | None = None) -> None:
        th = current_theme()
        band = QColor(th.loop)
        band.setAlpha(70 if not self.dashed else 110)
        pen = QPen(band, 11 if not self.dashed else 7)
        pen.setCapStyle(Qt.PenCapStyle.RoundCap)
        pen.setJoinStyle(Qt.PenJoinStyle.RoundJoin)
        if self.dashed:
            pen.setStyle(Qt.PenStyle.DashLine)
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setBrush(Qt.BrushStyle.NoBrush)
        painter.setPen(pen)
        painter.drawPath(self._path)
        pen.setWidthF(5)
        painter.setPen(pen)
        painter.drawPath(self._thin)
        ring = QPen(th.loop, 2.4)
        painter.setPen(ring)
        for r in self._rings:
            painter.drawEllipse(r, 10, 10)
        if self._label:
            painter.setFont(small_font())
            painter.setPen(th.loop)
            painter.drawText(self._label_at, self._label)

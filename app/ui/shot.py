"""Pictures without a screen: the annotated sketch as PNG (QImage), SVG (QtSvg) or a PDF page (``page``)."""
from __future__ import annotations

import os
import sys
from pathlib import Path

from PySide6.QtCore import QRectF, QSize, Qt
from PySide6.QtGui import QImage, QPainter
from PySide6.QtWidgets import QApplication

from ..sketch.fileio import load_sketch
from .bench_marks import BenchMarks
from .page import page_notes, write_pdf
from .scene import SketchScene
from .solve_worker import solve_sketch
from .symbols import IEC
from .theme import LIGHT, current_theme, scheme_for

__all__ = ["render", "render_scene", "ensure_app", "PICTURE_TYPES"]

PICTURE_TYPES = (".png", ".svg", ".pdf")


def ensure_app() -> QApplication:
    """The running QApplication, or a new one (offscreen when there is no display)."""
    app = QApplication.instance()
    if app is None:
        if not os.environ.get("QT_QPA_PLATFORM") and not (
                os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY")) and sys.platform.startswith("linux"):
            os.environ["QT_QPA_PLATFORM"] = "offscreen"
        app = QApplication(sys.argv[:1])
    return app  # type: ignore[return-value]


def render_scene(scene: SketchScene, path_out: str | os.PathLike[str], scale: float = 2.0,
                 title: str = "", cautions: list | None = None, paper: str = "a4") -> None:
    """Write everything drawn in ``scene`` to a PNG or SVG file, on the scheme's paper colour,
    or to PDF sheets of ``paper`` (``page.PAPERS``) headed ``title`` (default: the file's
    name) with ``cautions`` (the solution's ``Caution`` list) under the drawing."""
    out = Path(path_out)
    suffix = out.suffix.lower()
    if suffix not in PICTURE_TYPES:
        raise ValueError(f"Pictures can be written as .png, .svg or .pdf, not '{out.suffix or out.name}'.")
    if suffix == ".pdf":
        write_pdf(scene, out, title or out.stem, page_notes(cautions or []), paper)
        return
    scene.settle_marks()  # no mark left waiting for its place in a picture
    rect = scene.content_rect()
    if rect.isNull() or rect.width() < 1:
        rect = QRectF(0, 0, 200, 120)
    rect = rect.adjusted(-24, -24, 24, 24)
    paper = current_theme().paper
    if suffix == ".png":
        image = QImage(QSize(int(rect.width() * scale), int(rect.height() * scale)), QImage.Format.Format_ARGB32)
        image.fill(paper)
        painter = QPainter(image)
        painter.setRenderHints(QPainter.RenderHint.Antialiasing | QPainter.RenderHint.TextAntialiasing)
        with scene.drawn_afresh():
            scene.render(painter, QRectF(0, 0, image.width(), image.height()), rect,
                         Qt.AspectRatioMode.KeepAspectRatio)
        painter.end()
        if not image.save(str(out)):
            raise OSError(f"Could not write the picture {out}.")
        return
    from PySide6.QtSvg import QSvgGenerator
    gen = QSvgGenerator()
    gen.setFileName(str(out))
    gen.setSize(QSize(int(rect.width()), int(rect.height())))
    gen.setViewBox(QRectF(0, 0, rect.width(), rect.height()))
    gen.setTitle("Loopwright sketch")
    gen.setDescription("Sketch with its mesh-current solution")
    painter = QPainter(gen)
    painter.fillRect(QRectF(0, 0, rect.width(), rect.height()), paper)
    with scene.drawn_afresh():
        scene.render(painter, QRectF(0, 0, rect.width(), rect.height()), rect, Qt.AspectRatioMode.KeepAspectRatio)
    painter.end()


def render(path_in: str | os.PathLike[str], path_out: str | os.PathLike[str], paper: str = "a4") -> None:
    """Render the annotated sketch in ``path_in`` to ``path_out`` (.png, .svg or .pdf, on
    ``paper``), offscreen.

    Raises ``SketchFileError`` for a file that cannot be read and ValueError
    for a picture type other than PNG, SVG or PDF. Always uses the light scheme
    and IEC symbols, so pictures match from machine to machine.
    """
    if Path(path_out).suffix.lower() not in PICTURE_TYPES:
        raise ValueError(f"Pictures can be written as .png, .svg or .pdf, not '{Path(path_out).suffix or path_out}'.")
    sketch = load_sketch(path_in)
    ensure_app()
    with scheme_for(LIGHT):
        scene = SketchScene(sketch, IEC)
        result = solve_sketch(sketch)
        marks = BenchMarks(scene, scene.part_items)  # cautions and meter displays, as in the window
        marks.show(result.assessment if not result.error else [])
        scene.show_result(result)  # after the badges, so loop marks are placed clear of them
        render_scene(scene, path_out, title=Path(path_in).name,
                     cautions=result.assessment if not result.error else [], paper=paper)

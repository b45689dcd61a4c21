"""The sketch on a sheet: `loopwright shot … -o X.pdf` and File ▸ Print.

The PDF is read back with pypdf, a reader the project did not write. The values checked
are worked out by hand here (closed forms named beside each), not taken from the program.
"""
from __future__ import annotations

import unicodedata
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("pytestqt")
pypdf = pytest.importorskip("pypdf")

from hypothesis import given, settings, strategies as st  # noqa: E402
from PySide6.QtCore import QLocale, QRectF, QSizeF, Qt  # noqa: E402
from PySide6.QtGui import QImage, QPageSize, QPainter  # noqa: E402
from PySide6.QtPrintSupport import QPrintDialog, QPrinter  # noqa: E402
from PySide6.QtWidgets import QDialog, QFileDialog  # noqa: E402

from app.assess import DISCLAIMER  # noqa: E402
from app.cli import main  # noqa: E402
from app.sketch.fileio import save_sketch  # noqa: E402
from app.ui.page import OVERLAP, SMALLEST_TEXT_MM, paint_page, page_notes, sheet_areas  # noqa: E402
from app.ui.theme import DARK, LIGHT, SMALL_PX, current_theme, use_scheme  # noqa: E402
from test_ui_live_solver import lattice  # noqa: E402
from test_ui_window import one_loop  # noqa: E402  (12 V across 100 Ω and 200 Ω in series)
from ui_support import open_window  # noqa: E402

DEMOS = Path(__file__).resolve().parent.parent / "demo_circuits"
MM = 72 / 25.4  # PDF points per millimetre


def _text(path: Path) -> tuple[str, list]:
    reader = pypdf.PdfReader(str(path))
    # pypdf may split words with tabs and keep the font's ligatures ("ﬁ"): spaces and NFKC
    return " ".join(unicodedata.normalize("NFKC", reader.pages[0].extract_text()).split()), reader.pages


def test_shot_writes_one_a4_page_with_the_solution_and_the_disclaimer(capsys, tmp_path):
    out = tmp_path / "fixture.pdf"
    assert main(["shot", str(DEMOS / "bench_supply_fixture.lwsk"), "-o", str(out)]) == 0
    text, pages = _text(out)
    assert len(pages) == 1
    # ISO 216: A4 is 210 mm × 297 mm; the fixture is wider than tall, so the page lies across
    box = pages[0].mediabox
    assert float(box.width) == pytest.approx(297 * MM, abs=1) and float(box.height) == pytest.approx(210 * MM, abs=1)
    assert "bench_supply_fixture.lwsk" in text
    # by hand: 12 V / (0.05 + 47 + 100 ∥ 550) Ω = 91.1 mA through the supply (series–parallel reduction)
    assert "91.1 mA" in text
    assert " ".join(DISCLAIMER.split()) in text


def test_the_page_lists_the_cautions_under_the_drawing(capsys, tmp_path):
    out = tmp_path / "stall.pdf"
    assert main(["shot", str(DEMOS / "market_stall_lamps.lwsk"), "-o", str(out)]) == 0
    text, _ = _text(out)
    # the stall's two 10 W lamps on a 12.8 V pack run over their rating, and the cable drops
    # more than 3 % (common practice for a low-voltage feed): both are warnings
    assert text.count("Warning:") >= 3
    assert "above its 3 % limit" in text


def test_print_puts_the_sketch_on_the_printer_page(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, one_loop(), name="loop.lwsk", active=True)
    out = tmp_path / "printed.pdf"

    def pdf_printer():
        printer = QPrinter(QPrinter.PrinterMode.HighResolution)
        printer.setOutputFormat(QPrinter.OutputFormat.PdfFormat)
        printer.setOutputFileName(str(out))
        return printer

    win.choose_printer = pdf_printer  # the print dialog, answered
    qtbot.keyClick(win, Qt.Key.Key_P, Qt.KeyboardModifier.ControlModifier)
    text, pages = _text(out)
    assert len(pages) == 1 and "loop.lwsk" in text
    assert "40.0 mA" in text  # Ohm's law: 12 V / (100 + 200) Ω


def test_a_dark_window_prints_ink_on_white(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, one_loop())
    use_scheme(DARK)
    try:
        win.scene.refresh_looks()
        image = QImage(800, 560, QImage.Format.Format_RGB32)
        image.fill(Qt.GlobalColor.white)
        painter = QPainter(image)
        paint_page(win.scene, painter, QRectF(20, 20, 760, 520), "loop", page_notes([]))
        painter.end()
        assert current_theme() is DARK  # the window keeps its scheme
    finally:
        use_scheme(None)
    px = np.frombuffer(image.constBits(), np.uint8).reshape(560, image.bytesPerLine())[:, :3200].reshape(560, 800, 4)
    rgb = px[..., 2::-1][..., :3].astype(int)
    drawing = rgb[80:440, 40:760]  # between the title line and the notes: the drawing alone

    def near(colour, within: int) -> np.ndarray:
        return np.abs(drawing - np.array([colour.red(), colour.green(), colour.blue()])).sum(axis=2) < within

    assert not near(DARK.paper, 12).any() and not near(DARK.tag, 12).any()  # no dark scheme fills
    assert near(LIGHT.ink, 40).sum() > 200  # the light scheme's dark ink
    assert (drawing.sum(axis=2) > 750).mean() > 0.8  # on white


def test_printing_leaves_the_selection_off_the_page_and_in_the_window(qtbot, tmp_path):
    win = open_window(qtbot, tmp_path, one_loop(), name="loop.lwsk", active=True)
    qtbot.keyClick(win.view.viewport(), Qt.Key.Key_A, Qt.KeyboardModifier.ControlModifier)
    chosen = win.scene.selected_parts()
    assert len(chosen) == 4  # the cell, two resistors and the ground
    image = QImage(800, 560, QImage.Format.Format_RGB32)
    image.fill(Qt.GlobalColor.white)
    painter = QPainter(image)
    paint_page(win.scene, painter, QRectF(20, 20, 760, 520), "loop", page_notes([]))
    painter.end()
    px = np.frombuffer(image.constBits(), np.uint8).reshape(560, image.bytesPerLine())[:, :3200].reshape(560, 800, 4)
    rgb = px[..., 2::-1][..., :3].astype(int)
    select = np.array([LIGHT.select.red(), LIGHT.select.green(), LIGHT.select.blue()])
    assert (np.abs(rgb - select).sum(axis=2) < 30).sum() < 20  # no selection outline on the sheet
    assert win.scene.selected_parts() == chosen  # and the window keeps it

    def pdf_printer():
        printer = QPrinter(QPrinter.PrinterMode.HighResolution)
        printer.setOutputFormat(QPrinter.OutputFormat.PdfFormat)
        printer.setOutputFileName(str(tmp_path / "printed.pdf"))
        return printer

    win.choose_printer = pdf_printer
    qtbot.keyClick(win, Qt.Key.Key_P, Qt.KeyboardModifier.ControlModifier)
    assert win.scene.selected_parts() == chosen


@settings(max_examples=200, deadline=None)
@given(w=st.floats(50, 20000), h=st.floats(50, 20000), rw=st.floats(500, 5000), rh=st.floats(300, 5000),
       dpi=st.sampled_from([96, 300, 600, 1200]))
def test_sheets_cover_the_drawing_with_readable_text(w, h, rw, rh, dpi):
    drawing, room = QRectF(-w / 3, -h / 4, w, h), QSizeF(rw, rh)
    areas = sheet_areas(drawing, room, dpi)
    # the annotations' letters on paper, in mm: SMALL_PX units × (device px per unit) / dpi × 25.4
    least = min(min(room.width() / a.width(), room.height() / a.height()) for a in areas)
    if len(areas) == 1:
        assert areas[0] == drawing
    else:
        assert SMALL_PX * least / dpi * 25.4 == pytest.approx(SMALLEST_TEXT_MM)  # every sheet at the same scale
        # plane geometry: tiles cover the drawing when their spans cover each axis in turn
        xs = sorted({(a.left(), a.right()) for a in areas})
        ys = sorted({(a.top(), a.bottom()) for a in areas})
        assert len(areas) == len(xs) * len(ys)
        for spans, lo, hi in ((xs, drawing.left(), drawing.right()), (ys, drawing.top(), drawing.bottom())):
            assert spans[0][0] == pytest.approx(lo) and spans[-1][1] == pytest.approx(hi)
            for (_, end), (start, _) in zip(spans, spans[1:]):
                assert start < end  # neighbours overlap: a wire can be followed across
            n, size = len(spans), spans[0][1] - spans[0][0]
            if n > 1:  # neighbours share at least OVERLAP of a sheet, and one sheet fewer could not
                assert all(start - prev <= size * (1 - OVERLAP) + 1e-6 for (prev, _), (start, _) in zip(spans, spans[1:]))
                assert hi - lo > size if n == 2 else (hi - lo - size) / (n - 2) > size * (1 - OVERLAP)
    fits = SMALL_PX * min(room.width() / w, room.height() / h) / dpi * 25.4 >= SMALLEST_TEXT_MM
    assert (len(areas) == 1) == fits


def test_a_large_sketch_prints_on_several_sheets_each_with_its_number_and_the_cautions(capsys, tmp_path):
    sketch = lattice(5, 24)  # 92 grid steps across: a fitted A4 sheet would print its values about 1.9 mm tall
    path = tmp_path / "long_bench.lwsk"
    save_sketch(sketch, path)
    out = tmp_path / "long_bench.pdf"
    assert main(["shot", str(path), "-o", str(out)]) == 0
    pages = pypdf.PdfReader(str(out)).pages
    assert len(pages) > 1
    for k, page in enumerate(pages):
        text = " ".join(unicodedata.normalize("NFKC", page.extract_text()).split())
        assert f"sheet {k + 1} of {len(pages)}" in text
        assert " ".join(DISCLAIMER.split()) in text
        assert float(page.mediabox.width) == pytest.approx(297 * MM, abs=1)  # A4 across (ISO 216)


def test_shot_writes_letter_sheets_when_asked(capsys, tmp_path):
    out = tmp_path / "fixture.pdf"
    assert main(["shot", str(DEMOS / "bench_supply_fixture.lwsk"), "-o", str(out), "--paper", "letter"]) == 0
    box = pypdf.PdfReader(str(out)).pages[0].mediabox
    # ANSI A (US Letter) is 8.5 in × 11 in, 72 PDF points to the inch; across for this drawing
    assert float(box.width) == pytest.approx(11 * 72, abs=1) and float(box.height) == pytest.approx(8.5 * 72, abs=1)


@pytest.mark.parametrize("country, inches", [(QLocale.Country.UnitedStates, (11, 8.5)),
                                             (QLocale.Country.Germany, (297 / 25.4, 210 / 25.4))])
def test_export_picture_writes_the_sheet_people_print_on_there(qtbot, tmp_path, monkeypatch, country, inches):
    out = tmp_path / "loop.pdf"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(out), ""))  # the dialog, answered
    QLocale.setDefault(QLocale(QLocale.Language.English, country))
    try:
        win = open_window(qtbot, tmp_path, one_loop(), name="loop.lwsk")
        win.export_picture()
    finally:
        QLocale.setDefault(QLocale.system())
    box = pypdf.PdfReader(str(out)).pages[0].mediabox
    # US Letter (ANSI A) is 8.5 × 11 in, A4 (ISO 216) 210 × 297 mm; 72 PDF points to the inch
    assert (float(box.width), float(box.height)) == pytest.approx((inches[0] * 72, inches[1] * 72), abs=1)


def test_the_paper_chosen_in_the_file_menu_is_kept_for_pdf_files_and_the_print_dialog(qtbot, tmp_path, monkeypatch):
    out = tmp_path / "loop.pdf"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(out), ""))  # the dialog, answered
    QLocale.setDefault(QLocale(QLocale.Language.German, QLocale.Country.Germany))
    try:
        win = open_window(qtbot, tmp_path, one_loop(), name="loop.lwsk")
        assert win.paper_actions["a4"].isChecked()  # the local sheet until one is chosen
        win.paper_actions["a3"].trigger()  # File ▸ Paper Size ▸ A3
        win.export_picture()
        win.close()
        again = open_window(qtbot, tmp_path, one_loop(), name="loop.lwsk")  # the same settings file
    finally:
        QLocale.setDefault(QLocale.system())
    box = pypdf.PdfReader(str(out)).pages[0].mediabox
    # A3 (ISO 216) is 297 × 420 mm, turned across for this drawing; 72 PDF points to the inch
    assert (float(box.width), float(box.height)) == pytest.approx((420 * MM, 297 * MM), abs=1)
    assert again.paper_actions["a3"].isChecked() and not again.paper_actions["a4"].isChecked()
    monkeypatch.setattr(QPrintDialog, "exec", lambda self: QDialog.DialogCode.Accepted)  # the dialog, accepted
    printer = again.choose_printer()
    assert printer.pageLayout().pageSize().id() == QPageSize.PageSizeId.A3

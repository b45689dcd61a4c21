"""The main window: canvas, parts palette, Readings and Part panels, menus and files.

``run(path)`` opens the window (the ``loopwright FILE`` command).
"""
from __future__ import annotations

import sys
from pathlib import Path

from PySide6.QtCore import QEvent, QItemSelection, QItemSelectionModel, QRectF, QSettings, Qt, QTimer, Signal
from PySide6.QtGui import (QAction, QActionGroup, QCloseEvent, QGuiApplication, QKeySequence, QPageSize, QPainter,
                           QUndoStack)
from PySide6.QtPrintSupport import QPrintDialog, QPrinter
from PySide6.QtWidgets import (QApplication, QDialog, QFileDialog, QLabel, QMainWindow,
                               QMessageBox, QSizePolicy, QVBoxLayout, QWidget)

from ..sketch.fileio import SaveError, SketchFileError, load_sketch, save_sketch
from ..sketch.kinds import KINDS
from ..sketch.model import Sketch
from .annotations import LAYERS
from .editor import FRAGMENT_MIME, Editor
from .bench_tools import BenchTools
from .docks import add_dock
from .hand_analysis import HandAnalysis
from .heap import RestCollector
from .help_dialog import KeysDialog, show_about
from .icons import tool_icon
from .page import PAPER_NAMES, PAPERS, local_paper, page_notes, page_turn, paint_pages
from .parts_bar import PartsBar
from .properties import InlineValueEditor, PartPanel
from .readings import ReadingsModel, ReadingsView
from .scene import SketchScene
from .session import start
from .shot import render_scene
from .solve_worker import LiveSolver, Result
from .status_line import StatusLine
from .symbols import IEC, STYLED_KINDS, STYLES
from .theme import DARK, LIGHT, REFUSAL, style_refusal, use_scheme
from .view import SELECT, WIRE, CanvasView

__all__ = ["MainWindow", "run", "FILE_FILTER"]

FILE_FILTER = "Loopwright sketches (*.lwsk)"
MAX_RECENT = 8
PALETTE = [  # (tool, label, key)
    (SELECT, "Select and move", "Q"),
    (WIRE, "Wire", "W"),
    ("resistor", "Resistor", "R"),
    ("cell", "Cell or battery", "B"),
    ("current_source", "Current source", "I"),
    ("switch", "Switch", "S"),
    ("ground", "Ground", "G"),
    ("ammeter", "Ammeter", "A"),
    ("voltmeter", "Voltmeter", "V"),
    ("fuse", "Fuse", "U"),
    ("lamp", "Lamp", "L"),
    ("cable", "Cable run", "C"),
]


_FALLBACK_KEYS = {QKeySequence.StandardKey.Quit: "Ctrl+Q",  # where a platform defines none
                  QKeySequence.StandardKey.HelpContents: "F1"}


def _demo_dir() -> Path:
    return Path(__file__).resolve().parents[2] / "demo_circuits"


PLACE_NOW = 8  # loop marks and tags placed inside an edit (see SketchScene._place)

# the window's palette follows the application's, which follows the system's scheme
_PALETTE_EVENTS = (QEvent.Type.PaletteChange, QEvent.Type.ApplicationPaletteChange)


class MainWindow(QMainWindow):
    """One sketch in a window. ``settings`` defaults to the user's Loopwright settings."""

    documentReplaced = Signal()  # another sketch (new, opened, restored) took the window's place
    closed = Signal()            # the window was closed (its sketch saved, discarded or unchanged)

    def __init__(self, settings: QSettings | None = None) -> None:
        super().__init__()
        self.settings = settings or QSettings("Loopwright", "Loopwright")
        self.path: Path | None = None
        self.style_name = self.settings.value("symbols", IEC)
        if self.style_name not in STYLES:
            self.style_name = IEC
        self._scheme = self.settings.value("scheme", "system")
        self._apply_scheme(self._scheme)
        self._syncing = False
        self.sketch: Sketch
        self.stack: QUndoStack
        self.scene: SketchScene
        self.editor: Editor
        self.solver: LiveSolver
        self._inline: InlineValueEditor | None = None
        self.ask_to_save = self._ask_to_save  # replaced by tests: returns "save", "discard" or "cancel"
        self.tell = self._tell                # replaced by tests: shows a message to the person
        self.place_now: int | None = PLACE_NOW  # marks placed inside an edit (None: all)

        self.view = CanvasView(self)
        self.setCentralWidget(self.view)
        self.readings_model = ReadingsModel(self)
        self.readings = ReadingsView(self.readings_model)
        self.part_panel = PartPanel()
        self.status_text = StatusLine()  # new text repaints, never lays the window out again
        self.hint_text = StatusLine(fit=True)  # as wide as its text, up to half the window
        self.hint_text.setObjectName("hint")
        self.where = StatusLine("x -00000  y -00000")
        self.statusBar().addWidget(self.status_text, 1)
        self.statusBar().addPermanentWidget(self.hint_text)
        self.statusBar().addPermanentWidget(self.where)
        self._hint_timer = QTimer(self)
        self._hint_timer.setSingleShot(True)
        self._hint_timer.timeout.connect(self.hint_text.clear)
        self._build_actions()
        self._build_palette()
        self._build_docks()
        self.hand = HandAnalysis(self)  # Equations and Check panels, current tags, traced loops
        self.bench = BenchTools(self)  # Cautions panel and marks, equivalent at two points, preferred values
        self._build_menus()
        self.view.modeChanged.connect(self._mode_changed)
        self.view.editRequested.connect(self.edit_value_inline)
        self.view.fileDropped.connect(self.open_path)  # asks first over unsaved work
        self.view.notice.connect(self.hint)
        self.view.pressed.connect(self._dismiss_inline)
        self.view.pointerMoved.connect(lambda x, y: self.where.setText(f"x {x}  y {y}"))
        self.rest = RestCollector(self)  # Python's full collections wait for a rest in the drawing
        self.view.pointerMoved.connect(self.rest.poke)
        self.view.pressed.connect(self.rest.poke)
        self.readings.selectionModel().selectionChanged.connect(self._table_selection_changed)
        self.part_panel.refused.connect(lambda m: self.hint("Not accepted: " + m, 6000))
        self.set_document(Sketch(), None)
        self.resize(1200, 780)
        geo = self.settings.value("geometry")
        if geo is not None:
            self.restoreGeometry(geo)
        state = self.settings.value("window_state")
        if state is not None:
            self.restoreState(state)

    # -- building ---------------------------------------------------------------------
    def _action(self, text: str, slot, shortcut=None, checkable: bool = False, tip: str = "") -> QAction:
        a = QAction(text, self)
        if isinstance(shortcut, QKeySequence.StandardKey):
            keys = QKeySequence.keyBindings(shortcut)
            a.setShortcuts(keys if keys else [QKeySequence(_FALLBACK_KEYS.get(shortcut, ""))])
        elif isinstance(shortcut, list):
            a.setShortcuts(shortcut)
        elif shortcut is not None:
            a.setShortcut(shortcut)
        a.setCheckable(checkable)
        if tip:
            a.setStatusTip(tip)
        a.triggered.connect(slot)
        self.addAction(a)
        return a

    def _build_actions(self) -> None:
        K = QKeySequence.StandardKey
        self.act_new = self._action("&New", self.new_sketch, K.New)
        self.act_open = self._action("&Open…", self.open_dialog, K.Open)
        self.act_save = self._action("&Save", self.save, K.Save)
        self.act_save_as = self._action("Save &As…", self.save_as, K.SaveAs)
        self.act_export = self._action("&Export Picture…", self.export_picture)
        self.act_print = self._action("&Print…", self.print_sketch, K.Print)
        self.act_close = self._action("&Close", self.close_sketch, K.Close)
        self.act_quit = self._action("&Quit", self.close, K.Quit)
        self.act_undo = self._action("&Undo", lambda: self.stack.undo(), K.Undo)
        self.act_redo = self._action("&Redo", lambda: self.stack.redo(), K.Redo)
        self.act_cut = self._action("Cu&t", self.cut, K.Cut)
        self.act_copy = self._action("&Copy", self.copy, K.Copy)
        self.act_paste = self._action("&Paste", self.paste, K.Paste)
        self.act_duplicate = self._action("D&uplicate", lambda: self.editor.duplicate(), "Ctrl+D")
        self.act_delete = self._action("&Delete", lambda: self.editor.delete_selection(),
                                       [QKeySequence(K.Delete), QKeySequence("Backspace")])
        self.act_select_all = self._action("Select &All", self.select_all, K.SelectAll)
        self.act_rotate = self._action("&Turn 90°", lambda: self.view.turn(False), "Space",
                                       tip="Turn the part being placed or the selection; in the wire tool, swap the bend")
        self.act_mirror = self._action("&Mirror", lambda: self.view.turn(True), "F")
        self.act_edit_value = self._action("Edit &Value…", self._edit_selected_value, "F2")
        self.act_toggle = self._action("Open or Close Switch, Blow or Renew Fuse", self._toggle_switch, "T")
        self.act_zoom_in = self._action("Zoom &In", lambda: self.view.zoom_by(1.25), K.ZoomIn)
        self.act_zoom_out = self._action("Zoom &Out", lambda: self.view.zoom_by(0.8), K.ZoomOut)
        self.act_zoom_fit = self._action("Zoom to &Fit", self.view.zoom_fit, "Home")
        self.layer_actions: dict[str, QAction] = {}
        for key, text in LAYERS.items():
            a = self._action(text, lambda on, k=key: self._set_layer(k, on), checkable=True)
            a.setChecked(self.settings.value(f"layers/{key}", True, type=bool))
            self.layer_actions[key] = a
        self.tool_group = QActionGroup(self)
        self.tool_actions: dict[str, QAction] = {}
        for tool, text, key in PALETTE:
            a = self._action(text, lambda _=False, t=tool: self.view.set_mode(t), key, checkable=True,
                             tip=f"{text} ({key})")
            a.setIcon(tool_icon(tool, self.style_name))
            self.tool_group.addAction(a)
            self.tool_actions[tool] = a
        self.tool_actions[SELECT].setChecked(True)

    def _build_palette(self) -> None:
        bar = PartsBar("Parts", self)
        bar.setObjectName("parts")
        for tool, _, _ in PALETTE:
            bar.addAction(self.tool_actions[tool])
            if tool == WIRE:
                bar.addSeparator()
            if tool == "ground":  # the next are the bench parts
                bar.addSeparator()
        bar.even_widths()
        self.palette_bar = bar
        self.addToolBar(Qt.ToolBarArea.LeftToolBarArea, bar)

    def _build_docks(self) -> None:
        host = QWidget()
        lay = QVBoxLayout(host)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addWidget(self.readings)
        # the table (and the Equations tab beside it) takes the column's spare height; the part
        # panel no more than its rows need, or it kept the height of the longest part shown
        host.setSizePolicy(QSizePolicy.Policy.Preferred, QSizePolicy.Policy.Expanding)
        self.part_panel.setSizePolicy(QSizePolicy.Policy.Preferred, QSizePolicy.Policy.Maximum)
        self.readings_dock = add_dock(self, "Readings", "readings", host, scroll=False)  # its table scrolls
        self.part_dock = add_dock(self, "Part", "part", self.part_panel, scroll=False)  # values in full

    def _build_menus(self) -> None:
        mb = self.menuBar()
        f = mb.addMenu("&File")
        f.addAction(self.act_new)
        f.addAction(self.act_open)
        self.recent_menu = f.addMenu("Open &Recent")
        self.recent_menu.aboutToShow.connect(self._fill_recent)
        self.examples_menu = f.addMenu("Open E&xample")
        self.examples_menu.aboutToShow.connect(self._fill_examples)
        f.addSeparator()
        f.addAction(self.act_save)
        f.addAction(self.act_save_as)
        f.addAction(self.act_export)
        f.addAction(self.act_print)
        paper = f.addMenu("Paper Si&ze")
        group = QActionGroup(self)
        self.paper_actions = {}
        for key, text in PAPER_NAMES.items():
            a = self.paper_actions[key] = QAction(text, self, checkable=True)
            a.setChecked(key == self.paper())
            a.triggered.connect(lambda _=False, k=key: self.set_paper(k))
            group.addAction(a)
            paper.addAction(a)
        f.addSeparator()
        f.addAction(self.act_close)
        f.addAction(self.act_quit)
        e = mb.addMenu("&Edit")
        for a in (self.act_undo, self.act_redo, None, self.act_cut, self.act_copy, self.act_paste,
                  self.act_duplicate, self.act_delete, None, self.act_select_all, None,
                  self.act_rotate, self.act_mirror, self.act_edit_value, self.act_toggle):
            e.addSeparator() if a is None else e.addAction(a)
        d = mb.addMenu("&Draw")
        for tool, _, _ in PALETTE:
            d.addAction(self.tool_actions[tool])
        v = mb.addMenu("&View")
        v.addAction(self.act_zoom_in)
        v.addAction(self.act_zoom_out)
        v.addAction(self.act_zoom_fit)
        v.addSeparator()
        for a in self.layer_actions.values():
            v.addAction(a)
        v.addSeparator()
        sym = v.addMenu("&Symbols")
        group = QActionGroup(self)
        for key, text in STYLES.items():
            a = QAction(text, self, checkable=True)
            a.setChecked(key == self.style_name)
            a.triggered.connect(lambda _=False, k=key: self.set_symbol_style(k))
            group.addAction(a)
            sym.addAction(a)
        sch = v.addMenu("Colour &Scheme")
        group = QActionGroup(self)
        for key, text in (("system", "Follow the System"), ("light", "Light"), ("dark", "Dark")):
            a = QAction(text, self, checkable=True)
            a.setChecked(key == self._scheme)
            a.triggered.connect(lambda _=False, k=key: self.set_scheme(k))
            group.addAction(a)
            sch.addAction(a)
        v.addSeparator()
        v.addAction(self.readings_dock.toggleViewAction())
        v.addAction(self.part_dock.toggleViewAction())
        v.addAction(self.hand.equations_dock.toggleViewAction())
        v.addAction(self.hand.check_dock.toggleViewAction())
        an = mb.addMenu("&Analysis")
        for a in self.hand.menu_actions():
            an.addSeparator() if a is None else an.addAction(a)
        self.bench.build_menu(mb)
        h = mb.addMenu("&Help")
        h.addAction(self._action("&Keys and Mouse", lambda: KeysDialog(self).exec(),
                                 QKeySequence.StandardKey.HelpContents))
        h.addAction(self._action("&About Loopwright", lambda: show_about(self)))

    # -- the document ------------------------------------------------------------------
    def set_document(self, sketch: Sketch, path: Path | None) -> None:
        """Show ``sketch`` (read from ``path``, or new) with a fresh undo history."""
        old = getattr(self, "solver", None)
        if old is not None:
            old.shutdown()
        if self._inline is not None:
            self._inline.dismiss()
        self.sketch = sketch
        self.path = path
        self.stack = QUndoStack(self)
        self.stack.setUndoLimit(1000)
        self.scene = SketchScene(sketch, self.style_name, self)
        for key, a in self.layer_actions.items():
            self.scene.set_layer(key, a.isChecked())
        self.editor = Editor(sketch, self.scene, self.stack)
        self.solver = LiveSolver(sketch, parent=self)
        self.solver.resultReady.connect(self._show_result)
        self.scene.documentChanged.connect(self._document_changed)
        self.scene.selectionChanged.connect(self._scene_selection_changed)
        self.stack.cleanChanged.connect(self._clean_changed)
        self.stack.canUndoChanged.connect(self.act_undo.setEnabled)
        self.stack.canRedoChanged.connect(self.act_redo.setEnabled)
        self.stack.undoTextChanged.connect(self._undo_text)
        self.stack.redoTextChanged.connect(self._redo_text)
        self.act_undo.setEnabled(False)
        self.act_redo.setEnabled(False)
        self.view.set_editor(self.editor)
        self.part_panel.set_editor(self.editor)
        self.hand.attach()
        self.bench.attach()
        self.setWindowModified(False)
        self._update_title()
        self._document_changed()
        QTimer.singleShot(0, self.view.zoom_fit)
        self.documentReplaced.emit()

    def _clean_changed(self, clean: bool) -> None:
        self.setWindowModified(not clean)

    def _undo_text(self, text: str) -> None:
        self.act_undo.setText(f"&Undo {text}".strip())

    def _redo_text(self, text: str) -> None:
        self.act_redo.setText(f"&Redo {text}".strip())

    def _update_title(self) -> None:
        name = self.path.name if self.path else "Untitled"
        self.setWindowTitle(f"{name}[*] — Loopwright")

    @property
    def modified(self) -> bool:
        return not self.stack.isClean()

    def _document_changed(self) -> None:
        self.rest.poke()
        self.readings_model.set_parts(self.sketch)
        self.solver.request()
        self.hand.document_changed()
        sel = self.scene.selected_parts()
        self.part_panel.show_part(sel[0] if len(sel) == 1 else None)

    def _show_result(self, result: Result) -> None:
        self.bench.show_result(result)   # badges first, so loop marks are placed clear of them
        if self.editor.stepping:  # a drag goes on: its marks are placed when it pauses
            self.scene.place_now_up_to = 0
        self.scene.show_result(result)
        # a document's first solution places every mark at once; later ones place a few and
        # the rest when drawing pauses, so that a drag never waits for a whole new layout
        self.scene.place_now_up_to = self.place_now
        self.readings_model.set_readings(result.readings if not result.error else {})
        text = result.summary
        extra = result.cautions + result.notes
        if extra:
            text += "  " + "  ".join(extra)
        if result.open_ends:
            n = len(result.open_ends)
            text += f"  {n} unconnected end{'s' if n != 1 else ''} (ringed)."
        self.status_text.setText(text or "Empty sketch: choose a part from the palette, or press R, B, I, S or G.")

    # -- selection both ways ----------------------------------------------------------
    def _scene_selection_changed(self) -> None:
        if self._syncing:
            return
        self._syncing = True
        try:
            names = self.scene.selected_parts()
            sm = self.readings.selectionModel()
            sel = QItemSelection()
            for n in names:
                r = self.readings_model.row_of(n)
                if r >= 0:
                    sel.select(self.readings_model.index(r, 0),
                               self.readings_model.index(r, self.readings_model.columnCount() - 1))
            sm.select(sel, QItemSelectionModel.SelectionFlag.ClearAndSelect)
            if len(names) == 1 and self.readings_model.row_of(names[0]) >= 0:
                self.readings.scrollTo(self.readings_model.index(self.readings_model.row_of(names[0]), 0))
            self.part_panel.show_part(names[0] if len(names) == 1 else None)
        finally:
            self._syncing = False

    def _table_selection_changed(self) -> None:
        if self._syncing:
            return
        self._syncing = True
        try:
            rows = sorted({i.row() for i in self.readings.selectionModel().selectedIndexes()})
            names = [self.readings_model.names[r] for r in rows]
            self.scene.select(names)
            if names:
                self.view.ensureVisible(self.scene.part_items[names[0]].sceneBoundingRect())
            self.part_panel.show_part(names[0] if len(names) == 1 else None)
        finally:
            self._syncing = False

    def select_all(self) -> None:
        self.scene.select([p.name for p in self.sketch.parts], range(len(self.sketch.wires)))

    # -- tools and edits -------------------------------------------------------------
    def _mode_changed(self, mode: str) -> None:
        a = self.tool_actions.get(mode)
        if a is not None and not a.isChecked():
            a.setChecked(True)
        hints = {SELECT: "Drag or arrows move (Alt: off what it touches); Tab: next part.",
                 WIRE: "Click or press Enter at each corner; Space swaps the bend; Esc ends the wire."}
        hint = hints.get(mode, f"Placing a {KINDS[mode].title.lower()}: click or press Enter; "
                               "Space turns it, F mirrors it, Esc stops." if mode in KINDS else "")
        self.hint(hint, 8000)

    def hint(self, text: str, msec: int = 6000) -> None:
        """A passing hint or refusal at the right of the status line."""
        self.hint_text.setText(text)
        self._hint_timer.start(msec)

    def _set_layer(self, key: str, on: bool) -> None:
        self.scene.set_layer(key, on)
        self.settings.setValue(f"layers/{key}", on)

    def set_symbol_style(self, style: str) -> None:
        """Draw resistors as IEC 60617 rectangles or IEEE 315 zigzags."""
        self.style_name = style
        self.settings.setValue("symbols", style)
        self.scene.set_style(style)
        for kind in STYLED_KINDS:
            self.tool_actions[kind].setIcon(tool_icon(kind, style))

    def _apply_scheme(self, key: str) -> None:
        use_scheme({"light": LIGHT, "dark": DARK}.get(key))
        for label in self.findChildren(QLabel, REFUSAL):
            style_refusal(label)

    def set_scheme(self, key: str) -> None:
        """Use the light or dark scheme, or follow the system palette."""
        self._scheme = key
        self.settings.setValue("scheme", key)
        self._apply_scheme(key)
        for tool, a in self.tool_actions.items():
            a.setIcon(tool_icon(tool, self.style_name))
        self.scene.refresh_looks()
        self.view.resetCachedContent()

    def edit_value_inline(self, name: str) -> None:
        """Open the small value editor over the part on the canvas (switches toggle instead)."""
        if not self.sketch.has_part(name):
            return
        part = self.sketch.part(name)
        if part.kind == "switch":
            self.editor.set_flag(name, "closed", not part.flag("closed"))
            return
        if not KINDS[part.kind].fields:
            return
        if self._inline is not None:
            self._inline.dismiss()
        item = self.scene.part_items[name]
        at = self.view.mapFromScene(item.mapToScene(item.label_rect.bottomLeft()))
        self._inline = InlineValueEditor(self.view.viewport(), self.editor, name, at)
        self._inline.refused.connect(lambda m: self.hint("Not accepted: " + m, 6000))
        self._inline.closed.connect(self._inline_closed)

    def _dismiss_inline(self) -> None:
        if self._inline is not None:
            self._inline.dismiss()

    def _inline_closed(self) -> None:
        self._inline = None
        self.view.setFocus()

    def _edit_selected_value(self) -> None:
        sel = self.scene.selected_parts()
        if len(sel) == 1:
            self.edit_value_inline(sel[0])

    def _toggle_switch(self) -> None:
        for n in self.scene.selected_parts():
            p = self.sketch.part(n)
            if p.kind == "switch":
                self.editor.set_flag(n, "closed", not p.flag("closed"))
            elif p.kind == "fuse":
                self.editor.set_flag(n, "blown", not p.flag("blown"))

    def copy(self) -> None:
        if self.scene.selected_parts() or self.scene.selected_wires():
            from PySide6.QtCore import QMimeData
            data = QMimeData()
            text = self.editor.fragment()
            data.setData(FRAGMENT_MIME, text.encode("utf-8"))
            data.setText(text)
            QGuiApplication.clipboard().setMimeData(data)
            self.editor.reset_paste_offset()

    def cut(self) -> None:
        self.copy()
        self.editor.delete_selection()

    def paste(self) -> None:
        data = QGuiApplication.clipboard().mimeData()
        if data.hasFormat(FRAGMENT_MIME):
            text = bytes(data.data(FRAGMENT_MIME)).decode("utf-8")
        else:
            text = data.text()
        if not self.editor.paste(text):
            self.hint("The clipboard holds no Loopwright parts to paste.", 5000)

    # -- files -------------------------------------------------------------------------
    def _ask_to_save(self) -> str:
        name = self.path.name if self.path else "Untitled"
        box = QMessageBox(QMessageBox.Icon.Question, "Unsaved changes",
                          f"{name} has changes that are not saved. Save them first?",
                          QMessageBox.StandardButton.Save | QMessageBox.StandardButton.Discard
                          | QMessageBox.StandardButton.Cancel, self)
        box.setDefaultButton(QMessageBox.StandardButton.Save)
        answer = box.exec()
        return {QMessageBox.StandardButton.Save: "save",
                QMessageBox.StandardButton.Discard: "discard"}.get(QMessageBox.StandardButton(answer), "cancel")

    def _tell(self, title: str, message: str) -> None:
        QMessageBox.warning(self, title, message)

    def may_leave(self) -> bool:
        """True when the current sketch may be closed (saved, discarded or unchanged)."""
        if not self.modified:
            return True
        answer = self.ask_to_save()
        if answer == "save":
            return self.save()
        return answer == "discard"

    def new_sketch(self) -> None:
        if self.may_leave():
            self.set_document(Sketch(), None)

    def close_sketch(self) -> None:
        """Close the sketch (the window stays, with a new empty one)."""
        self.new_sketch()

    def open_dialog(self) -> None:
        if not self.may_leave():
            return
        start = str(self.path.parent) if self.path else str(Path.home())
        path, _ = QFileDialog.getOpenFileName(self, "Open sketch", start, FILE_FILTER)
        if path:
            self.open_path(path, ask=False)

    def open_path(self, path: str | Path, ask: bool = True) -> bool:
        """Open the sketch at ``path``; tells the person (and returns False) if it cannot be read."""
        if ask and not self.may_leave():
            return False
        try:
            sketch = load_sketch(path)
        except SketchFileError as e:
            self.tell("Cannot open the sketch", f"{Path(path).name}: {e}")
            return False
        except OSError as e:
            self.tell("Cannot open the sketch", f"{Path(path).name}: {e.strerror or e}")
            return False
        self.set_document(sketch, Path(path).resolve())
        self._remember(self.path)
        return True

    def save(self) -> bool:
        if self.path is None:
            return self.save_as()
        return self.save_to(self.path)

    def save_as(self) -> bool:
        start = str(self.path) if self.path else str(Path.home() / "sketch.lwsk")
        path, _ = QFileDialog.getSaveFileName(self, "Save sketch", start, FILE_FILTER)
        if not path:
            return False
        if not path.lower().endswith(".lwsk"):
            path += ".lwsk"
        return self.save_to(Path(path))

    def save_to(self, path: str | Path) -> bool:
        """Write the sketch to ``path`` and make it the window's file."""
        path = Path(path)
        try:
            save_sketch(self.sketch, path)
        except SaveError as e:  # one plain sentence naming the file; the file on disk is untouched
            self.tell("Cannot save the sketch", str(e))
            return False
        except (SketchFileError, OSError) as e:
            self.tell("Cannot save the sketch", f"{path.name}: {getattr(e, 'strerror', None) or e}")
            return False
        self.path = path.resolve()
        self.stack.setClean()
        self._update_title()
        self._remember(self.path)
        return True

    def export_picture(self) -> None:
        start = str(self.path.with_suffix(".png")) if self.path else str(Path.home() / "sketch.png")
        path, _ = QFileDialog.getSaveFileName(self, "Export picture", start,
                                              "PNG picture (*.png);;SVG drawing (*.svg);;PDF sheets with the cautions (*.pdf)")
        if path:
            try:
                render_scene(self.scene, path, title=self._page_title(), cautions=self._cautions(),
                             paper=self.paper())
            except (ValueError, OSError) as e:
                self.tell("Cannot export the picture", str(e))

    def paper(self) -> str:
        """The sheet PDF files and the print dialog start from (a key of ``page.PAPERS``): the
        one chosen under File ▸ Paper, kept between sessions, else the local one."""
        chosen = self.settings.value("paper", "")
        return chosen if chosen in PAPERS else local_paper()

    def set_paper(self, key: str) -> None:
        self.settings.setValue("paper", key)
        self.paper_actions[key].setChecked(True)

    def _page_title(self) -> str:
        return self.path.name if self.path else "Untitled sketch"

    def _cautions(self) -> list:
        """The cautions of the solution on the drawing (none while it is not solved)."""
        latest = self.solver.latest
        return latest.assessment if latest is not None and not latest.error else []

    def print_sketch(self) -> None:
        """Print the drawing, with its cautions under it, on as many sheets as it needs to stay readable (``page.paint_pages``)."""
        printer = self.choose_printer()
        if printer is None:
            return
        painter = QPainter()
        if not painter.begin(printer):
            self.tell("Cannot print", "The printer could not be started; check that it is on and free.")
            return
        try:
            area = printer.pageLayout().paintRectPixels(printer.resolution())
            paint_pages(self.scene, painter, QRectF(0, 0, area.width(), area.height()), self._page_title(),
                        page_notes(self._cautions()), printer.newPage)
        finally:
            painter.end()

    def choose_printer(self) -> QPrinter | None:
        """A printer set up by the person in the print dialog, the page turned to suit the
        drawing's shape to begin with (None: the dialog was cancelled)."""
        printer = QPrinter(QPrinter.PrinterMode.HighResolution)
        printer.setDocName(self._page_title())
        printer.setPageSize(QPageSize(PAPERS[self.paper()]))
        printer.setPageOrientation(page_turn(self.scene))
        dialog = QPrintDialog(printer, self)
        return printer if dialog.exec() == QDialog.DialogCode.Accepted else None

    def _remember(self, path: Path) -> None:
        recent = [p for p in self.recent_files() if p != str(path)]
        recent.insert(0, str(path))
        self.settings.setValue("recent", recent[:MAX_RECENT])

    def recent_files(self) -> list[str]:
        value = self.settings.value("recent", [])
        if isinstance(value, str):
            value = [value]
        return [str(v) for v in (value or [])]

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        files = self.recent_files()
        for p in files:
            a = self.recent_menu.addAction(Path(p).name)
            a.setStatusTip(p)
            a.triggered.connect(lambda _=False, q=p: self.open_path(q))
        if not files:
            a = self.recent_menu.addAction("No recent sketches")
            a.setEnabled(False)

    def _fill_examples(self) -> None:
        self.examples_menu.clear()
        files = sorted(_demo_dir().glob("*.lwsk"))
        for p in files:
            a = self.examples_menu.addAction(p.stem.replace("_", " ").capitalize())
            a.triggered.connect(lambda _=False, q=p: self.open_path(q))
        if not files:
            a = self.examples_menu.addAction("No examples found")
            a.setEnabled(False)

    def changeEvent(self, event: QEvent) -> None:  # noqa: N802 (Qt's name)
        """Follow the system's light or dark palette live when the scheme is "system"."""
        if event.type() in _PALETTE_EVENTS and getattr(self, "_scheme", "") == "system" and self.isVisible():
            self.set_scheme("system")
        super().changeEvent(event)

    def closeEvent(self, event: QCloseEvent) -> None:
        if not self.may_leave():
            event.ignore()
            return
        self.settings.setValue("geometry", self.saveGeometry())
        self.settings.setValue("window_state", self.saveState())
        self.solver.shutdown()
        self.rest.stop()
        event.accept()
        self.closed.emit()


def run(path: str | None = None) -> int:
    """Open the window (with the sketch at ``path``, if given) and run until it closes; the exit status."""
    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("Loopwright")
    app.setOrganizationName("Loopwright")
    windows = start(MainWindow, path)
    if not windows:
        return 2
    return app.exec()

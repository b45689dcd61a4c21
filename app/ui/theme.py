"""Colours, pens and fonts of the canvas, in a light and a dark scheme.

The scheme follows the system palette (a dark window background selects the
dark scheme). Colour never carries meaning alone: every flag drawn with one
of these colours also has a word or a shape (WCAG 2.1, 1.4.1).
"""
from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, replace

from PySide6.QtGui import QColor, QFont, QGuiApplication, QPalette

__all__ = ["Theme", "LIGHT", "DARK", "PRINT", "current_theme", "set_theme", "scheme_for", "use_scheme", "window_palette", "GRID",
           "label_font", "small_font", "SMALL_PX", "description_font", "REFUSAL", "style_refusal"]

GRID = 20.0  # scene units per grid step


@dataclass(frozen=True)
class Theme:
    """One colour scheme for the canvas."""

    name: str
    paper: QColor       # canvas background
    grid: QColor        # grid dots
    ink: QColor         # parts and wires
    label: QColor       # designators and values
    select: QColor      # selection outline
    current: QColor     # current arrows and values
    drop: QColor        # voltage drops and +/- marks
    potential: QColor   # node potential tags (text)
    tag: QColor         # node potential tags (fill)
    loop: QColor        # loop-current arrows
    fault: QColor       # parts named by an error
    note: QColor        # fill of the error note
    loose: QColor       # unconnected ends
    ghost: QColor       # part being placed, wire being drawn


LIGHT = Theme(
    name="light",
    paper=QColor("#f7f6f1"), grid=QColor("#cfcbbd"), ink=QColor("#27343b"),
    label=QColor("#4d5a60"), select=QColor("#2f78a8"), current=QColor("#98590b"),
    drop=QColor("#2c6a4c"), potential=QColor("#3e4448"), tag=QColor("#e8e6dc"),
    loop=QColor("#6a4a98"), fault=QColor("#b3261e"), note=QColor("#fbe9e6"),
    loose=QColor("#b76e00"), ghost=QColor("#2f78a8"),
)

DARK = Theme(
    name="dark",
    paper=QColor("#1d2124"), grid=QColor("#3a4146"), ink=QColor("#d5dbde"),
    label=QColor("#a9b4b9"), select=QColor("#7db4dc"), current=QColor("#e6b460"),
    drop=QColor("#83c9a2"), potential=QColor("#d5dbde"), tag=QColor("#2c3236"),
    loop=QColor("#b7a2e3"), fault=QColor("#ff7468"), note=QColor("#3d2422"),
    loose=QColor("#f0a540"), ghost=QColor("#7db4dc"),
)
PRINT = replace(LIGHT, paper=QColor("#ffffff"))  # the light scheme on a white sheet (``page``)

_current: Theme | None = None
_auto: Theme | None = None  # the system's scheme, worked out once per palette


def _system_is_dark() -> bool:
    app = QGuiApplication.instance()
    if app is None:
        return False
    hints = QGuiApplication.styleHints()
    scheme = getattr(hints, "colorScheme", None)
    if scheme is not None:
        from PySide6.QtCore import Qt
        value = scheme()
        if value == Qt.ColorScheme.Dark:
            return True
        if value == Qt.ColorScheme.Light:
            return False
    window = QGuiApplication.palette().color(QPalette.ColorRole.Window)
    return window.lightness() < 128


def current_theme() -> Theme:
    """The scheme in use: set explicitly, or else the one matching the system palette."""
    global _auto
    if _current is not None:
        return _current
    if _auto is None:
        _auto = DARK if _system_is_dark() else LIGHT
    return _auto


def set_theme(theme: Theme | None) -> None:
    """Use ``theme`` from now on; ``None`` follows the system palette again (looked at afresh)."""
    global _current, _auto
    _current = theme
    _auto = None


@contextmanager
def scheme_for(theme: Theme) -> Iterator[None]:
    """Draw in ``theme`` inside the block (a page printed in ink on white paper, say), then in
    the scheme used before. Whatever keeps pictures of itself must not be painted meanwhile
    but afresh (``SketchScene.drawn_afresh``): its pictures are of the other scheme's colours."""
    global _current, _auto
    was = _current, _auto
    _current = theme
    try:
        yield
    finally:
        _current, _auto = was


# the window's own colours (panels, menus, tables) per scheme, for when the scheme chosen is
# not the system's; their texts are the scheme's ink (``window_palette``), disabled ones dimmer
_WINDOW_COLOURS = {
    "dark": {"Window": "#262b2e", "Base": "#1d2124", "AlternateBase": "#23282b", "Button": "#30363a",
             "BrightText": "#ffffff", "Highlight": "#2f6690", "HighlightedText": "#ffffff",
             "ToolTipBase": "#2c3236", "PlaceholderText": "#8d989d", "Link": "#7db4dc",
             "Light": "#464d52", "Midlight": "#3a4146", "Mid": "#30363a", "Dark": "#16191b", "Shadow": "#0c0e0f"},
    "light": {"Window": "#efede6", "Base": "#fbfaf6", "AlternateBase": "#f2f0e9", "Button": "#e6e3da",
              "BrightText": "#ffffff", "Highlight": "#2f6f9c", "HighlightedText": "#ffffff",
              "ToolTipBase": "#fbfaf6", "PlaceholderText": "#6b7478", "Link": "#2f6f9c",
              "Light": "#ffffff", "Midlight": "#f4f2ec", "Mid": "#b9b5aa", "Dark": "#8f8b80", "Shadow": "#5a5750"},
}
_DISABLED = {"dark": "#6f7a7f", "light": "#9aa2a6"}
_TEXTS = ("WindowText", "Text", "ButtonText", "ToolTipText")


def window_palette(theme: Theme) -> QPalette:
    """A palette for the window's widgets in ``theme``'s scheme, used when the scheme chosen is
    not the system's (a dark window asked for on a light desktop, say)."""
    pal = QPalette()
    for role, colour in _WINDOW_COLOURS[theme.name].items():
        pal.setColor(getattr(QPalette.ColorRole, role), QColor(colour))
    for role in _TEXTS:
        pal.setColor(getattr(QPalette.ColorRole, role), theme.ink)
    for role in ("WindowText", "Text", "ButtonText", "PlaceholderText"):
        pal.setColor(QPalette.ColorGroup.Disabled, getattr(QPalette.ColorRole, role), QColor(_DISABLED[theme.name]))
    return pal


_own_palette = False  # whether the application's palette is a scheme's (``window_palette``), not the system's


def use_scheme(theme: Theme | None) -> None:
    """Draw in ``theme`` (None: the system's scheme), and give the window's widgets (panels,
    menus, tables) its palette when it is not the system's scheme: a dark canvas asked for
    on a light desktop gets dark panels beside it. The system's palette comes back otherwise."""
    global _own_palette
    if _own_palette:
        _own_palette = False
        QGuiApplication.setPalette(QPalette())  # an empty palette: the platform's again
    if theme is not None and (theme is DARK) != _system_is_dark():
        _own_palette = True
        QGuiApplication.setPalette(window_palette(theme))
    set_theme(theme)


_FONTS: dict[int, QFont] = {}


def label_font(pixels: int = 11) -> QFont:
    """The font of designators and values, sized in scene units so pictures match the screen.

    Made once per size (items ask for it on every paint); change a copy, not the font returned.
    """
    f = _FONTS.get(pixels)
    if f is None:
        f = QFont()
        f.setFamilies(["DejaVu Sans", "Segoe UI", "Helvetica Neue", "Sans Serif"])
        f.setPixelSize(pixels)
        # Unhinted glyphs scale linearly, so text measured at its scene size fits its box
        # at every zoom and in pictures (hinted glyphs grew wider when zoomed and were clipped).
        f.setHintingPreference(QFont.HintingPreference.PreferNoHinting)
        _FONTS[pixels] = f
    return f


SMALL_PX = 10  # the annotations' font size, in scene units


def small_font() -> QFont:
    """The font of annotations (currents, drops, potentials)."""
    return label_font(SMALL_PX)


_DESCRIPTION: QFont | None = None


def description_font() -> QFont:
    """The font of a part's description on the drawing: the label font in italic, so it
    reads as words about the part, not as one of its values."""
    global _DESCRIPTION
    if _DESCRIPTION is None:
        _DESCRIPTION = QFont(label_font())
        _DESCRIPTION.setItalic(True)
    return _DESCRIPTION


REFUSAL = "refusal"  # the object name of labels that say why an input was refused


def style_refusal(label) -> None:
    """Show ``label`` (a QLabel) in the scheme's fault colour, semi-bold, and name it ``REFUSAL``.

    The style sheet is the label's own: one set on the window makes every widget in it paint
    through Qt's style-sheet style, the Readings table's cells among them (measured 0.3 ms more
    per repaint of the table).
    """
    label.setObjectName(REFUSAL)
    label.setStyleSheet(f"color: {current_theme().fault.name()}; font-weight: 600;")

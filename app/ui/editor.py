"""Drawing operations as undo steps: the one place the window changes the document.

Each public method works out an ``Edit`` (see ``edits``) and pushes it on
the undo stack as one ``SketchCommand``; the moves of one drag share a merge
key so they become a single step.
"""
from __future__ import annotations

import itertools
import json
import re
from dataclasses import asdict, replace

from PySide6.QtGui import QUndoStack

from ..sketch.fileio import NAME_PATTERN
from ..sketch.kinds import KINDS, kind_spec
from ..sketch.model import PlacedPart, Sketch, Wire
from ..units import format_value
from .commands import SketchCommand
from .edits import (Edit, add_parts_edit, change_edit, delete_edit, move_target, rotate_edit,
                    route_clear, wires_edit)
from .scene import SketchScene

__all__ = ["Editor", "FRAGMENT_MIME"]

FRAGMENT_MIME = "application/x-loopwright-fragment"
GridPoint = tuple[int, int]
_drag_ids = itertools.count(1)


class Editor:
    """Turns drawing gestures into undoable steps on ``sketch``."""

    def __init__(self, sketch: Sketch, scene: SketchScene, stack: QUndoStack) -> None:
        self.sketch = sketch
        self.scene = scene
        self.stack = stack
        self._drag: tuple | None = None
        self._paste_shift = 0

    # -- plumbing -----------------------------------------------------------------
    def push(self, edit: Edit, text: str, merge_key: object = None) -> bool:
        """Push ``edit`` as one step (nothing happens for an empty edit)."""
        if edit.is_empty():
            return False
        self.stack.push(SketchCommand(self.sketch, edit, text, self.scene.batch, merge_key))
        return True

    def _free_names(self, kinds: list[str]) -> list[str]:
        used = {p.name for p in self.sketch.parts}
        out = []
        for kind in kinds:
            prefix = kind_spec(kind).prefix or "GND"
            n = 1
            while f"{prefix}{n}" in used:
                n += 1
            used.add(f"{prefix}{n}")
            out.append(f"{prefix}{n}")
        return out

    # -- placing and wiring ----------------------------------------------------------
    def place(self, kind: str, x: int, y: int, rotation: int = 0, mirror: bool = False) -> str:
        """Place a new part of ``kind`` with its first terminal at (x, y); returns its designator."""
        name = self.sketch.next_name(kind)
        part = PlacedPart(kind, name, x, y, rotation % 360, mirror)
        self.push(add_parts_edit(self.sketch, [part]), f"Place {name}")
        self.scene.select([name])
        return name

    def add_wire(self, a: GridPoint, b: GridPoint, horizontal_first: bool = True) -> int:
        """Join ``a`` to ``b`` with one or two wires at right angles, bent as asked unless the
        other bend runs over fewer parts (``route_clear``); returns how many were added."""
        edit = wires_edit(self.sketch, route_clear(self.sketch, a, b, horizontal_first))
        n = len(edit.wires_after) - len(edit.wires_before)
        self.push(edit, "Draw wire")
        return n

    # -- changing what is selected ------------------------------------------------
    def delete(self, names: list[str], wires: list[int]) -> None:
        if names or wires:
            self.push(delete_edit(self.sketch, names, wires), "Delete")

    def delete_selection(self) -> None:
        self.delete(self.scene.selected_parts(), self.scene.selected_wires())

    def move(self, names: list[str], wires: list[int], dx: int, dy: int, merge_key: object = None) -> None:
        """Move parts and wires by (dx, dy); attached wires stretch to follow."""
        if not (names or wires) or (dx, dy) == (0, 0):
            return
        movers = {n: self.sketch.part(n) for n in names}
        base = tuple(self.sketch.wires)
        new_parts, new_wires = move_target(movers, base, wires, dx, dy)
        edit = Edit([(movers[n], new_parts[n], None) for n in names], base, new_wires)
        self.push(edit, "Move", merge_key)
        self._reselect(names, new_wires, base, wires, dx, dy)

    def _reselect(self, names, new_wires, base, wires, dx, dy) -> None:
        if wires:
            want = {Wire(base[i].x1 + dx, base[i].y1 + dy, base[i].x2 + dx, base[i].y2 + dy) for i in wires}
            wires = [i for i, w in enumerate(self.sketch.wires) if w in want]
        self.scene.select(names, wires)

    def begin_drag(self) -> None:
        """Remember the selection and document before a drag, so its steps merge into one."""
        names = self.scene.selected_parts()
        wires = self.scene.selected_wires()
        self._drag = (next(_drag_ids), names, wires,
                      {n: self.sketch.part(n) for n in names}, tuple(self.sketch.wires), (0, 0))

    def drag_to(self, dx: int, dy: int) -> None:
        """Move the dragged selection to (dx, dy) grid steps from where the drag began."""
        if self._drag is None:
            return
        key, names, wires, movers, base, last = self._drag
        if (dx, dy) == last:
            return
        new_parts, new_wires = move_target(movers, base, wires, dx, dy)
        edit = Edit([(self.sketch.part(n), new_parts[n], None) for n in names],
                    tuple(self.sketch.wires), new_wires)
        self._drag = (key, names, wires, movers, base, (dx, dy))
        self.push(edit, "Move", ("drag", key))
        self._reselect(names, new_wires, base, wires, dx, dy)

    def end_drag(self) -> None:
        self._drag = None

    def nudge(self, dx: int, dy: int) -> None:
        """Move the selection one step with the keyboard."""
        self.move(self.scene.selected_parts(), self.scene.selected_wires(), dx, dy)

    def rotate(self, names: list[str], mirror: bool = False) -> None:
        if names:
            self.push(rotate_edit(self.sketch, names, mirror=mirror), "Mirror" if mirror else "Rotate")
            self.scene.select(names)

    def rotate_selection(self, mirror: bool = False) -> None:
        self.rotate(self.scene.selected_parts(), mirror)

    def set_values(self, name: str, values: dict[str, float]) -> None:
        """Give part ``name`` new values (SI base units)."""
        part = self.sketch.part(name)
        merged = dict(part.values)
        merged.update(values)
        self.push(change_edit(self.sketch, [(name, replace(part, values=merged))]), _values_text(part, values))

    def set_flag(self, name: str, key: str, on: bool) -> None:
        part = self.sketch.part(name)
        flags = dict(part.flags)
        flags[key] = on
        word = ("Close " if on else "Open ") if key == "closed" else "Change "
        self.push(change_edit(self.sketch, [(name, replace(part, flags=flags))]), word + name)

    def set_choice(self, name: str, key: str, option: str) -> None:
        """Pick ``option`` for the choice ``key`` of part ``name`` (a cable's material...)."""
        part = self.sketch.part(name)
        self.change(name, replace(part, choices=dict(part.choices, **{key: option})), f"Change {name}")

    def change(self, name: str, new: PlacedPart, text: str) -> None:
        """Replace part ``name`` by ``new`` (several properties at once) as one step."""
        self.push(change_edit(self.sketch, [(name, new)]), text)

    def rename(self, name: str, new: str) -> None:
        """Give a part a new designator; raises ValueError with a message if it cannot be used."""
        new = new.strip()
        if not new:
            raise ValueError("A designator cannot be empty.")
        if new.startswith("~"):
            raise ValueError("A designator cannot start with '~'.")
        if not re.fullmatch(NAME_PATTERN, new):
            raise ValueError("A designator is 1 to 32 letters, digits or . _ + -, starting with a letter "
                             "or digit (no spaces), so that the sketch can be saved.")
        if new != name and self.sketch.has_part(new):
            raise ValueError(f"{new} is already used by another part.")
        part = self.sketch.part(name)
        self.push(change_edit(self.sketch, [(name, replace(part, name=new))]), f"Rename {name} to {new}")
        self.scene.select([new])

    # -- clipboard -------------------------------------------------------------------
    def fragment(self) -> str:
        """The selection as text for the clipboard (parts and wires)."""
        parts = [asdict(self.sketch.part(n)) for n in self.scene.selected_parts()]
        wires = [asdict(self.sketch.wires[i]) for i in self.scene.selected_wires()]
        return json.dumps({"loopwright-fragment": 1, "parts": parts, "wires": wires})

    def paste(self, text: str, shift: int | None = None) -> bool:
        """Add a copied fragment, offset from its original and with fresh designators."""
        try:
            data = json.loads(text)
            if data.get("loopwright-fragment") != 1:
                return False
            parts = [PlacedPart(**p) for p in data["parts"]]
            wires = [Wire(**w) for w in data["wires"]]
        except (ValueError, TypeError, KeyError, AttributeError):
            return False
        parts = [p for p in parts if p.kind in KINDS]
        if not parts and not wires:
            return False
        if shift is None:
            self._paste_shift += 2
            shift = self._paste_shift
        names = self._free_names([p.kind for p in parts])
        parts = [replace(p, name=n, x=p.x + shift, y=p.y + shift) for p, n in zip(parts, names)]
        wires = [Wire(w.x1 + shift, w.y1 + shift, w.x2 + shift, w.y2 + shift) for w in wires]
        before = len(self.sketch.wires)
        self.push(add_parts_edit(self.sketch, parts, wires), "Paste")
        self.scene.select(names, range(before, before + len(wires)))
        return True

    def duplicate(self) -> None:
        """Copy the selection and paste it two steps down and right."""
        if self.scene.selected_parts() or self.scene.selected_wires():
            self.paste(self.fragment(), shift=2)

    def reset_paste_offset(self) -> None:
        self._paste_shift = 0


def _values_text(part: PlacedPart, values: dict[str, float]) -> str:
    """What the undo step is called: ``Set R1 resistance 4.70 kΩ`` (``Change R1`` for an unknown key)."""
    fields = {f.key: f for f in kind_spec(part.kind).value_fields}
    said = []
    for key, v in values.items():
        f = fields.get(key)
        if f is None:
            return f"Change {part.name}"
        said.append(f"{f.label.lower()} {format_value(v, f.unit) if f.prefixed else f'{v:g} {f.unit}'}")
    return f"Set {part.name} " + ", ".join(said) if said else f"Change {part.name}"

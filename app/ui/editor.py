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

from ..sketch.fileio import LABEL_MAX, NAME_PATTERN, text_problem
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
        self._drag: tuple | None = None  # the mouse's move under way (``_carry_from_here``)
        self._keys: tuple | None = None  # the keys' move under way, and what must hold for it to go on
        self._stack_changes = 0  # undo stack index changes: any other step ends a move by keys
        self.stepping = False  # while a later step of a move (a drag, keys in a row) is being made
        stack.indexChanged.connect(self._stack_changed)
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

    def move(self, names: list[str], wires: list[int], dx: int, dy: int, merge_key: object = None,
             apart: bool = False) -> None:
        """Move parts and wires by (dx, dy); attached wires stretch to follow, and what the
        moved parts touch directly stays joined by a new wire, unless ``apart`` (they come
        away from it)."""
        if not (names or wires) or (dx, dy) == (0, 0):
            return
        movers = {n: self.sketch.part(n) for n in names}
        base = tuple(self.sketch.wires)
        new_parts, new_wires = move_target(movers, base, wires, dx, dy,
                                           None if apart else self._staying(names))
        edit = Edit([(movers[n], new_parts[n], None) for n in names], base, new_wires)
        self.push(edit, "Move apart" if apart else "Move", merge_key)
        self._reselect(names, new_wires, base, wires, dx, dy)

    def _staying(self, names: list[str]) -> set[GridPoint]:
        """The terminals of the parts not in ``names``."""
        moving = set(names)
        return {t for p in self.sketch.parts if p.name not in moving for t in p.terminal_points}

    def _reselect(self, names, new_wires, base, wires, dx, dy) -> None:
        if wires:
            want = {Wire(base[i].x1 + dx, base[i].y1 + dy, base[i].x2 + dx, base[i].y2 + dy) for i in wires}
            wires = [i for i, w in enumerate(self.sketch.wires) if w in want]
        self.scene.select(names, wires)

    def begin_drag(self) -> None:
        """Remember the selection and document before a drag, so its steps merge into one."""
        self._drag = self._carry_from_here()

    def drag_to(self, dx: int, dy: int, apart: bool = False) -> None:
        """Move the dragged selection to (dx, dy) grid steps from where the drag began
        (``apart``: coming away from what it touches, as ``move``)."""
        if self._drag is not None:
            self._drag = self._carry_to(self._drag, dx, dy, apart)

    def end_drag(self) -> None:
        self._drag = None

    def nudge(self, dx: int, dy: int, apart: bool = False) -> None:
        """Move the selection (dx, dy) by keys (``apart``: as ``move``).

        Steps in a row on one selection, with nothing else done between them, are one move
        from where the first began, as a drag is: one undo step, and what the selection
        passes over on the way is not joined to it (only where it ends up).
        """
        keys = self._keys
        if keys is None or keys[1] != self._keys_mark():
            carry = self._carry_from_here()
            if not (carry[1] or carry[2]):
                return
        else:
            carry = keys[0]
        at = carry[-1]
        carry = self._carry_to(carry, at[0] + dx, at[1] + dy, apart)
        self._keys = (carry, self._keys_mark())

    def _keys_mark(self) -> tuple:
        """What must not change between two key steps for them to be one move."""
        return self._stack_changes, self.scene.selected_parts(), self.scene.selected_wires()

    def _stack_changed(self) -> None:
        self._stack_changes += 1

    def _carry_from_here(self) -> tuple:
        """A move of the selection about to start: (merge key, part names, wire indices,
        the parts, the wires, the staying terminals, (dx, dy, apart) so far)."""
        names = self.scene.selected_parts()
        return (next(_drag_ids), names, self.scene.selected_wires(), {n: self.sketch.part(n) for n in names},
                tuple(self.sketch.wires), self._staying(names), (0, 0, False))

    def _carry_to(self, carry: tuple, dx: int, dy: int, apart: bool) -> tuple:
        """Take the move ``carry`` to (dx, dy) from its start; the carry as it now is."""
        key, names, wires, movers, base, staying, last = carry
        if (dx, dy, apart) == last:
            return carry
        new_parts, new_wires = move_target(movers, base, wires, dx, dy, None if apart else staying)
        edit = Edit([(self.sketch.part(n), new_parts[n], None) for n in names],
                    tuple(self.sketch.wires), new_wires)
        # a drag's steps, and key steps after the first, come in a run: what is solved inside
        # them may leave the careful placing of its marks until the run pauses (``stepping``)
        self.stepping = self._drag is not None or last != (0, 0, False)
        try:
            self.push(edit, "Move", ("drag", key))
        finally:
            self.stepping = False
        self._reselect(names, new_wires, base, wires, dx, dy)
        return key, names, wires, movers, base, staying, (dx, dy, apart)

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

    def describe(self, name: str, text: str) -> None:
        """Say what part ``name`` is ('drive motor', 'tail lamp'): its description, shown under
        its value; spaces and line breaks run together, an empty text clears it. Raises
        ValueError with a message if the text cannot be kept."""
        text = " ".join(text.split())
        problem = text_problem(text, LABEL_MAX)  # the file's own rule for a label
        if problem:
            raise ValueError(f"A description {problem}, so that the sketch can be saved.")
        part = self.sketch.part(name)
        if text != part.label:
            self.push(change_edit(self.sketch, [(name, replace(part, label=text))]),
                      f"Describe {name}" if text else f"Clear the description of {name}")

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

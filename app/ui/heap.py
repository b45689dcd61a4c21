"""Keep Python's cycle collector off the path from an edit to the drawing.

A sketch of a few thousand parts holds some hundred thousand long-lived
objects (items, parts, undo steps). Every edit allocates a netlist and a
solution that outlive the young generations, so every few edits the
collector walks the whole heap: a pause of tens of milliseconds in the
middle of an edit. Once a document is loaded and shown, ``settle`` collects
what is garbage and moves everything alive into the collector's permanent
generation (``gc.freeze``, Python 3.7+), so later collections walk only what
edits made since. Freeing by reference counting still works for frozen
objects; only cycles among them wait for the next ``settle``, which first
thaws them. Small documents are only thawed: their heap is small, and a full
collection on every load would cost more than the pauses it saves.
"""
from __future__ import annotations

import gc

__all__ = ["settle", "SETTLE_FROM"]

SETTLE_FROM = 100  # parts; below this the heap is small and a full collection costs more than it saves


def settle(parts: int) -> None:
    """After loading a document of ``parts`` parts: thaw what earlier documents froze, and for a
    large one collect the garbage once and freeze what is alive."""
    gc.unfreeze()
    if parts >= SETTLE_FROM:
        gc.collect()
        gc.freeze()

"""Pausing Python's cyclic garbage collector while a stage builds many long-lived records.

Reading a 100,000-part netlist allocates millions of small objects that hold no reference
cycles: the collector would re-walk all of them on every oldest-generation collection,
which costs more than the work itself. Memory is still freed on time (reference counts do
that); only cycles wait until the pause ends.
"""

from __future__ import annotations

import gc
from contextlib import contextmanager
from typing import Iterator

__all__ = ["paused_gc"]


@contextmanager
def paused_gc() -> Iterator[None]:
    """Pause the cyclic garbage collector for the block, then restore it.

    On resuming, what the block made goes straight to the oldest generation (freeze, then
    unfreeze), where long-lived records end up anyway; otherwise the first young collection
    would walk every one of them. Nested pauses leave the outermost one in charge.
    """
    collecting = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if collecting:
            gc.freeze()
            gc.unfreeze()
            gc.enable()

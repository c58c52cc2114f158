"""SPICE netlist reader (SPICE3 / ngspice dialect) → :class:`linter.model.Circuit`.

The reading happens in stages, one module each:

1. :mod:`~linter.readers.spice_lines` — comments, ``+`` continuation lines, tokens with
   positions, ``.control`` blocks skipped;
2. :mod:`~linter.readers.spice_deck` — the title line, ``.include`` / ``.lib`` (refused
   outside the project folder ``root`` and in loops), ``.end``;
3. :mod:`~linter.readers.spice_structure` — ``.subckt`` / ``.ends``, ``.model``, ``.global``;
4. :mod:`~linter.readers.spice_flatten` — element cards (:mod:`~linter.readers.spice_elements`),
   parameters (:mod:`~linter.readers.spice_expr`), SPICE numbers
   (:mod:`~linter.readers.spice_numbers`), hierarchy flattened;
5. :mod:`~linter.readers.spice_parts` — references, kinds, nets, and ``spice-scale-trap``
   notes (:mod:`~linter.readers.spice_traps`).

Decisions a user of the Circuit should know:

* SPICE is case-insensitive: a net is named by the spelling of its first use.
* Ground: nodes ``0`` and ``gnd`` (any case) are one net named ``0`` with the alias ``GND``.
* A voltage source ``V`` is a part of kind ``source``; its ``value_si`` is its DC voltage (None
  for a source with only a waveform), so it defines a rail between its nodes.
* ``X`` instances are flattened, except those of a subcircuit named in ``opaque``
  (case-insensitive) or with an empty body, which stay whole: one part whose pins are the
  subcircuit's ports, ``cell`` and ``part_number`` the subcircuit name, named without the
  ``X`` (``XU1`` → ``U1``); a MOSFET or JFET named ``MQ2`` is the board's ``Q2``. Where the
  reference drops a letter, the SPICE name is in ``properties["spice_name"]``.
* ``Part.path`` is the instance path with ``/``; for a part kept whole its last element is the
  reference-style name (``X2/U1``), its SPICE name being ``properties["spice_name"]``.
* Locations: the top file as named by ``source``; an included file by its path relative to
  the top file's folder, joined to the folder part of ``source`` (found from the same place).

Every malformed input raises :class:`linter.errors.NetlistError` located at file, line, column.
"""

from __future__ import annotations

from pathlib import Path
from typing import Collection

from linter.model import Circuit
from linter.readers.spice_deck import load_deck
from linter.readers.spice_flatten import flatten
from linter.readers.spice_parts import assemble
from linter.readers.spice_structure import structure_of

__all__ = ["read_spice"]


def read_spice(text: str, source: str, *, path: Path, root: Path,
               opaque: Collection[str] = ()) -> Circuit:
    """Read a SPICE deck into a flattened :class:`~linter.model.Circuit`.

    Parameters
    ----------
    text : str
        The top file's text (its first line is the title).
    source : str
        The top file's name as the user gave it; used in locations and messages.
    path : Path
        The top file on disk: ``.include`` paths are relative to its folder.
    root : Path
        The project folder; no included file may lie outside it (real paths compared).
    opaque : collection of str
        Subcircuit names (case-insensitive) whose instances stay whole parts.

    Raises
    ------
    linter.errors.NetlistError
        For anything that is not a readable deck, with file, line and column.
    """
    deck = load_deck(text, source, path=path, root=root)
    title = deck.title
    structure = structure_of(title, deck.cards)
    del deck
    flat = flatten(structure, opaque)
    del structure  # the cards go before the parts are made (nothing flattened points to one)
    return assemble(flat, source, title, release=True)

"""Flattened SPICE elements to parts and nets: references, kinds, values, notes.

References: a part is named by its leaf name while that leaf is unique in the design (compared
without regard to case); otherwise by its path ``X2/R3``. The leaf name is the element name,
except where SPICE forced a letter in front of a board designator (:func:`leaf_name`): an
``X`` instance kept whole loses its ``X`` when a letter follows (``XU1`` → ``U1``, ``X1``
stays ``X1``), a MOSFET ``MQ2`` is ``Q2``. The SPICE name is then kept in
``properties["spice_name"]``.

Kinds come from the element letter, refined by the model and the words it carries:
R is a resistor (a ``link`` at 0 Ω), C a capacitor, L an inductor, Q ``npn``/``pnp`` and M
``nmos``/``pmos`` by their model type, J a ``transistor``, V and I ``source``, E F G H B
``other``. A D element is an ``led`` when :func:`linter.kinds.infer_kind` finds LED or colour
words in its name or model, or when its ``.model`` puts the forward voltage at
:data:`LED_TEST_CURRENT` above :data:`LED_MIN_FORWARD_VOLTAGE` (a silicon junction is well
below it); else a ``diode``. An ``X`` part gets :func:`~linter.kinds.infer_kind` of its
reference and subcircuit name.
"""

from __future__ import annotations

import math
import re
from collections import Counter
from typing import Callable

from linter.kinds import infer_kind
from linter.model import Circuit, DeviceModel, Net, Part, Pin, ReaderNote, SourceLocation, location_packer
from linter.readers.spice_flatten import FlatElement, Flattened
from linter.readers.spice_traps import scale_trap_note

__all__ = ["assemble", "leaf_name", "forward_voltage", "LED_TEST_CURRENT", "LED_MIN_FORWARD_VOLTAGE"]

LED_TEST_CURRENT = 10e-3
"""A, the current at which a diode model's forward voltage is judged."""

LED_MIN_FORWARD_VOLTAGE = 1.5
"""V; from memory: silicon junctions conduct at 0.6–1.0 V, visible LEDs from about 1.7 V (red)."""

_BOLTZMANN = 1.380649e-23
"""J/K, exact (SI 2019 defining constant)."""
_ELEMENTARY_CHARGE = 1.602176634e-19
"""C, exact (SI 2019 defining constant)."""
_SPICE_NOMINAL_KELVIN = 300.15
"""K, 27 °C: the nominal temperature SPICE models are written for (ngspice TNOM default)."""

_LETTER_KINDS = {"R": "resistor", "C": "capacitor", "L": "inductor", "J": "transistor",
                 "V": "source", "I": "source", "E": "other", "F": "other", "G": "other",
                 "H": "other", "B": "other"}
_MODEL_KINDS = {"NPN": "npn", "PNP": "pnp", "NMOS": "nmos", "PMOS": "pmos"}


_EXPORTER_PREFIXED = {"M": re.compile(r"[QqTt]\d"), "J": re.compile(r"[QqTt]\d"),
                      "D": re.compile(r"(?i:led)\d")}
"""Board designators that SPICE cannot use as element names for these letters, so netlist
exporters put the element letter in front (common practice): ``MQ2`` is the MOSFET Q2."""


def leaf_name(element: FlatElement) -> str:
    """The name an engineer sees: the element name without a letter SPICE forced in front.

    An ``X`` instance loses its ``X`` when a letter follows (``XU1`` → ``U1``, ``X1`` stays);
    a MOSFET or JFET named ``MQ2``/``JT1`` is ``Q2``/``T1``; a diode ``DLED3`` is ``LED3``.
    """
    name, letter = element.name, element.letter
    if letter == "X" and len(name) > 1 and name[1].isalpha():
        return name[1:]
    prefixed = _EXPORTER_PREFIXED.get(letter)
    if prefixed is not None and prefixed.match(name, 1):
        return name[1:]
    return name


def forward_voltage(model: DeviceModel, current: float) -> float:
    """Forward voltage of a SPICE diode model at ``current`` (A), at 27 °C, in V.

    Shockley with series resistance: V = N·Vt·ln(I/IS + 1) + I·RS, Vt = k·T/q, using the
    SPICE defaults IS = 1e-14 A, N = 1, RS = 0 Ω for missing parameters.

    >>> round(forward_voltage(DeviceModel("d", "D", {"IS": 1e-14}), 1e-3), 3)
    0.655
    """
    saturation = model.params.get("IS", 1e-14)
    emission = model.params.get("N", 1.0)
    series = model.params.get("RS", 0.0)
    thermal = _BOLTZMANN * _SPICE_NOMINAL_KELVIN / _ELEMENTARY_CHARGE
    return emission * thermal * math.log(current / saturation + 1.0) + current * series


def _kind(element: FlatElement, ref: str, lit: dict[int, bool] | None = None) -> str:
    """The part's kind (see the module docstring); ``lit`` remembers, by model identity,
    whether a diode model's forward voltage makes it an LED."""
    letter = element.letter
    if letter == "R" and element.value_si == 0:
        return "link"
    if letter in _LETTER_KINDS:
        return _LETTER_KINDS[letter]
    model_name = element.model.name if element.model is not None else None
    if letter == "X":
        return infer_kind(ref, None, element.subcircuit, cell=element.subcircuit)
    if letter in "QM":
        model_type = element.model.type if element.model is not None else ""
        return _MODEL_KINDS.get(model_type, "transistor")
    if infer_kind(element.name, model_name, model_name) == "led":
        return "led"
    model = element.model
    if model is None:
        return "diode"
    if lit is None:
        return "led" if _lights(model) else "diode"
    bright = lit.get(id(model))
    if bright is None:
        bright = lit[id(model)] = _lights(model)
    return "led" if bright else "diode"


def _lights(model: DeviceModel) -> bool:
    """True for a diode model whose forward voltage at the test current is an LED's."""
    return model.type == "D" and model.params.get("IS", 1e-14) > 0 and \
        forward_voltage(model, LED_TEST_CURRENT) > LED_MIN_FORWARD_VOLTAGE


def _references(elements: list[FlatElement], leaves: list[str]) -> list[str]:
    folded = [leaf.casefold() for leaf in leaves]
    if len(set(folded)) == len(folded):  # every leaf unique: each is its own reference
        return leaves
    counts = Counter(folded)
    refs: list[str] = []
    taken: set[str] = set()
    for element, leaf in zip(elements, leaves):
        ref = leaf if counts[leaf.casefold()] == 1 else "/".join([*element.path, leaf])
        folded = ref.casefold()
        if folded in taken:  # a kept-whole XJ1 beside an element J1 at the same level
            ref = "/".join([*element.path, element.name])
            folded = ref.casefold()
        taken.add(folded)
        refs.append(ref)
    return refs


class _PartMaker:
    """Parts of one deck. Pins with the same name and net, equal value and cell texts, and the
    empty property table are one object each (a 100,000-element deck repeats a few dozen
    values; the table is never changed once the part is made); locations are stored packed."""

    def __init__(self, net_names: dict[str, str]) -> None:
        self.net_names = net_names
        self.pins: dict[tuple[str, str], Pin] = {}  # by (pin name, net key)
        self.texts: dict[str, str] = {}
        self.lit: dict[int, bool] = {}
        self.packers: dict[str, Callable[[int, int], SourceLocation]] = {}

    def packed(self, location: SourceLocation) -> SourceLocation:
        """The location as a Part or Net stores it, packed (:func:`linter.model.packed_location`:
        it reads as the same SourceLocation)."""
        pack = self.packers.get(location.file)
        if pack is None:
            pack = self.packers[location.file] = location_packer(location.file)
        return pack(location.line, location.column)

    def pins_of(self, element: FlatElement) -> tuple[Pin, ...]:
        known = self.pins  # (pin name, net key): a net key names one net
        pins = []
        for pair in element.pins:
            pin = known.get(pair)
            if pin is None:
                pin = known[pair] = Pin(pair[0], self.net_names[pair[1]])
            pins.append(pin)
        return tuple(pins)

    def part(self, element: FlatElement, ref: str, leaf: str) -> Part:
        path = "/".join([*element.path, leaf]) if element.path else leaf
        properties = dict(element.params) if element.params else _NO_PROPERTIES
        if leaf != element.name:
            properties = {**properties, "spice_name": element.name}
        cell, part_number = _cell_and_part_number(element)
        share = self.texts.setdefault
        value = element.value_text
        location = element.location
        pack = self.packers.get(location.file)
        if pack is None:
            pack = self.packers[location.file] = location_packer(location.file)
        return Part(ref, _kind(element, ref, self.lit),
                    value if value is None else share(value, value), self.pins_of(element),
                    pack(location.line, location.column), element.value_si, path,
                    share(cell, cell), part_number, properties, element.model)


def _cell_and_part_number(element: FlatElement) -> tuple[str, str | None]:
    """The part's cell (its subcircuit, or its element letter) and part number (the
    subcircuit, or the model card's name of a diode or transistor; else None)."""
    letter = element.letter
    if letter == "X":
        return element.subcircuit or "X", element.subcircuit
    model = element.model
    return letter, model.name if model is not None and letter in "DQMJ" else None


_NO_PROPERTIES: dict[str, str] = {}
"""One empty property table for every part without properties (never changed)."""


def _part(element: FlatElement, ref: str, leaf: str, net_names: dict[str, str],
          lit: dict[int, bool] | None = None) -> Part:
    """One part on its own (nothing shared with other parts)."""
    pins = tuple([Pin(name, net_names[key]) for name, key in element.pins])
    path = "/".join([*element.path, leaf]) if element.path else leaf
    properties = dict(element.params) if element.params else {}
    if leaf != element.name:
        properties["spice_name"] = element.name
    cell, part_number = _cell_and_part_number(element)
    return Part(ref, _kind(element, ref, lit), element.value_text, pins, element.location,
                element.value_si, path, cell, part_number, properties, element.model)


def assemble(flat: Flattened, source: str, title: str, *, release: bool = False) -> Circuit:
    """Build the :class:`~linter.model.Circuit` from a flattened deck.

    ``release=True`` lets go of each element of ``flat.elements`` (the list keeps None in its
    place) once its part is made, so that the parts reuse the elements' memory.
    """
    net_names = {key: info.name for key, info in flat.nets.items()}
    elements = flat.elements
    leaves = [leaf_name(element) for element in elements]
    refs = _references(elements, leaves)
    parts: dict[str, Part] = {}
    joined: dict[str, list[tuple[str, str]]] = {key: [] for key in flat.nets}
    notes: list[ReaderNote] = []
    maker = _PartMaker(net_names)
    make = maker.part
    readings: dict[tuple[str, str], float | None] = {}
    for index, (element, ref, leaf) in enumerate(zip(elements, refs, leaves)):
        if release:
            elements[index] = None  # type: ignore[call-overload]  # (the loop holds it)
        parts[ref] = make(element, ref, leaf)
        for pin, key in element.pins:
            joined[key].append((ref, pin))
        if element.value_token is not None:
            note = scale_trap_note(element, ref, readings)
            if note is not None:
                notes.append(note)
    nets = {info.name: Net(info.name, tuple(joined[key]), maker.packed(info.location), info.aliases)
            for key, info in flat.nets.items()}
    return Circuit(source=source, format="spice", parts=parts, nets=nets, notes=tuple(notes),
                   design=title)

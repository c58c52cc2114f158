"""From a :class:`~linter.groups.Group` to the nodal network the solver runs on.

:func:`build_model` turns a group's parts (read from the Circuit by kind) into a
:class:`GroupModel`: the :class:`~linter.solve.Network` structure, the per-element figures
(nominal values, tolerances, fitted curves) and the corner axes they hang on. Groups whose
models share a :attr:`GroupModel.signature` are solved in one batch.

Modelling choices: a ``link`` merges its two nets; a capacitor is open at DC; an LED or
diode with series resistance gets an inner node (as SPICE does); a microcontroller output
pin is a fixed node (its supply rail when driven high, 0 V when low) behind its output
resistance, and a pin a scenario leaves undriven is that resistance opened (1e-12 S);
nets with a known rail voltage are fixed nodes. For the ``npn-sink`` / ``pnp-source``
headroom check the LED strings' far end gets its own fixed node (normally at the rail), so
that extra rows can move it out of the way and find the current the sink would regulate to.
"""

from __future__ import annotations

import functools
from dataclasses import field, replace

import numpy as np

from linter.corners import Axis
from linter.devices import (VT_REF, LedCurve, bjt_is_from_vbe, led_curve,
                            mosfet_kp_from_rds_on)
from linter.groups import Group
from linter.model import Circuit, Part
from linter.partdata import BjtData, LedData, McuData, MosfetData, PartDataMap, Rail, ResistorData
from linter.records import record
from linter.solve import Network
from linter.unionfind import UnionFind

__all__ = ["ModelGap", "ResistorSpec", "DiodeSpec", "BjtSpec", "MosfetSpec", "PinSpec",
           "FixedSpec", "GroupModel", "build_model", "supply_pin_names", "GENERIC"]

GENERIC: dict[str, float] = {
    "resistor_tolerance": 0.05,   # DESIGN.md: BOM, else 5 %
    "hfe_typ": 200.0,             # small-signal NPN/PNP, from memory
    "vbe": 0.65, "vbe_current": 0.01,   # V at A, small-signal, from memory
    "vce_sat": 0.2,               # V, common practice
    "br": 1.0,                    # SPICE default BR
    "vgs_th": 1.5, "rds_on": 1.0, "rds_on_vgs": 4.5,   # small logic-level MOSFET, from memory
    "output_resistance": 25.0,    # Ω, microcontroller push-pull output, from memory
    "diode_is": 2.5e-9, "diode_n": 1.8,   # small-signal silicon diode, from memory
    "bjt_tempco": -0.002,         # V/K, Vbe, from memory
}
"""Figures used where part data gives none; every use is named in the model's notes."""

HIGH_Z_SIEMENS: float = 1e-12
"""S, an undriven pin's output (open)."""


class ModelGap(ValueError):
    """A group cannot be modelled: a figure is missing with no generic value."""


@record
class ResistorSpec:
    """A resistor element: ``role`` part / rs (an LED's inner series R) / pin (output R)."""

    ref: str | None
    role: str
    ohms: float
    tolerance: float
    axis: int
    pin: int = -1
    rating_w: float | None = None
    package: str | None = None


@record
class DiodeSpec:
    """An LED (``curve`` set) or plain diode (``i_s``, ``ideality``); ``anode``/``cathode``
    are the outer nodes (the LED's terminals), the element sits on the inner ones."""

    ref: str
    part_number: str | None
    anode: int
    cathode: int
    axis: int
    curve: LedCurve | None = None
    i_s: float = 0.0
    ideality: float = 1.0
    tempco: float = -0.002


@record
class BjtSpec:
    """A bipolar transistor element (nodes C, B, E) and its figures."""

    ref: str
    polarity: int
    nodes: tuple[int, int, int]
    i_s: float
    hfe_min: float
    hfe_typ: float
    br: float
    vce_sat: float
    axis: int
    data: BjtData


@record
class MosfetSpec:
    """A MOSFET element (nodes D, G, S), level-1 VTO (V, magnitude), KP (A/V²), λ (1/V)."""

    ref: str
    polarity: int
    nodes: tuple[int, int, int]
    vto: float
    kp: float
    lam: float
    data: MosfetData


@record
class PinSpec:
    """A driven microcontroller pin: its source node, output resistor, supply."""

    id: str
    net: str
    source: int
    resistor: int
    supply_axis: int
    supply: Rail | None
    supply_voltage: float | None
    current_max: float | None


@record
class FixedSpec:
    """A fixed node: ``rail`` (at its corner voltage), ``pin`` (pin source) or ``headroom``;
    ``name`` is its node key: ``("f", net)``, ``("pin", pin id)`` or ``("h", net)`` (tuples,
    so that no net name can be taken for one)."""

    name: tuple[str, str]
    kind: str
    rail: Rail | None = None
    axis: int = -1
    pin: int = -1


@record(eq=False)
class GroupModel:
    """A group ready to solve; element lists are in the network's element order."""

    group: Group
    network: Network
    axes: tuple[Axis, ...]
    nodes: dict[str | tuple[str, str], int]
    fixed: tuple[FixedSpec, ...]
    resistors: tuple[ResistorSpec, ...]
    diodes: tuple[DiodeSpec, ...]
    bjts: tuple[BjtSpec, ...]
    mosfets: tuple[MosfetSpec, ...]
    pins: tuple[PinSpec, ...]
    levels: np.ndarray
    lit: np.ndarray
    headroom: tuple[int, int, str] | None
    notes: tuple[str, ...] = ()
    signature: tuple = field(default=())
    note_parts: tuple[tuple[str, str], ...] = ()
    """``notes`` as (part reference, text): each note is ``f"{ref}: {text}"``."""


_PIN_NAMES = {
    "led": (("a", "anode", "+", "1"), ("k", "c", "cathode", "-", "2")),
    "npn": (("c", "collector", "1"), ("b", "base", "2"), ("e", "emitter", "3")),
    "mosfet": (("d", "drain", "1"), ("g", "gate", "2"), ("s", "source", "3")),
}
_SUPPLY_NAMES = ("vdd", "vcc", "vddio", "avdd", "vdd1", "v+")


def _pin_net(part: Part, names: tuple[str, ...], position: int) -> str:
    for name in names:
        pin = part.pin(name)
        if pin is not None and pin.net is not None:
            return pin.net
    if position < len(part.pins) and part.pins[position].net is not None:
        return part.pins[position].net  # type: ignore[return-value]
    raise ModelGap(f"{part.ref}: no pin {names[0].upper()}")


class _Nets(UnionFind):
    """Union-find over net names (links merge nets); a rail stays the root of its set."""

    def join(self, a: str, b: str, rails: dict) -> None:  # type: ignore[override]
        super().join(a, b, keep=lambda net: net in rails)


class _Builder:
    """Collects elements with node keys; :meth:`finish` numbers nodes and freezes."""

    def __init__(self, group: Group, circuit: Circuit, part_data: PartDataMap,
                 rails: dict[str, Rail]) -> None:
        self.group, self.circuit, self.data, self.rails = group, circuit, part_data, rails
        self.nets = _Nets()
        self.axes: list[Axis] = []
        self.axis_index: dict[tuple[str, str], int] = {}
        self.unknown: list[str] = []
        self.fixed: list[FixedSpec] = []
        self.elements: dict[str, list] = {"r": [], "d": [], "q": [], "m": []}
        self.resistors: list[ResistorSpec] = []
        self.diodes: list[DiodeSpec] = []
        self.bjts: list[BjtSpec] = []
        self.mosfets: list[MosfetSpec] = []
        self.pins: list[PinSpec] = []
        self.notes: list[tuple[str, str]] = []
        self.headroom: tuple[tuple[str, str], int, str] | None = None
        self.headroom_ends: set[str] = set()

    def axis(self, kind: str, name: str) -> int:
        found = self.axis_index.get((kind, name))
        if found is None:
            found = self.axis_index[(kind, name)] = len(self.axes)
            self.axes.append(Axis(kind, name))  # type: ignore[arg-type]
        return found

    def key(self, net: str) -> str | tuple[str, str]:
        """The node key of a net: fixed (``("f", net)``) when it is a rail, else the net."""
        net = self.nets.find(net)
        rail = self.rails.get(net)
        if rail is not None:
            name = ("f", net)
            if all(f.name != name for f in self.fixed):
                axis = self.axis("rail", net) if rail.min < rail.max else -1
                self.fixed.append(FixedSpec(name, "rail", rail, axis))
            return name
        if net not in self.unknown:
            self.unknown.append(net)
        return net

    def inner(self, label: tuple[str, str]) -> tuple[str, str]:
        self.unknown.append(label)
        return label

    def data_of(self, ref: str, kind: type):
        found = self.data.get(ref)
        return found if isinstance(found, kind) else None

    def note(self, ref: str, what: tuple[str, ...]) -> None:
        if what:
            self.notes.append((ref, f"generic {', '.join(what)}"))


def _add_resistor(b: _Builder, part: Part) -> None:
    data = b.data_of(part.ref, ResistorData)
    ohms = data.ohms if data is not None and data.ohms is not None else part.value_si
    if ohms is None or ohms <= 0:
        raise ModelGap(f"{part.ref}: resistance unknown")
    tol = data.tolerance if data is not None and data.tolerance is not None else None
    if tol is None:
        tol = GENERIC["resistor_tolerance"]
        b.note(part.ref, ("tolerance",))
    a, c = (b.key(_pin_net(part, (n,), i)) for i, n in enumerate(("1", "2")))
    axis = b.axis("resistor", part.ref) if tol > 0 else -1
    b.elements["r"].append((a, c))
    b.resistors.append(ResistorSpec(part.ref, "part", float(ohms), float(tol), axis,
                                    rating_w=data.power if data else None,
                                    package=data.package if data else None))


def _led_data(b: _Builder, part: Part) -> LedData:
    data = b.data_of(part.ref, LedData) or LedData()
    params = part.model.params if part.model is not None else {}
    if data.spice_is is None and "IS" in params:
        data = replace(data, spice_is=params["IS"], ideality=params.get("N", 1.0),
                       rs=params.get("RS", 0.0))
    return data


_cached_curve = functools.lru_cache(maxsize=4096)(led_curve)
""":func:`~linter.devices.led_curve` once per distinct LedData (boards repeat parts)."""


def _add_diode(b: _Builder, part: Part) -> None:
    anode = b.key(_pin_net(part, _PIN_NAMES["led"][0], 0))
    cathode = b.key(_pin_net(part, _PIN_NAMES["led"][1], 1))
    if b.headroom is not None and part.ref in b.headroom_ends:
        if b.headroom[1] > 0 and anode == ("f", b.headroom[2]):
            anode = b.headroom[0]
        elif b.headroom[1] < 0 and cathode == ("f", b.headroom[2]):
            cathode = b.headroom[0]
    if part.kind == "led":
        try:
            curve = _cached_curve(_led_data(b, part))
        except ValueError as exc:
            raise ModelGap(f"{part.ref}: {exc}") from exc
        b.note(part.ref, curve.assumed)
        spec = DiodeSpec(part.ref, part.part_number, anode, cathode,  # type: ignore[arg-type]
                         b.axis("vf", part.ref), curve, ideality=curve.ideality,
                         tempco=curve.tempco)
        rs = curve.rs
    else:
        params = part.model.params if part.model is not None else {}
        if "IS" not in params:
            b.note(part.ref, ("diode IS, N",))
        spec = DiodeSpec(part.ref, part.part_number, anode, cathode, -1, None,  # type: ignore[arg-type]
                         params.get("IS", GENERIC["diode_is"]),
                         params.get("N", GENERIC["diode_n"] if "IS" not in params else 1.0))
        rs = params.get("RS", 0.0)
    inner = anode
    if rs > 0:
        inner = b.inner(("inner", part.ref))
        b.elements["r"].append((anode, inner))
        b.resistors.append(ResistorSpec(None, "rs", rs, 0.0, -1))
    b.elements["d"].append((inner, cathode))
    b.diodes.append(spec)


def _add_bjt(b: _Builder, part: Part) -> None:
    data = b.data_of(part.ref, BjtData) or BjtData(polarity=part.kind)  # type: ignore[arg-type]
    params = part.model.params if part.model is not None else {}
    generic: list[str] = []

    def pick(value: float | None, spice: str, name: str) -> float:
        if value is not None:
            return float(value)
        if spice in params:
            return float(params[spice])
        generic.append(name)
        return GENERIC[name]

    hfe_typ = data.spice_bf if data.spice_bf is not None else pick(data.hfe_typ, "BF", "hfe_typ")
    hfe_min = data.hfe_min if data.hfe_min is not None else hfe_typ
    if data.hfe_min is None:
        generic.append("hfe_min (= hfe_typ)")
    if data.spice_is is not None or "IS" in params:
        i_s = float(data.spice_is if data.spice_is is not None else params["IS"])
    else:
        i_s = bjt_is_from_vbe(pick(data.vbe, "", "vbe"), pick(data.vbe_current, "", "vbe_current"))
    br = data.spice_br if data.spice_br is not None else pick(None, "BR", "br")
    vce_sat = pick(data.vce_sat, "", "vce_sat")
    b.note(part.ref, tuple(g for g in generic if g != "br"))
    nodes = tuple(b.key(_pin_net(part, names, i)) for i, names in enumerate(_PIN_NAMES["npn"]))
    b.elements["q"].append(nodes)
    b.bjts.append(BjtSpec(part.ref, 1 if part.kind == "npn" else -1, nodes,  # type: ignore[arg-type]
                          i_s, float(hfe_min), float(hfe_typ), float(br), vce_sat,
                          b.axis("beta", part.ref), data))


def _add_mosfet(b: _Builder, part: Part) -> None:
    data = b.data_of(part.ref, MosfetData) or MosfetData(polarity=part.kind)  # type: ignore[arg-type]
    params = part.model.params if part.model is not None else {}
    if "VTO" in params and "KP" in params:
        vto, kp = abs(float(params["VTO"])), float(params["KP"])
    else:
        generic = [n for n in ("vgs_th", "rds_on", "rds_on_vgs") if getattr(data, n) is None]
        b.note(part.ref, tuple(generic))
        vto = abs(data.vgs_th if data.vgs_th is not None else GENERIC["vgs_th"])
        rds = data.rds_on if data.rds_on is not None else GENERIC["rds_on"]
        vgs = abs(data.rds_on_vgs if data.rds_on_vgs is not None else GENERIC["rds_on_vgs"])
        try:
            kp = mosfet_kp_from_rds_on(rds, vgs, vto)
        except ValueError as exc:
            raise ModelGap(f"{part.ref}: {exc}") from exc
    nodes = tuple(b.key(_pin_net(part, names, i)) for i, names in enumerate(_PIN_NAMES["mosfet"]))
    b.elements["m"].append(nodes)
    b.mosfets.append(MosfetSpec(part.ref, 1 if part.kind == "nmos" else -1, nodes,  # type: ignore[arg-type]
                                vto, kp, float(params.get("LAMBDA", 0.0)), data))


def supply_pin_names(mcu: McuData) -> tuple[str, ...]:
    """The case-folded names of a microcontroller's supply pins (its data, else the usual)."""
    return tuple(n.casefold() for n in mcu.supply_pins) or _SUPPLY_NAMES


def _mcu_supply(b: _Builder, ref: str, mcu: McuData) -> Rail | None:
    """The rail on the microcontroller's supply pin, or None."""
    part = b.circuit.parts.get(ref)
    if part is None:
        return None
    names = supply_pin_names(mcu)
    for pin in part.pins:
        if pin.name.casefold() in names and pin.net is not None:
            rail = b.rails.get(b.nets.find(pin.net))
            if rail is not None:
                return rail
    return None


def _add_pins(b: _Builder) -> None:
    for drive in b.group.pins:
        mcu = b.data_of(drive.part, McuData)
        if mcu is None:
            mcu = McuData()
            b.note(drive.part, ("microcontroller data",))
        supply = None if mcu.supply_voltage is not None else _mcu_supply(b, drive.part, mcu)
        if supply is None and mcu.supply_voltage is None:
            raise ModelGap(f"{drive.id}: supply voltage of {drive.part} unknown")
        rout = mcu.output_resistance
        if rout is None:
            rout = GENERIC["output_resistance"]
            b.note(drive.part, ("output_resistance",))
        axis = b.axis("rail", supply.name) if supply is not None and supply.min < supply.max else -1
        index = len(b.pins)
        b.fixed.append(FixedSpec(("pin", drive.id), "pin", supply, axis, index))
        b.elements["r"].append((("pin", drive.id), b.key(drive.net)))
        b.resistors.append(ResistorSpec(None, "pin", float(rout), 0.0, -1, pin=index))
        b.pins.append(PinSpec(drive.id, drive.net, 0, len(b.resistors) - 1, axis, supply,
                              mcu.supply_voltage, mcu.pin_current_max))


def _plan_headroom(b: _Builder) -> None:
    """For a sink or source, give the LED strings' far end its own fixed node."""
    sign = {"npn-sink": 1, "pnp-source": -1}.get(b.group.topology)
    if sign is None or not b.group.strings:
        return
    ends = [s[0] if sign > 0 else s[-1] for s in b.group.strings if s]
    nets = set()
    for ref in ends:
        part = b.circuit.parts.get(ref)
        if part is None:
            return
        side = _PIN_NAMES["led"][0 if sign > 0 else 1]
        nets.add(b.nets.find(_pin_net(part, side, 0 if sign > 0 else 1)))
    if len(nets) != 1:
        return
    net = nets.pop()
    rail = b.rails.get(net)
    if rail is None:
        return
    axis = b.axis("rail", net) if rail.min < rail.max else -1
    b.fixed.append(FixedSpec(("h", net), "headroom", rail, axis))
    b.headroom = (("h", net), sign, net)
    b.headroom_ends = set(ends)


_ADDERS = {"resistor": _add_resistor, "led": _add_diode, "diode": _add_diode,
           "npn": _add_bjt, "pnp": _add_bjt, "nmos": _add_mosfet, "pmos": _add_mosfet}
_IGNORED = {"capacitor", "mcu", "ic", "connector", "source", "link"}


def _add_parts(b: _Builder) -> None:
    parts = [b.circuit.parts[r] for r in b.group.parts if r in b.circuit.parts]
    missing = [r for r in b.group.parts if r not in b.circuit.parts]
    if missing:
        raise ModelGap(f"parts not in the circuit: {', '.join(missing)}")
    for part in parts:
        if part.kind in ("link", "inductor"):
            nets = [p.net for p in part.pins if p.net is not None]
            for other in nets[1:]:
                b.nets.join(nets[0], other, b.rails)
    _plan_headroom(b)
    for part in parts:
        adder = _ADDERS.get(part.kind)
        if adder is not None:
            adder(b, part)
        elif part.kind not in _IGNORED and part.kind != "inductor":
            raise ModelGap(f"{part.ref}: cannot model a part of kind {part.kind!r}")
    _add_pins(b)


def _scenario_arrays(group: Group, pins: list[PinSpec], leds: list[str]
                     ) -> tuple[np.ndarray, np.ndarray]:
    """Pin levels (S, P): +1 high, −1 low, 0 undriven; LED lit mask (S, L).

    An LED is lit in the scenarios whose ``lit`` names it, and in every scenario whose
    ``lit`` is None (all of the group's LEDs).
    """
    levels = np.array([[{"high": 1, "low": -1}.get(s.levels.get(p.id, ""), 0) for p in pins]
                       for s in group.scenarios], np.int8).reshape(len(group.scenarios), len(pins))
    lit = np.array([[s.lit is None or ref in s.lit for ref in leds]
                    for s in group.scenarios], bool).reshape(len(group.scenarios), len(leds))
    return levels, lit


def _finish(b: _Builder) -> GroupModel:
    n = len(b.unknown)
    index = {key: i for i, key in enumerate(b.unknown)}
    index.update({f.name: n + i for i, f in enumerate(b.fixed)})

    def nodes(kind: str, width: int) -> np.ndarray:
        rows = [[index[k] for k in element] for element in b.elements[kind]]
        return np.array(rows, int).reshape(len(rows), width)

    terminals = {k: nodes(k, w) for k, w in (("r", 2), ("d", 2), ("q", 3), ("m", 3))}
    network = Network(n, len(b.fixed), terminals["r"], terminals["d"], terminals["q"],
                      terminals["m"], np.array([q.polarity for q in b.bjts], float),
                      np.array([m.polarity for m in b.mosfets], float))
    diodes = tuple(replace(d, anode=index[d.anode], cathode=index[d.cathode])  # type: ignore[index]
                   for d in b.diodes)
    bjts = tuple(replace(q, nodes=tuple(index[k] for k in q.nodes)) for q in b.bjts)  # type: ignore[index]
    mosfets = tuple(replace(m, nodes=tuple(index[k] for k in m.nodes)) for m in b.mosfets)  # type: ignore[index]
    pins = [replace(p, source=index[("pin", p.id)]) for p in b.pins]
    levels, lit = _scenario_arrays(b.group, pins, [d.ref for d in diodes if d.curve is not None])
    headroom = None if b.headroom is None else (index[b.headroom[0]], b.headroom[1], b.headroom[2])
    signature = (
        n, tuple(f.kind for f in b.fixed), tuple(f.axis for f in b.fixed),
        tuple(f.pin for f in b.fixed),
        tuple((a.shape, a.tobytes()) for a in terminals.values()),
        tuple(q.polarity for q in bjts), tuple(m.polarity for m in mosfets),
        tuple(a.kind for a in b.axes), tuple((r.role, r.axis, r.pin) for r in b.resistors),
        tuple((d.curve is not None, d.axis) for d in diodes), tuple(q.axis for q in bjts),
        tuple((p.resistor, p.supply_axis, p.supply is None) for p in pins),
        levels.tobytes(), levels.shape, lit.tobytes(), lit.shape, headroom,
    )
    return GroupModel(b.group, network, tuple(b.axes), dict(index), tuple(b.fixed),
                      tuple(b.resistors), diodes, bjts, mosfets, tuple(pins), levels, lit,
                      headroom, tuple(f"{ref}: {text}" for ref, text in b.notes), signature,
                      tuple(b.notes))


def build_model(group: Group, circuit: Circuit, part_data: PartDataMap,
                rails: dict[str, Rail]) -> GroupModel:
    """The solver model of ``group``.

    Raises
    ------
    ModelGap
        When a part, rail or figure the network needs is unknown.
    """
    unknown = [r for r in group.rails if r not in rails]
    if unknown:
        raise ModelGap(f"rail voltage unknown: {', '.join(unknown)}")
    builder = _Builder(group, circuit, part_data, dict(rails))
    builder.axis("ambient", "ambient")
    _add_parts(builder)
    return _finish(builder)

"""Groups with one transistor in the drive path: sinks, sources and switches.

The strands of the cluster fall on two sides of the transistor: the *LED side* on the
collector (drain) and the *emitter side* (source). A low-side device (NPN, N-MOSFET) has
the LEDs from a rail into its collector; a high-side device (PNP, P-MOSFET) has them from
its collector down to a rail. The emitter reaches its rail directly (a switch) or through
one resistor chain (a sink or source: the resistor sets the current with the base drive).
The base or gate network (:func:`linter.topology_walk.walk_control`) joins the group.
"""

from __future__ import annotations

from linter.groups import NO_LEVELS, Group, Scenario
from linter.topology_draft import Draft, resistor_label
from linter.topology_index import CircuitIndex
from linter.topology_shape import Bank, NotABank, Strand, find_bank
from linter.topology_walk import terminal_word, walk_control

__all__ = ["classify_transistor"]


def _components(index: CircuitIndex, strands: list[Strand]) -> dict[str, str]:
    """Union-find over the strands' end nets, rails left out: net → representative."""
    parent: dict[str, str] = {}

    def find(net: str) -> str:
        root = parent.setdefault(net, net)
        while root != parent[root]:
            root = parent[root]
        while parent[net] != root:
            parent[net], net = root, parent[net]
        return root

    for strand in strands:
        ends = [net for net in (strand.start, strand.end)
                if net is not None and net not in index.rails]
        for net in ends:
            find(net)
        if len(ends) == 2:
            parent[find(ends[0])] = find(ends[1])
    return {net: find(net) for net in list(parent)}


def _side(index: CircuitIndex, strand: Strand, roots: dict[str, str]) -> str | None:
    for net in (strand.start, strand.end):
        if net is not None and net not in index.rails:
            return roots.get(net)
    return None


def _emitter_path(index: CircuitIndex, ref: str, net: str,
                  strands: list[Strand]) -> tuple[str, tuple[str, ...]]:
    """(rail, resistors) from the emitter net; raises :class:`NotABank` for anything else."""
    if net in index.rails:
        return net, ()
    word = terminal_word(index, ref, "e")
    if len(strands) != 1:
        raise NotABank(f"{ref}: {word} (net {net}) does not reach a rail through one "
                       f"resistor path")
    strand = strands[0]
    far = strand.end if strand.start == net else strand.start
    if far not in index.rails:
        raise NotABank(f"{ref}: {word} path {' '.join(strand.chain.parts)} ends at net {far}, "
                       f"which is not a rail")
    return far, strand.resistors


def _split(draft: Draft, ref: str, c_net: str, e_net: str) -> tuple[list[Strand], list[Strand]]:
    """(LED side, emitter side); raises :class:`NotABank` when the sides are not clean."""
    index = draft.index
    roots = _components(index, draft.strands)
    c_root, e_root = roots.get(c_net), roots.get(e_net)
    if c_root is not None and c_root == e_root:
        raise NotABank(f"a path joins the {terminal_word(index, ref, 'c')} and "
                       f"{terminal_word(index, ref, 'e')} of {ref} around it")
    led_side = [s for s in draft.strands if c_root is not None and _side(index, s, roots) == c_root]
    other = [s for s in draft.strands if s not in led_side]
    if any(s.leds for s in other) or not led_side:
        raise NotABank(f"LEDs on the {terminal_word(index, ref, 'e')} side of {ref} "
                       f"(a follower) are not recognised")
    return led_side, other


def _check_rails(draft: Draft, ref: str, bank: Bank, c_net: str, e_rail: str, low: bool) -> None:
    """The LEDs run from a rail into the collector (low side) or out of it (high side)."""
    rails = draft.index.rails
    word = terminal_word(draft.index, ref, "c")
    far = bank.top if low else bank.bottom
    near = bank.bottom if low else bank.top
    if near != c_net or far not in rails:
        direction = "from a rail into" if low else "out of"
        raise NotABank(f"the LEDs do not run {direction} the {word} of {ref} "
                       f"{'' if low else 'down to a rail'}".rstrip())
    upper, lower = (far, e_rail) if low else (e_rail, far)
    if rails[upper].nom <= rails[lower].nom:
        raise NotABank(f"{ref}: rail {upper} is not above rail {lower}")


def _label(draft: Draft, ref: str, bank: Bank, emitter_resistors: tuple[str, ...],
           low: bool) -> tuple[str, str | None, str | None]:
    """(topology, setter, reason) for the transistor group."""
    is_fet = draft.index.polarity(ref) in ("nmos", "pmos")
    if emitter_resistors:
        if is_fet:
            return ("unrecognised", None, f"{ref}: MOSFET with source resistor "
                    f"{', '.join(emitter_resistors)} (a MOSFET current sink) is not recognised")
        return ("npn-sink" if low else "pnp-source"), ref, None
    switch = "low-side-switch" if low else "high-side-switch"
    label, setter, reason = resistor_label(bank, switch)
    if label == "across-rails":
        return switch, None, f"nothing but {ref} limits the current"
    if label in ("resistor", "string"):
        return switch, setter, reason
    return label, setter, reason


def classify_transistor(draft: Draft, ref: str) -> Group:
    """Label a group whose drive path runs through transistor ``ref``."""
    index = draft.index
    terminals = index.transistor_pins(ref)
    if terminals is None or terminals["c"].net is None or terminals["e"].net is None:
        return draft.unrecognised(f"{ref}: terminals not recognised or not connected")
    c_net, e_net = terminals["c"].net, terminals["e"].net
    low = index.polarity(ref) in ("npn", "nmos")
    control = walk_control(index, ref, terminals["b"].net, draft.cluster.nets)
    draft.extra_parts += control.parts
    draft.extra_nets += control.nets
    draft.extra_pins += control.pins
    try:
        led_side, emitter_side = _split(draft, ref, c_net, e_net)
        pin_nets = {pin.net for pin in draft.cluster.pins}
        terminal_nets = {n for n in draft.cluster.nets if n in index.rails} | pin_nets | {c_net}
        bank = find_bank(led_side, terminal_nets)
        e_rail, emitter_resistors = _emitter_path(index, ref, e_net, emitter_side)
        _check_rails(draft, ref, bank, c_net, e_rail, low)
    except NotABank as problem:
        return draft.unrecognised(str(problem))
    if control.problems:
        return draft.unrecognised("; ".join(dict.fromkeys(control.problems)))
    label, setter, reason = _label(draft, ref, bank, emitter_resistors, low)
    if label == "unrecognised":
        return draft.unrecognised(reason or "")
    level = "high" if low else "low"
    scenario = Scenario("on", {pin.id: level for pin in control.pins} or NO_LEVELS,
                        draft.leds)
    reason = "; ".join([text for text in [reason, *control.notes] if text]) or None
    return draft.group(label, setter=setter, scenarios=(scenario,), reason=reason,
                       transistor=ref, drive=control.drive)

"""The flat road: a design whose top view places only leaf cells, connected without a walk.

Most netlists are flat: one top cell whose contents are the parts and the nets between them.
For those, :func:`flat_plan` works out which net each pin is on in one pass over the nets'
port references, instead of the hierarchy walk, the union–find and the placed-net records of
:mod:`linter.readers.edif_flatten` (its plain twin, which reads every design).

The plan is made only when the plain walk would give the same circuit without any merging
and without any error; in every other case it returns None and the caller takes the plain
road, which then also words any error. So it refuses (None) a design where:

* the top view places an instance that is not a leaf, or places nothing, or more instances
  than ``max_parts`` (or has more nets than ``4 x max_parts``);
* an instance cannot be resolved, or places a cell with an array port;
* a net is an array, or joins through a port list or a member, or names an instance or a
  port that does not exist;
* one pin, or one of the top cell's own ports, is on two nets or twice on one (the plain
  road merges such nets);
* two nets have the same name, or a net has fewer than two connections (the top cell's own
  ports count as one each).

The equality of both roads is checked in ``tests/test_edif_direct.py``.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass
from itertools import accumulate, chain, compress, count, repeat
from operator import add, attrgetter, eq, floordiv, is_, not_

from linter.errors import NetlistError
from linter.limits import active
from linter.readers.edif_flatten import _Flattener, _Target, _top
from linter.readers.edif_syntax import Cell, EdifFile, Instance, Net, PortRef, View

__all__ = ["FlatPlan", "flat_plan"]


@dataclass(slots=True)
class FlatPlan:
    """A flat design's connectivity.

    ``instances`` and ``targets`` are the top view's instances in order and what each places;
    the pins of instance ``i`` are slots ``firsts[i]`` onward of ``pin_nets`` (its view's
    ports in order), each holding the number of the net it is on (in ``nets``) or None;
    ``sizes`` counts the pins on each net number (and the unconnected ones under None).
    """

    cell: Cell
    view: View
    instances: list[Instance]
    targets: list[_Target]
    firsts: list[int]
    pin_nets: list[int | None]
    nets: list[Net]
    names: list[str]
    sizes: Counter


def flat_plan(edif: EdifFile) -> FlatPlan | None:
    """The plan of a flat design, or None when the plain road must read it (module docstring).

    Raises only what the plain road raises first as well: the top cell not found.
    """
    cell, view = _top(edif)
    instances = list(view.instances.values())
    nets = view.nets
    limit = active().max_parts
    if not instances or len(instances) > limit or len(nets) > 4 * limit:
        return None
    flattener = _Flattener(edif)
    references = list(map(attrgetter("library", "cell", "view"), instances))
    resolved: dict[tuple[str | None, str, str], _Target] = {}
    try:
        for key, at in dict(zip(reversed(references), range(len(instances) - 1, -1, -1))).items():
            target = resolved[key] = flattener.resolve(instances[at], cell)  # the first placing it
            if not target.leaf or len(target.ports) != len(target.view.ports):
                return None  # a sheet, or a cell with an array port
    except NetlistError:
        return None
    targets = list(map(resolved.__getitem__, references))
    del references
    firsts = list(accumulate(map(len, map(attrgetter("ports"), targets)), initial=0))
    pin_nets: list[int | None] = [None] * firsts.pop()
    connections = _connect(nets, view, flattener.scalar_ports(view), targets, firsts, pin_nets)
    if connections is None:
        return None
    names = list(map(attrgetter("name.display"), nets))
    if len(set(names)) != len(names):
        return None
    sizes = Counter(pin_nets)
    numbers = range(len(nets))  # each net's pins and the top cell's own ports on it
    if min(map(add, map(sizes.__getitem__, numbers), map(connections.__getitem__, numbers)),
           default=2) < 2:
        return None
    return FlatPlan(cell, view, instances, targets, firsts, pin_nets, nets, names, sizes)


_DIMS, _PAIRS_OF, _JOINED = attrgetter("name.dims"), attrgetter("pairs"), attrgetter("joined")


def _connect(nets: list[Net], view: View, own_ports: dict[str, int], targets: list[_Target],
             firsts: list[int], pin_nets: list[int | None]) -> Counter | None:
    """Fill ``pin_nets`` from the nets' port references; the count of the top cell's own
    ports on each net. None where the plain road would merge, or refuse (module docstring).

    The references are looked up with built-in passes over all of them (a 100,000-part board
    has some 200,000), names case-folded once per distinct spelling; an instance named as
    it was declared is found by that spelling without folding.
    """
    if any(map(_DIMS, nets)):
        return None
    texts = list(map(_PAIRS_OF, nets))
    if any(map(_JOINED, nets)):  # references kept as records: read one net at a time
        texts = list(map(_pairs, nets))
        if None in texts:
            return None
    every = list(chain.from_iterable(texts))
    ports, instances = every[0::2], every[1::2]
    numbers = list(chain.from_iterable(map(repeat, range(len(texts)),
                                           map(floordiv, map(len, texts), repeat(2)))))
    del every, texts
    port_keys = {port: port.casefold() for port in set(ports)}
    outside: Counter = Counter()
    if "" in instances:  # the top cell's own ports
        own = list(map(not_, instances))
        own_keys = list(map(port_keys.__getitem__, compress(ports, own)))
        if not set(own_keys) <= own_ports.keys() or len(set(own_keys)) != len(own_keys):
            return None
        outside.update(compress(numbers, own))
        kept = list(map(not_, own))
        ports, instances = list(compress(ports, kept)), list(compress(instances, kept))
        numbers = list(compress(numbers, kept))
    at = _instance_numbers(view, instances)
    if at is None:
        return None
    tables = list(map(attrgetter("ports"), targets))
    pins = list(map(dict.get, map(tables.__getitem__, at), map(port_keys.__getitem__, ports)))
    if None in pins:
        return None
    for first, pin, number in zip(map(firsts.__getitem__, at), pins, numbers):
        if pin_nets[first + pin] is not None:  # a pin on two nets, or twice on one
            return None
        pin_nets[first + pin] = number
    return outside


def _instance_numbers(view: View, written: list[str]) -> list[int] | None:
    """The number (in ``view.instances``) of each instance named in ``written``, or None
    when one is not there."""
    keys = list(view.instances)
    displays = list(map(attrgetter("name.display"), view.instances.values()))
    as_declared = dict(compress(zip(displays, count()), map(eq, map(str.casefold, displays), keys)))
    del displays
    at = list(map(as_declared.get, written))
    if None in at:  # named in another letter case (or not at all)
        index = dict(zip(keys, count()))
        for position in compress(range(len(at)), map(is_, at, repeat(None))):
            at[position] = index.get(written[position].casefold())
        if None in at:
            return None
    return at  # type: ignore[return-value]


def _pairs(net: Net) -> tuple[str, ...] | None:
    """The net's port and instance ('' for a port of the top cell) of each reference in turn,
    or None for a port list or a member reference."""
    texts = list(net.pairs)
    for entry in net.joined:
        if type(entry) is not PortRef or entry.member is not None:
            return None
        texts += (entry.port, entry.instance or "")
    return tuple(texts)

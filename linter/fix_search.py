"""Fix searches backed by the real solver: the value a re-run would accept.

A rule's fix must agree with what ``ledlint check`` reports once the fix is applied. So the
searches here change a part's value (or the circuit) and solve the group again with
:func:`linter.analysis.analyse`, the same call the engine makes, instead of trusting a
straight-line estimate. The straight-line formulas of :mod:`linter.fixes` give the starting
points. All quantities SI floats.
"""

from __future__ import annotations

import hashlib
import re
from collections import OrderedDict
from operator import lt
from dataclasses import replace
from typing import Any, Callable, Iterable, Mapping

from linter import eseries
from linter.analysis import analyse
from linter.fix_batch import Overlay, SeriesWalk, solve_resistor_values
from linter.fixes import SERIES_STEP, ResistorChoice, resistor_for_current_solved
from linter.model import Circuit, Pin
from linter.partdata import ResistorData
from linter.results import GroupResult

__all__ = ["DEFAULT_TOLERANCE", "resolve", "with_resistor", "led_currents",
           "resistor_for_max", "resistor_for_min", "rail_for_min", "sub_circuit",
           "resolve_circuit", "resistor_record", "tolerance_of", "split_resistor",
           "signature", "signature_plain", "follower_signature", "remembered", "resistor_walk", "solved_walk", "forget_board",
           "is_remembered", "remember", "ASK", "resistor_ohms", "resistor_for_max_question"]

DEFAULT_TOLERANCE = 0.05
"""Resistor tolerance (fraction) when the part data gives none (DESIGN.md: else 5 %)."""

_MAX_STEPS = 200
"""Series steps a search may take before giving up (two decades of E96)."""


def resolve(context: Any, result: GroupResult, part_data: Mapping[str, Any] | None = None,
            rails: Mapping[str, Any] | None = None) -> GroupResult:
    """The group solved again with some part data (or rails) replaced."""
    data = Overlay(context.part_data, part_data or {})
    rail_map = dict(context.rails)
    rail_map.update(rails or {})
    (again,) = analyse([result.group], context.circuit, data, rail_map, context.settings.ambient)
    return again


def resistor_record(context: Any, ref: str, ohms: float) -> ResistorData:
    """The resistor's part data with its value replaced (a 5 % record when there was none)."""
    data = context.part_data.get(ref)
    if isinstance(data, ResistorData):
        return replace(data, ohms=ohms)
    return ResistorData(ohms, DEFAULT_TOLERANCE, assumed=("tolerance",))


def with_resistor(context: Any, result: GroupResult, ref: str, ohms: float) -> GroupResult:
    """The group solved again with resistor ``ref`` at ``ohms`` (Ω)."""
    return resolve(context, result, {ref: resistor_record(context, ref, ohms)})


def led_currents(result: GroupResult, refs: Iterable[str]) -> tuple[float, float, float]:
    """(highest nominal, lowest minimum, highest maximum) current in A over the LEDs named."""
    leds = [result.led(ref) for ref in refs]
    return (max(x.current.nom for x in leds), min(x.current.min for x in leds),
            max(x.current.max for x in leds))


_WALKS_KEPT = 8
"""Groups (with one resistor each) whose solved values are kept for the next search."""

_WALKS: OrderedDict[tuple[int, int, str], tuple[Any, GroupResult, dict]] = OrderedDict()


def _solved_values(context: Any, result: GroupResult, ref: str) -> dict:
    """The table of ``result``'s group solved with ``ref`` at each value (Ω) so far, shared
    by the searches of several rules on the same group and resistor (a pin's limit and the
    LED's, say). Kept for the last :data:`_WALKS_KEPT` groups; the context and the result
    are held with it, so that the ids in the key stay theirs."""
    key = (id(context), id(result), ref)
    entry = _WALKS.get(key)
    if entry is not None and entry[0] is context and entry[1] is result:
        _WALKS.move_to_end(key)
        return entry[2]
    table: dict = {}
    _WALKS[key] = (context, result, table)
    if len(_WALKS) > _WALKS_KEPT:
        _WALKS.popitem(last=False)
    return table


def forget_board() -> None:
    """Drop the solved values kept for the last groups searched and the record texts of
    the signatures (they hold their board)."""
    _WALKS.clear()
    _TEXTS.clear()
    _FORMS.clear()
    _BOARD[:] = [None, None, ""]


def resistor_walk(context: Any, result: GroupResult, ref: str, series: str) -> SeriesWalk:
    """The group solved with resistor ``ref`` at the values a search of ``series`` asks for,
    neighbouring values solved ahead in one batch (:class:`linter.fix_batch.SeriesWalk`);
    each answer is what :func:`with_resistor` gives for that value."""
    return SeriesWalk(lambda values: solve_resistor_values(context, result, ref, values),
                      up=lambda ohms: eseries.above(ohms * SERIES_STEP, series),
                      down=lambda ohms: eseries.below(ohms / SERIES_STEP, series),
                      known=_solved_values(context, result, ref))


def solved_walk(context: Any, result: GroupResult, ref: str,
                series: str) -> Callable[[float], GroupResult]:
    """:func:`resistor_walk`'s answer for each value asked, always a solved group.

    Raises
    ------
    RuntimeError
        When the group cannot be solved with the value asked (the search then has no answer).
    """
    walk = resistor_walk(context, result, ref, series)

    def solved(ohms: float) -> GroupResult:
        again = walk(ohms)
        if again.status != "solved":
            raise RuntimeError(f"{result.id}: not solvable with {ref} = {ohms} Ω")
        return again
    return solved


def _solver(context: Any, result: GroupResult, ref: str, leds: tuple[str, ...], series: str):
    solved = solved_walk(context, result, ref, series)

    def current(ohms: float) -> tuple[float, float, float]:
        return led_currents(solved(ohms), leds)
    return current


def tolerance_of(context: Any, ref: str) -> float:
    """The resistor's tolerance (fraction), 5 % when unknown."""
    data = context.part_data.get(ref)
    if isinstance(data, ResistorData) and data.tolerance:
        return data.tolerance
    return DEFAULT_TOLERANCE


def resistor_ohms(result: GroupResult, ref: str) -> float:
    """The nominal ohms of resistor ``ref`` of the group, read from the records that hold
    its figures (a follower's template's, under the template's name: the follower's own
    records are not built)."""
    origin = result.origin
    if origin is None:
        return result.resistor(ref).ohms
    template, refs = origin
    return next(r.ohms for r in template.resistors if refs[r.ref] == ref)


def resistor_for_max_question(ref: str, leds: tuple[str, ...], limit: float) -> tuple:
    """The question :func:`resistor_for_max` remembers its answer under (for
    :func:`follower_signature`)."""
    return ("resistor_for_max", ref, leds, limit)


def resistor_for_max(context: Any, result: GroupResult, ref: str, leds: tuple[str, ...],
                     limit: float, key: Any = None) -> ResistorChoice | None:
    """The smallest resistor of the series made at ``ref``'s tolerance (IEC 60063) for
    which the solver's worst-case maximum over ``leds`` is at most ``limit`` (A).
    ``key``: the :func:`signature` of :func:`resistor_for_max_question` when the caller
    has it (default: worked out)."""
    def search() -> ResistorChoice | None:
        tolerance = tolerance_of(context, ref)
        series = eseries.series_for_tolerance(tolerance)
        start = resistor_ohms(result, ref)
        return resistor_for_current_solved(_solver(context, result, ref, leds, series), limit,
                                           start, series=series, tolerance=tolerance,
                                           max_steps=_MAX_STEPS)
    return remembered(context, result, resistor_for_max_question(ref, leds, limit), search,
                      ASK if key is None else key)


def resistor_for_min(context: Any, result: GroupResult, ref: str, leds: tuple[str, ...],
                     floor: float, ceiling: float | None) -> ResistorChoice | None:
    """The largest series resistor (below the present one) for which the solver's worst-case
    minimum over ``leds`` reaches ``floor`` (A) while the maximum stays at or below
    ``ceiling`` (A, when given); None when no value does both."""
    return remembered(context, result, ("resistor_for_min", ref, leds, floor, ceiling),
                      lambda: _resistor_for_min(context, result, ref, leds, floor, ceiling))


def _resistor_for_min(context: Any, result: GroupResult, ref: str, leds: tuple[str, ...],
                      floor: float, ceiling: float | None) -> ResistorChoice | None:
    tolerance = tolerance_of(context, ref)
    series = eseries.series_for_tolerance(tolerance)
    current = _solver(context, result, ref, leds, series)
    ohms = resistor_ohms(result, ref)
    for _ in range(_MAX_STEPS):
        ohms = eseries.below(ohms / 1.001, series)
        nom, low, high = current(ohms)
        if ceiling is not None and high > ceiling:
            return None
        if low >= floor:
            return ResistorChoice(ohms, series, tolerance, high, nom, low)
    return None


def sub_circuit(circuit: Circuit, refs: Iterable[str]) -> Circuit:
    """The circuit cut down to the parts named, nets rebuilt from their pins."""
    from linter.model import Net

    parts = {ref: circuit.parts[ref] for ref in refs if ref in circuit.parts}
    joined: dict[str, list[tuple[str, str]]] = {}
    for ref, part in parts.items():
        for pin in part.pins:
            if pin.net is not None:
                joined.setdefault(pin.net, []).append((ref, pin.name))
    nets = {}
    for name, pins in joined.items():
        old = circuit.nets.get(name)
        location = old.location if old is not None else next(iter(parts.values())).location
        nets[name] = Net(name, tuple(pins), location)
    return Circuit(circuit.source, circuit.format, parts, nets, (), circuit.design)


def resolve_circuit(context: Any, circuit: Circuit,
                    part_data: Mapping[str, Any]) -> tuple[GroupResult, ...]:
    """Find the groups of an edited (sub-)circuit and solve them, as the engine would."""
    from linter.topology import find_groups

    known = context.part_data  # only the (sub-)circuit's parts are looked at: not copied whole
    data = {ref: known[ref] for ref in circuit.parts if ref in known}
    data.update(part_data)
    groups = find_groups(circuit, context.rails, data)
    return analyse(groups, circuit, data, context.rails, context.settings.ambient)


_BISECTIONS = 24
"""Halvings of the rail search interval (a 20 V span to about 1 µV)."""


def rail_for_min(context: Any, result: GroupResult, rail_name: str, leds: tuple[str, ...],
                 floor: float, ceiling_v: float) -> float | None:
    """The lowest minimum of rail ``rail_name`` (V) at which the solver's worst-case minimum
    current over ``leds`` reaches ``floor`` (A); None when even ``ceiling_v`` does not."""
    return remembered(context, result, ("rail_for_min", rail_name, leds, floor, ceiling_v),
                      lambda: _rail_for_min(context, result, rail_name, leds, floor, ceiling_v))


def _rail_for_min(context: Any, result: GroupResult, rail_name: str, leds: tuple[str, ...],
                  floor: float, ceiling_v: float) -> float | None:
    from linter.partdata import Rail

    rail = context.rails[rail_name]

    def lowest(volts: float) -> float:
        moved = Rail(rail.name, max(rail.nom, volts), volts, max(rail.max, volts),
                     rail.inferred, rail.origin)
        again = resolve(context, result, rails={rail_name: moved})
        if again.status != "solved":
            raise RuntimeError(f"{result.id}: not solvable with {rail_name} at {volts} V")
        return led_currents(again, leds)[1]

    low, high = rail.min, ceiling_v
    if lowest(high) < floor:
        return None
    for _ in range(_BISECTIONS):
        middle = (low + high) / 2
        low, high = (low, middle) if lowest(middle) >= floor else (middle, high)
    return high


def split_resistor(circuit: Circuit, group: Any, shared: str, ohms_each: float
                   ) -> tuple[Circuit, dict[str, str]]:
    """The group's sub-circuit with the shared resistor replaced by one per string.

    The shared resistor joins a rail-side net and the node the strings meet at; each string's
    end LED pin on that node moves to a net of its own, and a new resistor (named
    ``<shared>_<first LED>``, value ``ohms_each``) joins it to the rail-side net. Returns the
    circuit and the new resistor names by first LED.
    """
    from dataclasses import replace as copy

    from linter.model import Part, Pin

    resistor = circuit.parts[shared]
    nets = [pin.net for pin in resistor.pins]
    node = next(n for n in nets if any(n in circuit.parts[s[0]].nets or
                                       n in circuit.parts[s[-1]].nets for s in group.strings))
    far = next(n for n in nets if n != node)
    parts = {ref: circuit.parts[ref] for ref in group.parts if ref != shared}
    names: dict[str, str] = {}
    for string in group.strings:
        name = f"{shared}_{string[0]}"
        own = f"{name}_NODE"
        for ref in (string[0], string[-1]):
            part = parts[ref]
            parts[ref] = copy(part, pins=tuple(Pin(p.name, own if p.net == node else p.net)
                                               for p in part.pins))
        parts[name] = Part(name, "resistor", None, (Pin("1", far), Pin("2", own)),
                           resistor.location, value_si=ohms_each)
        names[string[0]] = name
    edited = Circuit(circuit.source, circuit.format, parts, circuit.nets)  # only what is kept
    return sub_circuit(edited, parts), names


_QUOTED = re.compile(r"'([^'\\\n]*)'")
"""A name as ``repr`` quotes it (names holding quotes or backslashes are never memoised)."""

_MEMO_SIZE = 4096
"""Search answers kept (least recently used dropped first); each is a few numbers."""

_ANSWERS: OrderedDict[bytes, Any] = OrderedDict()


def _part_record(part: Any) -> Any:
    """What the topology and the solver read of a placed part: not where it was placed."""
    model = part.model
    if model is not None:
        model = replace(model, location=None)
    return (part.ref, part.kind, part.value, part.pins, part.value_si, part.cell,
            part.part_number, model)


def _data_record(ref: str, data: Any) -> Any:
    """A part-data record with the part's own name taken off the front of its note."""
    note = getattr(data, "note", None)
    if isinstance(note, str) and note.startswith(f"{ref}: "):
        return replace(data, note=note[len(ref) + 2:])
    return data


_TEXTS_KEPT = 4096
"""Record texts kept (by the record's identity; records are frozen)."""

_TEXTS: dict[int, tuple[Any, str, "_Split | None"]] = {}


def _record_text(record: Any) -> str:
    """``repr(record)``, written once per record object (part data is often shared)."""
    return _record_entry(record)[1]


def _record_entry(record: Any) -> tuple[Any, str, "_Split | None"]:
    """(record, its text, the text's :func:`_split`), worked out once per record object."""
    if record is None:
        return _NONE_ENTRY
    entry = _TEXTS.get(id(record))
    if entry is not None and entry[0] is record:
        return entry
    text = repr(record)
    if len(_TEXTS) >= _TEXTS_KEPT:
        _TEXTS.clear()
    entry = _TEXTS[id(record)] = (record, text, _split(text))
    return entry


def _board_text(context: Any) -> str:
    """``repr(sorted rails), repr(ambient)`` of the board, written once per board."""
    return _board_entry(context)[2]


def _board_entry(context: Any) -> list:
    """(rails, settings, :func:`_board_text`, its :func:`_split`) of the board, kept for
    the board last asked about."""
    if _BOARD[0] is context.rails and _BOARD[1] is context.settings:
        return _BOARD
    text = f"{sorted(context.rails.items())!r}, {context.settings.ambient!r}"
    _BOARD[:] = [context.rails, context.settings, text, _split(text)]
    return _BOARD


_BOARD: list = [None, None, "", None]
"""(rails, settings, their text, its split) of the board last asked about."""


_Split = tuple  # (pieces of _QUOTED.split: text, quoted, text, …; the quoted texts as a set)


def _split(text: str) -> "_Split | None":
    """``text`` cut at its quoted names (:data:`_QUOTED`), and the set of those names; None
    when a quote of ``text`` is left out of every quoted name (a name holding a quote or
    a backslash, say): cut on its own, such a text might not be cut as it is inside a
    longer one. A text whose every quote opens or closes a quoted name is cut the same
    alone and anywhere inside a longer text (the search for the next quote starts afresh
    after it)."""
    pieces = _QUOTED.split(text)
    if text.count("'") != len(pieces) - 1:  # two quotes per name; len(pieces) = 2·names + 1
        return None
    return pieces, frozenset(pieces[1::2])


_NONE_ENTRY = (None, "None", _split("None"))


def _group_text(group: Any) -> str:
    """``repr(replace(group, id=''))``: the group's text with its id spliced out (no copy
    of the group made), or the copy's text when the text does not open with the id."""
    text = repr(group)
    head = f"{type(group).__name__}(id={group.id!r}"
    if isinstance(group.id, str) and text.startswith(head):
        return f"{type(group).__name__}(id=''{text[len(head):]}"
    return repr(replace(group, id=""))


def signature(context: Any, result: GroupResult, question: Any) -> bytes | None:
    """:func:`signature_plain`, the same digest of the same text, with the texts of part
    data records and of the board cut at their quoted names once per record and per board
    (not once per group), and a record naming none of the group's names copied whole.

    The text is put together piece by piece in the plain path's order; each piece is cut
    on its own, which cuts it as the whole text is cut when every quote of it opens or
    closes a quoted name (:func:`_split`); otherwise, and for a name that ``repr`` would
    escape, the plain path gives the digest (tests compare the two)."""
    from linter.refs import natural_key

    group = result.group
    refs = list(group.parts) + [d.part for d in group.pins if d.part not in group.parts]
    names = set(refs) | set(group.nets)
    joined = "".join(names)
    if "'" in joined or "\\" in joined or "\n" in joined:
        return None
    if not joined.isprintable():  # repr would escape a character of a name
        return signature_plain(context, result, question)
    circuit_parts = context.circuit.parts
    parts = [_part_record(circuit_parts[r]) for r in refs if r in circuit_parts]
    head = _split(f"({_group_text(group)}, {parts!r}, {question!r}, [")
    board = _board_entry(context)[3]
    if head is None or board is None:
        return signature_plain(context, result, question)
    order: dict[str, int] = {}
    out: list[str] = []
    _neutral(head[0], names, order, out)
    data = context.part_data
    separator = "("
    for ref in sorted(names):
        _, text, cut = _record_entry(_data_record(ref, data.get(ref)))
        if cut is None:
            return signature_plain(context, result, question)
        out.append(separator)
        separator = ", ("
        out.append("\0%d\0, " % order.setdefault(ref, len(order)))
        if cut[1].isdisjoint(names):
            out.append(text)
        else:
            _neutral(cut[0], names, order, out)
        out.append(")")
    out.append("], ")
    _neutral(board[0], names, order, out)
    out.append(")")
    text = "".join(out)
    seen = list(order)
    ranks = (sorted(range(len(seen)), key=lambda i: seen[i]),
             sorted(range(len(seen)), key=lambda i: natural_key(seen[i])))
    return hashlib.sha256(f"{text}|{ranks}".encode("utf-8", "surrogatepass")).digest()


def _neutral(pieces: list[str], names: set[str], order: dict[str, int],
             out: list[str]) -> None:
    """Append ``pieces`` (a :func:`_split`) to ``out``, each quoted name of ``names`` as
    its index in ``order`` (by first appearance), any other quoted text as it was."""
    setdefault = order.setdefault
    marks = _MARKS
    cut = list(pieces)
    cut[1::2] = [(marks[setdefault(name, len(order))] if len(order) < _MARKED
                  else "\0%d\0" % setdefault(name, len(order))) if name in names
                 else f"'{name}'" for name in pieces[1::2]]
    out.extend(cut)


_MARKED = 256
_MARKS = tuple("\0%d\0" % index for index in range(_MARKED))
"""The texts of the first name indices, ``"\\0<index>\\0"``."""


def signature_plain(context: Any, result: GroupResult, question: Any) -> bytes | None:
    """A digest of everything a fix search on ``result``'s group reads, names made neutral.

    Identical channels of a board (same parts data, values, pins and rails, only the
    references and net names differ) give the same signature for the same ``question``
    (the search's own arguments, e.g. which resistor and which limit): the group, its
    placed parts and its pins' parts (value, pins, model; not the location), the part data (its note without
    the leading part name) and rails under each name, every rail and the ambient range. Each quoted name of the group's parts
    and nets becomes its index in order of first appearance, and the names' order under
    plain and natural sorting is part of the signature, so that a search that sorts by
    name meets the same order. None when a name cannot be made neutral safely.
    """
    from linter.refs import natural_key

    group = result.group
    refs = list(group.parts) + [d.part for d in group.pins if d.part not in group.parts]
    names = set(refs) | set(group.nets)
    joined = "".join(names)  # one look for the three characters that cannot be made neutral
    if "'" in joined or "\\" in joined or "\n" in joined:
        return None
    text = _plain_text(context, group, refs, names, question)
    order: dict[str, int] = {}
    pieces = _QUOTED.split(text)  # text, quoted name, text, quoted name, …, text
    for index in range(1, len(pieces), 2):
        name = pieces[index]
        pieces[index] = ("\0%d\0" % order.setdefault(name, len(order)) if name in names
                         else f"'{name}'")
    text = "".join(pieces)
    seen = list(order)
    ranks = (sorted(range(len(seen)), key=lambda i: seen[i]),
             sorted(range(len(seen)), key=lambda i: natural_key(seen[i])))
    return hashlib.sha256(f"{text}|{ranks}".encode("utf-8", "surrogatepass")).digest()


def _plain_text(context: Any, group: Any, refs: list[str], names: set[str],
                question: Any) -> str:
    """The text :func:`signature_plain` makes neutral: ``repr((group without its id, placed
    parts, question, part data by sorted name, rails, ambient))``, records shared by many
    parts (and the board's rails) written once."""
    circuit_parts = context.circuit.parts
    parts = ", ".join([_part_text(circuit_parts[r]) for r in refs if r in circuit_parts])
    known = context.part_data
    data = ", ".join([f"({r!r}, {_record_text(_data_record(r, known.get(r)))})"
                      for r in sorted(names)])
    return (f"({_group_text(group)}, [{parts}], {question!r}, [{data}], "
            f"{_board_text(context)})")


def _part_text(part: Any) -> str:
    """``repr(_part_record(part))``, its pins written in place when each is a plain
    :class:`~linter.model.Pin` (whose text is ``Pin(name=…, net=…)``, checked at import)."""
    pins = part.pins
    if not _PIN_TEXT or type(pins) is not tuple or any(type(p) is not Pin for p in pins):
        return repr(_part_record(part))
    inner = ", ".join([f"Pin(name={p.name!r}, net={p.net!r})" for p in pins])
    if len(pins) == 1:
        inner += ","
    model = part.model
    if model is not None:
        model = replace(model, location=None)
    return (f"({part.ref!r}, {part.kind!r}, {part.value!r}, ({inner}), {part.value_si!r}, "
            f"{part.cell!r}, {part.part_number!r}, {model!r})")


_PIN_TEXT = (repr(Pin("a", None)) == "Pin(name='a', net=None)"
             and repr(Pin("b", "c")) == "Pin(name='b', net='c')")
"""Whether a Pin's text is the one :func:`_part_text` writes."""


def _names(group: Any) -> tuple[list[str], list[str]]:
    """(the group's part references as a signature lists them: its parts, then its pins'
    parts not among them; those and its nets, in that order)."""
    parts = group.parts
    refs = list(parts) + [d.part for d in group.pins if d.part not in parts]
    return refs, refs + list(group.nets)


def _safe(names: set[str]) -> bool:
    """Whether every name can be made neutral and ``repr`` writes it as it is."""
    joined = "".join(names)
    return not ("'" in joined or "\\" in joined or "\n" in joined) and joined.isprintable()


class _Form:
    """A template's :func:`_plain_text` for one question, cut to be filled with a
    follower's names: ``text % names`` (each quoted name of the template in order) is the
    text the follower would have if it differed from the template in its names only."""

    __slots__ = ("template", "question", "names", "sequence", "ordered", "natural",
                 "text", "filled", "literals", "key")

    def __init__(self, context: Any, template: Any, question: Any) -> None:
        from linter.refs import natural_key

        self.template = template
        self.question = question
        self.key = None
        refs, sequence = _names(template.group)
        names = set(sequence)
        self.names, self.sequence = names, sequence
        if not _safe(names):
            return
        raw = _plain_text(context, template.group, refs, names, question)
        pieces = _QUOTED.split(raw)
        if raw.count("'") != len(pieces) - 1:  # a quote outside every quoted name
            return
        quoted = pieces[1::2]
        self.filled = [name for name in quoted if name in names]
        self.literals = frozenset(quoted).difference(names)
        cut = [piece.replace("%", "%%") for piece in pieces]
        cut[1::2] = ["'%s'" if name in names else f"'{name.replace('%', '%%')}'"
                     for name in quoted]
        self.text = "".join(cut)
        self.ordered = sorted(names)
        self.natural = sorted(names, key=natural_key)
        self.key = signature(context, template, question)


_FORMS: dict[int, _Form] = {}
_FORMS_KEPT = 4096


def _form(context: Any, template: Any, question: Any) -> _Form:
    """The :class:`_Form` of ``template`` for ``question``, made once per template and
    question (by the question's text: ``-0.0`` and ``0.0`` are told apart; the same question
    object is the same text)."""
    key = id(template)
    entry = _FORMS.get(key)
    if (entry is None or entry.template is not template
            or (entry.question is not question and repr(entry.question) != repr(question))):
        if len(_FORMS) >= _FORMS_KEPT:
            _FORMS.clear()
        entry = _FORMS[key] = _Form(context, template, question)
    return entry


def follower_signature(context: Any, result: GroupResult, question: Any,
                       template_question: Any) -> bytes | None:
    """:func:`signature` of ``(result, question)``; for a follower (``result.origin``)
    whose text is its template's with the names changed, the template's signature for
    ``template_question`` (the same question asked in the template's names), without
    cutting and hashing the follower's text.

    The follower's names are paired with the template's in the order of :func:`_names`
    (the pairing must be one to one); its :func:`_plain_text` must equal the template's
    with each quoted name of the template replaced by its partner (so every other text,
    quoted or not, is the same), none of the template's other quoted texts may be a name
    of the follower, and the pairing must keep the names' plain and natural order. Then
    the text cut at its quoted names is the template's, each name in the same place, the
    same names are made neutral to the same indices, and the orders of the names are the
    same: the digest is the same. Otherwise :func:`signature` itself."""
    origin = result.origin
    if origin is None:
        return signature(context, result, question)
    from linter.refs import natural_key

    form = _form(context, origin[0], template_question)
    refs, sequence = _names(result.group)
    if form.key is None or len(sequence) != len(form.sequence):
        return signature(context, result, question)
    pairs = dict(zip(form.sequence, sequence))
    partner = pairs.__getitem__
    names = set(sequence)
    if (list(map(partner, form.sequence)) != sequence or len(names) != len(form.names)
            or not _safe(names) or not form.literals.isdisjoint(names)
            or list(map(partner, form.ordered)) != sorted(names)):
        return signature(context, result, question)
    natural = list(map(natural_key, map(partner, form.natural)))
    if not all(map(lt, natural, natural[1:])):
        return signature(context, result, question)
    expected = form.text % tuple(map(partner, form.filled))
    if _plain_text(context, result.group, refs, names, question) != expected:
        return signature(context, result, question)
    return form.key


ASK = object()
"""Default of :func:`remembered`'s ``key``: work the signature out."""


def remembered(context: Any, result: GroupResult, question: Any,
               search: Callable[[], Any], key: Any = ASK) -> Any:
    """``search()``, or its answer to the same :func:`signature` asked before.

    The answer must hold no names (numbers, a ResistorChoice): it is handed to every
    identical channel. An exception is not remembered (the search runs again next time).
    ``key`` is the signature when the caller has it already (None: not to be remembered).
    """
    if key is ASK:
        key = signature(context, result, question)
    if key is None:
        return search()
    if key in _ANSWERS:
        _ANSWERS.move_to_end(key)
        return _ANSWERS[key]
    answer = search()
    remember(key, answer)
    return answer


def is_remembered(key: bytes | None) -> bool:
    """True when an answer to the :func:`signature` ``key`` is kept."""
    return key is not None and key in _ANSWERS


def remember(key: bytes, answer: Any) -> None:
    """Keep ``answer`` (no names in it) for the :func:`signature` ``key``; the caller found
    it as the search itself would (e.g. solved in one batch with other searches')."""
    _ANSWERS[key] = answer
    _ANSWERS.move_to_end(key)
    if len(_ANSWERS) > _MEMO_SIZE:
        _ANSWERS.popitem(last=False)

"""Fix searches solved in batches: many candidate values of one group in one solver run.

A fix search asks the solver about one group again and again, each time with one part
value (or one rail) changed. Each question alone is a whole Newton run of a tiny batch;
asked together, the candidates are models of one structure and the solver takes them as one
batch (:func:`linter.analysis.analyse` does the same for identical groups of a board). The
answers are the same numbers: the solver treats every row on its own (a row converges and
leaves the iteration by itself), so a candidate solved among others gives what it gives
alone. ``tests/test_fix_batch.py`` compares both paths number for number.

:class:`SeriesWalk` is what the searches use: a lookup of "the group with resistor R at
this value" that, on the first value asked, solves a window of the neighbouring series
values along with it, and a longer window each time the search walks past what is known.
The search itself runs unchanged and asks exactly the values it asked before; it only finds
most of them solved already.
"""

from __future__ import annotations

from typing import Any, Callable, Iterator, Mapping, Sequence

from linter.netbuild import ModelGap, build_model
from linter.results import GroupResult

__all__ = ["Overlay", "solve_variants", "solve_circuits", "solve_resistor_values",
           "resistor_models", "SeriesWalk", "FIRST_WINDOW", "MAX_WINDOW"]

FIRST_WINDOW = (2, 8)
"""Values solved with the first one asked: (below it, above it) along the walk. Most walks
ask a handful of values; a long one doubles its window each time it walks past the known
values (so 30 steps take 3 batches). Each value solved is a model built, solved at every
corner and reduced: the demo's searches ask 52 distinct values; (4, 24) solved 116 of
them in 4 batches, (2, 8) solves 68 in 6 (less solver and reduction work all the same:
2/3 of the rows; on the 10k board 11 values instead of 29 in its one batch)."""

MAX_WINDOW = 64
"""Most values solved ahead in one batch when a search walks past the known ones."""


class Overlay(Mapping):
    """A mapping read through ``changes`` first, then ``base`` (neither is copied).

    A 100,000-part board's part data is not copied for every candidate value of one
    resistor: the model builder only looks parts up.
    """

    def __init__(self, base: Mapping[str, Any], changes: Mapping[str, Any]) -> None:
        self._base, self._changes = base, changes

    def __getitem__(self, key: str) -> Any:
        if key in self._changes:
            return self._changes[key]
        return self._base[key]

    def __contains__(self, key: object) -> bool:
        return key in self._changes or key in self._base

    def get(self, key: str, default: Any = None) -> Any:
        if key in self._changes:
            return self._changes[key]
        return self._base.get(key, default)

    def __iter__(self) -> Iterator[str]:
        yield from self._changes
        yield from (key for key in self._base if key not in self._changes)

    def __len__(self) -> int:
        return len(self._base) + sum(1 for key in self._changes if key not in self._base)


def _solve_models(models: list, ambient: Any) -> list[GroupResult]:
    """Models of one structure (one signature) solved as one batch, in order."""
    from linter import analysis

    hook = getattr(analysis, "analyse_models", None)
    if hook is not None:
        return list(hook(models, ambient))
    with analysis._gc_paused():  # the analysis owner's bucket solver; see the report
        return list(analysis._solve_bucket(models, ambient))


Variant = tuple[Mapping[str, Any], Mapping[str, Any]]
"""(part data changes by reference, rail changes by net name) of one candidate."""


def solve_variants(context: Any, result: GroupResult, variants: Sequence[Variant]
                   ) -> list[GroupResult]:
    """``result``'s group solved again once per variant, every variant in one batch.

    Each answer is what :func:`linter.fix_search.resolve` gives for that variant alone:
    a model that cannot be built is ``unsolved`` with the reason, as the analysis reports it.
    """
    answers: list[GroupResult | None] = [None] * len(variants)
    models: list[tuple[int, Any]] = []
    group = result.group
    for index, (data, rails) in enumerate(variants):
        rail_map = dict(context.rails)
        rail_map.update(rails)
        try:
            models.append((index, build_model(group, context.circuit,
                                              Overlay(context.part_data, data), rail_map)))
        except ModelGap as exc:
            answers[index] = GroupResult(group, "unsolved", reason=str(exc))
    _solve_buckets(models, answers, context.settings.ambient)
    return [answer for answer in answers if answer is not None]


def _solve_buckets(models: list[tuple[int, Any]], answers: list, ambient: Any) -> None:
    """``answers[i]`` for each (i, model): same-structure models solved in one batch each."""
    buckets: dict[tuple, list[tuple[int, Any]]] = {}
    for index, model in models:
        buckets.setdefault(model.signature, []).append((index, model))
    for members in buckets.values():
        solved = _solve_models([model for _, model in members], ambient)
        for (index, _), answer in zip(members, solved):
            answers[index] = answer


def solve_circuits(context: Any, problems: Sequence[tuple[Any, Mapping[str, Any]]]
                   ) -> list[tuple[GroupResult, ...]]:
    """The LED groups of each edited (sub-)circuit found and solved, as
    :func:`linter.fix_search.resolve_circuit` gives them one circuit at a time; the models
    of every circuit are solved together, one batch per structure.

    ``problems`` holds (circuit, part data changes by reference) pairs.
    """
    from linter.topology import find_groups

    known = context.part_data
    rails = dict(context.rails)
    found: list[tuple[int, int]] = []      # (problem, group) of each answer slot
    answers: list[GroupResult | None] = []
    models: list[tuple[int, Any]] = []
    for number, (circuit, changes) in enumerate(problems):
        data = {ref: known[ref] for ref in circuit.parts if ref in known}
        data.update(changes)
        for group in find_groups(circuit, context.rails, data):
            slot = len(answers)
            found.append((number, slot))
            answers.append(None)
            try:
                models.append((slot, build_model(group, circuit, data, rails)))
            except ModelGap as exc:
                answers[slot] = GroupResult(group, "unsolved", reason=str(exc))
    _solve_buckets(models, answers, context.settings.ambient)
    grouped: list[list[GroupResult]] = [[] for _ in problems]
    for number, slot in found:
        answer = answers[slot]
        if answer is not None:
            grouped[number].append(answer)
    return [tuple(answers_of) for answers_of in grouped]


def solve_resistor_values(context: Any, result: GroupResult, ref: str,
                          values: Sequence[float]) -> list[GroupResult]:
    """The group solved with resistor ``ref`` at each of ``values`` (Ω), in one batch; the
    same results as :func:`linter.fix_search.with_resistor` value by value.

    The models come from :func:`resistor_models` (one built, the others that one with the
    resistor's value changed); when it declines, every model is built
    (:func:`solve_variants`)."""
    from linter.fix_search import resistor_record

    variants = [({ref: resistor_record(context, ref, ohms)}, {}) for ohms in values]
    models = resistor_models(context, result, ref, [data[ref] for data, _ in variants])
    if models is None:
        return solve_variants(context, result, variants)
    answers: list = [None] * len(models)
    _solve_buckets(list(enumerate(models)), answers, context.settings.ambient)
    return answers


def resistor_models(context: Any, result: GroupResult, ref: str,
                    records: Sequence[Any]) -> list | None:
    """The models of ``result``'s group with resistor ``ref``'s part data replaced by each
    of ``records`` (records that differ in ``ohms`` alone): the first built by
    :func:`linter.netbuild.build_model`, each other one that model with the resistor's
    ``ohms`` replaced, which is all the builder reads differently from such a record (the
    resistor's value goes into its element, nowhere else: not into the structure
    signature, the notes or the axes). None, for the plain path (every model built), when
    a record differs otherwise, a value would not build (not above 0 Ω) or the first model
    does not build or does not hold ``ref`` as one part resistor.
    ``tests/test_fix_batch_models.py`` compares both field by field.
    """
    from dataclasses import replace

    if not records:
        return None
    first = records[0]
    if any(not (record.ohms > 0) or replace(record, ohms=first.ohms) != first
           for record in records):
        return None
    rail_map = dict(context.rails)
    try:
        model = build_model(result.group, context.circuit,
                            Overlay(context.part_data, {ref: first}), rail_map)
    except ModelGap:
        return None
    places = [i for i, spec in enumerate(model.resistors) if spec.ref == ref]
    if len(places) != 1 or model.resistors[places[0]].role != "part":
        return None
    place = places[0]
    models = [model]
    for record in records[1:]:
        resistors = list(model.resistors)
        resistors[place] = replace(resistors[place], ohms=float(record.ohms))
        models.append(replace(model, resistors=tuple(resistors)))
    return models


Step = Callable[[float], float]
"""The next series value from one value (Ω → Ω), up or down the walk."""


class SeriesWalk:
    """The group solved at the values of one resistor a search asks for, solved ahead.

    ``walk(ohms)`` is the GroupResult of the group with the resistor at ``ohms``. The first
    value asked is solved together with the :data:`FIRST_WINDOW` values reached from it by
    ``down`` and ``up``; a value beyond the known ones is solved with as many more in its
    direction as are known already (at most :data:`MAX_WINDOW`). A value the steps do not
    reach is solved too, only with fewer companions. Every answer is kept for the walk's
    lifetime (one search), or as long as the ``known`` table handed in is kept.
    """

    def __init__(self, solve_many: Callable[[list[float]], list[GroupResult]],
                 up: Step, down: Step, known: dict[float, GroupResult] | None = None) -> None:
        self._solve_many, self._up, self._down = solve_many, up, down
        self._known: dict[float, GroupResult] = {} if known is None else known
        """Answers by value; ``known`` shares them with other walks of the same resistor."""
        self.batches = 0
        """Solver runs so far (for tests and profiling)."""

    def __call__(self, ohms: float) -> GroupResult:
        found = self._known.get(ohms)
        if found is None:
            self._fetch(ohms)
            found = self._known[ohms]
        return found

    def _fetch(self, ohms: float) -> None:
        if not self._known:
            below, above = FIRST_WINDOW
        else:
            ahead = min(MAX_WINDOW, max(len(self._known), FIRST_WINDOW[1]))
            below, above = (0, ahead) if ohms > max(self._known) else (
                (ahead, 0) if ohms < min(self._known) else (1, 1))
        values = [ohms]
        values += self._steps(ohms, self._up, above)
        values += self._steps(ohms, self._down, below)
        wanted = [v for v in dict.fromkeys(values) if v not in self._known]
        try:
            answers = self._solve_many(wanted)
        except Exception:  # noqa: BLE001 - a value solved ahead may fail; the asked one alone
            if len(wanted) == 1:
                raise
            wanted, answers = [ohms], self._solve_many([ohms])
        self._known.update(zip(wanted, answers))
        self.batches += 1

    @staticmethod
    def _steps(start: float, step: Step, count: int) -> list[float]:
        found: list[float] = []
        value = start
        for _ in range(count):
            try:
                value = step(value)
            except ValueError:  # outside the values the E-series tables handle
                break
            found.append(value)
        return found

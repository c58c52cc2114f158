"""One large board's rules shared between processes, each taking the next rule from one queue.

Rules are pure functions of the analysed board (context → findings), and on a large board
they are a sixth of a check. With a second CPU, forked children take rules from the same
queue as this process and send their findings back pickled; the findings are then put
together in rule-id order, so the list is the one the plain loop
(:func:`linter.engine.run_rules` with ``processes=1``) makes, element for element
(``tests/test_rule_sharing.py``).

The queue is a pipe holding one byte per rule, written whole before any child starts;
reading one byte claims one rule, and a pipe hands each byte to one reader only. The rules
known to take longest come first (:data:`LONGEST_FIRST`), so that the processes end close
together. A child writes its findings, pickled, to its own pipe, which this process reads
once its queue is empty.

Nothing is guessed when something goes wrong:

* a rule a child could not finish (it raised, or the child died) is run again here, in
  rule-id order with the rest that did not come back;
* a rule that raises here stops the sharing: the children are ended and every rule is run
  again by the plain loop, so the exception is the one the plain loop raises.

Only for boards of at least :data:`MIN_GROUPS` LED groups (below that a fork costs more
than it saves), on Linux with more than one usable CPU, and never from a process running
other Python threads (a fork copies only the calling thread; a terminal's progress timer is
one, so a check drawing progress keeps its rules to one process).
"""

from __future__ import annotations

import gc
import os
import pickle
import signal
import sys
from typing import Any, Callable, Mapping, Sequence

from linter.findings import Finding
from linter.model import SourceLocation

__all__ = ["LONGEST_FIRST", "MIN_GROUPS", "usable_processes", "shared_findings"]

MIN_GROUPS = 1000
"""LED groups from which a board's rules are shared (a 10,000-part board has about 2,700)."""

LONGEST_FIRST = ("shared-ballast", "string-headroom", "led-overcurrent", "resistor-overload",
                 "floating-led", "pin-overcurrent", "transistor-overload")
"""Rules that take longest on a large board, longest first (CPU seconds measured with
``bench/profile_pipeline.py`` on the generated 100,000-part board); the others follow in
id order."""

RuleCheck = Callable[[str], list[Finding]]
"""Runs one rule by id on the board and returns its findings."""


def usable_processes(asked: int | None, groups: int) -> int:
    """How many processes share the rules: ``asked`` when given (``--jobs``), else two
    when the board has :data:`MIN_GROUPS` groups or more and two CPUs are usable, else one.
    Always one where a fork is unavailable or another Python thread runs."""
    if not _can_fork() or _other_threads():
        return 1
    if asked is not None:
        return max(1, asked)
    if groups < MIN_GROUPS:
        return 1
    return min(2, _cpus())


def _can_fork() -> bool:
    """Linux only: elsewhere a fork may leave system libraries unusable in the child (macOS
    warns against forking after its frameworks start), and Windows has no fork."""
    return sys.platform.startswith("linux") and hasattr(os, "fork")


def _cpus() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        return os.cpu_count() or 1


def _other_threads() -> bool:
    threading = sys.modules.get("threading")  # not imported: no other thread was started
    return threading is not None and threading.active_count() > 1


def queue_order(rule_ids: Sequence[str]) -> list[str]:
    """The rules as the queue holds them: :data:`LONGEST_FIRST`, then the rest in id order."""
    rank = {rule_id: index for index, rule_id in enumerate(LONGEST_FIRST)}
    return sorted(rule_ids, key=lambda rule_id: (rank.get(rule_id, len(rank)), rule_id))


class _RuleRaised(Exception):
    """A rule raised in this process while sharing: run everything the plain way."""


def shared_findings(rule_ids: Sequence[str], check: RuleCheck, processes: int
                    ) -> dict[str, list[Finding]] | None:
    """Each rule's findings, ``rule_ids`` run by ``processes`` processes (this one and
    ``processes - 1`` forked children). None when the rules are better run by the plain
    loop: fewer than two processes or rules, more rules than the queue's bytes can name, or
    a rule raised in this process (the plain loop then raises what it raises)."""
    order = queue_order(rule_ids)
    if processes < 2 or not 2 <= len(order) <= 256:
        return None
    queue_out, queue_in = os.pipe()
    os.write(queue_in, bytes(range(len(order))))  # below the pipe's buffer: never blocks
    os.close(queue_in)
    children: list[tuple[int, int]] = []  # (pid, read end of its findings pipe)
    received = False
    try:
        for _ in range(min(processes, len(order)) - 1):
            children.append(_start_child(queue_out, order, check))
        try:
            found = dict(_take_rules(queue_out, order, check))
        except _RuleRaised:
            return None
        for _, results in children:
            found.update(_receive(results))
        received = True
    finally:
        os.close(queue_out)
        _end(children, kill=not received)
    left = [rule_id for rule_id in rule_ids if rule_id not in found]
    found.update((rule_id, check(rule_id)) for rule_id in left)  # what no child brought back
    return found


def _take_rules(queue: int, order: Sequence[str], check: RuleCheck
                ) -> list[tuple[str, list[Finding]]]:
    """Claim rules from the queue until it is empty; their findings in the order run."""
    taken = []
    while token := os.read(queue, 1):
        rule_id = order[token[0]]
        try:
            taken.append((rule_id, check(rule_id)))
        except Exception as exc:
            raise _RuleRaised(rule_id) from exc
    return taken


def _start_child(queue: int, order: Sequence[str], check: RuleCheck) -> tuple[int, int]:
    """Fork a child that takes rules from ``queue`` and writes ``{rule: findings}`` pickled
    to a pipe whose read end is returned with its pid. The child never returns: it leaves
    by ``os._exit`` (no clean-up of this process's state, no buffered output flushed)."""
    results_out, results_in = os.pipe()
    pid = os.fork()
    if pid:
        os.close(results_in)
        return pid, results_out
    status = 1
    try:
        os.close(results_out)
        gc.disable()  # short-lived: its records die with it
        done: dict[str, list[Finding]] = {}
        try:
            for rule_id, findings in _take_rules(queue, order, check):
                done[rule_id] = findings
        except _RuleRaised:
            pass  # the rules finished so far go back; the rest are run by the parent
        with os.fdopen(results_in, "wb") as out:
            _FindingsPickler(out, protocol=pickle.HIGHEST_PROTOCOL).dump(done)
        status = 0
    finally:
        os._exit(status)


def _finding_parts(finding: Finding) -> tuple[type, tuple]:
    return Finding, (finding.rule, finding.severity, finding.message, finding.parts,
                     finding.nets, finding.group, finding.values, finding.fix, finding.location)


def _location_parts(location: SourceLocation) -> tuple[type, tuple]:
    return SourceLocation, (location.file, location.line, location.column)


class _FindingsPickler(pickle.Pickler):
    """Findings and their locations pickled as constructor calls: the dataclass default
    (a ``__setstate__`` that looks up the fields of every object) made unpickling 28 µs a
    finding, three quarters of what sharing the rules saves."""

    dispatch_table = {Finding: _finding_parts, SourceLocation: _location_parts}


def _receive(results: int) -> Mapping[str, list[Finding]]:
    """A child's findings; empty when it sent nothing whole (its rules are run here)."""
    try:
        with os.fdopen(results, "rb", closefd=False) as stream:
            received: Any = pickle.load(stream)
    except Exception:  # noqa: BLE001 - a dead child's half message: its rules run here
        return {}
    return received if isinstance(received, dict) else {}


def _end(children: Sequence[tuple[int, int]], kill: bool) -> None:
    """Close the children's pipes and reap them (each has sent all it will send); with
    ``kill`` (this process stopped early) they are killed first."""
    for pid, results in children:
        os.close(results)
        try:
            if kill:
                os.kill(pid, signal.SIGKILL)
            os.waitpid(pid, 0)
        except (ChildProcessError, ProcessLookupError):
            pass

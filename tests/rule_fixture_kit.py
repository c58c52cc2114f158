"""Shared by the rule tests: run a rule fixture through the engine, and ngspice as the oracle.

ngspice runs the same deck (``.op`` replaced by a ``.control`` block that prints every node);
a worst-case corner is the deck with element values replaced (rail at its maximum, resistor
at the low end of its tolerance) and the LED model's IS moved so that the curve passes
through vf_min (or vf_max) at the test current — the Shockley equation
IS = I / (exp((Vf − I·RS)/(N·Vt)) − 1), Vt = k·T/q at 25 °C (scipy.constants). A missing
ngspice is a failure, not a skip.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
import tempfile
from pathlib import Path
from typing import Mapping

import pytest
from scipy import constants

from linter.engine import CheckRequest, CheckResult, run_check
from linter.findings import Finding

RULE_FIXTURES = Path(__file__).resolve().parent.parent / "fixtures" / "rules"
TEST_CURRENT = 0.020
"""A, the test current of the fixtures' LRED part data."""
LRED = (1e-19, 2.0, 4.0)
"""IS (A), N, RS (Ω) of the fixtures' ``.model LRED`` card."""


def check(rule_folder: str, deck: str, bom: str | None = None, **request) -> CheckResult:
    """The engine's result for ``fixtures/rules/<rule_folder>/<deck>``."""
    folder = RULE_FIXTURES / rule_folder
    return run_check(CheckRequest(netlist=folder / deck, bom=None if bom is None else folder / bom,
                                  **request))


def of_rule(result: CheckResult, rule: str) -> list[Finding]:
    return [f for f in result.findings if f.rule == rule]


def deck_text(rule_folder: str, deck: str) -> str:
    return (RULE_FIXTURES / rule_folder / deck).read_text(encoding="utf-8")


def shockley_is(vf: float, model: tuple[float, float, float] = LRED,
                current: float = TEST_CURRENT) -> float:
    """IS (A) putting the curve of ``model`` (IS, N, RS) through ``vf`` (V) at ``current`` (A)."""
    _, n, rs = model
    vt = constants.k * (25.0 + constants.zero_Celsius) / constants.e
    return current / (math.exp((vf - current * rs) / (n * vt)) - 1.0)


def corner(text: str, values: Mapping[str, float] = (), led_is: float | None = None) -> str:
    """The deck with element values replaced (``{"V12": 12.6, "R1": 446.5}``) and the LRED
    model's IS set to ``led_is``."""
    lines = []
    for line in text.splitlines():
        words = line.split()
        if words and words[0].upper() in {k.upper() for k in values}:
            value = {k.upper(): v for k, v in values.items()}[words[0].upper()]
            words[-1] = f"{value!r}"
            line = " ".join(words)
        if led_is is not None and line.lower().startswith(".model lred"):
            line = re.sub(r"IS=[^ )]+", f"IS={led_is!r}", line)
        lines.append(line)
    return "\n".join(lines) + "\n"


def ngspice_op(text: str) -> dict[str, float]:
    """Node voltages (V) and source currents (A) of ngspice's DC operating point."""
    ngspice = shutil.which("ngspice")
    if ngspice is None:
        pytest.fail("ngspice is not installed (the oracle is required)")
    body = [line for line in text.splitlines() if line.strip().lower() not in (".op", ".end")]
    body += [".control", "op", "print all", ".endc", ".end"]
    with tempfile.TemporaryDirectory() as folder:
        deck = Path(folder) / "deck.cir"
        deck.write_text("\n".join(body) + "\n", encoding="utf-8")
        done = subprocess.run([ngspice, "-b", str(deck)], capture_output=True, text=True,
                              timeout=60)
    values = {m.group(1).lower(): float(m.group(2)) for m in
              re.finditer(r"^(\S+) = (\S+)$", done.stdout, re.MULTILINE)}
    assert values, done.stdout + done.stderr
    values.setdefault("0", 0.0)
    return values

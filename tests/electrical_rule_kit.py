"""Helpers for the electrical rules' fixture tests: run ledlint, and ask ngspice the same
question at the same corner.

A corner reported by ledlint (a :class:`~linter.corners.Corner`) is turned into a SPICE deck
by plain text edits of the fixture: each rail's source at the corner's voltage, each
resistor at R·(1 ± 5 %) (the fixtures' assumed tolerance), each LED's model IS moved to the
corner's Vf bin with the Shockley equation (IS' = IS·exp(−(Vf_bin − Vf_typ)/(N·Vt)), Vf_typ
the model's voltage at the 20 mA test current, Vt = k·T/q at 25 °C from scipy.constants),
and a transistor at hfe_min given BF = hfe_min. ngspice then solves it; 0 V sources in series
with every LED read the currents. The fixtures hold the ambient at 25 °C, so no temperature
shift enters; ngspice is told to solve at 25 °C with the models' figures taken at 25 °C
(``.options temp=25 tnom=25``), the temperature ledlint's solver uses for SPICE figures.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
from pathlib import Path
from typing import Mapping

from scipy import constants

from linter.engine import CheckRequest, run_check

ROOT = Path(__file__).resolve().parent.parent
RULES = ROOT / "fixtures" / "rules"
VT = constants.k * (25.0 + constants.zero_Celsius) / constants.e
"""Thermal voltage at 25 °C (V), scipy.constants."""
TEST_CURRENT = 0.020
"""A, the fixtures' vf_test_current."""
TOLERANCE = 0.05
"""The fixtures' resistors carry no tolerance: ledlint assumes 5 % (DESIGN.md)."""


def check(path: Path, config: Path | None = None):
    """ledlint's CheckResult for a fixture."""
    return run_check(CheckRequest(netlist=path, config=config))


def findings(result, rule: str) -> list:
    return [f for f in result.findings if f.rule == rule]


def model_params(text: str) -> dict[str, dict[str, float]]:
    """``.model NAME D(IS=.. N=.. RS=..)`` cards of a deck: name → parameters."""
    found = {}
    for name, body in re.findall(r"^\.model (\S+) \w+\(([^)]*)\)", text, re.MULTILINE):
        found[name] = {k.upper(): float(v) for k, v in re.findall(r"(\w+)=(\S+)", body)}
    return found


def vf_at(i: float, i_s: float, n: float, rs: float) -> float:
    """Shockley with series resistance: V = N·Vt·ln(I/IS + 1) + I·RS (V)."""
    return n * VT * math.log1p(i / i_s) + i * rs


def is_for_bin(i_s: float, n: float, rs: float, vf_bin: float) -> float:
    """IS that puts the curve through ``vf_bin`` at the test current (Shockley)."""
    typ = vf_at(TEST_CURRENT, i_s, n, rs)
    return i_s * math.exp(-(vf_bin - typ) / (n * VT))


def at_corner(text: str, rails: Mapping[str, float] = (), resistors: Mapping[str, float] = (),
              bins: Mapping[str, float] = (), beta: Mapping[str, float] = ()) -> str:
    """The deck with rails (net → V), resistors (ref → Ω), LED bins (ref → Vf at 20 mA) and
    transistor gains (ref → BF) set, and an ammeter (``VAM_<ref>``) in series with each LED."""
    models = model_params(text)
    out, extra = [], []
    for line in text.splitlines():
        words = line.split()
        if not words or line.startswith(("*", ".")):
            out.append(line)
            continue
        ref = words[0]
        if ref[0] == "V" and words[1] in rails:
            line = f"{ref} {words[1]} {words[2]} DC {rails[words[1]]}"
        elif ref in resistors:
            line = f"{ref} {words[1]} {words[2]} {resistors[ref]}"
        elif ref[0] == "D" and words[3] in models and "N" in models[words[3]]:
            p = models[words[3]]
            name = words[3]
            if ref in bins:
                name = f"{words[3]}_{ref}"
                i_s = is_for_bin(p["IS"], p["N"], p.get("RS", 0.0), bins[ref])
                extra.append(f".model {name} D(IS={i_s:.6e} N={p['N']} RS={p.get('RS', 0.0)})")
            out.append(f"VAM_{ref} {words[1]} am_{ref} DC 0")
            line = f"{ref} am_{ref} {words[2]} {name}"
        elif ref[0] == "Q" and ref in beta:
            name = f"{words[4]}_{ref}"
            p = dict(models[words[4]], BF=beta[ref])
            extra.append(f".model {name} NPN(" + " ".join(f"{k}={v}" for k, v in p.items()) + ")")
            line = " ".join(words[:4] + [name])
        out.append(line)
    body = [x for x in out if x.strip().lower() not in (".op", ".end")]
    options = [".options temp=25 tnom=25"]  # the model figures at 25 °C, as ledlint reads them
    return "\n".join(body[:1] + options + body[1:] + extra + [".control", "op", "print all", ".endc", ".end", ""])


def ngspice(text: str, tmp_path: Path) -> dict[str, float]:
    """Every ``name = value`` of ngspice's ``print all`` after ``op`` (node voltages, and
    ``vam_<ref>#branch`` currents)."""
    binary = shutil.which("ngspice")
    assert binary is not None, "ngspice is required (apt install ngspice)"
    deck = tmp_path / "corner.cir"
    deck.write_text(text)
    done = subprocess.run([binary, "-b", str(deck)], capture_output=True, text=True, timeout=60)
    values = {m.group(1).lower(): float(m.group(2)) for m in
              re.finditer(r"^(\S+) = (\S+)$", done.stdout, re.MULTILINE)}
    assert values and "error" not in done.stderr.lower(), done.stderr
    return values


def led_current(values: Mapping[str, float], ref: str) -> float:
    """The current (A) of LED ``ref`` from its ammeter."""
    return values[f"vam_{ref.lower()}#branch"]


def corner_args(corner, ohms: Mapping[str, float], vf: Mapping[str, float],
                hfe_min: float | None = None) -> dict:
    """``at_corner`` keywords for a ledlint Corner: rails and resistor levels as reported,
    LED bins mapped to the fixture's vf figures (``vf``: bin name → V, vf_typ absent =
    the model as written), gains at hfe_min given BF = ``hfe_min``."""
    scale = {"low": 1 - TOLERANCE, "nom": 1.0, "high": 1 + TOLERANCE}
    return {
        "rails": {name: volts for name, (_, volts) in corner.rails.items()},
        "resistors": {ref: ohms[ref] * scale[level] for ref, level in corner.resistors.items()},
        "bins": {ref: vf[b] for ref, b in corner.vf.items() if b in vf},
        "beta": {ref: hfe_min for ref, b in corner.beta.items() if b == "hfe_min" and hfe_min},
    }

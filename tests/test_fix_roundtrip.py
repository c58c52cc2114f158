"""Fix round trip: each computed fix, applied to a copy of the SPICE deck, clears its finding.

For every ``led-overcurrent``, ``shared-ballast`` and ``string-headroom`` finding of the rule
fixtures and of the demo deck, the test edits a temporary copy of the netlist with the fix's
machine-readable values (``Finding.values``) — a resistor's new value, the shared resistor
split into one per LED, or the designed NPN sink put in place of the resistor — and runs
ledlint again: no finding of that rule may remain on those LEDs. The edits are plain text
handling here, independent of the rules' own circuit edits.
"""

from __future__ import annotations

import re
import shutil
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))
from electrical_rule_kit import ROOT, check  # noqa: E402

RULES = ("led-overcurrent", "shared-ballast", "string-headroom")
DECKS = sorted((ROOT / "fixtures" / "rules" / rule / name)
               for rule in RULES for name in ("fires.cir", "warns.cir")
               if (ROOT / "fixtures" / "rules" / rule / name).exists())
DECKS.append(ROOT / "fixtures" / "demo" / "dust_extractor_panel.cir")


def _cases() -> list[tuple[Path, str, tuple[str, ...]]]:
    """Every finding of the rules whose fix is a part to put in: a ``string-headroom``
    finding for which no sink within the search holds the limit offers none (its fix says
    so; tests/test_rule_string_headroom.py checks that claim)."""
    cases = []
    for deck in DECKS:
        for finding in check(deck).findings:
            if finding.rule in RULES and (finding.rule != "string-headroom"
                                          or "sink_r_emitter_ohms" in finding.values):
                cases.append((deck, finding.rule, finding.parts))
    return cases


CASES = _cases()


def _line_of(text: str, ref: str) -> list[str]:
    return next(line.split() for line in text.splitlines() if line.split()[:1] == [ref])


def _set_value(text: str, ref: str, value: float) -> str:
    words = _line_of(text, ref)
    return re.sub(rf"^{re.escape(ref)} .*$", " ".join(words[:3] + [f"{value:g}"]), text,
                  count=1, flags=re.MULTILINE)


def _split(text: str, shared: str, leds: tuple[str, ...], value: float) -> str:
    """One resistor per LED from the shared resistor's far net to the LED's own node."""
    words = _line_of(text, shared)
    node = next(n for n in words[1:3] if any(_line_of(text, d)[1] == n or _line_of(text, d)[2] == n
                                               for d in leds))
    far = words[2] if words[1] == node else words[1]
    lines = [line for line in text.splitlines() if line.split()[:1] != [shared]]
    for led in leds:
        own = f"{node}_{led}"
        lines = [re.sub(rf"^({led} )(\S+) (\S+)", lambda m: m.group(1) + " ".join(
            own if n == node else n for n in (m.group(2), m.group(3))), line)
            for line in lines]
        lines.insert(-1, f"R{shared}_{led} {far} {own} {value:g}")
    return "\n".join(lines) + "\n"


def _insert_sink(text: str, resistor: str, leds: tuple[str, ...], values: dict) -> str:
    """The resistor shorted out, an NPN sink between the bottom LED and ground."""
    rail_side, led_side = _line_of(text, resistor)[1:3]
    lines = [line for line in text.splitlines() if line.split()[:1] != [resistor]]
    lines = [re.sub(rf"(?<=\s){re.escape(led_side)}(?=\s)", rail_side, line) for line in lines]
    bottom = next(d for d in leds if _line_of("\n".join(lines), d)[2] == "0")
    lines = [re.sub(rf"^({bottom} \S+) 0 ", r"\1 snk_c ", line) for line in lines]
    reference = next(line.split()[1] for line in lines if re.match(
        rf"^V\S* \S+ 0 DC {values['sink_reference_v']:g}$", line))
    lines[-1:-1] = [f"QSNK snk_c snk_b snk_e QSNKM",
                    f"RSNKE snk_e 0 {values['sink_r_emitter_ohms']:g}",
                    f"RSNKT {reference} snk_b {values['sink_r_top_ohms']:g}",
                    f"RSNKB snk_b 0 {values['sink_r_bottom_ohms']:g}",
                    ".model QSNKM NPN(IS=1e-14 BF=200 BR=2)"]
    return "\n".join(lines) + "\n"


def _apply(text: str, rule: str, finding) -> str:
    values = dict(finding.values)
    leds = tuple(p for p in finding.parts if p.startswith("D"))
    if rule == "led-overcurrent":
        ref = re.match(r"make (\S+)", finding.fix).group(1)
        return _set_value(text, ref, values["fix_ohms"])
    if rule == "shared-ballast":
        return _split(text, finding.parts[0], leds, values["fix_ohms"])
    resistor = next(p for p in finding.parts if not p.startswith("D"))
    return _insert_sink(text, resistor, leds, values)


@pytest.mark.parametrize("deck,rule,parts", CASES,
                         ids=[f"{d.stem}-{r}-{'+'.join(p)}" for d, r, p in CASES])
def test_fix_clears_the_finding(deck: Path, rule: str, parts: tuple[str, ...], tmp_path: Path):
    (finding,) = [f for f in check(deck).findings if f.rule == rule and f.parts == parts]
    assert finding.fix and any(k.startswith(("fix_", "sink_")) for k in finding.values)
    edited = tmp_path / deck.name
    edited.write_text(_apply(deck.read_text(), rule, finding))
    shutil.copy(deck.parent / "ledlint.toml", tmp_path / "ledlint.toml")
    leds = {p for p in parts if p.startswith("D")}
    again = [f for f in check(edited).findings if f.rule == rule and leds & set(f.parts)]
    assert again == [], edited.read_text()


def test_every_rule_has_a_case():
    assert {rule for _, rule, _ in CASES} == set(RULES)

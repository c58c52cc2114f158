"""Guessing what a part is from what the netlist says about it.

Part data (``kind = "led"`` in a parts file) always wins; this module is the fallback the
readers use: the reference letters, then words in the value, part number, description and
package. An LED is recognised by a reference such as ``LED3`` or by LED or colour words; a
plain diode (``D1``, ``1N4148``) is not an LED.
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import Iterable

__all__ = ["infer_kind", "LED_WORDS", "COLOR_WORDS"]

COLOR_WORDS: tuple[str, ...] = (
    "red", "orange", "amber", "yellow", "green", "blue", "white", "warm white", "cool white",
    "ir", "infrared", "uv", "ultraviolet", "rgb", "royal blue", "yellow-green",
)
"""Colour words that, on a diode, mean a light-emitting diode."""

LED_WORDS: tuple[str, ...] = ("led", "leds", "light emitting", "light-emitting", "indicator")
"""Words that mark a part as an LED wherever they appear."""

_WORD = re.compile(r"[a-z]+")
_PHRASES = tuple(word for word in COLOR_WORDS + LED_WORDS if not word.isalpha())
_REF_PREFIX = re.compile(r"^([A-Za-z]+)")

_PREFIX_KINDS: dict[str, str] = {
    "R": "resistor", "RN": "resistor", "RV": "resistor",
    "C": "capacitor", "L": "inductor",
    "FB": "link", "F": "link", "JP": "link", "SJ": "link",
    "D": "diode", "LED": "led", "DL": "led", "LD": "led",
    "Q": "transistor", "T": "transistor", "M": "transistor",
    "U": "ic", "IC": "ic",
    "J": "connector", "P": "connector", "CN": "connector", "X": "connector",
    "SW": "switch", "S": "switch", "K": "switch",
    "V": "source", "I": "source",
}

_POLARITY_WORDS: tuple[tuple[str, str], ...] = (
    ("pnp", "pnp"), ("npn", "npn"),
    ("pmos", "pmos"), ("p-channel", "pmos"), ("p-ch", "pmos"), ("pfet", "pmos"),
    ("nmos", "nmos"), ("n-channel", "nmos"), ("n-ch", "nmos"), ("nfet", "nmos"),
)


def _words(texts: Iterable[str | None]) -> set[str]:
    found: set[str] = set()
    for text in texts:
        if text:
            lowered = text.casefold()
            found.update(_WORD.findall(lowered))
            found.update(phrase for phrase in _PHRASES if phrase in lowered)
    return found


def _mentions_led(texts: Iterable[str | None]) -> bool:
    words = _words(texts)
    return bool(words & set(LED_WORDS)) or bool(words & set(COLOR_WORDS))


def infer_kind(
    ref: str,
    value: str | None = None,
    part_number: str | None = None,
    description: str | None = None,
    package: str | None = None,
    cell: str | None = None,
) -> str:
    """The kind of a part from its reference letters and descriptive text.

    >>> infer_kind("D3", "RED")
    'led'
    >>> infer_kind("D1", "1N4148")
    'diode'
    >>> infer_kind("LED7")
    'led'
    >>> infer_kind("Q2", "MMBT-NPN")
    'npn'
    >>> infer_kind("R5", "0")
    'link'
    """
    match = _REF_PREFIX.match(ref.rsplit("/", 1)[-1])
    prefix = match.group(1).upper() if match else ""
    return _kind(prefix, value, part_number, description, package, cell)


@lru_cache(maxsize=4096)
def _kind(prefix: str, value: str | None, part_number: str | None, description: str | None,
          package: str | None, cell: str | None) -> str:
    """:func:`infer_kind` from the reference's letters (upper case) on; remembered, as a board
    repeats a few combinations of letters and texts thousands of times."""
    texts = (value, part_number, description, package, cell)
    kind = _PREFIX_KINDS.get(prefix)
    if kind is None and prefix:
        kind = _PREFIX_KINDS.get(prefix[:2]) or _PREFIX_KINDS.get(prefix[:1])
    if kind in ("diode", "led", None) and _mentions_led(texts):
        return "led"
    if kind == "transistor":
        lowered = " ".join(t.casefold() for t in texts if t)
        for word, polarity in _POLARITY_WORDS:
            if word in lowered:
                return polarity
    if kind == "resistor" and value is not None and value.strip() in ("0", "0R", "0r", "0 Ω", "0Ω"):
        return "link"
    return kind or "other"

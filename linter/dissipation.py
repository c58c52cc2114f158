"""How much a part may dissipate: its rating derated to the ambient maximum, held to a share.

Shared by the rules ``resistor-overload``, ``transistor-overload`` and ``led-overpower``.
The derating curves are those of :mod:`linter.fixes_rating` (common practice): resistors
full to 70 °C and zero at 155 °C; transistors and LEDs full at 25 °C and zero at 150 °C. The
share is the ``[derating]`` setting (60 % by default, common practice). Worst-case
dissipation (the largest over every corner solved) is compared with the allowance at the
ambient maximum, the hottest the board is said to see.
"""

from __future__ import annotations

import math

from linter.fixes import derated_resistor_rating, derated_transistor_rating, derating_factor
from linter.fixes_rating import (RESISTOR_FULL_RATING_UNTIL_C, RESISTOR_ZERO_RATING_AT_C,
                                 TRANSISTOR_FULL_RATING_UNTIL_C, TRANSISTOR_ZERO_RATING_AT_C)
from linter.records import record
from linter.units import format_si

__all__ = ["Allowance", "resistor_allowance", "semiconductor_allowance", "over"]


@record
class Allowance:
    """A part's allowed worst-case dissipation.

    rating_w : W, the rating before derating (at 70 °C for resistors, 25 °C for pd_max).
    ambient_c : °C, the ambient maximum it is derated to.
    factor : the derating curve's fraction left at ``ambient_c``.
    share : the ``[derating]`` share.
    allowed_w : W = rating_w · factor · share.
    """

    rating_w: float
    ambient_c: float
    factor: float
    share: float
    allowed_w: float

    def describe(self, rating_name: str) -> str:
        """``"pd_max 250 mW derated to 50 °C (80 % left), 60 % share"``."""
        return (f"{rating_name} {format_si(self.rating_w, 'W')} derated to "
                f"{self.ambient_c:g} °C ({self.factor * 100:.3g} % left), "
                f"{self.share * 100:g} % share")

    def values(self, power_max_w: float, power_nom_w: float,
               rating_key: str = "pd_max_w") -> dict[str, float]:
        """The finding values every dissipation rule reports (SI floats), the rating under
        ``rating_key`` (``rating_w`` for a resistor, ``pd_max_w`` for a semiconductor)."""
        return {"power_max_w": power_max_w, "power_nom_w": power_nom_w,
                rating_key: self.rating_w, "allowed_w": self.allowed_w,
                "ambient_max_c": self.ambient_c, "derating_share": self.share}

    def rating_needed(self, power_w: float) -> float | None:
        """The rating (W, same reference temperature) whose allowance covers ``power_w``;
        None when the ambient leaves no rating at all."""
        per_watt = self.factor * self.share
        return power_w / per_watt if per_watt > 0 else None


def resistor_allowance(rating_w: float, ambient_c: float, share: float) -> Allowance:
    """Allowance of a thick-film resistor: P = P_rated · f(T) · share, f from 1 at 70 °C to
    0 at 155 °C (common practice).

    >>> round(resistor_allowance(0.1, 112.5, 0.6).allowed_w, 6)
    0.03
    """
    factor = derating_factor(ambient_c, RESISTOR_FULL_RATING_UNTIL_C, RESISTOR_ZERO_RATING_AT_C)
    return Allowance(rating_w, ambient_c, factor, share,
                     derated_resistor_rating(rating_w, ambient_c, share))


def semiconductor_allowance(pd_max_w: float, ambient_c: float, share: float) -> Allowance:
    """Allowance of a transistor or LED: P = Pd_max · f(T) · share, f from 1 at 25 °C to 0
    at 150 °C (common practice for small packages).

    >>> round(semiconductor_allowance(0.25, 87.5, 1.0).allowed_w, 6)
    0.125
    """
    factor = derating_factor(ambient_c, TRANSISTOR_FULL_RATING_UNTIL_C,
                             TRANSISTOR_ZERO_RATING_AT_C)
    return Allowance(pd_max_w, ambient_c, factor, share,
                     derated_transistor_rating(pd_max_w, ambient_c, share))


def over(power_w: float, allowance: Allowance) -> bool:
    """True when a finite worst-case dissipation exceeds the allowance."""
    return math.isfinite(power_w) and power_w > allowance.allowed_w

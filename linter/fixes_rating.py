"""Power ratings: temperature derating of resistors and transistors, and the package to buy.

Derating curves are common practice: thick-film chip resistors carry full rating up to
70 °C ambient and fall linearly to zero at 155 °C; small-signal transistor packages carry
their ``pd_max`` at 25 °C and fall linearly to zero at 150 °C. The derated rating is then
held to a share (the ``[derating]`` setting, 60 % by default, common practice) that the
worst-case dissipation may use.
"""

from __future__ import annotations

import math

from linter.records import record
from linter.units import format_si

__all__ = [
    "CHIP_POWER_RATINGS",
    "DEFAULT_DERATING_SHARE",
    "RatingChoice",
    "derating_factor",
    "derated_resistor_rating",
    "derated_transistor_rating",
    "resistor_rating",
]

CHIP_POWER_RATINGS: tuple[tuple[str, float], ...] = (
    ("0201", 0.050), ("0402", 0.063), ("0603", 0.100), ("0805", 0.125),
    ("1206", 0.250), ("1210", 0.500), ("2010", 0.750), ("2512", 1.000),
)
"""(chip size, rated power in W at 70 °C), smallest first (common practice, from memory)."""

DEFAULT_DERATING_SHARE = 0.6
"""Share of the derated rating that worst-case dissipation may use (common practice)."""

RESISTOR_FULL_RATING_UNTIL_C = 70.0
"""°C ambient up to which a thick-film chip resistor carries its full rating (common practice)."""
RESISTOR_ZERO_RATING_AT_C = 155.0
"""°C ambient at which a thick-film chip resistor's rating reaches zero (common practice)."""
TRANSISTOR_FULL_RATING_UNTIL_C = 25.0
"""°C ambient at which a small-signal transistor's ``pd_max`` is stated (common practice)."""
TRANSISTOR_ZERO_RATING_AT_C = 150.0
"""°C ambient at which a small-signal transistor's allowed dissipation reaches zero (common practice)."""


def derating_factor(ambient_c: float, full_until_c: float, zero_at_c: float) -> float:
    """The fraction of rating left at ``ambient_c`` on a linear derating curve.

    f = 1 for T ≤ T_full; f = (T_zero − T)/(T_zero − T_full) between; f = 0 for T ≥ T_zero
    (temperatures in °C, f dimensionless).

    >>> derating_factor(112.5, 70.0, 155.0)
    0.5
    """
    if not zero_at_c > full_until_c:
        raise ValueError(f"derating curve needs zero point {zero_at_c} above {full_until_c}")
    if ambient_c <= full_until_c:
        return 1.0
    if ambient_c >= zero_at_c:
        return 0.0
    return (zero_at_c - ambient_c) / (zero_at_c - full_until_c)


def _check_share(share: float) -> None:
    if not 0.0 < share <= 1.0:
        raise ValueError(f"derating share must be in (0, 1], got {share!r}")


def derated_resistor_rating(rating_w: float, ambient_c: float,
                            share: float = DEFAULT_DERATING_SHARE) -> float:
    """Allowed worst-case dissipation of a resistor, in W.

    P_allowed = P_rated · f(T_ambient) · share, with f linear from 1 at 70 °C to 0 at 155 °C
    (P in W, T in °C; thick film, common practice).

    >>> round(derated_resistor_rating(0.25, 40.0, 0.6), 6)
    0.15
    """
    _check_share(share)
    factor = derating_factor(ambient_c, RESISTOR_FULL_RATING_UNTIL_C, RESISTOR_ZERO_RATING_AT_C)
    return rating_w * factor * share


def derated_transistor_rating(pd_max_w: float, ambient_c: float,
                              share: float = DEFAULT_DERATING_SHARE) -> float:
    """Allowed worst-case dissipation of a transistor, in W.

    P_allowed = Pd_max · f(T_ambient) · share, with f linear from 1 at 25 °C to 0 at 150 °C
    (P in W, T in °C; small-signal packages, common practice).

    >>> round(derated_transistor_rating(0.25, 87.5, 1.0), 6)
    0.125
    """
    _check_share(share)
    factor = derating_factor(ambient_c, TRANSISTOR_FULL_RATING_UNTIL_C, TRANSISTOR_ZERO_RATING_AT_C)
    return pd_max_w * factor * share


@record
class RatingChoice:
    """A resistor package to buy for a worst-case dissipation.

    ``count`` equal parts (series or parallel) of ``package`` rated ``rating_w`` (W at
    70 °C) share ``p_worst_w`` (W); each may dissipate ``allowed_w`` (W) after derating.
    """

    package: str
    rating_w: float
    count: int
    allowed_w: float
    p_worst_w: float

    @property
    def per_part_w(self) -> float:
        """Worst-case dissipation of each part, W."""
        return self.p_worst_w / self.count

    @property
    def text(self) -> str:
        """``"1206, 250 mW"``, or ``"split across 2 parts of 2512, 1 W (0.45 W each)"``."""
        rating = f"{self.package}, {format_si(self.rating_w, 'W')}"
        if self.count == 1:
            return rating
        return (f"split across {self.count} parts of {rating} "
                f"({format_si(self.per_part_w, 'W')} each)")


def resistor_rating(p_worst_w: float, ambient_max_c: float,
                    derating_share: float = DEFAULT_DERATING_SHARE,
                    packages: tuple[tuple[str, float], ...] = CHIP_POWER_RATINGS,
                    ) -> RatingChoice | None:
    """The smallest package whose derated rating covers ``p_worst_w`` (W) at ``ambient_max_c`` (°C).

    Each package may dissipate P_rated · f(T) · share (see :func:`derated_resistor_rating`).
    When even the largest is short, the power is split across N = ⌈P_worst / P_allowed⌉
    equal parts of the largest. None when the ambient leaves no rating at all (≥ 155 °C).

    >>> resistor_rating(0.12, 40.0).text
    '1206, 250 mW'
    """
    if not (p_worst_w >= 0 and math.isfinite(p_worst_w)):
        raise ValueError(f"worst-case power must be a finite W figure ≥ 0, got {p_worst_w!r}")
    if not packages:
        raise ValueError("no packages to choose from")
    for package, rating in sorted(packages, key=lambda item: item[1]):
        allowed = derated_resistor_rating(rating, ambient_max_c, derating_share)
        if p_worst_w <= allowed and allowed > 0:
            return RatingChoice(package, rating, 1, allowed, p_worst_w)
    package, rating = max(packages, key=lambda item: item[1])
    allowed = derated_resistor_rating(rating, ambient_max_c, derating_share)
    if allowed <= 0:
        return None
    return RatingChoice(package, rating, math.ceil(p_worst_w / allowed), allowed, p_worst_w)

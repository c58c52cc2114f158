"""shared-ballast's hottest LED among tied ones read from the group's LEDs in natural order
(``_first_in_order``) is the one ``min`` by natural key picks.

Expected values: ``min(positions, key=natural_key of the position's name)``, the plain path
of our own code (``linter.refs.natural_key``), over generated names and orders.
"""

from __future__ import annotations

from hypothesis import given
from hypothesis import strategies as st

from linter.refs import natural_key, natural_sorted
from linter.rules.shared_ballast import _first_in_order

NAMES = st.sampled_from(["D1", "D2", "D10", "d3", "D03", "LED2", "D1A", "x", "D", "Ð5", "D１"])


def _plain(names: list[str], positions: tuple[int, ...]) -> int:
    by_position = dict(zip(positions, names))
    return min(positions, key=lambda i: natural_key(by_position[i]))


@given(st.lists(NAMES, min_size=1, max_size=6), st.lists(NAMES, max_size=8), st.randoms())
def test_the_first_in_natural_order_is_the_plain_minimum(names, others, random):
    positions = tuple(random.sample(range(20), len(names)))
    for ordered in (natural_sorted(names + others), natural_sorted(others),
                    natural_sorted(names[1:] + others)):
        assert _first_in_order(names, positions, tuple(ordered)) == _plain(names, positions)

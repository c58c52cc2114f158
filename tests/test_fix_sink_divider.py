"""The sink's divider search on arrays picks exactly the divider the plain pair-by-pair
search picks.

Expected values are the plain path of our own code (``_choose_divider_plain``, the search as
it was written pair by pair), never pasted output. The inputs are invented: reference rails
and base targets a sink design asks for, divider totals over several decades.
"""

from __future__ import annotations

import random

from linter import fixes_sink


def _cases():
    rng = random.Random(7)
    for v_reference in (2.5, 3.3, 5.0, 12.0, 24.0):
        for target in (0.9, 1.2, 1.7, 2.45, 2.7):
            for total in (150.0, 1.0e3, 2.2e3, 4.7e3, 12345.0, 1.0e5, 3.3e5):
                yield v_reference, target, total
    for _ in range(300):
        yield (rng.uniform(2.0, 15.0), rng.uniform(0.6, 3.0), 10 ** rng.uniform(1.5, 6.5))
    # totals too small for any pair of values in range, and the narrowest ranges
    yield 5.0, 1.7, 1.0
    yield 5.0, 1.7, 2.0e-2


def test_array_divider_search_matches_the_plain_search():
    compared = 0
    for v_reference, target, total in _cases():
        fast = fixes_sink._choose_divider(v_reference, target, total)
        plain = fixes_sink._choose_divider_plain(v_reference, target, total)
        assert fast == plain, (v_reference, target, total)
        assert fast is None or all(type(v) is float for v in fast)
        compared += fast is not None
    assert compared > 300

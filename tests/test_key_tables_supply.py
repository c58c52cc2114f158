"""GroupKeys' supply pins of a driving microcontroller, read once per reference.

Expected values: the plain path of our own code. ``group_key_plain`` numbers a supply pin's
net in each group; GroupKeys keeps a microcontroller's supply pins coded once when their nets
are rails or unconnected and numbers them per group otherwise. Either way the keys must
partition the groups as the plain key does (``_check``), with the same references.
"""

from __future__ import annotations

from linter.model import Pin
from test_analysis_memo import GND, _channels, _with_part
from test_key_tables import _check


def _supply_on(c, net: str | None, count: int):
    """``c`` with U1's VDD pin on ``net`` (its VSS on GND, its port pins as they were)."""
    pins = (Pin("VDD", net), Pin("VSS", "GND"),
            *(Pin(f"PA{i}", f"P{i}") for i in range(count)))
    return _with_part(c, "U1", pins=pins)


def test_supply_on_rails_keys_equal_channels_alike() -> None:
    groups, c, data, rails = _channels(3)
    assert _check(groups, c, data, rails) == [0, 0, 0]


def test_supply_on_a_plain_net_is_numbered_in_each_group() -> None:
    groups, c, data, rails = _channels(3)
    # V5 no longer a rail: VDD's net is a plain net, numbered like the others
    assert _check(groups, c, data, {"GND": GND}) == [0, 0, 0]


def test_supply_on_a_net_of_one_channel_separates_it() -> None:
    groups, c, data, rails = _channels(3)
    # VDD on channel 0's anode net: that net is met again in group 0 only
    found = _check(groups, _supply_on(c, "A0", 3), data, rails)
    assert found[0] != found[1] and found[1] == found[2]


def test_supply_unconnected_and_supply_on_each_channel_net() -> None:
    groups, c, data, rails = _channels(3)
    assert _check(groups, _supply_on(c, None, 3), data, rails) == [0, 0, 0]
    for net in ("A1", "P2", "E0", "GND", "V5"):
        _check(groups, _supply_on(c, net, 3), data, rails)
        _check(groups, _supply_on(c, net, 3), data, {"GND": GND})

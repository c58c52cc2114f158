"""Hand-built circuits, groups and part data for the solver tests (topology is not used).

``circuit([...])`` takes ``(ref, kind, {pin: net}, value_si, model_params)`` tuples.
"""

from __future__ import annotations

from linter.model import Circuit, DeviceModel, Net, Part, Pin, SourceLocation

HERE = SourceLocation("test", 1, 1)


def circuit(parts: list[tuple]) -> Circuit:
    """A Circuit from (ref, kind, pins, value_si[, model params[, model type]]) tuples."""
    built: dict[str, Part] = {}
    nets: dict[str, list[tuple[str, str]]] = {}
    for entry in parts:
        ref, kind, pins, value = entry[:4]
        params = entry[4] if len(entry) > 4 else None
        model = DeviceModel(f"M_{ref}", kind, params) if params else None
        built[ref] = Part(ref, kind, None, tuple(Pin(p, n) for p, n in pins.items()), HERE,
                          value_si=value, model=model)
        for pin, net in pins.items():
            nets.setdefault(net, []).append((ref, pin))
    return Circuit("test", "spice", built,
                   {n: Net(n, tuple(p), HERE) for n, p in nets.items()})

"""Place parts on a grid and join their pins by label or power symbol, for schematic fixtures.

Used by tests and by fixtures/make_review_fixture.py: every net is drawn as labels on pin ends
(no wires), which the schematic format allows.
"""

from __future__ import annotations

from builder import RESISTOR_PINS, Pin, SchematicBuilder

__all__ = ["LabelPlacer"]


class LabelPlacer:
    """A :class:`SchematicBuilder` with a placement grid; ``rails`` are joined by power symbol."""

    def __init__(self, rails: frozenset[str], columns: int = 8) -> None:
        self.b = SchematicBuilder()
        self.rails = rails
        self.columns = columns
        self.slot = 0

    def at(self) -> tuple[float, float]:
        """The next free grid point (mm)."""
        self.slot += 1
        return (25.4 + 38.1 * (self.slot % self.columns), 25.4 + 38.1 * (self.slot // self.columns))

    def join(self, ref: str, pin: str, net: str, unit: int | None = None) -> None:
        point = self.b.pin_point(ref, pin, unit)
        if net in self.rails:
            self.b.power(net, at=point)
        else:
            self.b.label(net, at=point)

    def place(
        self, ref: str, lib: str, pins: tuple[Pin, ...], value: str, nets: dict[str, str],
        **fields: str,
    ) -> None:  # fmt: skip
        """Place a one-unit part; ``nets`` maps pin numbers to nets."""
        self.b.part(ref, lib, pins=pins, at=self.at(), value=value, fields=fields or None)
        for number, net in nets.items():
            self.join(ref, number, net)

    def resistor(self, ref: str, value: str, a: str, b: str, **fields: str) -> None:
        """A resistor with pin 1 on ``a`` and pin 2 on ``b``."""
        self.place(ref, "Device:R", RESISTOR_PINS, value, {"1": a, "2": b}, **fields)

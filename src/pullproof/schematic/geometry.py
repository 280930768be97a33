"""Placing library pins on the sheet: the symbol transform, on an integer µm grid."""

from __future__ import annotations

from .model import Point

__all__ = ["place_pin", "to_um"]


def to_um(value: float) -> int:
    """A millimetre coordinate as integer micrometres (compare coordinates as integers)."""
    return round(value * 1000)


def place_pin(pin: Point, at: Point, rotation: int, mirror: str) -> Point:
    """Where a library pin point lands on the sheet.

    Library Y is up and sheet Y is down, so (u, v) = (px, −py); then rotate
    counter-clockwise on screen by ``rotation``; then mirror about the anchor
    (``x``: v → −v, ``y``: u → −u). Rotating before mirroring matters: the other
    order swaps pins of a rotated (90/270) and mirrored symbol.
    """
    u, v = pin[0], -pin[1]
    if rotation == 90:
        u, v = v, -u
    elif rotation == 180:
        u, v = -u, -v
    elif rotation == 270:
        u, v = -v, u
    if mirror == "x":
        v = -v
    elif mirror == "y":
        u = -u
    return at[0] + u, at[1] + v

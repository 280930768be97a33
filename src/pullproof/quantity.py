"""A quantity as pullproof computes with it: a number in one of a few named units.

Every value pullproof reads is in a base unit (V, A, Ω, F, s, W, 1/K, a fraction, or a
temperature in °C), so the engine needs no unit algebra, only the number in the unit it
was read in. :class:`Qty` holds exactly that, cheaply, and answers the small part of the
pint quantity interface the code uses (``magnitude``, ``units``, ``to``,
``to_base_units``, ``dimensionless``, comparison, ``abs``, formatting). Whatever it does
not hold natively — a prefixed unit such as ``mV``, any arithmetic between quantities — it
hands to pint, which stays the reference for units: :meth:`Qty.pint` gives the same value
as a pint quantity, and the tests check every native answer against pint's.

Loading pint costs most of a second; a review that never leaves these units never loads it.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

__all__ = ["Qty", "UnitName", "canonical_unit", "pint_registry"]

# Spellings of the units held natively → (canonical key, pint's name, pint's "~P" symbol).
_UNITS: dict[str, tuple[str, str]] = {
    "V": ("volt", "V"),
    "A": ("ampere", "A"),
    "ohm": ("ohm", "Ω"),
    "": ("dimensionless", ""),
    "W": ("watt", "W"),
    "s": ("second", "s"),
    "F": ("farad", "F"),
    "1/K": ("1 / kelvin", "1/K"),
    "degC": ("degree_Celsius", "°C"),
    "K": ("kelvin", "K"),
}
_ALIASES: dict[str, str] = {key: key for key in _UNITS}
_ALIASES.update({name: key for key, (name, _) in _UNITS.items()})
_ALIASES.update({"kelvin": "K", "Ω": "ohm"})
_KELVIN_OFFSET = 273.15  # pint's degree_Celsius: kelvin with this offset


@functools.cache
def pint_registry() -> Any:
    """The one pint unit registry, created on first use."""
    import pint

    return pint.UnitRegistry()


def canonical_unit(unit: Any) -> str | None:
    """The canonical key of a natively held unit (``"volt"`` → ``"V"``), or None."""
    return _ALIASES.get(unit if isinstance(unit, str) else str(unit))


class UnitName(str):
    """A unit as pint names it: ``str()`` gives pint's name ("volt"), ``"~P"`` its symbol."""

    __slots__ = ("symbol",)
    symbol: str

    def __new__(cls, key: str) -> UnitName:
        name, symbol = _UNITS[key]
        self = super().__new__(cls, name)
        self.symbol = symbol
        return self

    def __format__(self, spec: str) -> str:
        if "~" in spec:
            return self.symbol
        return format(str(self), spec)


_NAMES = {key: UnitName(key) for key in _UNITS}


@dataclass(frozen=True, slots=True)
class Qty:
    """A magnitude in one natively held unit (``unit`` is its canonical key)."""

    magnitude: Any  # float (or int) as given, as pint keeps it
    unit: str

    def __post_init__(self) -> None:
        if self.unit not in _UNITS:
            raise ValueError(f"unit {self.unit!r} is not held natively; use pint")

    @property
    def units(self) -> UnitName:
        return _NAMES[self.unit]

    @property
    def dimensionless(self) -> bool:
        return self.unit == ""

    def pint(self) -> Any:
        """The same value as a pint quantity."""
        return pint_registry().Quantity(self.magnitude, self.unit)

    def m_as(self, unit: Any) -> float:
        """The magnitude in ``unit`` as a float."""
        key = canonical_unit(unit)
        if key == self.unit:
            return float(self.magnitude)
        if key is not None and {key, self.unit} == {"degC", "K"}:
            # pint's offset conversion: to the reference (v·1 + 273.15), or back from it
            if key == "K":
                return float(self.magnitude * 1 + _KELVIN_OFFSET)
            return float((self.magnitude - _KELVIN_OFFSET) / 1)
        return float(self.pint().to(unit).magnitude)

    def to(self, unit: Any) -> Any:
        """This value in ``unit``: a :class:`Qty` for a natively held unit, else pint's."""
        key = canonical_unit(unit)
        if key == self.unit:
            return self
        if key is not None and {key, self.unit} == {"degC", "K"}:
            return Qty(self.m_as(key), key)
        return self.pint().to(unit)

    def to_base_units(self) -> Qty:
        """The magnitude in SI base units (held units are coherent SI: only °C moves)."""
        if self.unit == "degC":
            return Qty(self.m_as("K"), "K")
        return self

    def _other(self, other: Any) -> float:
        if isinstance(other, Qty):
            return other.m_as(self.unit)
        return float(other.to(self.unit).magnitude)

    def __lt__(self, other: Any) -> bool:
        return bool(self.magnitude < self._other(other))

    def __le__(self, other: Any) -> bool:
        return bool(self.magnitude <= self._other(other))

    def __gt__(self, other: Any) -> bool:
        return bool(self.magnitude > self._other(other))

    def __ge__(self, other: Any) -> bool:
        return bool(self.magnitude >= self._other(other))

    def __abs__(self) -> Qty:
        return Qty(abs(self.magnitude), self.unit)

    def __neg__(self) -> Qty:
        return Qty(-self.magnitude, self.unit)

    def __format__(self, spec: str) -> str:
        return format(self.pint(), spec)

    def __str__(self) -> str:
        return str(self.pint())

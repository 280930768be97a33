"""Where a number came from, carried with the number to the report.

Every quantity pullproof computes with is a :class:`Sourced` value: a pint
quantity plus a :class:`Provenance` saying which part field, family table entry
(and its standard), rules-file key, or named default supplied it.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum
from typing import Any

from .quantity import Qty

__all__ = ["Origin", "Provenance", "Sourced", "Stands", "Status"]


class Origin(StrEnum):
    """The kind of place a number was taken from."""

    FIELD = "field"  # a field (property) on a placed part in the schematic
    VALUE = "value"  # the part's Value field, read as a resistance/capacitance/…
    FAMILY = "family"  # a built-in logic-family table entry
    PART_LIBRARY = "part-library"  # a user part library entry (TOML)
    RULES = "rules"  # a key of the project rules file
    DEFAULT = "default"  # a documented default, with its reason
    # a documented default standing in for a rating or requirement nothing states (a part's
    # rating, the wiring's capacitance): a limit resting on it is soft and shown as assumed
    ASSUMED = "assumed"
    SCHEMATIC = "schematic"  # derived from the drawing (rail name, topology)
    DERIVED = "derived"  # computed from other sourced numbers


class Status(StrEnum):
    """How far a number has been confirmed, as the references describe it."""

    CONFIRMED = "confirmed"
    FROM_MEMORY = "from memory"
    COMMON_PRACTICE = "common practice"
    USER = "user"  # the designer wrote it (field, rules file)
    DEFAULT = "default"


@dataclass(frozen=True)
class Stands:
    """What an assumed number stands for: the designer's list of values to confirm.

    ``part`` and ``pin`` name where the real value belongs ("" for a rail or a rules value),
    ``quantity`` the number ("I_high", "V_IH,min", "voltage"), ``text`` the value used as
    written ("0.7 VDD", "10 µA"), ``basis`` the assumption it comes from (an assumption
    class such as ``cmos``, ``open-drain``, ``usb-bus``, ``rail range``, or ``default`` for a
    documented default), and ``fix`` where to put the real one.
    """

    part: str
    pin: str
    quantity: str
    text: str
    basis: str
    fix: str


@dataclass(frozen=True)
class Provenance:
    """The source of one number.

    ``where`` is a short human phrase ("field 'Tolerance' on R3",
    "family 74HC, JEDEC JESD7A", "rules key resistor.tolerance (pullproof.toml:4)");
    ``reason`` explains a default or carries a caution ("check the datasheet of
    the part you fit").
    """

    origin: Origin
    where: str
    status: Status = Status.USER
    reason: str = ""
    stands: Stands | None = None  # for an assumed number: what it stands for

    def __post_init__(self) -> None:
        if not self.where:
            raise ValueError("a provenance needs a non-empty 'where'")

    def describe(self) -> str:
        """One line for reports: where, status and reason."""
        text = f"{self.where} [{self.status.value}]"
        return f"{text}: {self.reason}" if self.reason else text


@dataclass(frozen=True)
class Sourced:
    """A pint quantity (or plain number for ratios) with its provenance."""

    value: Any  # pint.Quantity; typed loosely because pint ships no stubs
    source: Provenance

    def magnitude(self, unit: str) -> float:
        """The value as a float in ``unit`` (use "" for a dimensionless ratio)."""
        value = self.value
        if type(value) is Qty:
            if value.unit == unit:  # asked in its own canonical unit: Qty.m_as's first case
                return float(value.magnitude)
            return value.m_as(unit)
        from .units import ureg

        q = value if hasattr(value, "to") else ureg.Quantity(value)
        held = getattr(q, "_units", None)
        if held is not None:
            # Most values are asked for in the unit they are held in; converting through pint
            # is slow, so remember for each (held unit, asked unit) whether they are the same.
            key = (held, unit)
            same = _SAME_UNIT.get(key)
            if same is None:
                same = _SAME_UNIT[key] = q.to(unit)._units == held
            if same:
                return float(q.magnitude)
        return float(q.to(unit).magnitude)


_SAME_UNIT: dict[tuple[Any, str], bool] = {}

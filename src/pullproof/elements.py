"""The resistors inside a part: one for a two-pin resistor, several for an array.

A resistor-kind part with more than two pins is a resistor array or network: a set of
elements, each judged (or set aside) like a two-pin resistor. Its elements come from,
in order:

1. the field ``pullproof.elements`` (``1-8,2-7,3-6,4-5`` or ``common=1``): the designer's word;
2. units that each hold exactly two pins (an array drawn one element per unit);
3. a pin named ``COMMON`` or ``COM``, or the pin geometry: pins on two facing sides of the
   body are paired across it (1–8, 2–7, 3–6, 4–5 on an 8-pin isolated array); one pin
   alone on its side, facing all the others, is a bussed network's common pin (pin 1 of a
   9-pin network), shared by every element.

Reports name an element ``RN1 (1–8)``; JSON carries the reference plus ``1-8``.
Whether a part is fitted at all (not ``dnp``, on the board, no "DNP" Value) is decided
here too, because a resistor that is not there is no pull and no divider half.
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from .circuit import Circuit, Part
from .errors import ValueParseError
from .schematic.hierarchy import Hierarchy
from .schematic.model import LibPin

__all__ = ["Element", "Layout", "layout_of", "library_pins", "not_fitted"]

FIELD = "pullproof.elements"


@dataclass(frozen=True)
class Element:
    """One resistor between two pins of a part.

    ``unit`` is the unit that draws this element alone (0 when it shares a symbol with
    others), so a writer can put an element's fields on its own symbol.
    """

    ref: str
    pins: tuple[str, str]
    array: bool = False
    unit: int = 0

    @property
    def label(self) -> str:
        """How reports name it: ``R3``, or ``RN1 (1–8)`` for an array element."""
        return f"{self.ref} ({self.pins[0]}–{self.pins[1]})" if self.array else self.ref

    @property
    def element(self) -> str:
        """The element's pins for JSON (``1-8``), or "" for a two-pin resistor."""
        return f"{self.pins[0]}-{self.pins[1]}" if self.array else ""


@dataclass(frozen=True)
class Layout:
    """The elements of one resistor part, how they were found, or why they could not be."""

    ref: str
    elements: tuple[Element, ...]
    how: str = ""  # "two pins", "units", "pin geometry", "common pin 1", "field …"
    problem: str = ""  # why the elements could not be told ("" when found)


_PAIR = re.compile(r"^\s*([\w.+\-]+?)\s*-\s*([\w.+\-]+)\s*$")
_COMMON_FIELD = re.compile(r"^\s*common\s*=\s*([\w.+\-]+)\s*$", re.IGNORECASE)
_COMMON_NAME = re.compile(r"(?i)^(COMMON|COM)$")


def _from_field(part: Part, text: str) -> tuple[Element, ...]:
    numbers = {p.number for p in part.pins}
    expected = f"pin pairs such as 1-8,2-7 or common=1, naming pins of {part.ref}"
    common = _COMMON_FIELD.match(text)
    if common is not None:
        c = common.group(1)
        if c not in numbers:
            raise ValueParseError(text, expected=expected, field=FIELD, part=part.ref)
        others = [p.number for p in part.pins if p.number != c]
        return tuple(Element(part.ref, (c, o), array=True) for o in others)
    out = []
    for item in text.split(","):
        m = _PAIR.match(item)
        if m is None or m.group(1) not in numbers or m.group(2) not in numbers:
            raise ValueParseError(text, expected=expected, field=FIELD, part=part.ref)
        out.append(Element(part.ref, (m.group(1), m.group(2)), array=True))
    if not out:
        raise ValueParseError(text, expected=expected, field=FIELD, part=part.ref)
    return tuple(out)


def _pairs_across(pins: Sequence[LibPin]) -> tuple[tuple[str, str], ...] | str | None:
    """Pins on two facing sides, paired across the body; or the common pin's number when
    one pin sits alone facing all the others; None when the geometry says neither."""
    # Pins on exactly two lines (two rows, or two columns) face each other across the body;
    # when both readings fit (a 2×2 grid), the body lies across the wider gap.
    axes = [a for a in (1, 0) if len({p.at[a] for p in pins}) == 2]
    gap = {a: max(p.at[a] for p in pins) - min(p.at[a] for p in pins) for a in axes}
    for axis in sorted(axes, key=lambda a: -gap[a]):
        lines = sorted({p.at[axis] for p in pins})
        high = [p for p in pins if p.at[axis] == lines[1]]
        low = [p for p in pins if p.at[axis] == lines[0]]
        for lone, many in ((high, low), (low, high)):
            if len(lone) == 1 and len(many) >= 2:
                return lone[0].number
        across = 1 - axis
        if len(high) == len(low) and len({p.at[across] for p in high}) == len(high):
            by_place = {p.at[across]: p for p in high}
            pairs: list[tuple[str, str]] = []
            for p in sorted(low, key=lambda q: q.at[across]):
                mate = by_place.get(p.at[across])
                if mate is None:
                    return None
                a, b = sorted((p.number, mate.number), key=_number_key)
                pairs.append((a, b))
            return tuple(sorted(pairs, key=lambda ab: _number_key(ab[0])))
    return None


def _number_key(number: str) -> tuple[int, str]:
    return (int(number), "") if number.isdigit() else (1 << 30, number)


def layout_of(part: Part, pins: Sequence[LibPin] | None) -> Layout:
    """The elements of a resistor-kind ``part`` drawn with library ``pins`` (None: unknown).

    Raises:
        ValueParseError: the field ``pullproof.elements`` cannot be read.
    """
    ref = part.ref
    text = part.field(FIELD)
    if text is not None:
        return Layout(ref, _from_field(part, text), f"field '{FIELD}'")
    if len(part.pins) == 2:
        a, b = part.pins
        return Layout(ref, (Element(ref, (a.number, b.number)),), "two pins")
    if len(part.pins) < 2:
        return Layout(ref, (), problem="it has fewer than two pins")
    named = [p.number for p in part.pins if _COMMON_NAME.match(p.name)]
    if len(named) == 1:
        c = named[0]
        others = [p.number for p in part.pins if p.number != c]
        return Layout(ref, tuple(Element(ref, (c, o), True) for o in others), f"common pin {c}")
    hint = f"add field '{FIELD}' (e.g. 1-8,2-7 or common=1)"
    if not pins:
        return Layout(ref, (), problem=f"its symbol's pins are not known; {hint}")
    units: dict[int, list[LibPin]] = {}
    for p in pins:
        units.setdefault(p.unit, []).append(p)
    if 0 not in units and len(units) > 1 and all(len(u) == 2 for u in units.values()):
        return Layout(
            ref,
            tuple(
                Element(ref, (u[0].number, u[1].number), True, unit=n)
                for n, u in sorted(units.items())
            ),
            "units",
        )
    drawn = {p.number: p for p in pins}  # one position per pin (the first unit drawing it)
    found = _pairs_across(list(drawn.values()))
    if isinstance(found, str):
        others = [p.number for p in part.pins if p.number != found]
        return Layout(
            ref, tuple(Element(ref, (found, o), True) for o in others), f"common pin {found}"
        )
    if found:
        return Layout(ref, tuple(Element(ref, ab, True) for ab in found), "pin geometry")
    return Layout(ref, (), problem=f"its elements cannot be told from the symbol; {hint}")


def library_pins(hier: Hierarchy, circuit: Circuit) -> Mapping[str, tuple[LibPin, ...]]:
    """The library pins (every unit, the placed body style) of each part with more than two
    pins, read from the symbol its first placement uses."""
    index = {key: {sym.span: sym for sym in model.symbols} for key, model in hier.models.items()}
    out: dict[str, tuple[LibPin, ...]] = {}
    for part in circuit.parts:
        if len(part.pins) <= 2 or not part.placements:
            continue
        pl = part.placements[0]
        sym = index.get(pl.file, {}).get(pl.span)
        if sym is None:
            continue
        lib = hier.models[pl.file].lib_symbols.get(sym.lib_key)
        if lib is None:
            continue
        out[part.ref] = tuple(p for p in lib.pins if p.body_style in (0, sym.body_style))
    return out


# Values designers write on a part that is not fitted (common practice).
_NOT_FITTED_VALUE = re.compile(
    r"(?i)^\s*(DNP|DNF|DNI|NF|NP|N/?F|NOT[ _]FITTED|DO[ _]NOT[ _](FIT|POPULATE|PLACE))\s*$"
)


def not_fitted(part: Part) -> str:
    """Why ``part`` is not on the assembled board ("" when it is fitted)."""
    if part.dnp:
        return "marked do-not-populate (dnp)"
    if not part.on_board:
        return "excluded from the board"
    if _NOT_FITTED_VALUE.match(part.value):
        return f"its Value {part.value!r} says it is not fitted"
    return ""

"""What a placed part is (resistor, switch, logic IC …), from what the part itself says.

The evidence, in order: the symbol's own name (the part of the library id after ``:``),
then a part number in the Value or symbol name (74HC14, RP2040, PC817, LM358), then the
reference prefix, then the pins (an inverting and a non-inverting input make an
amplifier or comparator). The library nickname before ``:`` is never used: it names a
file of symbols, not the part, and a project library named after a microcontroller
holds resistors too.
"""

from __future__ import annotations

import fnmatch
import re
from collections.abc import Callable
from enum import StrEnum
from functools import lru_cache

from ..circuit import Part

__all__ = ["PartKind", "classify", "symbol_name"]


class PartKind(StrEnum):
    RESISTOR = "resistor"
    POTENTIOMETER = "potentiometer"
    SENSOR = "sensor"  # thermistor, photoresistor: a resistance that measures something
    CAPACITOR = "capacitor"
    SWITCH = "switch"
    RELAY = "relay"
    OPTOCOUPLER = "optocoupler"
    LED = "LED"
    DIODE = "diode"
    TRANSISTOR = "transistor"
    LOGIC = "logic IC"
    MCU = "microcontroller"
    CONNECTOR = "connector"
    OPAMP = "op-amp"  # also comparators: both have an inverting and a non-inverting input
    OTHER = "other"


def symbol_name(lib_id: str) -> str:
    """The symbol's own name: ``Device:R_Small`` → ``R_Small`` (the nickname is dropped)."""
    return lib_id.rsplit(":", 1)[-1]


# Generic symbol names as symbol libraries draw them (globs on the upper-cased name, first
# match wins, so the specific names come before R_* and C_*). Common practice.
_SYMBOL_KIND: tuple[tuple[str, PartKind], ...] = (
    ("R_POT*", PartKind.POTENTIOMETER),
    ("R_POTENTIOMETER*", PartKind.POTENTIOMETER),
    ("R_TRIM*", PartKind.POTENTIOMETER),
    ("POT", PartKind.POTENTIOMETER),
    ("POT_*", PartKind.POTENTIOMETER),
    ("POTENTIOMETER*", PartKind.POTENTIOMETER),
    ("THERMISTOR*", PartKind.SENSOR),
    ("R_NTC*", PartKind.SENSOR),
    ("R_PTC*", PartKind.SENSOR),
    ("R_PHOTO*", PartKind.SENSOR),
    ("R", PartKind.RESISTOR),
    ("R_*", PartKind.RESISTOR),  # R_Small, R_US, R_Array, R_Pack04, R_Network08 …
    ("CRYSTAL*", PartKind.OTHER),  # not a capacitor, though the name starts with C
    ("RESONATOR*", PartKind.OTHER),
    ("C", PartKind.CAPACITOR),
    ("C_*", PartKind.CAPACITOR),
    ("CP", PartKind.CAPACITOR),
    ("CP_*", PartKind.CAPACITOR),
    ("LED", PartKind.LED),
    ("LED_*", PartKind.LED),
    ("D", PartKind.DIODE),
    ("D_*", PartKind.DIODE),
    ("Q", PartKind.TRANSISTOR),
    ("Q_*", PartKind.TRANSISTOR),
    ("SW", PartKind.SWITCH),
    ("SW_*", PartKind.SWITCH),
    ("RELAY*", PartKind.RELAY),
    ("CONN_*", PartKind.CONNECTOR),
    ("SCREW_TERMINAL*", PartKind.CONNECTOR),
)
# Part numbers that say what the part is (common practice).
_MCU_NAME = re.compile(
    r"(?i)ATMEGA|ATTINY|ATXMEGA|STM32|GD32|CH32V|RP2[03][45]0|ESP32|ESP8266|PIC1[0268]F|PIC24|"
    r"PIC32|DSPIC|NRF5|SAMD\d|ATSAM|EFM32|MSP430|\bPICO\b|ARDUINO"
)
_OPTO_NAME = re.compile(
    r"(?i)^(PC8\d\d|TLP\d|6N13\d|H11|LTV|4N2\d|4N3\d|SFH6|EL8|CNY17|ACPL|HCPL|VO6\d|TCMT|PS28|FOD8)"
)
_OPAMP_NAME = re.compile(
    r"(?i)^(LM358|LM324|LM741|LM290[24]|LM393|LM339|LM311|LMV3\d\d|TL0[678]\d|TLV\d{3}|"
    r"MCP60\d\d|OPA\d|NE55\d\d|TSV\d)"
)
# Reference prefixes (IEEE 315 / IEC 81346 letter codes as commonly used; the longest first).
_REF_KIND: tuple[tuple[str, PartKind], ...] = (
    ("RN", PartKind.RESISTOR),
    ("RV", PartKind.POTENTIOMETER),
    ("VR", PartKind.POTENTIOMETER),
    ("TH", PartKind.SENSOR),
    ("NTC", PartKind.SENSOR),
    ("SW", PartKind.SWITCH),
    ("LED", PartKind.LED),
    ("OK", PartKind.OPTOCOUPLER),
    ("ISO", PartKind.OPTOCOUPLER),
    ("R", PartKind.RESISTOR),
    ("C", PartKind.CAPACITOR),
    ("S", PartKind.SWITCH),
    ("K", PartKind.RELAY),
    ("D", PartKind.DIODE),
    ("Q", PartKind.TRANSISTOR),
    ("T", PartKind.TRANSISTOR),
    ("J", PartKind.CONNECTOR),
    ("P", PartKind.CONNECTOR),
)
# An inverting and a non-inverting input ("+"/"-", "IN+"/"IN-", "+INA"/"-INA", "INP"/"INN").
_NON_INVERTING = re.compile(r"^(\+|\+IN\w*|IN\d*[A-D]?\+|INP\d*|IN\d*P|NON_?INV\w*)$")
_INVERTING = re.compile(r"^(-|-IN\w*|IN\d*[A-D]?-|INN\d*|IN\d*N|INV\w*)$")


def _has_differential_input(part: Part) -> bool:
    names = {p.name.upper().replace("\u2212", "-").replace(" ", "") for p in part.pins}
    return any(_NON_INVERTING.match(n) for n in names) and any(_INVERTING.match(n) for n in names)


@lru_cache(maxsize=1024)  # a board places the same few symbols many times
def _symbol_kind(upper: str) -> PartKind | None:
    """The kind the first generic symbol name matching ``upper`` gives, if any."""
    for pattern, kind in _SYMBOL_KIND:
        if fnmatch.fnmatchcase(upper, pattern):
            return kind
    return None


def classify(part: Part, family_from_name: Callable[[str], object | None]) -> PartKind:
    """The kind of ``part`` from its symbol name, part number, reference prefix and pins.

    ``family_from_name`` recognises logic part numbers (``74HC14``); it is passed in so
    this module knows nothing of family data.
    """
    symbol = symbol_name(part.lib_id)
    by_symbol = _symbol_kind(symbol.upper())
    if by_symbol is not None:
        return by_symbol
    # A logic IC needs at least a supply, a ground, an input and an output: a part drawn with
    # one to three pins whose number happens to read like 4020 is a header, not a counter.
    few_pins = 0 < len(part.pins) < 4
    if not few_pins and (family_from_name(part.value) or family_from_name(symbol)):
        return PartKind.LOGIC
    if _MCU_NAME.search(part.value) or _MCU_NAME.search(symbol):
        return PartKind.MCU
    if _OPTO_NAME.search(part.value) or _OPTO_NAME.search(symbol):
        return PartKind.OPTOCOUPLER
    if _OPAMP_NAME.search(part.value) or _OPAMP_NAME.search(symbol):
        return PartKind.OPAMP
    prefix = re.match(r"[A-Za-z]*", part.ref)
    letters = prefix.group(0).upper() if prefix else ""
    for start, kind in _REF_KIND:
        if letters == start:
            return kind
    if _has_differential_input(part):
        return PartKind.OPAMP
    return PartKind.OTHER

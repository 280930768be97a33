"""What is a rail: when a net is a supply (or ground), and how pullproof knows.

A net is a rail when a power symbol names it, when the rules file lists it, when its
*whole* name is a supply name, or when its function makes it one. Ground names are kept
in :mod:`pullproof.rules`; this module reads supply names and supply functions.

* **Supply names** (:func:`read_supply_name`): an optional sign, a head that is a voltage
  (``3V3``, ``+5V``, ``3.3V``, ``V3P3``) or a supply word (``VCC``, ``VDD``, ``VBUS`` …),
  then only qualifiers (another voltage or supply word, or a word such as ``USB``,
  ``IO``, ``A``, ``CORE``, ``SW``): ``+5V``, ``3V3``, ``VCC_1V8``, ``+5V_USB``,
  ``VDD_IO``. A voltage inside an otherwise signal-like name never makes a rail:
  ``PULLUP_EN_3V3``, ``VDD_GOOD``, ``LDO_3V3_PG``, ``VBUS_EN``, ``AMUX_S0_3V3`` are
  signals (an enable, a power-good flag, a select line).
* **Supply function** (:func:`supply_function`): a net that feeds a power-input pin or
  carries a power output (a regulator's OUT) is a supply even when its name states no
  voltage (``VREG_VIN``, ``VDD_CORE_SW``). Its voltage is unknown unless its name or the
  rules say it. A power-output pin is typed ``power_out`` and a power input ``power_in``
  by the symbol library; a pin typed otherwise is not read by name here.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from .circuit import Circuit, Net

__all__ = ["RailTie", "SupplyName", "read_supply_name", "supply_function", "supply_nets"]


@dataclass(frozen=True)
class RailTie:
    """The rail a net stands for, as topology sees it.

    ``certain`` is false for a supply known only by its function (it feeds power pins),
    so findings that need two true rails (an up/down divider) are not built on it.
    """

    name: str
    ground: bool
    certain: bool = True


@dataclass(frozen=True)
class SupplyName:
    """A name that reads as a supply: its voltage when the name states one."""

    volts: float | None


_SIGN = re.compile(r"^[+-]")
_SPLIT = re.compile(r"[_\-\s]+")
# A voltage as a name states it (common practice): 3V3, 1V8, 3.3V, 3P3V, +5V, 12VA, V3P3.
_VOLTAGE = re.compile(
    r"""
    ^(?:
        (?P<a> \d+ ) [V.P] (?P<b> \d+ ) V?          # 3V3, 3.3V, 3P3, 3.3VP (suffix below)
      | (?P<c> \d+ ) V                              # 5V, 12V, 24V
      | V (?P<d> \d+ ) P (?P<e> \d+ )               # V3P3
    )
    (?: A | D | P | S | SB | IO )?$                 # analog, digital, protected, standby …
    """,
    re.VERBOSE,
)
# Words that name a supply (common practice), optionally numbered (VDD2, VCCIO1).
_SUPPLY_WORD = re.compile(
    r"""^(
        V(?:CC|DD|EE)(?:A|B|D|IO|Q|CORE|INT|AUX)? | VIO | VL | VLOGIC | VREF | VREG | VCORE
      | AVDD | DVDD | IOVDD | AVCC | DVCC | VANA | VDIG
      | VBAT | VBATT | BAT | BATT | VBUS | VUSB | VSYS | VIN | VOUT | VMOT | VM | VPP | VDC
      | VSUPPLY | SUPPLY | PWR | POWER | VPWR
    )\d*$""",
    re.VERBOSE,
)
# Words that may follow a supply head without making it a signal: a domain or a stage.
_QUALIFIERS = frozenset(
    {
        "A", "D", "P", "IO", "USB", "ANA", "ANALOG", "DIG", "DIGITAL", "MCU", "CPU", "CORE",
        "SW", "SWITCHED", "AUX", "MAIN", "EXT", "SYS", "RTC", "LOGIC", "PERIPH", "RF", "RADIO",
        "REG", "LDO", "BUCK", "BOOST", "OUT", "IN", "FILT", "F", "ISO", "HV", "LV", "BUS",
        "SENSOR", "SENSORS", "LCD", "MOTOR", "MOT", "STBY", "SB", "RAW", "PROT", "BL",
    }
)  # fmt: skip
# USB bus power is 5 V nominal (USB 2.0 specification §7.2.1, from memory).
_USB_POWER = frozenset({"VBUS", "VUSB", "USB"})


def _volts(token: str) -> float | None:
    m = _VOLTAGE.match(token)
    if m is None:
        return None
    if m.group("a") is not None:
        return float(f"{m.group('a')}.{m.group('b')}")
    if m.group("c") is not None:
        return float(m.group("c"))
    return float(f"{m.group('d')}.{m.group('e')}")


def read_supply_name(name: str) -> SupplyName | None:
    """Read a net name (its last path part) as a supply name, or None for a signal name.

    ``+5V`` → 5.0, ``VCC_1V8`` → 1.8, ``+5V_USB`` → 5.0, ``VBUS`` → 5.0, ``VDD_IO`` → unknown
    voltage; ``PULLUP_EN_3V3``, ``VDD_GOOD``, ``LDO_3V3_PG`` → None.
    """
    bare = name.rsplit("/", 1)[-1].strip().upper()
    sign = -1.0 if bare.startswith("-") else 1.0
    tokens = [t for t in _SPLIT.split(_SIGN.sub("", bare)) if t]
    if not tokens:
        return None
    head, rest = tokens[0], tokens[1:]
    if _volts(head) is None and not _SUPPLY_WORD.match(head):
        return None
    volts: float | None = None
    usb = False
    for token in (head, *rest):
        v = _volts(token)
        if v is not None:
            volts = v if volts is None else volts
        elif _SUPPLY_WORD.match(token):
            usb = usb or token.rstrip("0123456789") in _USB_POWER
        elif token not in _QUALIFIERS:
            return None  # a signal word after the supply head: an enable, a flag, a sense line
    if volts is None and usb:
        volts = 5.0
    return SupplyName(None if volts is None else sign * volts)


def supply_function(net: Net) -> str:
    """Why ``net`` is a supply by what it connects to ("" when it is not): it carries a
    power output, or it feeds a power input."""
    for m in net.members:
        if m.type == "power_out":
            return f"it carries {m.ref} pin {m.name or m.pin}, a power output"
    for m in net.members:
        if m.type == "power_in":
            return f"it feeds {m.ref} pin {m.name or m.pin}, a power input"
    return ""


def supply_nets(circuit: Circuit) -> dict[str, str]:
    """Every net that is a supply by function, with the reason."""
    out = {}
    for net in circuit.nets:
        why = supply_function(net)
        if why:
            out[net.name] = why
    return out

"""Two revisions of an invented design for the review-workflow tests: a workshop dust-extractor
gate panel, a 74HC14 on +5 V reading the blast-gate switches.

Revision B → revision C:

* ``/GATE_A`` (R1 10k, SW1): unchanged, pass;
* ``/GATE_B`` (R2, SW2): the value changes 4k7 → 10k, still pass;
* ``/BLAST`` (R4): the value changes 10k → 2M2, and the verdict turns pass → fail (a 74HC
  input's leakage across 2.2 MΩ no longer holds the high level);
* ``/OLD_SENSE`` (R5): the pull is removed in C; ``/NEW_SENSE`` (R7): added in C;
* ``/DOOR`` (R8 820 Ω, SW8): marginal (below the preferred 1 kΩ) in both revisions;
* ``/HATCH`` (SW9 into the 74HC14, no pull): a floating input in both.
"""

from __future__ import annotations

from builder import HEX_INVERTER_PINS, RESISTOR_PINS, SWITCH_PINS
from placer import LabelPlacer

__all__ = ["draw_panel"]

RAILS = frozenset({"+5V", "GND"})
GATE_INPUTS = {"GATE_A": "1", "GATE_B": "3", "BLAST": "5", "OLD_SENSE": "9", "NEW_SENSE": "11",
               "DOOR": "13"}  # fmt: skip
GATE_UNITS = {"1": 1, "3": 2, "5": 3, "9": 4, "11": 5, "13": 6}


def draw_panel(rev: str, *, r8_value: str = "820", r8_fields: dict[str, str] | None = None) -> str:
    """The panel's schematic text in revision ``rev`` ("B" or "C")."""
    p = LabelPlacer(RAILS, columns=6)

    def r(ref: str, value: str, net: str, **fields: str) -> None:
        p.place(ref, "Device:R", RESISTOR_PINS, value, {"1": "+5V", "2": net},
                Footprint="Resistor_SMD:R_0603_1608Metric", **fields)  # fmt: skip

    def sw(ref: str, net: str) -> None:
        p.place(ref, "Switch:SW_Push", SWITCH_PINS, "GATE", {"1": net, "2": "GND"})

    r("R1", "10k", "GATE_A")
    sw("SW1", "GATE_A")
    r("R2", "4k7" if rev == "B" else "10k", "GATE_B")
    sw("SW2", "GATE_B")
    r("R4", "10k" if rev == "B" else "2M2", "BLAST")
    if rev == "B":
        r("R5", "10k", "OLD_SENSE")
    else:
        r("R7", "10k", "NEW_SENSE")
    r("R8", r8_value, "DOOR", **(r8_fields or {}))
    sw("SW8", "DOOR")
    sw("SW9", "HATCH")
    nets = dict(GATE_INPUTS)
    nets.pop("NEW_SENSE" if rev == "B" else "OLD_SENSE")
    for net, pin in nets.items():
        unit = GATE_UNITS[pin]
        p.b.part("U9", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=p.at(), unit=unit, value="74HC14")
        p.join("U9", pin, net, unit)
    # the unit that reads the hatch switch directly, with no pull on its input
    p.b.part("U10", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=p.at(), unit=1, value="74HC14")
    p.join("U10", "1", "HATCH", 1)
    for ref in ("U9", "U10"):
        p.b.part(ref, "74xx:74HC14", pins=HEX_INVERTER_PINS, at=p.at(), unit=7, value="74HC14")
        p.join(ref, "14", "+5V", 7)
        p.join(ref, "7", "GND", 7)
    return p.b.text()

"""Write the demo schematic: a greenhouse irrigation controller (root plus three sub-sheets).

The committed files under ``fixtures/demo/`` are this script's output; run it again after
changing the scenario::

    python tools/make_demo.py            # writes fixtures/demo/*.kicad_sch

The board, in a few words: a 5 V input feeds a 3.3 V regulator and a 3.3 V microcontroller
(root sheet). The ``inputs`` sheet holds the front-panel buttons, a reed float switch in the
water tank, a tank-lid interlock read by a 74LS00 gate and a door contact on a 74HC14 Schmitt
input with an RC debounce capacitor. The ``mains`` sheet senses the 230 V AC pump supply with
an optocoupler. The ``sensors`` sheet has the I2C bus to a climate sensor, the sensor's
open-drain alarm output and a flow meter's pulse output.

Every pull is chosen so the review shows each verdict a designer meets in practice; the
expected verdict per net is pinned in ``tests/test_demo.py``. UUIDs are derived from a fixed
seed, so regenerating gives the same text.
"""

from __future__ import annotations

import random
import sys
import types
import uuid
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO / "tests"))

import builder  # noqa: E402  (tests/builder.py, found through the path set above)
from builder import HEX_INVERTER_PINS, SWITCH_PINS, Pin, SchematicBuilder  # noqa: E402

OUT = REPO / "fixtures" / "demo"
ROOT_FILE = "irrigation.kicad_sch"
Point = tuple[float, float]

# A generic 3.3 V microcontroller: port A on the left, port B on the right.
MCU_PINS = (
    Pin("1", (0, 13.97), "power_in", "VDD"),
    Pin("2", (0, -13.97), "power_in", "GND"),
    *(Pin(str(3 + i), (-12.7, 8.89 - 2.54 * i), "bidirectional", f"PA{i}") for i in range(8)),
    *(Pin(str(11 + i), (12.7, 8.89 - 2.54 * i), "bidirectional", f"PB{i}") for i in range(8)),
)
# A quad two-input NAND: gates are units 1-4, supply pins in unit 5.
QUAD_NAND_PINS = (
    *tuple(
        pin
        for gate, (a, b, y) in enumerate(((1, 2, 3), (4, 5, 6), (9, 10, 8), (12, 13, 11)), start=1)
        for pin in (
            Pin(str(a), (-7.62, 2.54), "input", "", gate),
            Pin(str(b), (-7.62, -2.54), "input", "", gate),
            Pin(str(y), (7.62, 0), "output", "", gate),
        )
    ),
    Pin("14", (0, 12.7), "power_in", "VCC", 5),
    Pin("7", (0, -12.7), "power_in", "GND", 5),
)
LDO_PINS = (
    Pin("1", (-7.62, 0), "power_in", "VI"),
    Pin("2", (0, -7.62), "power_in", "GND"),
    Pin("3", (7.62, 0), "power_out", "VO"),
)
OPTO_PINS = (
    Pin("1", (-7.62, 2.54), "passive", "A"),
    Pin("2", (-7.62, -2.54), "passive", "K"),
    Pin("3", (7.62, -2.54), "passive", "E"),
    Pin("4", (7.62, 2.54), "open_collector", "C"),
)
SENSOR_PINS = (
    Pin("1", (0, 10.16), "power_in", "VDD"),
    Pin("2", (0, -10.16), "power_in", "GND"),
    Pin("3", (-10.16, 2.54), "bidirectional", "SDA"),
    Pin("4", (-10.16, 0), "input", "SCL"),
    Pin("5", (-10.16, -2.54), "open_collector", "ALERT"),
)
TWO_PINS = (Pin("1", (0, 3.81)), Pin("2", (0, -3.81)))  # capacitor, diode, LED (vertical)
FET_PINS = (
    Pin("1", (-5.08, 0), "input", "G"),
    Pin("2", (2.54, 5.08), "passive", "D"),
    Pin("3", (2.54, -5.08), "passive", "S"),
)
CONN2_PINS = (Pin("1", (-5.08, 0)), Pin("2", (-5.08, -2.54)))
CONN3_PINS = (*CONN2_PINS, Pin("3", (-5.08, -5.08)))

CHIP = {"Footprint": "Resistor_SMD:R_0603_1608Metric"}
CHIP_1 = {**CHIP, "Tolerance": "1%"}
HV_CHIP = {"Footprint": "Resistor_SMD:R_1206_3216Metric", "Tolerance": "1%"}


def _seeded_uuids(seed: int) -> types.SimpleNamespace:
    rng = random.Random(seed)
    return types.SimpleNamespace(uuid4=lambda: uuid.UUID(int=rng.getrandbits(128), version=4))


class Sheet:
    """One schematic file: a builder plus the instance path its parts are placed under."""

    def __init__(self, name: str, root_uuid: str, block_uuid: str = "") -> None:
        self.name = name
        # a sub-sheet file has its own uuid; its parts are placed under /root/block
        self.b = SchematicBuilder() if block_uuid else SchematicBuilder(uuid=root_uuid)
        self.path = f"/{root_uuid}" + (f"/{block_uuid}" if block_uuid else "")

    def part(self, ref: str, lib_id: str, pins: tuple[Pin, ...], at: Point, **kw: object) -> None:
        self.b.part(ref, lib_id, pins=pins, at=at, instances={self.path: ref}, **kw)  # type: ignore[arg-type]

    def r(self, ref: str, value: str, at: Point, fields: dict[str, str] | None = None) -> None:
        self.b.resistor(ref, value, at=at, fields=fields or CHIP, instances={self.path: ref})

    def pin(self, ref: str, number: str, unit: int | None = None) -> Point:
        return self.b.pin_point(ref, number, unit)

    def net(
        self, name: str, at: Point, *, stub: tuple[float, float] = (0, 0), kind: str = "label"
    ) -> None:
        """Name the net at ``at``: a label there, or at the end of a short wire stub."""
        end = (round(at[0] + stub[0], 4), round(at[1] + stub[1], 4))
        if end != at:
            self.b.wire(at, end)
        self.b.label(name, at=end, kind=kind)

    def tie(self, ref: str, rails: dict[str, str], unit: int | None = None) -> None:
        """Put a power symbol on each listed pin of ``ref`` (pin number → rail name)."""
        for number, name in rails.items():
            self.b.power(name, at=self.pin(ref, number, unit))

    def wire(self, *points: Point) -> None:
        self.b.wire(*points)

    def junction(self, at: Point) -> None:
        self.b.junction(at)


def root_sheet(root_uuid: str, blocks: dict[str, str]) -> Sheet:
    s = Sheet("root", root_uuid)
    # Power entry: a 5 V screw terminal and a 3.3 V low-dropout regulator.
    s.part("J1", "Connector:Screw_Terminal_01x02", CONN2_PINS, (25.4, 50.8), value="5V IN")
    s.tie("J1", {"1": "+5V", "2": "GND"})
    s.part("U1", "Regulator_Linear:LDO_3V3", LDO_PINS, (50.8, 50.8), value="LDO 3.3V 500mA")
    s.tie("U1", {"1": "+5V", "2": "GND", "3": "+3V3"})
    s.part("C1", "Device:C", TWO_PINS, (71.12, 55.88), value="10u")
    s.tie("C1", {"1": "+3V3", "2": "GND"})
    # Power LED: its series resistor is tied to a rail but is no logic pull.
    s.r("R1", "1k", (88.9, 45.72))
    s.tie("R1", {"1": "+3V3"})
    s.part("D1", "Device:LED", TWO_PINS, (88.9, 58.42), value="green")
    s.wire(s.pin("R1", "2"), s.pin("D1", "1"))
    s.tie("D1", {"2": "GND"})

    # The microcontroller; each port pin is named by a label on a short stub.
    s.part("U2", "MCU_Generic:GENERIC_MCU33", MCU_PINS, (139.7, 101.6), value="GENERIC_MCU33")
    s.tie("U2", {"1": "+3V3", "2": "GND"})
    port_a = ("BTN_MENU", "BTN_OK", "FLOAT_TANK", "DOOR", "LID_OK", "RAIN", "PUMP_AC_OK", "PUMP_EN")
    port_b = ("SCL", "SDA", "ALERT", "FLOW_PULSE")
    for i, name in enumerate(port_a):
        s.net(name, s.pin("U2", str(3 + i)), stub=(-5.08, 0))
    for i, name in enumerate(port_b):
        s.net(name, s.pin("U2", str(11 + i)), stub=(5.08, 0))

    # Pump driver: the gate pull-down is transistor bias, set aside by the review.
    s.part("Q1", "Transistor_FET:NMOS_GDS", FET_PINS, (182.88, 63.5), value="small N-MOSFET")
    s.net("PUMP_EN", s.pin("Q1", "1"), stub=(-5.08, 0))
    s.r("R2", "100k", (172.72, 73.66))
    s.wire(s.pin("R2", "1"), (172.72, 63.5))
    s.tie("R2", {"2": "GND"})
    s.net("PUMP_COIL", s.pin("Q1", "2"), stub=(0, -2.54))
    s.tie("Q1", {"3": "GND"})

    # The sheet blocks; each sheet pin meets the MCU's label of the same name.
    pins = {
        "inputs": ("BTN_MENU", "BTN_OK", "FLOAT_TANK", "DOOR", "LID_OK", "RAIN"),
        "mains": ("PUMP_AC_OK",),
        "sensors": ("SCL", "SDA", "ALERT", "FLOW_PULSE"),
    }
    for k, (name, names) in enumerate(pins.items()):
        x, y = 50.8, 91.44 + 40.64 * k
        at = {n: (x + 20.0, y + 2.54 * (i + 1)) for i, n in enumerate(names)}
        s.b.sheet(name, f"{name}.kicad_sch", at=(x, y), pins=at, uuid=blocks[name])
        for n, p in at.items():
            s.net(n, p, stub=(5.08, 0))
    return s


def inputs_sheet(root_uuid: str, block: str) -> Sheet:
    s = Sheet("inputs", root_uuid, block)
    # Front-panel buttons to ground, pulled up to 3V3 into the MCU.
    for k, (sw, r, value, net) in enumerate(
        (("SW1", "R10", "10k", "BTN_MENU"), ("SW2", "R11", "22k", "BTN_OK"))
    ):
        x = 38.1 + 30.48 * k
        s.r(r, value, (x, 40.64))
        s.tie(r, {"1": "+3V3"})
        s.part(sw, "Switch:SW_Push", SWITCH_PINS, (x + 5.08, 55.88), value="TACT_GOLD 6x6")
        s.wire(s.pin(r, "2"), s.pin(sw, "1"))
        s.tie(sw, {"2": "GND"})
        s.net(net, s.pin(r, "2"), stub=(0, 2.54), kind="hierarchical_label")

    # Reed float switch in the tank: its contacts need a wetting current.
    s.r("R12", "100k", (114.3, 40.64))
    s.tie("R12", {"1": "+3V3"})
    s.part("SW3", "Switch:SW_Reed", SWITCH_PINS, (119.38, 55.88), value="REED_FLOAT")
    s.wire(s.pin("R12", "2"), s.pin("SW3", "1"))
    s.tie("SW3", {"2": "GND"})
    s.net("FLOAT_TANK", s.pin("R12", "2"), stub=(0, 2.54), kind="hierarchical_label")

    # Tank-lid interlock: the closed lid switch ties a 74LS00 input to +5V; a pull-down holds it
    # low when the lid is open. TTL-style inputs source current, so the pull-down must be small.
    s.part("U10", "74xx:74LS00", QUAD_NAND_PINS, (50.8, 101.6), value="74LS00", unit=1)
    s.part("U10", "74xx:74LS00", QUAD_NAND_PINS, (50.8, 139.7), value="74LS00", unit=5)
    s.tie("U10", {"14": "+5V", "7": "GND"}, 5)
    s.part("SW4", "Switch:SW_Push", SWITCH_PINS, (25.4, 93.98), value="LID_INTERLOCK")
    s.tie("SW4", {"1": "+5V"})
    s.r("R13", "680", (33.02, 109.22), CHIP_1)
    s.wire(s.pin("SW4", "2"), (33.02, 93.98), s.pin("R13", "1"))
    s.wire((33.02, 99.06), s.pin("U10", "1", 1))
    s.junction((33.02, 99.06))
    s.wire(s.pin("U10", "1", 1), s.pin("U10", "2", 1))
    s.tie("R13", {"2": "GND"})
    s.net("LID_SW", (33.02, 93.98))
    s.net("LID_OK", s.pin("U10", "3", 1), stub=(5.08, 0), kind="hierarchical_label")

    # Door contact on a 74HC14 Schmitt input, with an RC debounce capacitor on the node.
    s.part("U11", "74xx:74HC14", HEX_INVERTER_PINS, (114.3, 101.6), value="74HC14", unit=1)
    s.part("U11", "74xx:74HC14", HEX_INVERTER_PINS, (114.3, 132.08), value="74HC14", unit=2)
    s.part("U11", "74xx:74HC14", HEX_INVERTER_PINS, (152.4, 132.08), value="74HC14", unit=7)
    s.tie("U11", {"14": "+3V3", "7": "GND"}, 7)
    s.r("R14", "4k7", (96.52, 88.9))
    s.tie("R14", {"1": "+3V3"})
    s.part("C10", "Device:C", TWO_PINS, (96.52, 114.3), value="4u7")
    s.tie("C10", {"2": "GND"})
    s.part("SW5", "Switch:SW_Reed", SWITCH_PINS, (83.82, 101.6), value="DOOR_CONTACT")
    s.tie("SW5", {"1": "GND"})
    s.wire(s.pin("R14", "2"), (96.52, 101.6), s.pin("C10", "1"))
    s.wire(s.pin("SW5", "2"), (96.52, 101.6), s.pin("U11", "1", 1))
    s.junction((96.52, 101.6))
    s.net("DOOR_SW", (96.52, 101.6))
    s.net("DOOR", s.pin("U11", "2", 1), stub=(5.08, 0), kind="hierarchical_label")

    # Rain contact on the second gate: drawn without any pull, so the input floats when open.
    s.part("SW6", "Switch:SW_Reed", SWITCH_PINS, (96.52, 132.08), value="RAIN_CONTACT")
    s.tie("SW6", {"1": "GND"})
    s.wire(s.pin("SW6", "2"), s.pin("U11", "3", 2))
    s.net("RAIN_SW", s.pin("U11", "3", 2))
    s.net("RAIN", s.pin("U11", "4", 2), stub=(5.08, 0), kind="hierarchical_label")
    return s


def mains_sheet(root_uuid: str, block: str) -> Sheet:
    s = Sheet("mains", root_uuid, block)
    # Pump supply presence: 230 V AC through two series resistors into an optocoupler's LED,
    # a reverse diode across the LED; the phototransistor pulls PUMP_AC_OK low while mains is on.
    s.part("J20", "Connector:Screw_Terminal_01x02", CONN2_PINS, (25.4, 63.5), value="PUMP 230VAC")
    s.net("AC_L", s.pin("J20", "1"), stub=(-5.08, 0))
    s.net("AC_N", s.pin("J20", "2"), stub=(-5.08, 0))
    s.r("R20", "47k", (50.8, 50.8), HV_CHIP)
    s.r("R21", "47k", (50.8, 68.58), HV_CHIP)
    s.net("AC_L", s.pin("R20", "1"), stub=(0, -2.54))
    s.wire(s.pin("R20", "2"), s.pin("R21", "1"))
    s.part(
        "U20",
        "Isolator:Opto_NPN",
        OPTO_PINS,
        (76.2, 81.28),
        value="PC817",
        fields={"pullproof.i_f": "2mA", "pullproof.ctr_min": "50%"},
    )
    s.wire(s.pin("R21", "2"), (50.8, 78.74), s.pin("U20", "1"))
    s.net("OPTO_A", (50.8, 78.74))
    s.wire(s.pin("U20", "2"), (55.88, 83.82))
    s.net("AC_N", (55.88, 83.82))
    s.part("D20", "Device:D", TWO_PINS, (60.96, 81.28), value="1N4148")
    s.wire(s.pin("D20", "1"), (60.96, 78.74))
    s.wire(s.pin("D20", "2"), (60.96, 83.82))
    s.junction((60.96, 78.74))
    s.junction((60.96, 83.82))
    s.tie("U20", {"3": "GND"})
    s.r("R22", "22k", (96.52, 71.12))
    s.tie("R22", {"1": "+3V3"})
    s.wire(s.pin("R22", "2"), (96.52, 78.74), s.pin("U20", "4"))
    s.net("PUMP_AC_OK", (96.52, 78.74), stub=(5.08, 0), kind="hierarchical_label")
    return s


def sensors_sheet(root_uuid: str, block: str) -> Sheet:
    s = Sheet("sensors", root_uuid, block)
    # Climate sensor on I2C (Standard-mode), with its open-drain alarm output.
    s.part("U30", "Sensor:CLIMATE_SENSOR", SENSOR_PINS, (101.6, 76.2), value="CLIMATE_SENSOR")
    s.tie("U30", {"1": "+3V3", "2": "GND"})
    for k, (r, value, pin, net) in enumerate(
        (("R30", "4k7", "3", "SDA"), ("R31", "4k7", "4", "SCL"), ("R32", "10k", "5", "ALERT"))
    ):
        x = 63.5 + 7.62 * k
        s.r(r, value, (x, 50.8))
        s.tie(r, {"1": "+3V3"})
        p = s.pin("U30", pin)
        s.wire(s.pin(r, "2"), (x, p[1]), p)
        s.net(net, (x, p[1]), stub=(-5.08 - 7.62 * k, 0), kind="hierarchical_label")
        s.junction((x, p[1]))
    s.part("C30", "Device:C", TWO_PINS, (116.84, 63.5), value="100n")
    s.tie("C30", {"1": "+3V3", "2": "GND"})

    # Flow meter in the irrigation line: an open-collector pulse output on a 3-pin connector,
    # pulled up to +5V (the meter's supply) straight into a 3.3 V-only MCU pin.
    s.part("J30", "Connector:Conn_01x03", CONN3_PINS, (152.4, 76.2), value="FLOW METER")
    s.tie("J30", {"1": "+5V", "3": "GND"})
    s.r("R33", "10k", (137.16, 63.5))
    s.tie("R33", {"1": "+5V"})
    s.wire(s.pin("R33", "2"), (137.16, 78.74), s.pin("J30", "2"))
    s.net("FLOW_PULSE", (137.16, 78.74), stub=(-5.08, 0), kind="hierarchical_label")
    return s


def main() -> None:
    builder._uuid = _seeded_uuids(20250301)  # type: ignore[attr-defined]
    root_uuid = str(builder._uuid.uuid4())
    blocks = {name: str(builder._uuid.uuid4()) for name in ("inputs", "mains", "sensors")}
    sheets = {
        ROOT_FILE: root_sheet(root_uuid, blocks),
        "inputs.kicad_sch": inputs_sheet(root_uuid, blocks["inputs"]),
        "mains.kicad_sch": mains_sheet(root_uuid, blocks["mains"]),
        "sensors.kicad_sch": sensors_sheet(root_uuid, blocks["sensors"]),
    }
    OUT.mkdir(parents=True, exist_ok=True)
    for file, sheet in sheets.items():
        print(f"wrote {sheet.b.write(OUT / file).relative_to(REPO)}")


if __name__ == "__main__":
    main()

"""Write the review fixture: a workshop machine interlock panel on one sheet.

The committed files under ``fixtures/review/`` are this script's output; run it again after
changing the scenario::

    python tools/make_review_fixture.py     # writes fixtures/review/interlock_panel.kicad_sch

The panel, in a few words: a 74HC14 (5 V) and a 74LS04 (5 V) read the front-panel buttons
and guard switches, a CD40106B on the 12 V rail reads the door reed contact, and two generic
3.3 V microcontrollers (part data: ``fixtures/parts/generic_mcu33.toml``) read the lid
switch, a spindle-ready open-drain output, the I2C display bus and a temperature divider.
Every net is drawn with labels on pin ends (no wires), which the format allows.

Each net exercises one situation the review must tell apart; the expected verdict of each
is pinned in ``tests/test_review.py``. UUIDs come from a fixed seed, so regenerating gives
the same text.
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
from placer import LabelPlacer  # noqa: E402

OUT = REPO / "fixtures" / "review"
ROOT_FILE = "interlock_panel.kicad_sch"
RAILS = frozenset({"+5V", "+3V3", "+12V", "GND"})

# A generic 3.3 V microcontroller; pin PA5 doubles as an ADC input.
MCU_PINS = (
    Pin("1", (0, 13.97), "power_in", "VDD"),
    Pin("2", (0, -13.97), "power_in", "VSS"),
    *(
        Pin(str(3 + i), (-12.7, 8.89 - 2.54 * i), "bidirectional", name)
        for i, name in enumerate(("PA0", "PA1", "PA2", "PA3", "PA4", "PA5_ADC5", "PB6", "PB7"))
    ),
)
# A part nobody has described: an input pin, its supply and ground.
UNKNOWN_PINS = (
    Pin("1", (-7.62, 0), "input", "EN"),
    Pin("2", (0, 7.62), "power_in", "VCC"),
    Pin("3", (0, -7.62), "power_in", "GND"),
)
# An open-drain buffer: output pin 1, supply pins.
OD_PINS = (
    Pin("1", (7.62, 0), "open_collector", "OUT"),
    Pin("2", (0, 7.62), "power_in", "VCC"),
    Pin("3", (0, -7.62), "power_in", "GND"),
)
LED_PINS = (Pin("1", (-3.81, 0), "passive", "K"), Pin("2", (3.81, 0), "passive", "A"))
CAP_PINS = (Pin("1", (0, 3.81)), Pin("2", (0, -3.81)))
JACK_PINS = (Pin("1", (-5.08, 0), "passive", "1"), Pin("2", (-5.08, -2.54), "passive", "2"))


def _seeded_uuids(seed: int) -> types.SimpleNamespace:
    rng = random.Random(seed)
    return types.SimpleNamespace(uuid4=lambda: uuid.UUID(int=rng.getrandbits(128), version=4))


class Panel(LabelPlacer):
    """The interlock panel, placed on a grid with labels on pin ends."""

    def __init__(self) -> None:
        super().__init__(RAILS)

    def r(self, ref: str, value: str, a: str, b: str, **fields: str) -> None:
        self.resistor(ref, value, a, b, **fields)

    def two(
        self, ref: str, lib: str, pins: tuple[Pin, ...], value: str, a: str, b: str, **fields: str
    ) -> None:
        self.place(ref, lib, pins, value, {pins[0].number: a, pins[1].number: b}, **fields)

    def hex_part(self, ref: str, lib: str, value: str, supply: str, inputs: dict[int, str]) -> None:
        """A hex inverter: gate inputs (unit → net), outputs left open, supply unit 7."""
        for unit in range(1, 8):
            self.b.part(ref, lib, pins=HEX_INVERTER_PINS, at=self.at(), unit=unit, value=value)
        for pin in HEX_INVERTER_PINS:
            if pin.unit == 7:
                self.join(ref, pin.number, supply if pin.name == "VCC" else "GND", 7)
            elif pin.type == "input" and pin.unit in inputs:
                self.join(ref, pin.number, inputs[pin.unit], pin.unit)

    def chip(self, ref: str, lib: str, pins: tuple[Pin, ...], value: str, nets: dict[str, str],
             **fields: str) -> None:  # fmt: skip
        """A one-unit chip; ``nets`` maps pin names to nets."""
        by_number = {pin.number: nets[pin.name] for pin in pins if pin.name in nets}
        self.place(ref, lib, pins, value, by_number, **fields)


def build() -> SchematicBuilder:
    p = Panel()
    p.hex_part(
        "U1",
        "74xx:74HC14",
        "74HC14",
        "+5V",
        {1: "START_BTN", 2: "ESTOP_LOOP", 3: "JOG_FILT", 4: "FEED_HOLD", 5: "COOLANT_SEL"},
    )
    p.hex_part("U2", "74xx:74LS04", "74LS04", "+5V", {1: "STOP_BTN", 2: "GUARD_CLOSED"})
    p.hex_part("U4", "4xxx:40106", "CD40106B", "+12V", {1: "DOOR_REED"})
    p.chip(
        "U3",
        "Panel:GENERIC_MCU33",
        MCU_PINS,
        "GENERIC_MCU33",
        {
            "VDD": "+3V3",
            "VSS": "GND",
            "PA0": "LID_SW",
            "PA1": "SPINDLE_OK",
            "PA2": "AUX_BTN",
            "PA4": "TOOL_PROBE",
            "PA5_ADC5": "TEMP_SENSE",
            "PB6": "I2C_SCL",
            "PB7": "I2C_SDA",
        },
    )
    p.chip(
        "U6",
        "Panel:GENERIC_MCU33",
        MCU_PINS,
        "GENERIC_MCU33",
        {"VDD": "+3V3", "VSS": "GND", "PA0": "PENDANT_BTN", "PA1": "SPEED_SEL"},
        **{"pullproof.internal_pull": "30k..50k"},
    )
    p.chip(
        "U5",
        "Panel:OD_BUFFER",
        OD_PINS,
        "OD_BUFFER",
        {"OUT": "SPINDLE_OK", "VCC": "+3V3", "GND": "GND"},
        **{"pullproof.i_ol": "4mA", "pullproof.v_ol": "0.4V", "pullproof.i_off": "1uA"},
    )
    p.chip(
        "U7", "Panel:XK9000", UNKNOWN_PINS, "XK9000", {"EN": "LAMP_EN", "VCC": "+3V3", "GND": "GND"}
    )
    sw, reed = ("Switch:SW_Push", SWITCH_PINS), ("Switch:SW_Reed", SWITCH_PINS)

    # 74HC14: a button with a pull-up (pass), a floating E-stop loop (fail), an RC-filtered jog
    # button (pull-up, 1 k series resistor, 100 nF), two parallel 20 k pulls, an up+down pair.
    p.r("R1", "10k", "+5V", "START_BTN")
    p.two("SW1", *sw, "START", "START_BTN", "GND")
    p.two("SW5", *sw, "E-STOP", "ESTOP_LOOP", "GND")
    p.r("R17", "10k", "+5V", "JOG_RAW")
    p.r("R18", "1k", "JOG_RAW", "JOG_FILT")
    p.two("C1", "Device:C", CAP_PINS, "100n", "JOG_FILT", "GND")
    p.two("SW8", *sw, "JOG", "JOG_RAW", "GND", **{"pullproof.bounce": "5ms"})
    p.r("R19", "20k", "+5V", "FEED_HOLD")
    p.r("R20", "20k", "+5V", "FEED_HOLD")
    p.two("SW9", *sw, "FEED HOLD", "FEED_HOLD", "GND")
    p.r("R13", "10k", "+5V", "COOLANT_SEL")
    p.r("R14", "10k", "COOLANT_SEL", "GND")
    # 74LS04: a pull-down that TTL input current defeats (fail), a pull-up that holds (pass).
    p.r("R2", "4k7", "STOP_BTN", "GND", Tolerance="1%")
    p.two("SW2", *sw, "STOP", "STOP_BTN", "+5V")
    p.r("R3", "10k", "+5V", "GUARD_CLOSED", Tolerance="1%")
    p.two("SW3", *sw, "GUARD", "GUARD_CLOSED", "GND")
    # CD40106B on 12 V: a silver reed contact that needs 2 mA wetting current (fail at 10 k).
    p.r("R4", "10k", "+12V", "DOOR_REED")
    p.two("SW4", *reed, "DOOR", "DOOR_REED", "GND", **{"pullproof.wetting": "2mA"})
    # Microcontroller U3: lid switch (pass), open-drain spindle-ready (driver sink fails at
    # 470 Ω), I2C display bus, a 5 V pull-up on a 3.3 V-only pin, a floating button, a divider.
    p.r("R5", "10k", "+3V3", "LID_SW", Tolerance="1%")
    p.two("SW6", *sw, "LID", "LID_SW", "GND")
    p.r("R6", "470", "+3V3", "SPINDLE_OK")
    p.r("R7", "1k2", "+3V3", "I2C_SDA", Tolerance="1%")
    p.r("R8", "2k2", "+3V3", "I2C_SCL", Tolerance="1%")
    p.r("R9", "10k", "+5V", "TOOL_PROBE")
    p.two("SW7", *sw, "PROBE", "TOOL_PROBE", "GND")
    p.two("SW10", *sw, "AUX", "AUX_BTN", "GND")
    p.r("R11", "100k", "+5V", "TEMP_SENSE")
    p.r("R12", "47k", "TEMP_SENSE", "GND")
    # Microcontroller U6 declares its internal pull: its pendant button is not floating.
    p.two("SW11", *sw, "PENDANT", "PENDANT_BTN", "GND")
    # A speed-select strap pulled up through 820 Ω: safe, but below the preferred 1 kΩ.
    p.r("R23", "820", "+3V3", "SPEED_SEL")
    # An input nobody has described (incomplete), a pull with no input, an LED, role fields.
    p.r("R10", "10k", "+3V3", "LAMP_EN")
    p.r("R16", "10k", "+5V", "SPARE_KEY")
    p.two("SW12", *sw, "SPARE", "SPARE_KEY", "GND")
    p.r("R15", "1k", "+5V", "LED_RUN")
    p.two("D1", "Device:LED", LED_PINS, "RUN", "GND", "LED_RUN")
    p.r("R21", "10k", "+5V", "TEST_POINT", **{"pullproof.role": "skip"})
    p.two("J1", "Connector:Jack", JACK_PINS, "REMOTE", "TEST_POINT", "GND")
    p.r("R22", "4k7", "+5V", "REMOTE_IN", **{"pullproof.role": "pull"})
    p.two("J2", "Connector:Jack", JACK_PINS, "REMOTE2", "REMOTE_IN", "GND")
    return p.b


def main() -> None:
    builder._uuid = _seeded_uuids(20250412)  # type: ignore[attr-defined]
    OUT.mkdir(parents=True, exist_ok=True)
    path = build().write(OUT / ROOT_FILE)
    print(f"wrote {path.relative_to(REPO)}")


if __name__ == "__main__":
    main()

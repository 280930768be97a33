"""What is a rail: whole supply names, and supplies known by what they feed.

The fixture is an invented aquarium lid controller: a 5 V input, a regulator whose output
net is named only by its function, a pump driver's enable line whose name carries a
voltage, and a power-good flag. Which names read as supplies is common practice; USB bus
power is 5 V nominal (USB 2.0 specification §7.2.1, from memory).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from builder import RESISTOR_PINS, Pin
from placer import LabelPlacer
from pullproof.detect import Resolver
from pullproof.families.match import PartLibrary, resolve_part
from pullproof.nets import build_circuit
from pullproof.review import review
from pullproof.rules import load_rules
from pullproof.supplies import read_supply_name


@pytest.mark.parametrize(
    ("name", "volts"),
    [
        ("+5V", 5.0),
        ("3V3", 3.3),
        ("VCC_1V8", 1.8),
        ("+5V_USB", 5.0),
        ("/LID/+3V3", 3.3),
        ("3.3V", 3.3),
        ("V3P3", 3.3),
        ("-12V", -12.0),
        ("+3.3VP", 3.3),
        ("VBUS", 5.0),
        ("+VUSB", 5.0),
        ("VDD_IO", None),
        ("VCC", None),
        ("VREG_VIN", None),
        ("AVDD", None),
    ],
)
def test_supply_names(name: str, volts: float | None) -> None:
    found = read_supply_name(name)
    assert found is not None
    assert found.volts == (pytest.approx(volts) if volts is not None else None)


@pytest.mark.parametrize(
    "name",
    # a voltage inside an otherwise signal-like name is a signal: an enable, a power-good
    # flag, a select line, a sense line (common practice)
    ["PULLUP_EN_3V3", "VDD_GOOD", "LDO_3V3_PG", "VBUS_EN", "AMUX_S0_3V3", "VCC_SENSE",
     "VBAT_ADC", "3V3_EN", "KEY_UP", "/LID/PUMP_ON", "MUX_VREF_VOUT", "VREG_EN"],
)  # fmt: skip
def test_signal_names(name: str) -> None:
    assert read_supply_name(name) is None


@pytest.mark.parametrize("name", ["PULLUP_EN_3V3", "VDD_GOOD", "LDO_3V3_PG", "VBUS_EN"])
def test_rules_never_read_a_rail_from_a_signal_name(tmp_path: Path, name: str) -> None:
    assert load_rules(tmp_path / "lid.kicad_sch").rail(name) is None


REG_PINS = (
    Pin("1", (-7.62, 0), "power_in", "VIN"),
    Pin("2", (0, -7.62), "power_in", "GND"),
    Pin("3", (7.62, 0), "power_out", "OUT"),
    Pin("4", (0, 7.62), "input", "EN"),
)
SENSOR_PINS = (
    Pin("1", (0, 7.62), "power_in", "VDD"),
    Pin("2", (0, -7.62), "power_in", "GND"),
    Pin("3", (7.62, 0), "open_collector", "ALERT"),
)


def _lid(tmp_path: Path) -> Path:
    """Regulator U1 (+5V in) makes LID_SUPPLY; sensor U2 runs from it; R1 pulls the sensor's
    alert line up to that supply; R2 pulls the regulator enable PUMP_EN_3V3 up to +5V."""
    k = LabelPlacer(frozenset({"+5V", "GND"}))
    k.place("U1", "aquarium:LDO", REG_PINS, "LDO",
            {"1": "+5V", "2": "GND", "3": "LID_SUPPLY", "4": "PUMP_EN_3V3"})  # fmt: skip
    k.place("U2", "aquarium:TEMP", SENSOR_PINS, "TSENSE",
            {"1": "LID_SUPPLY", "2": "GND", "3": "TEMP_ALERT"})  # fmt: skip
    k.resistor("R1", "10k", "LID_SUPPLY", "TEMP_ALERT")
    k.resistor("R2", "100k", "+5V", "PUMP_EN_3V3")
    k.place("C1", "Device:C", RESISTOR_PINS, "1u", {"1": "LID_SUPPLY", "2": "GND"})
    return k.b.write(tmp_path / "lid.kicad_sch")


def test_a_net_that_powers_a_part_is_a_supply(tmp_path: Path) -> None:
    root = _lid(tmp_path)
    circuit = build_circuit(root)
    rules = load_rules(root)
    infos = {p.ref: resolve_part(p, PartLibrary(), rules) for p in circuit.parts}
    resolver = Resolver(circuit, infos, rules)
    nets = {n.name: n for n in circuit.nets}
    supply = resolver.rail_of(nets["/LID_SUPPLY"])
    assert supply is not None and supply.nominal is None  # its name states no voltage
    assert supply.inferred == "it carries U1 pin OUT, a power output"
    tie = resolver.rail_key(nets["/LID_SUPPLY"])
    assert tie is not None and not tie.certain
    assert resolver.rail_of(nets["/PUMP_EN_3V3"]) is None  # an enable line, not a 3.3 V rail


def test_pull_to_a_supply_of_unknown_voltage(tmp_path: Path) -> None:
    result = review(_lid(tmp_path))
    by_net = {n.network.net: n for n in result.networks}
    # R1 pulls the alert line up to the regulator's output: a rail whose voltage is unknown
    alert = by_net["/TEMP_ALERT"]
    assert alert.network.rail.name == "LID_SUPPLY"
    assert "the voltage of rail LID_SUPPLY is unknown" in alert.reason
    # R2 pulls the enable line, a signal whose name merely carries a voltage
    assert by_net["/PUMP_EN_3V3"].network.rail.name == "+5V"

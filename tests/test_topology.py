"""Pull networks found by topology: what is a logic pull and what is set aside, and why.

Each case is a small schematic of an invented bench (a kiln controller's front panel) drawn
with labels on pin ends. What counts as an LED series resistor, a USB-C configuration
resistor, an op-amp bias resistor or a shield bleed is common practice.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from builder import HEX_INVERTER_PINS, RESISTOR_PINS, SWITCH_PINS, Pin
from placer import LabelPlacer
from pullproof.detect import Resolver
from pullproof.families.match import PartLibrary, resolve_part
from pullproof.nets import build_circuit
from pullproof.review import _kind_word
from pullproof.rules import load_rules
from pullproof.topology import PinOnNet, Topology, find_pulls

RAILS = frozenset({"+5V", "+3V3", "GND"})
MCU_PINS = (
    Pin("1", (0, 10.16), "power_in", "VDD"),
    Pin("2", (0, -10.16), "power_in", "VSS"),
    Pin("3", (-12.7, 2.54), "bidirectional", "GPIO26_ADC0"),
    Pin("4", (-12.7, 0), "input", "FB"),
    Pin("5", (-12.7, -2.54), "bidirectional", "PA1"),
)
OPAMP_PINS = (Pin("2", (-7.62, -2.54), "input", "-"), Pin("3", (-7.62, 2.54), "input", "+"),
              Pin("1", (7.62, 0), "output", "~"))  # fmt: skip
TWO_PINS = (Pin("1", (-3.81, 0), "passive", "K"), Pin("2", (3.81, 0), "passive", "A"))
QPINS = (Pin("1", (-5.08, 0), "input", "B"), Pin("2", (2.54, 5.08), "passive", "C"),
         Pin("3", (2.54, -5.08), "passive", "E"))  # fmt: skip


class Bench(LabelPlacer):
    """A kiln controller front panel, drawn one situation at a time."""

    def __init__(self) -> None:
        super().__init__(RAILS, columns=6)

    def part(self, ref: str, lib: str, pins: tuple[Pin, ...], value: str,
             nets: dict[str, str], **fields: str) -> Bench:  # fmt: skip
        self.place(ref, lib, pins, value, nets, **fields)
        return self

    def r(self, ref: str, a: str, b: str, value: str = "10k", **fields: str) -> Bench:
        return self.part(ref, "Device:R", RESISTOR_PINS, value, {"1": a, "2": b}, **fields)

    def hc14(self, net: str) -> Bench:
        """A 74HC14 on +5V with gate 1's input on ``net``."""
        for unit in (1, 7):
            self.b.part("U9", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=self.at(), unit=unit,
                        value="74HC14")  # fmt: skip
        self.join("U9", "1", net, 1)
        self.join("U9", "14", "+5V", 7)
        self.join("U9", "7", "GND", 7)
        return self

    def mcu(self, **nets: str) -> Bench:
        return self.part("U1", "MCU_Generic:RP2040", MCU_PINS, "RP2040",
                         {"1": "+3V3", "2": "GND", **nets})  # fmt: skip

    def switch(self, ref: str, a: str, b: str = "GND") -> Bench:
        return self.part(ref, "Switch:SW_Push", SWITCH_PINS, "KEY", {"1": a, "2": b})


def topology(bench: Bench, tmp_path: Path) -> Topology:
    root = bench.b.write(tmp_path / "kiln.kicad_sch")
    circuit = build_circuit(root)
    rules = load_rules(root)
    infos = {p.ref: resolve_part(p, PartLibrary(), rules) for p in circuit.parts}
    resolver = Resolver(circuit, infos, rules)
    return find_pulls(circuit, lambda p: _kind_word(infos[p.ref]), resolver.rail_key)


def aside(topo: Topology) -> dict[str, str]:
    return {a.ref: a.reason for a in topo.set_aside}


# (drawing, {ref: reason}) for resistors tied to a rail that are not logic pulls
SET_ASIDE: list[tuple[str, Callable[[Bench], Bench], dict[str, str]]] = [
    (
        "LED series",
        lambda k: k.r("R1", "+5V", "LED_A", "1k").part(
            "D1", "Device:LED", TWO_PINS, "RUN", {"2": "LED_A", "1": "GND"}
        ),
        {"R1": "LED series resistor: the net reaches only a diode (D1)"},
    ),
    (
        "USB-C CC",
        lambda k: k.r("R1", "CC_A", "GND", "5k1").part(
            "J1", "Connector:USB_C_Receptacle", (Pin("A5", (5.08, 0), "bidirectional", "CC1"),),
            "USB_C", {"A5": "CC_A"},
        ),
        {"R1": "USB-C configuration resistor: the net reaches J1 pin CC1"},
    ),
    (
        "op-amp",
        lambda k: k.r("R1", "INV", "GND").part(
            "U2", "Amplifier_Operational:LM358", OPAMP_PINS, "LM358", {"2": "INV"}
        ),
        {"R1": "op-amp bias or gain resistor: the net reaches U2 pin 2 (-)"},
    ),
    (
        "shield net name",
        lambda k: k.r("R1", "CASE_SHIELD", "GND", "1M").part(
            "J1", "Connector:Conn_01x01", (Pin("1", (5.08, 0), "passive", "1"),), "LUG",
            {"1": "CASE_SHIELD"},
        ),
        {"R1": "shield or chassis bleed resistor: the net is a shield net"},
    ),
    (
        "shield pin names",
        lambda k: k.r("R1", "JACK_S", "GND", "1M").part(
            "J1", "Connector:USB_A", (Pin("5", (5.08, 0), "passive", "SH1"),
                                      Pin("6", (5.08, -2.54), "passive", "SH2")),
            "USB_A", {"5": "JACK_S", "6": "JACK_S"},
        ),
        {"R1": "shield or chassis bleed resistor: the net reaches only shield pins"},
    ),
    (
        "shield tabs by number",
        lambda k: k.r("R1", "TABS", "GND", "1M").part(
            "J1", "Connector:RJ45", (Pin("17", (5.08, 0), "passive", "17"),
                                     Pin("18", (5.08, -2.54), "passive", "18")),
            "RJ45", {"17": "TABS", "18": "TABS"},
        ),
        {"R1": "shield or chassis bleed resistor: the net joins only pins 17, 18 of J1, as a "
               "connector's shield tabs do"},
    ),
    (
        "one connector pin",
        lambda k: k.r("R1", "+5V", "EXT").part(
            "J1", "Connector:Conn_01x01", (Pin("1", (5.08, 0), "passive", "1"),), "EXT",
            {"1": "EXT"},
        ),
        {"R1": "the net reaches only connector or unclassified pins (J1): a shield bleed or an "
               "input off this schematic; set field 'pullproof.role' = pull to judge it"},
    ),
    (
        "divider into an ADC-capable GPIO",
        lambda k: k.mcu(**{"3": "VSENSE_DIV"}).r("R1", "+5V", "VSENSE_DIV", "100k")
        .r("R2", "VSENSE_DIV", "GND", "47k"),
        {r: "divider into an analog or feedback node: the net reaches U1 pin GPIO26_ADC0"
         for r in ("R1", "R2")},
    ),
    (
        "feedback pin",
        lambda k: k.mcu(**{"4": "FB_NODE"}).r("R1", "FB_NODE", "GND"),
        {"R1": "analog or feedback bias: the net reaches U1 pin FB"},
    ),
    (
        "divider with no input",
        lambda k: k.r("R1", "+5V", "MID").r("R2", "MID", "GND"),
        {r: "divider into an analog or feedback node: no logic input on the net"
         for r in ("R1", "R2")},
    ),
    (
        "transistor base",
        lambda k: k.r("R1", "BASE", "GND", "47k").part(
            "Q1", "Transistor_BJT:BC847", QPINS, "BC847", {"1": "BASE", "3": "GND"}
        ),
        {"R1": "transistor base or gate bias: the net reaches Q1 pin B, no logic input"},
    ),
    (
        "role skip",
        lambda k: k.hc14("SPARE").r("R1", "+5V", "SPARE", **{"pullproof.role": "skip"}),
        {"R1": "marked not a pull by its 'pullproof.role' field"},
    ),
]  # fmt: skip


@pytest.mark.parametrize(
    ("draw", "reasons"), [c[1:] for c in SET_ASIDE], ids=[c[0] for c in SET_ASIDE]
)
def test_set_aside(draw: Callable[[Bench], Bench], reasons: dict[str, str], tmp_path: Path) -> None:
    topo = topology(draw(Bench()), tmp_path)
    assert aside(topo) == reasons
    assert topo.sites == ()


def test_pull_on_a_logic_input(tmp_path: Path) -> None:
    topo = topology(Bench().hc14("KEY").r("R1", "+5V", "KEY").switch("SW1", "KEY"), tmp_path)
    (site,) = topo.sites
    assert site.net.name == "/KEY"
    assert (site.ups, site.downs) == ((("R1", "+5V"),), ())
    assert site.inputs == (PinOnNet("U9", "1", ""),)
    assert [(s.ref, s.far_net) for s in site.switches] == [("SW1", "GND")]


def test_series_resistor_then_input(tmp_path: Path) -> None:
    # RC filter: pull-up on the contact side, 1 k in series, 100 nF at the Schmitt input
    bench = Bench().hc14("FILT").r("R1", "+5V", "RAW").r("R2", "RAW", "FILT", "1k")
    bench.part("C1", "Device:C", RESISTOR_PINS, "100n", {"1": "FILT", "2": "GND"})
    topo = topology(bench.switch("SW1", "RAW"), tmp_path)
    (site,) = topo.sites
    assert site.net.name == "/RAW"
    assert site.inputs == (PinOnNet("U9", "1", "", via="R2"),)
    assert site.capacitors == ()  # C1 sits beyond the series resistor
    assert topo.unpulled_switch_inputs == ()


def test_parallel_pulls(tmp_path: Path) -> None:
    topo = topology(Bench().hc14("KEY").r("R1", "+5V", "KEY", "20k").r("R2", "+5V", "KEY", "20k"),
                    tmp_path)  # fmt: skip
    (site,) = topo.sites
    assert site.ups == (("R1", "+5V"), ("R2", "+5V"))


def test_up_and_down_on_a_logic_input(tmp_path: Path) -> None:
    topo = topology(Bench().hc14("SEL").r("R1", "+5V", "SEL").r("R2", "SEL", "GND"), tmp_path)
    (site,) = topo.sites  # kept: the review reports the divider as a finding
    assert (site.ups, site.downs) == ((("R1", "+5V"),), (("R2", "GND"),))


def test_single_pull_on_an_adc_capable_gpio_is_a_logic_pull(tmp_path: Path) -> None:
    topo = topology(Bench().mcu(**{"3": "BTN"}).r("R1", "+3V3", "BTN").switch("SW1", "BTN"),
                    tmp_path)  # fmt: skip
    (site,) = topo.sites
    assert [p.name for p in site.inputs] == ["GPIO26_ADC0"]


def test_pull_without_input(tmp_path: Path) -> None:
    topo = topology(Bench().r("R1", "+5V", "LOOSE").switch("SW1", "LOOSE"), tmp_path)
    (site,) = topo.sites
    assert site.inputs == () and [s.ref for s in site.switches] == ["SW1"]


def test_role_pull_overrides_a_set_aside_reason(tmp_path: Path) -> None:
    bench = Bench().r("R1", "+5V", "EXT", **{"pullproof.role": "pull"})
    bench.part("J1", "Connector:Conn_01x01", (Pin("1", (5.08, 0), "passive", "1"),), "EXT",
               {"1": "EXT"})  # fmt: skip
    topo = topology(bench, tmp_path)
    assert [s.net.name for s in topo.sites] == ["/EXT"]
    assert topo.set_aside == ()


def test_role_skip_leaves_the_other_pull(tmp_path: Path) -> None:
    # R2 marked skip: R1 alone pulls, no divider is reported
    bench = (
        Bench()
        .hc14("SEL")
        .r("R1", "+5V", "SEL")
        .r("R2", "SEL", "GND", **{"pullproof.role": "skip"})
    )
    topo = topology(bench, tmp_path)
    (site,) = topo.sites
    assert (site.ups, site.downs) == ((("R1", "+5V"),), ())
    assert aside(topo) == {"R2": "marked not a pull by its 'pullproof.role' field"}


def test_switch_input_without_pull(tmp_path: Path) -> None:
    topo = topology(Bench().hc14("ESTOP").switch("SW1", "ESTOP"), tmp_path)
    assert topo.sites == ()
    ((net, switches, inputs),) = topo.unpulled_switch_inputs
    assert net.name == "/ESTOP"
    assert [s.ref for s in switches] == ["SW1"] and [i.ref for i in inputs] == ["U9"]

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
from pullproof.review import _kind_word, _nominal_ohms
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
OPTO_PINS = (
    Pin("1", (-7.62, 2.54), "passive", "A"),
    Pin("2", (-7.62, -2.54), "passive", "K"),
    Pin("3", (7.62, -2.54), "passive", "E"),
    Pin("4", (7.62, 2.54), "open_collector", "C"),
)
BARGRAPH_PINS = (Pin("1", (-5.08, 0), "passive", "LED_A"), Pin("2", (5.08, 0), "passive", "LED_K"))
COMPARATOR_PINS = (
    Pin("1", (-7.62, 2.54), "input", "IN+"),
    Pin("2", (-7.62, -2.54), "input", "IN-"),
    Pin("3", (7.62, 0), "open_collector", "OUT"),
    Pin("4", (0, 7.62), "power_in", "V+"),
    Pin("5", (0, -7.62), "power_in", "V-"),
)
ADC_PINS = (
    Pin("1", (-7.62, 2.54), "input", "AINP"),
    Pin("2", (-7.62, -2.54), "input", "AINN"),
    Pin("3", (7.62, 0), "output", "DOUT"),
    Pin("4", (0, 7.62), "power_in", "VDD"),
)
REGULATOR_PINS = (
    Pin("1", (-7.62, 0), "power_in", "VIN"),
    Pin("2", (7.62, 0), "power_out", "SW"),
    Pin("3", (0, -7.62), "passive", "VFB"),
)
MUX_PINS = (
    Pin("1", (-7.62, 2.54), "input", "S0"),
    Pin("2", (-7.62, 0), "passive", "Y0"),
    Pin("3", (7.62, 0), "passive", "Z"),
    Pin("4", (0, 7.62), "power_in", "VCC"),
)
POT_PINS = (Pin("1", (0, 3.81)), Pin("2", (3.81, 0)), Pin("3", (0, -3.81)))


class Bench(LabelPlacer):
    """A kiln controller front panel, drawn one situation at a time."""

    def __init__(self) -> None:
        super().__init__(RAILS, columns=6)

    def part(self, ref: str, lib: str, pins: tuple[Pin, ...], value: str,
             nets: dict[str, str], **fields: str) -> Bench:  # fmt: skip
        self.place(ref, lib, pins, value, nets, **fields)
        return self

    def r(self, ref: str, a: str, b: str, value: str = "10k", *, dnp: bool = False,
          on_board: bool = True, **fields: str) -> Bench:  # fmt: skip
        self.b.part(ref, "Device:R", pins=RESISTOR_PINS, at=self.at(), value=value,
                    fields=fields or None, dnp=dnp, on_board=on_board)  # fmt: skip
        self.join(ref, "1", a)
        self.join(ref, "2", b)
        return self

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
    return find_pulls(
        circuit,
        lambda p: _kind_word(infos[p.ref]),
        resolver.rail_key,
        ohms=lambda ref: _nominal_ohms(infos[ref]),
    )


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
        {"R1": "analog or feedback bias: the net reaches U2 pin 2 (-), an amplifier or "
               "comparator input"},
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
        {"R1": "transistor base or gate bias: the net drives Q1 pin B, and holds no logic "
               "input itself"},
    ),
    (
        "role skip",
        lambda k: k.hc14("SPARE").r("R1", "+5V", "SPARE", **{"pullproof.role": "skip"}),
        {"R1": "marked not a pull by its 'pullproof.role' field"},
    ),
    # ---- below 10 Ω: no logic input needs a pull this strong (common practice)
    (
        "below 10 ohm",
        lambda k: k.hc14("HEATER_SNS").r("R1", "+5V", "HEATER_SNS", "4R7"),
        {"R1": "below 10 Ω (4.7 Ω): a link, shunt, current-sense or filter resistor in a "
               "supply or sense path, not a logic pull"},
    ),
    # ---- both ends on supplies: a link, filter, load or bleed, never a signal pull
    (
        "between two supplies",
        lambda k: k.r("R1", "+5V", "+3V3", "100R"),
        {"R1": "link, shunt or filter between supply nets +5V and +3V3, not a signal"},
    ),
    (
        "supply to ground",
        lambda k: k.r("R1", "+5V", "GND", "10k"),
        {"R1": "load or bleed resistor: it joins supply +5V to ground (GND), not a signal"},
    ),
    # ---- an LED inside another part: the optocoupler input of the door interlock
    (
        "optocoupler LED",
        lambda k: k.r("R1", "+5V", "OPTO_A", "1k").part(
            "U3", "kiln:PC817", OPTO_PINS, "PC817", {"1": "OPTO_A", "2": "GND", "3": "GND"}
        ),
        {"R1": "LED series resistor: the net reaches only U3 pin A, the anode or cathode of an "
               "emitter inside the part (optocoupler input, LED bar or display)"},
    ),
    (
        "LED bar",
        lambda k: k.r("R1", "+5V", "BAR1", "680").part(
            "U4", "kiln:BARGRAPH10", BARGRAPH_PINS, "BAR10", {"1": "BAR1", "2": "GND"}
        ),
        {"R1": "LED series resistor: the net reaches only U4 pin LED_A, the anode or cathode "
               "of an emitter inside the part (optocoupler input, LED bar or display)"},
    ),
    # ---- a resistor in front of a switch: the pull, if any, is on the other side
    (
        "series before a switch",
        lambda k: k.hc14("DOOR").r("R1", "+5V", "DOOR_FEED", "1k").switch("SW1", "DOOR_FEED",
                                                                          "DOOR"),
        {"R1": "series resistor in front of a switch: the net holds only R1 and SW1 pin 1, "
               "whose other side /DOOR is the switched line; a pull, if any, belongs there"},
    ),
    # ---- analog inputs beyond ADC names
    (
        "divider into a comparator",
        lambda k: k.part("U5", "kiln:TLV7011", COMPARATOR_PINS, "TLV7011",
                         {"1": "TRIP", "4": "+5V", "5": "GND"})
        .r("R1", "+5V", "TRIP", "100k").r("R2", "TRIP", "GND", "22k"),
        {r: "divider into an analog or feedback node: the net reaches U5 pin IN+, an amplifier "
            "or comparator input" for r in ("R1", "R2")},
    ),
    (
        "converter input",
        lambda k: k.part("U6", "kiln:ADS1000", ADC_PINS, "ADS1000",
                         {"1": "THERMO_P", "4": "+3V3"}).r("R1", "+3V3", "THERMO_P", "1M"),
        {"R1": "analog or feedback bias: the net reaches U6 pin AINP"},
    ),
    (
        "feedback pin",
        lambda k: k.part("U7", "kiln:BUCK", REGULATOR_PINS, "BUCK",
                         {"1": "+5V", "3": "FB_DIV"}).r("R1", "FB_DIV", "GND", "10k"),
        {"R1": "analog or feedback bias: the net reaches U7 pin VFB"},
    ),
    (
        "thermistor",
        lambda k: k.mcu(**{"3": "KILN_NTC"}).r("R1", "+3V3", "KILN_NTC", "10k")
        .part("TH1", "Device:Thermistor_NTC", RESISTOR_PINS, "10k NTC",
              {"1": "KILN_NTC", "2": "GND"}),
        {"R1": "sensor bias: the net reaches TH1 pin 1, a thermistor or other sensing resistor, "
               "so the node is a measurement"},
    ),
    (
        "connector pin named for an analog input",
        lambda k: k.r("R1", "EXT_AN3", "GND", "1M").part(
            "J2", "Connector:Conn_01x01", (Pin("1", (5.08, 0), "passive", "AN3"),), "PROBE",
            {"1": "EXT_AN3"},
        ),
        {"R1": "analog or feedback bias: the net reaches J2 pin AN3"},
    ),
    (
        "passive pin of a typed logic part",
        lambda k: k.part("U8", "kiln:74HC4051", MUX_PINS, "74HC4051",
                         {"2": "MUX_Y0", "4": "+5V"}).r("R1", "+5V", "MUX_Y0", "10k"),
        {"R1": "analog or pass-through pin: the net reaches U8 pin Y0, typed passive on a part "
               "whose logic pins are typed, so it is no logic input (an analog switch channel, "
               "a measurement or a series path)"},
    ),
    # ---- resistors only: one leg of a divider or chain
    (
        "resistor chain",
        lambda k: k.r("R1", "+5V", "CHAIN", "10k").r("R2", "CHAIN", "CHAIN_END", "10k"),
        {"R1": "divider or resistor chain: the net reaches only R2, and no logic input"},
    ),
    (
        "potentiometer end",
        lambda k: k.r("R1", "+5V", "POT_TOP", "10k").part(
            "RV1", "Device:R_Potentiometer", POT_PINS, "1k", {"1": "POT_TOP", "3": "GND"}
        ),
        {"R1": "divider or resistor chain: the net reaches only RV1, and no logic input"},
    ),
    (
        # a collector load that drives the next transistor's base: the base clamps the node
        "collector driving a base through a resistor",
        lambda k: k.r("R1", "+5V", "DRIVE", "10k").r("R2", "DRIVE", "QB", "1k")
        .part("Q2", "Transistor_BJT:BC847", QPINS, "BC847", {"2": "DRIVE", "3": "GND"})
        .part("Q1", "Transistor_BJT:BC847", QPINS, "BC847", {"1": "QB", "3": "GND"}),
        {"R1": "transistor base or gate bias: the net drives Q1 pin B through R2, and holds no "
               "logic input itself"},
    ),
    (
        "unused",
        lambda k: k.r("R1", "+5V", "NOTHING", "10k"),
        {"R1": "unused: the resistor's other end connects to nothing"},
    ),
    # ---- parts that are not fitted are listed, never silently dropped
    (
        "not fitted (dnp)",
        lambda k: k.hc14("OPTION").r("R1", "+5V", "OPTION", "10k", dnp=True),
        {"R1": "not fitted (marked do-not-populate (dnp)); if fitted it would pull the net up "
               "to +5V"},
    ),
    (
        "not fitted (excluded from the board)",
        lambda k: k.r("R1", "LED_K", "GND", "1k", on_board=False).part(
            "D1", "Device:LED", TWO_PINS, "RUN", {"1": "LED_K", "2": "+5V"}
        ),
        {"R1": "not fitted (excluded from the board); if fitted: LED series resistor: the net "
               "reaches only a diode (D1)"},
    ),
    (
        "not fitted (Value)",
        lambda k: k.r("R1", "+5V", "SPARE_IO", "DNF"),
        {"R1": "not fitted (its Value 'DNF' says it is not fitted); if fitted: unused: the "
               "resistor's other end connects to nothing"},
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


def test_a_part_not_fitted_is_no_divider_half(tmp_path: Path) -> None:
    # R2 is marked do-not-populate: R1 alone pulls SEL, no up/down divider is reported
    topo = topology(Bench().hc14("SEL").r("R1", "+5V", "SEL").r("R2", "SEL", "GND", dnp=True),
                    tmp_path)  # fmt: skip
    (site,) = topo.sites
    assert (site.ups, site.downs) == ((("R1", "+5V"),), ())
    assert aside(topo)["R2"].startswith("not fitted (marked do-not-populate (dnp))")


def test_up_and_down_needs_two_true_rails(tmp_path: Path) -> None:
    # R1 goes to a converter's output, a supply known only from its pins (a power output):
    # an up/down finding would rest on a guess, so the pair is set aside as a divider
    bench = Bench().hc14("SEL").part("U7", "kiln:BUCK", REGULATOR_PINS, "BUCK",
                                     {"1": "+5V", "2": "BUCK_OUT", "3": "FB_DIV"})  # fmt: skip
    topo = topology(bench.r("R1", "BUCK_OUT", "SEL").r("R2", "SEL", "GND"), tmp_path)
    assert topo.sites == ()
    reason = ("divider: an up and a down pull, and BUCK_OUT is a supply known only from its "
              "pins (a power input or output on it)")  # fmt: skip
    assert aside(topo) == {"R1": reason, "R2": reason}


def test_a_switch_to_a_rail_is_no_series_resistor(tmp_path: Path) -> None:
    # the node holds only R1 and a contact to ground: a pull whose input is missing
    topo = topology(Bench().r("R1", "+5V", "LID").switch("SW1", "LID", "GND"), tmp_path)
    (site,) = topo.sites
    assert [s.far_net for s in site.switches] == ["GND"]

"""Part matching: family by name, fields, part library, resistor data and defaults."""

from __future__ import annotations

from pathlib import Path

import pytest

from pullproof.circuit import Part, PartPin
from pullproof.errors import ValueParseError
from pullproof.families import PartKind, PartLibrary, family_from_name, load_part_library
from pullproof.families.match import FIELDS, resolve_part
from pullproof.provenance import Origin
from pullproof.rules import load_rules

ROOT = Path(__file__).parents[1]
RULES = load_rules(Path("/nonexistent/x.kicad_sch"))
EXAMPLE = ROOT / "fixtures" / "parts" / "generic_mcu33.toml"


def _part(ref: str, value: str, lib_id: str = "", **fields: str) -> Part:
    return Part(ref=ref, value=value, lib_id=lib_id, sheet="/", fields=fields, pins=())


@pytest.mark.parametrize(
    ("text", "family", "schmitt"),
    # part numbering and Schmitt device numbers: common practice
    [
        ("74HC14", "HC", True),
        ("SN74LS00N", "LS", False),
        ("CD4093B", "4000B", True),
        ("74LVC1G17", "LVC", True),
        ("74LVC1G14", "LVC", True),
        ("74HCT245", "HCT", False),
        ("MC14093", "4000B", True),
        ("CD40106B", "4000B", True),
        ("MC14584", "4000B", True),
        ("74HC132", "HC", True),
        ("74LS132", "LS", True),
        ("74AHC1G14", "AHC", True),
        ("7400", "74", False),
        ("74HC165", "HC", False),
        ("CD4011B", "4000B", False),
        ("74ALS04", "", False),  # recognised, no built-in data
    ],
)
def test_family_from_name(text: str, family: str, schmitt: bool) -> None:
    found = family_from_name(text)
    assert found is not None
    assert (found.family, found.schmitt) == (family, schmitt)


@pytest.mark.parametrize("text", ["10k", "ATmega328P", "LED", "SW_Push", "PC817"])
def test_not_a_logic_name(text: str) -> None:
    assert family_from_name(text) is None


@pytest.mark.parametrize(
    ("ref", "value", "lib_id", "kind"),
    [
        ("R1", "10k", "Device:R", PartKind.RESISTOR),
        ("C1", "100n", "Device:C", PartKind.CAPACITOR),
        ("SW1", "SW_Push", "Switch:SW_Push", PartKind.SWITCH),
        ("K1", "G5V-1", "Relay:G5V-1", PartKind.RELAY),
        ("U3", "PC817", "Isolator:PC817", PartKind.OPTOCOUPLER),
        ("D1", "LED", "Device:LED", PartKind.LED),
        ("D2", "1N4148", "Diode:1N4148", PartKind.DIODE),
        ("Q1", "BC547", "Transistor_BJT:BC547", PartKind.TRANSISTOR),
        ("U1", "74HC14", "74xx:74HC14", PartKind.LOGIC),
        ("U2", "ATmega328P-P", "MCU_Microchip_ATmega:ATmega328P-P", PartKind.MCU),
        ("J1", "Conn_01x04", "Connector_Generic:Conn_01x04", PartKind.CONNECTOR),
        ("U4", "LM358", "Amplifier_Operational:LM358", PartKind.OPAMP),
        ("R9", "4k7", "", PartKind.RESISTOR),  # reference prefix only
        ("X1", "thing", "", PartKind.OTHER),
        # the symbol's own name decides, never the library nickname before ':'
        ("R4", "10k", "rp2040_board:R_0402", PartKind.RESISTOR),
        ("C7", "100n", "MCU_Project:C_Small", PartKind.CAPACITOR),
        ("U5", "RP2040", "beehive_parts:RP2040", PartKind.MCU),
        ("RN1", "4x10k", "scale_lib:R_Array", PartKind.RESISTOR),
        ("RV1", "10k", "Device:R_Potentiometer", PartKind.POTENTIOMETER),
        ("VR2", "KNOB", "Device:R_POT", PartKind.POTENTIOMETER),
        ("TH1", "10k NTC", "Device:Thermistor_NTC", PartKind.SENSOR),
        ("Y1", "12MHz", "Device:Crystal_GND24", PartKind.OTHER),  # not a capacitor
        ("U8", "SN74HC14N", "hive:SN74HC14N", PartKind.LOGIC),
        ("U9", "RP2350B", "any_library:ESP32x-80", PartKind.MCU),  # Value names the part
    ],
)
def test_classify(ref: str, value: str, lib_id: str, kind: PartKind) -> None:
    assert resolve_part(_part(ref, value, lib_id), PartLibrary(), RULES).kind is kind


def _pins(*names: str) -> tuple[PartPin, ...]:
    return tuple(PartPin(str(n), name, "input") for n, name in enumerate(names, 1))


@pytest.mark.parametrize(
    ("pins", "kind"),
    [
        # an inverting and a non-inverting input: an amplifier or comparator (common practice)
        (("+", "-", "OUT", "V+", "V-"), PartKind.OPAMP),
        (("IN+", "IN\u2212", "OUT"), PartKind.OPAMP),
        (("+INA", "-INA", "OUTA"), PartKind.OPAMP),
        (("INP", "INN", "VOUT"), PartKind.OPAMP),
        (("A", "B", "Y", "VCC", "GND"), PartKind.OTHER),
        (("V+", "V-", "OUT"), PartKind.OTHER),  # supply pins are not inputs
    ],
)
def test_classify_by_pins(pins: tuple[str, ...], kind: PartKind) -> None:
    part = Part(ref="U3", value="XQ9000", lib_id="greenhouse:XQ9000", sheet="/", fields={},
                pins=_pins(*pins))  # fmt: skip
    assert resolve_part(part, PartLibrary(), RULES).kind is kind


def test_few_pins_are_not_a_logic_ic() -> None:
    # a two-pin header whose part number ends in 4020 is no CD4020 counter: a logic IC needs
    # a supply, a ground, an input and an output (common practice)
    part = Part(ref="H8", value="PWR", lib_id="shop:22-28-4020", sheet="/", fields={},
                pins=_pins("1", "2"))  # fmt: skip
    assert resolve_part(part, PartLibrary(), RULES).kind is PartKind.OTHER


def test_resistor_from_value_and_footprint() -> None:
    part = _part("R3", "4k7", "Device:R", Footprint="Resistor_SMD:R_0603_1608Metric")
    info = resolve_part(part, PartLibrary(), RULES).resistor
    assert info is not None and info.ohms is not None
    assert info.ohms.magnitude("ohm") == 4700.0
    assert info.size == "0603"
    # 0603 → 0.1 W / 50 V, generic chip table (REFERENCES §6: common practice)
    assert info.power is not None and info.power.magnitude("W") == 0.1
    assert info.working_voltage is not None and info.working_voltage.magnitude("V") == 50.0
    # a size's generic rating stands in for the fitted part's: an assumption
    assert info.power.source.origin is Origin.ASSUMED
    # no Tolerance field and none in the Value: the rules default (E24, 5 %), assumed
    assert info.tolerance.magnitude("") == 0.05
    assert info.tolerance.source.origin is Origin.ASSUMED


def test_tolerance_field_beats_value_text() -> None:
    info = resolve_part(_part("R1", "10k 5%", "Device:R", Tolerance="1%"), PartLibrary(), RULES)
    assert info.resistor is not None
    assert info.resistor.tolerance.magnitude("") == 0.01
    assert info.resistor.tolerance.source.where == "field 'Tolerance' on R1"


def test_unreadable_resistor_value_is_missing_data() -> None:
    info = resolve_part(_part("R5", "DNP", "Device:R", Power="0.1W"), PartLibrary(), RULES)
    assert info.resistor is not None and info.resistor.ohms is None
    assert [m.what for m in info.missing] == ["resistance of R5"]


@pytest.mark.parametrize(
    ("fields", "message"),
    [
        ({"Tolerance": "5 %%"},
         "field 'Tolerance' of R1: cannot read '5 %%'; "
         "expected a percentage such as 5% or ±1%"),
        ({"Power": "lots"},
         "field 'Power' of R1: cannot read 'lots'; expected a power such as 0.1W, 1/4W or 100mW"),
        ({"pullproof.role": "maybe"},
         "field 'pullproof.role' of R1: cannot read 'maybe'; expected pull or skip"),
    ],
)  # fmt: skip
def test_bad_explicit_field_raises(fields: dict[str, str], message: str) -> None:
    with pytest.raises(ValueParseError) as info:
        resolve_part(_part("R1", "10k", "Device:R", **fields), PartLibrary(), RULES)
    assert str(info.value) == message


def test_family_field_and_overrides() -> None:
    part = _part("U7", "MYSTERY", "", **{"pullproof.family": "74HC", "pullproof.vih": "3.5V"})
    info = resolve_part(part, PartLibrary(), RULES)
    assert info.family == "HC" and info.inputs is not None
    at = info.inputs.at(4.5)
    assert at.vih_min is not None and at.vih_min.magnitude("V") == 3.5
    assert at.vih_min.source.where == "field 'pullproof.vih' on U7"
    assert at.vil_max is not None and at.vil_max.magnitude("V") == 1.35  # JESD7A (from memory)


def test_input_current_field_is_stored_as_magnitude() -> None:
    part = _part("U8", "74LS04", "", **{"pullproof.i_low": "-0.4 mA"})
    info = resolve_part(part, PartLibrary(), RULES)
    assert info.inputs is not None
    i_low = info.inputs.at(5.0).i_low
    assert i_low is not None and i_low.magnitude("A") == pytest.approx(0.4e-3)


def test_unknown_part_is_reported_not_raised() -> None:
    info = resolve_part(_part("U9", "XYZ123", "Custom:XYZ123"), PartLibrary(), RULES)
    assert info.inputs is None
    assert info.missing[0].hint == "add field 'pullproof.family' (e.g. HC) or a part-library entry"


def test_unknown_family_field_raises() -> None:
    with pytest.raises(ValueParseError, match=r"field 'pullproof\.family' of U1: cannot read 'ZZ'"):
        resolve_part(_part("U1", "x", "", **{"pullproof.family": "ZZ"}), PartLibrary(), RULES)


def test_example_part_library() -> None:
    lib = load_part_library(EXAMPLE)
    info = resolve_part(_part("U1", "GENERIC_MCU33", "MCU:GENERIC_MCU33"), lib, RULES)
    assert info.kind is PartKind.MCU and info.inputs is not None
    at = info.inputs.at(3.0)
    assert at.vih_min is not None and at.vih_min.magnitude("V") == pytest.approx(0.7 * 3.0)
    assert info.inputs.five_volt_tolerant is False
    assert info.inputs.internal_pull is not None
    assert [p.magnitude("ohm") for p in info.inputs.internal_pull] == [30e3, 50e3]
    assert "example data" in at.vih_min.source.reason


def test_switch_defaults_are_marked() -> None:
    info = resolve_part(_part("SW1", "SW_Push", "Switch:SW_Push"), PartLibrary(), RULES)
    wet = info.ratings.get("wetting")
    assert wet is not None and wet.source.origin is Origin.ASSUMED and wet.source.reason
    info = resolve_part(
        _part("SW2", "SW_Push", "Switch:SW_Push", **{"pullproof.wetting": "1mA"}),
        PartLibrary(),
        RULES,
    )
    wet = info.ratings.get("wetting")
    assert wet is not None and wet.source.origin is Origin.FIELD


def test_opto_without_ctr_is_missing() -> None:
    info = resolve_part(_part("U5", "PC817", "Isolator:PC817"), PartLibrary(), RULES)
    assert [m.what for m in info.missing] == ["CTR min of U5"]


def test_bad_part_library(tmp_path: Path) -> None:
    path = tmp_path / "lib.toml"
    path.write_text('[part.X]\nkind = "gadget"\n', encoding="utf-8")
    with pytest.raises(ValueParseError) as info:
        load_part_library(path)
    assert str(info.value) == (
        f"{path}:2:1: field 'kind' of [part.X]: cannot read 'gadget'; expected one of resistor, "
        "potentiometer, sensor, capacitor, switch, relay, optocoupler, LED, diode, transistor, "
        "logic IC, microcontroller, connector, op-amp, other"
    )


def test_field_table_lists_our_prefix() -> None:
    ours = [name for name in FIELDS if name.startswith("pullproof.")]
    assert len(ours) >= 10
    assert all(doc.example for doc in FIELDS.values())


def test_packaged_example_matches_fixture() -> None:
    packaged = ROOT / "src" / "pullproof" / "families" / "data" / "examples" / "generic_mcu33.toml"
    assert packaged.read_text(encoding="utf-8") == EXAMPLE.read_text(encoding="utf-8")

"""Resistor arrays and networks: each element is judged like a two-pin resistor.

The fixture is an invented beehive scale's front end: four hive-door reed contacts and a
tare button read by a 74HC14, pulled by resistor arrays drawn the ways symbol libraries
draw them (one element per unit, one isolated 8-pin pack, one bussed 9-pin network).
Which pins of an 8-pin isolated array form an element (1–8, 2–7, 3–6, 4–5) and that a
bussed network shares pin 1 are facts of the trade (common practice); 74HC levels come
from JEDEC JESD7A (from memory).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from builder import HEX_INVERTER_PINS, SWITCH_PINS, Pin, SchematicBuilder
from pullproof.annotate import apply_annotation, format_plan, plan_annotation
from pullproof.circuit import Part, PartPin
from pullproof.cli import main
from pullproof.elements import layout_of
from pullproof.errors import ValueParseError
from pullproof.report.console import review_table
from pullproof.report.review_json import review_json
from pullproof.review import review
from pullproof.schematic.model import LibPin
from pullproof.sexpr import parse

# Four elements, one per unit (pins 1/8, 2/7, 3/6, 4/5), as some libraries draw an array.
UNIT_ARRAY = tuple(
    pin
    for unit, (a, b) in enumerate(((1, 8), (2, 7), (3, 6), (4, 5)), start=1)
    for pin in (
        Pin(str(a), (0, 2.54), "passive", "", unit),
        Pin(str(b), (0, -2.54), "passive", "", unit),
    )
)
# An isolated 8-pin pack in one unit: pins 1-4 along the bottom, 8-5 above them.
PACK = tuple(
    Pin(str(n), (-3.81 + 2.54 * i, y), "passive", "")
    for i, (low, high) in enumerate(((1, 8), (2, 7), (3, 6), (4, 5)))
    for n, y in ((low, -5.08), (high, 5.08))
)
# A bussed 9-pin network: pin 1 alone on top, pins 2-9 below, every element shares pin 1.
BUSSED = (
    Pin("1", (-10.16, 5.08), "passive", ""),
    *(Pin(str(n), (-10.16 + 2.54 * (n - 2), -5.08), "passive", "") for n in range(2, 10)),
)
# A single-row SIP drawn with every pin on one line: geometry cannot tell the elements.
SIP_ROW = tuple(Pin(str(n), (2.54 * n, -5.08), "passive", "") for n in range(1, 5))
# The first six inverter inputs of a 74HC14 and its supply unit.
INPUTS = ("1", "3", "5", "9", "11", "13")


def _hive(tmp_path: Path, *, elements_field: str = "") -> Path:
    b = SchematicBuilder()
    for unit in range(1, 8):
        b.part("U1", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=(150 + 20 * unit, 30),
               unit=unit, value="74HC14")  # fmt: skip
    b.power("+5V", at=b.pin_point("U1", "14", 7))
    b.power("GND", at=b.pin_point("U1", "7", 7))
    # RN1, one element per unit: 1–8 pulls DOOR_A up, 2–7 pulls DOOR_B up
    for unit, (x, up, net, pin) in enumerate(
        (
            (30, "8", "DOOR_A", "1"),
            (50, "7", "DOOR_B", "2"),
            (70, "6", "", "3"),
            (90, "5", "", "4"),
        ),
        start=1,
    ):
        b.part("RN1", "hive_lib:R_Array", pins=UNIT_ARRAY, at=(x, 30), unit=unit, value="4x10k",
               fields={"Footprint": "Resistor_SMD:R_Array_Convex_4x0603", "Power": "1/16W",
                       "pullproof.working_voltage": "50V"})  # fmt: skip
        if net:
            b.power("+5V", at=b.pin_point("RN1", up, unit))
            b.label(net, at=b.pin_point("RN1", pin, unit))
    b.label("DOOR_A", at=b.pin_point("U1", "1", 1))
    b.label("DOOR_B", at=b.pin_point("U1", "3", 2))
    # RN2, an isolated pack drawn as one symbol: 3–6 pulls DOOR_C down
    b.part("RN2", "hive_lib:R_Pack04", pins=PACK, at=(30, 80), value="47k",
           fields={"Footprint": "Resistor_SMD:R_Array_Convex_4x0603", "Power": "1/16W",
                       "pullproof.working_voltage": "50V"})  # fmt: skip
    b.power("GND", at=b.pin_point("RN2", "6"))
    b.label("DOOR_C", at=b.pin_point("RN2", "3"))
    b.label("DOOR_C", at=b.pin_point("U1", "5", 3))
    # RN3, a bussed network: common pin 1 on +5V, 1–2 pulls DOOR_D up, 1–3 pulls TARE up
    b.part("RN3", "hive_lib:R_Network08", pins=BUSSED, at=(80, 80), value="8x4k7",
           fields={"Footprint": "Resistor_THT:R_Array_SIP9", "Power": "1/8W",
                       "pullproof.working_voltage": "100V"})  # fmt: skip
    b.power("+5V", at=b.pin_point("RN3", "1"))
    b.label("DOOR_D", at=b.pin_point("RN3", "2"))
    b.label("TARE", at=b.pin_point("RN3", "3"))
    b.label("DOOR_D", at=b.pin_point("U1", "9", 4))
    b.label("TARE", at=b.pin_point("U1", "11", 5))
    # door reeds and the tare button close to the rail opposite their pull
    for ref, net, far in (("SW1", "DOOR_A", "GND"), ("SW2", "DOOR_B", "GND"),
                          ("SW3", "DOOR_C", "+5V"), ("SW4", "DOOR_D", "GND"),
                          ("SW5", "TARE", "GND")):  # fmt: skip
        b.part(ref, "Switch:SW_Push", pins=SWITCH_PINS, at=(30 + 25 * int(ref[2:]), 130),
               value="REED", fields={"pullproof.contact_max": "100mA"})  # fmt: skip
        b.label(net, at=b.pin_point(ref, "1"))
        b.power(far, at=b.pin_point(ref, "2"))
    # RN4, drawn as one row of pins: its elements come from its field, or not at all
    fields = {
        "Footprint": "Resistor_SMD:R_Array_Convex_2x0603",
        "Power": "1/16W",
        "pullproof.working_voltage": "50V",
    }
    if elements_field:
        fields["pullproof.elements"] = elements_field
    b.part("RN4", "hive_lib:R_SIP4", pins=SIP_ROW, at=(130, 80), value="10k", fields=fields)
    b.power("+5V", at=b.pin_point("RN4", "4"))
    b.label("SPARE", at=b.pin_point("RN4", "1"))
    b.label("SPARE", at=b.pin_point("U1", "13", 6))
    return b.write(tmp_path / "hive.kicad_sch")


def test_every_element_is_judged_on_its_own_net(tmp_path: Path) -> None:
    result = review(_hive(tmp_path, elements_field="1-4,2-3"))
    judged = {n.network.net: n.network.resistor.refs for n in result.networks}
    assert judged == {
        "/DOOR_A": ("RN1 (1–8)",),  # one element per unit
        "/DOOR_B": ("RN1 (2–7)",),
        "/DOOR_C": ("RN2 (3–6)",),  # pins paired across the body
        "/DOOR_D": ("RN3 (1–2)",),  # the bussed network's common pin 1
        "/TARE": ("RN3 (1–3)",),
        "/SPARE": ("RN4 (1–4)",),  # the field says which pins form an element
    }
    # the array's Value is one element's value: 4x10k is four 10 kΩ elements
    by_net = {n.network.net: n.network for n in result.networks}
    assert by_net["/DOOR_A"].resistor.ohms.magnitude("ohm") == pytest.approx(10e3)
    assert by_net["/DOOR_D"].resistor.ohms.magnitude("ohm") == pytest.approx(4.7e3)
    assert by_net["/DOOR_C"].direction.value == "down"


def test_array_elements_in_the_reports(tmp_path: Path) -> None:
    result = review(_hive(tmp_path, elements_field="1-4,2-3"))
    doc = review_json(result)
    resistors = {n["net"]: n["resistors"][0] for n in doc["networks"]}
    assert (resistors["/DOOR_A"]["ref"], resistors["/DOOR_A"]["element"]) == ("RN1", "1-8")
    assert (resistors["/TARE"]["ref"], resistors["/TARE"]["element"]) == ("RN3", "1-3")
    table = review_table(result)
    assert "RN2 (3–6)" in table and "RN1 (1–8)" in table


def test_elements_that_cannot_be_told_are_set_aside_with_the_hint(tmp_path: Path) -> None:
    result = review(_hive(tmp_path))
    (rn4,) = [s for s in result.skipped if s.ref == "RN4"]
    assert rn4.reason == (
        "resistor array: its elements cannot be told from the symbol; add field "
        "'pullproof.elements' (e.g. 1-8,2-7 or common=1)"
    )
    assert "/SPARE" not in {n.network.net for n in result.networks}


def test_a_bad_elements_field_is_an_input_error(tmp_path: Path) -> None:
    root = _hive(tmp_path, elements_field="1-9")
    with pytest.raises(ValueParseError) as info:
        review(root)
    assert str(info.value).startswith(f"{root}:")  # placed at the field: FILE:LINE:COL
    assert str(info.value).endswith(
        ": field 'pullproof.elements' of RN4: cannot read '1-9'; expected pin pairs such as "
        "1-8,2-7 or common=1, naming pins of RN4"
    )
    assert main(["review", str(root)]) == 2


def _part(ref: str, pins: tuple[str, ...], **fields: str) -> Part:
    return Part(
        ref, "10k", "x:R_Array", "/", fields, tuple(PartPin(p, "", "passive") for p in pins)
    )


def _lib(points: dict[str, tuple[int, int]], units: dict[str, int] | None = None) -> list[LibPin]:
    return [LibPin(n, "", "passive", xy, (units or {}).get(n, 1), 0) for n, xy in points.items()]


def test_layouts_by_rule() -> None:
    # pins on two facing sides, paired across the body (left column to right column)
    side = _lib({"1": (-5080, 2540), "2": (-5080, 0), "3": (5080, 0), "4": (5080, 2540)})
    lay = layout_of(_part("RN7", ("1", "2", "3", "4")), side)
    assert ([e.label for e in lay.elements], lay.how) == (["RN7 (1–4)", "RN7 (2–3)"],
                                                         "pin geometry")  # fmt: skip
    # a pin named COMMON is shared by every element
    named = Part("RN8", "4k7", "x:RN", "/", {},
                 (PartPin("1", "common", "passive"), PartPin("2", "R1", "passive"),
                  PartPin("3", "R2", "passive")))  # fmt: skip
    lay = layout_of(named, None)
    assert ([e.label for e in lay.elements], lay.how) == (["RN8 (1–2)", "RN8 (1–3)"],
                                                         "common pin 1")  # fmt: skip
    lay = layout_of(_part("RN9", ("1", "2", "3"), **{"pullproof.elements": "common=2"}), None)
    assert [e.element for e in lay.elements] == ["2-1", "2-3"]


def test_annotate_writes_each_unit_its_element_and_a_shared_symbol_the_worst(
    tmp_path: Path,
) -> None:
    root = _hive(tmp_path, elements_field="1-4,2-3")
    plan = plan_annotation(root)
    listing = format_plan(plan, written=False)
    apply_annotation(plan)
    text = root.read_text(encoding="utf-8")
    fields_by_unit: dict[tuple[str, int], dict[str, str]] = {}
    for sym in parse(text, "hive").nodes("symbol"):
        props = {str(p.atom(0)): str(p.atom(1)) for p in sym.nodes("property")}
        unit = sym.first("unit")
        if "Reference" in props and unit is not None:
            fields_by_unit[(props["Reference"], int(unit.atom(0)))] = props
    # RN1 is drawn one element per unit: each unit carries its own element's fields
    assert "pullproof.verdict" in fields_by_unit[("RN1", 1)]
    assert fields_by_unit[("RN1", 1)]["pullproof.reason"].startswith("RN1 (1–8) ")
    assert fields_by_unit[("RN1", 2)]["pullproof.reason"].startswith("RN1 (2–7) ")
    assert "pullproof.verdict" not in fields_by_unit[("RN1", 3)]  # an unused element
    # RN3 is one symbol for several elements: it carries one element's fields, and the
    # listing says which and why
    assert fields_by_unit[("RN3", 1)]["pullproof.reason"].startswith("RN3 (1–")
    assert "RN3 (1–2)/RN3 (1–3) share one symbol (elements of one resistor array)" in listing


def test_cli_json_names_the_element(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    root = _hive(tmp_path, elements_field="1-4,2-3")
    assert main(["review", str(root), "--json"]) in (0, 1)
    doc = json.loads(capsys.readouterr().out)
    elements = sorted((r["ref"], r["element"]) for n in doc["networks"] for r in n["resistors"])
    assert elements == [("RN1", "1-8"), ("RN1", "2-7"), ("RN2", "3-6"), ("RN3", "1-2"),
                        ("RN3", "1-3"), ("RN4", "1-4")]  # fmt: skip


def test_an_acceptance_naming_the_array_covers_its_element(tmp_path: Path) -> None:
    # RN2 (3–6) is marginal: its door contact's wetting current is assumed, not stated
    root = _hive(tmp_path, elements_field="1-4,2-3")
    (root.parent / "pullproof.toml").write_text(
        '[[accept]]\nref = "RN2"\nkind = "marginal"\nreason = "the door reeds are gold contacts"\n',
        encoding="utf-8",
    )
    door_c = next(n for n in review(root).networks if n.network.net == "/DOOR_C")
    assert door_c.verdict.value == "marginal"
    assert door_c.accepted is not None and door_c.accepted.holds


def test_sarif_points_an_element_at_its_array_symbol(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _hive(tmp_path, elements_field="1-4,2-3")
    sarif = tmp_path / "hive.sarif"
    main(["review", str(root), "--sarif", str(sarif)])
    capsys.readouterr()
    log = json.loads(sarif.read_text(encoding="utf-8"))
    (door_c,) = [r for r in log["runs"][0]["results"] if "/DOOR_C" in r["message"]["text"]]
    assert door_c["locations"][0]["logicalLocations"][0]["name"] == "RN2"

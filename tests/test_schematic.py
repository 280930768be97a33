"""The schematic reader and the symbol transform."""

from __future__ import annotations

import pytest

from builder import V6, V10, Pin, SchematicBuilder
from pullproof.errors import SchematicError
from pullproof.schematic import read_text, unescape
from pullproof.schematic.geometry import place_pin, to_um

# Pin offsets worked by hand from the format rule (DESIGN, "Axes and transform": flip Y,
# rotate counter-clockwise on screen, then mirror about the anchor), for library pins
# (-2.54, 5.08) and (5.08, 0) of a symbol anchored at the origin.
HAND_TABLE = [
    (0, "", (-2.54, -5.08), (5.08, 0)),
    (90, "", (-5.08, 2.54), (0, -5.08)),
    (180, "", (2.54, 5.08), (-5.08, 0)),
    (270, "", (5.08, -2.54), (0, 5.08)),
    (0, "x", (-2.54, 5.08), (5.08, 0)),
    (90, "x", (-5.08, -2.54), (0, 5.08)),
    (180, "x", (2.54, -5.08), (-5.08, 0)),
    (270, "x", (5.08, 2.54), (0, -5.08)),
    (0, "y", (2.54, -5.08), (-5.08, 0)),
    (90, "y", (5.08, 2.54), (0, -5.08)),
    (180, "y", (-2.54, 5.08), (5.08, 0)),
    (270, "y", (-5.08, -2.54), (0, 5.08)),
]


def _um(p: tuple[float, float]) -> tuple[int, int]:
    return to_um(p[0]), to_um(p[1])


@pytest.mark.parametrize(("rot", "mirror", "first", "second"), HAND_TABLE)
def test_place_pin_matches_hand_table(
    rot: int, mirror: str, first: tuple[float, float], second: tuple[float, float]
) -> None:
    anchor = (to_um(100.0), to_um(50.0))
    for lib, want in (((-2.54, 5.08), first), ((5.08, 0.0), second)):
        got = place_pin(_um(lib), anchor, rot, mirror)
        assert got == (anchor[0] + to_um(want[0]), anchor[1] + to_um(want[1]))


@pytest.mark.parametrize(
    ("text", "plain"),
    [
        ("MIST{slash}PUMP", "MIST/PUMP"),
        ("A{backslash}B", "A\\B"),
        ("{lt}EN{gt}", "<EN>"),
        ("X{colon}Y", "X:Y"),
        ("{dblquote}q{quote}", "\"q'"),
        ("T{tab}R{return}S{space}", "T\tR\nS "),
        ("~{RESET}", "~{RESET}"),  # overbar markup is not an escape
        ("{unknown}", "{unknown}"),
    ],
)
def test_unescape(text: str, plain: str) -> None:
    assert unescape(text) == plain


@pytest.mark.parametrize("version", [V6, 20231120, V10])
def test_reader_reads_parts_in_each_dialect(version: int) -> None:
    b = SchematicBuilder(version=version)
    b.part(
        "U5",
        "Pump:Driver",
        pins=(Pin("1", (0, 2.54), "input", "EN", 1), Pin("2", (0, -2.54), "power_in", "", 2)),
        at=(50.8, 25.4),
        rot=270,
        mirror="y",
        unit=2,
        value="DRV",
        fields={"Tolerance": "5%", "Note": "aquarium doser"},
        dnp=True,
    )
    b.power("+12V", at=(10.16, 10.16))
    b.label("DOSE{slash}EN", at=(20.32, 20.32), kind="global_label")
    model = read_text(b.text(), "doser.kicad_sch")
    assert model.version == version
    sym = model.symbols[0]
    assert (sym.lib_id, sym.at, sym.rotation, sym.mirror, sym.unit, sym.body_style) == (
        "Pump:Driver",
        (50800, 25400),
        270,
        "y",
        2,
        1,
    )
    assert dict(sym.properties) == {
        "Reference": "U5",
        "Value": "DRV",
        "Tolerance": "5%",
        "Note": "aquarium doser",
    }
    assert sym.dnp is True
    lib = model.lib_symbols["Pump:Driver"]
    assert [(p.number, p.name, p.type, p.unit, p.body_style) for p in lib.pins] == [
        ("1", "EN", "input", 1, 1),
        ("2", "", "power_in", 2, 1),
    ]
    power = model.lib_symbols["power:+12V"]
    assert power.power and power.pins[0].hidden
    assert model.labels[0].name == "DOSE/EN" and model.labels[0].kind == "global_label"
    if version == V6:
        assert model.symbol_instances[f"/{sym.uuid}"].reference == "U5"
    else:
        assert sym.instances[0].reference == "U5"


@pytest.mark.parametrize(
    ("text", "message"),
    [
        (
            "(kicad_pcb (version 1))",
            "1:1: not a schematic: it is a board file (kicad_pcb)",
        ),
        (
            '(kicad_sch\n (symbol (lib_id "R") (at 1 2 45)))',
            "2:23: rotation 45 is not a multiple of 90",
        ),
        ('(kicad_sch\n (junction (at "x" 2)))', "2:12: expected a number as item 1 of (at …)"),
        (
            "(kicad_sch\n (wire (pts (xy 1 2) (xy 3))))",
            "2:22: expected a number as item 2 of (xy …)",
        ),
        ('(kicad_sch\n (label "A"))', "2:2: (label …) has no (at x y) position"),
        (
            '(kicad_sch\n (sheet (at 0 0) (property "Sheetname" "A")))',
            "2:2: sheet has no Sheetfile property",
        ),
    ],
)
def test_reader_errors(text: str, message: str) -> None:
    with pytest.raises(SchematicError) as info:
        read_text(text, "panel.kicad_sch")
    assert str(info.value) == f"panel.kicad_sch:{message}"


def test_unknown_elements_are_skipped() -> None:
    model = read_text('(kicad_sch (version 20231120) (frobnicate (x 1)) (text "hi"))', "t")
    assert model.symbols == () and model.wires == ()

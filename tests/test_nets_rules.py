"""Three format rules of connectivity, each on a fixture of its own in v6, v8 and v10.

* the unit of a symbol comes from its sheet instance (``valve_bank_*``);
* a local label joins the global net of the same name when a power symbol or global label
  of that name is on the same sheet instance (``hive_door_*``);
* bus groups ``NAME{A B}`` / ``{A B}`` / ``{D[0..3] CLK}`` stand for their members (``lid_bus_*``).

The rules are the schematic format's own (the editor that writes these files connects them
so); the expected partitions were worked out by hand from each drawing.
"""

from __future__ import annotations

import random
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from builder import V6, V8, V10, SchematicBuilder
from conftest import CONNECTIVITY
from draw_connectivity import QUAD_GATES, draw_valve_bank, members_of_lid_bus
from pullproof.circuit import Circuit
from pullproof.nets import build_circuit
from pullproof.schematic.busnames import bus_members, parse_bus_name

DIALECTS = ("v6", "v8", "v10")


def _nets(circuit: Circuit) -> dict[str, set[str]]:
    return {n.name: {f"{m.ref}.{m.pin}" for m in n.members} for n in circuit.nets}


def _partition(circuit: Circuit) -> set[frozenset[str]]:
    return {frozenset(f"{m.ref}.{m.pin}" for m in n.members) for n in circuit.nets}


def _valve_bank_expected() -> set[frozenset[str]]:
    parts: set[frozenset[str]] = {
        frozenset({"R11.1", "R21.1", "R31.1", "R41.1", "U1.14"}),
        frozenset({"J11.2", "J21.2", "J31.2", "J41.2", "U1.7"}),
    }
    for k, (a, y) in QUAD_GATES.items():
        parts.add(frozenset({f"R{k}1.2", f"J{k}1.1", f"U1.{a}"}))  # the channel's input node
        parts.add(frozenset({f"U1.{y}", f"J1.{k}"}))  # its output to the valve connector
    return parts


@pytest.mark.parametrize("dialect", DIALECTS)
def test_unit_comes_from_the_sheet_instance(dialect: str) -> None:
    circuit = build_circuit(CONNECTIVITY / f"valve_bank_{dialect}" / "valve_bank.kicad_sch")
    assert _partition(circuit) == _valve_bank_expected()
    u1 = circuit.part("U1")
    assert u1 is not None
    # one drawn unit, four instances placing units 1-4, and the power unit on the root
    assert sorted(p.unit for p in u1.placements) == [1, 2, 3, 4, 5]
    assert [p.number for p in u1.pins] == ["1", "2", "3", "4", "5", "6", "7", "8", "9", "14"]


@settings(max_examples=20, deadline=None)
@given(
    turns=st.integers(0, 3),
    flip=st.booleans(),
    dx=st.integers(-30, 30),
    dy=st.integers(-30, 30),
    version=st.sampled_from((V6, V8, V10)),
)
def test_unit_per_instance_survives_rotation_and_mirroring(
    tmp_path_factory: pytest.TempPathFactory, turns: int, flip: bool, dx: int, dy: int, version: int
) -> None:
    folder = tmp_path_factory.mktemp("valves")
    files = draw_valve_bank(version, turns=turns, flip=flip, shift=(2.54 * dx, 2.54 * dy))
    for name, text in files.items():
        (folder / name).write_text(text, encoding="utf-8")
    assert _partition(build_circuit(folder / "valve_bank.kicad_sch")) == _valve_bank_expected()


@pytest.mark.parametrize("dialect", DIALECTS)
def test_local_label_joins_a_global_name_on_its_own_sheet(dialect: str) -> None:
    nets = _nets(build_circuit(CONNECTIVITY / f"hive_door_{dialect}" / "hive_door.kicad_sch"))
    # the door sheet carries a GND power symbol and an ALARM global label: its connector's
    # local labels GND and ALARM are on those nets
    assert nets["GND"] == {"C1.2", "C2.2", "J2.2"}
    assert nets["ALARM"] == {"R1.2", "R3.2", "J2.1"}
    # the trap sheet has neither: the same local names stay local to that sheet
    assert nets["/TRAP/GND"] == {"J3.2", "R5.2"}
    assert nets["/TRAP/ALARM"] == {"J3.1", "R5.1"}


@pytest.mark.parametrize("dialect", DIALECTS)
def test_bus_groups_join_their_members_through_sheet_pins(dialect: str) -> None:
    circuit = build_circuit(CONNECTIVITY / f"lid_bus_{dialect}" / "lid_bus.kicad_sch")
    partition = _partition(circuit)
    for resistor, switch in members_of_lid_bus():
        assert frozenset({f"{resistor}.2", f"{switch}.1"}) in partition
    nets = _nets(circuit)
    assert nets["/LID.OPEN"] == {"R1.2", "SW11.1"}  # NAME{A B} → NAME.A, named on the root
    assert nets["/SDA"] == {"R3.2", "SW13.1"}  # a bare group {A B} → A, B
    assert nets["/PORT.D1"] == {"R6.2", "SW16.1"}  # a vector inside a group
    assert nets["/~{RESET}"] == {"R8.2", "R9.2"}  # overbar markup is one plain name


@pytest.mark.parametrize(
    ("name", "members", "shorts"),
    [
        ("A[0..3]", ("A0", "A1", "A2", "A3"), ("A0", "A1", "A2", "A3")),
        ("A[2..0]", ("A2", "A1", "A0"), ("A2", "A1", "A0")),
        ("LID{OPEN CLOSED}", ("LID.OPEN", "LID.CLOSED"), ("OPEN", "CLOSED")),
        ("{SDA SCL}", ("SDA", "SCL"), ("SDA", "SCL")),
        ("{SDA,SCL}", ("SDA", "SCL"), ("SDA", "SCL")),
        ("PORT{D[0..1] CLK}", ("PORT.D0", "PORT.D1", "PORT.CLK"), ("D0", "D1", "CLK")),
        ("{D[0..1] CLK}", ("D0", "D1", "CLK"), ("D0", "D1", "CLK")),
    ],
)
def test_bus_name_expansion(name: str, members: tuple[str, ...], shorts: tuple[str, ...]) -> None:
    parsed = parse_bus_name(name)
    assert parsed is not None and parsed.members == members and parsed.shorts == shorts
    assert bus_members(name) == members


@pytest.mark.parametrize(
    "name", ["RESET", "~{RESET}", "V_{IN}", "x^{2}", "CS~{0}", "{}", "{ }", "A[0..x]"]
)
def test_plain_names_and_text_markup_are_not_buses(name: str) -> None:
    # ~{…}, _{…} and ^{…} are the format's overbar, subscript and superscript markup
    assert parse_bus_name(name) is None and bus_members(name) == ()


# -- net names stay deterministic when power symbols and labels name one net -----------------


def _named_twice(tmp: Path, order: list[int]) -> str:
    """One net named by power symbols +3V3 and VDD_IO, a global and a local label, drawn in
    the given order; returns its name."""
    b = SchematicBuilder()
    b.resistor("R1", "10k", at=(50.8, 50.8))
    p = b.pin_point("R1", "1")
    items = [
        lambda: b.power("VDD_IO", at=p),
        lambda: b.power("+3V3", at=p),
        lambda: b.label("LOGIC_SUPPLY", at=p, kind="global_label"),
        lambda: b.label("AUX", at=p),
    ]
    for i in order:
        items[i]()
    circuit = build_circuit(b.write(tmp / f"named_{''.join(map(str, order))}.kicad_sch"))
    net = circuit.net_of("R1", "1")
    assert net is not None
    assert set(net.labels) == {"+3V3", "VDD_IO", "LOGIC_SUPPLY", "AUX"}
    return net.name


def test_power_symbol_name_wins_whatever_the_drawing_order(tmp_path: Path) -> None:
    rng = random.Random(8)
    orders = [rng.sample(range(4), 4) for _ in range(6)]
    # our rule: power-symbol names first, the lowest in character order ('+' < 'V')
    assert {_named_twice(tmp_path, o) for o in orders} == {"+3V3"}

"""Connectivity rules on hand-made fixtures, and invariance under whole-sheet transforms."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from builder import HEX_INVERTER_PINS, SWITCH_PINS, SchematicBuilder
from conftest import CONNECTIVITY
from pullproof.circuit import Circuit
from pullproof.nets import build_circuit, natural_key

Partition = set[frozenset[tuple[str, str]]]


def partition(circuit: Circuit) -> Partition:
    return {frozenset((m.ref, m.pin) for m in n.members) for n in circuit.nets}


def nets_by_name(circuit: Circuit) -> dict[str, set[str]]:
    return {n.name: {f"{m.ref}.{m.pin}" for m in n.members} for n in circuit.nets}


def test_every_pin_in_exactly_one_net() -> None:
    for path in sorted(CONNECTIVITY.rglob("*.kicad_sch")):
        circuit = build_circuit(path)
        seen = [(m.ref, m.pin) for n in circuit.nets for m in n.members]
        assert len(seen) == len(set(seen)), path
        pins = {(p.ref, q.number) for p in circuit.parts for q in p.pins}
        assert pins == set(seen), path
        assert not any(p.ref.startswith("#") for p in circuit.parts), path


def test_greenhouse_rules() -> None:
    nets = nets_by_name(build_circuit(CONNECTIVITY / "greenhouse_vent.kicad_sch"))
    # common practice of the format: a wire end on another wire's interior joins it (T-join)
    assert nets["net@R1.2"] == {"R1.2", "SW1.2", "U1.1"}
    # crossing wires without a junction stay apart; a label mid-wire names the wire
    assert nets["/FAN_SENSE"] == {"R2.1", "R3.2"}
    # coincident pins connect; {slash} escapes compare equal to the plain character
    assert nets["net@R4.2"] == {"R4.2", "R5.1"}
    assert nets["/MIST/PUMP"] == {"R5.2", "R6.2"}
    # power symbols name the rail and are not members; the flag joins nothing
    assert nets["+5V"] == {"R1.1"} and nets["GND"] == {"SW1.1"}
    assert nets["net@R2.2"] == {"R2.2"}  # a no-connect changes nothing


def test_power_flags_and_labels() -> None:
    circuit = build_circuit(CONNECTIVITY / "greenhouse_vent.kicad_sch")
    by_name = {n.name: n for n in circuit.nets}
    assert by_name["+5V"].power and not by_name["/FAN_SENSE"].power
    assert by_name["/MIST/PUMP"].labels == ("MIST/PUMP",)
    r1 = circuit.part("R1")
    assert r1 is not None and dict(r1.fields) == {"Tolerance": "1%"} and r1.value == "10k"


@pytest.mark.parametrize("k", range(1, 9))
def test_eight_orientations(k: int) -> None:
    # each label sits where the format's rule puts the pin (offsets worked by hand)
    nets = nets_by_name(build_circuit(CONNECTIVITY / "interlock_orient.kicad_sch"))
    assert nets[f"/K{k}_A"] == {f"K{k}.1"} and nets[f"/K{k}_B"] == {f"K{k}.2"}


def test_multi_unit_part_and_hidden_power_pins() -> None:
    circuit = build_circuit(CONNECTIVITY / "doser_comparator.kicad_sch")
    nets = nets_by_name(circuit)
    assert nets["net@R10.2"] == {"R10.2", "U2.1", "U2.7", "U3.1"}  # wired-OR outputs
    assert nets["+3V3"] == {"R10.1", "U2.8", "U3.5"}  # U3's hidden power-in pin joins by name
    assert nets["GND"] == {"U2.4", "U3.3"}
    u2 = circuit.part("U2")
    assert u2 is not None and len(u2.placements) == 3
    assert [p.number for p in u2.pins] == ["1", "2", "3", "4", "5", "6", "7", "8"]


def test_hierarchy_with_a_sheet_used_twice() -> None:
    circuit = build_circuit(CONNECTIVITY / "beehive" / "beehive.kicad_sch")
    nets = nets_by_name(circuit)
    assert [s.path for s in circuit.sheets] == ["/", "/HIVE_A/", "/HIVE_B/"]
    assert nets["/HIVE_A/MID"] == {"R11.2", "R12.1"}  # a local label per sheet instance
    assert nets["/HIVE_B/MID"] == {"R21.2", "R22.1"}
    assert nets["/HIVE_A/OUT"] == {"J1.1", "R11.1"}  # hierarchical label ↔ sheet pin
    assert nets["/WEIGHT_B"] == {"J1.2", "R21.1"}
    assert nets["/D0"] == {"J1.3", "R12.2"}  # bus D[0..1] joined member by member
    assert nets["/D1"] == {"J1.4", "R13.1"}
    assert nets["/HIVE_B/D0"] == {"R22.2"}  # HIVE_B's bus pin is not wired
    assert nets["SCALE_EN"] == {"R1.1", "R13.2", "R23.2"}  # global label everywhere
    assert circuit.part("R21") is not None and circuit.part("R1") is not None
    assert sorted(circuit.files) == ["beehive.kicad_sch", "load_cell.kicad_sch"]


@pytest.mark.parametrize(
    ("fixture", "expected"),
    [
        ("aquarium_lid_v6.kicad_sch", {"+5V": {"R7.1"}, "/LID_OPEN": {"R7.2", "SW2.1"}}),
        ("entrance_counter_v10.kicad_sch", {"+3V3": {"R8.1"}, "BEE_GATE": {"R8.2", "U4.1"}}),
    ],
)
def test_format_dialects(fixture: str, expected: dict[str, set[str]]) -> None:
    nets = nets_by_name(build_circuit(CONNECTIVITY / fixture))
    for name, members in expected.items():
        assert nets[name] == members


def test_natural_order() -> None:
    assert sorted(["R10", "R2", "R1"], key=natural_key) == ["R1", "R2", "R10"]


# -- the same circuit drawn rotated, mirrored and moved keeps its partition -------------------


def _draw(tmp: Path, turns: int, flip: bool, dx: int, dy: int) -> Circuit:
    """A pull-up, a T-join, a crossing and a coincident pair, under a whole-sheet transform."""

    def t(p: tuple[float, float]) -> tuple[float, float]:
        u, v = p
        for _ in range(turns):
            u, v = v, -u  # a quarter turn counter-clockwise on screen (Y down)
        if flip:
            v = -v
        return round(u + 2.54 * dx, 4), round(v + 2.54 * dy, 4)

    ref = SchematicBuilder()  # untransformed drawing, used only to find pin points
    b = SchematicBuilder()

    def part(name: str, kind: str, at: tuple[float, float], rot: int, **kw: object) -> None:
        pins = {"R": None, "U": HEX_INVERTER_PINS, "S": SWITCH_PINS}[kind]
        # flip∘turn∘rotate(rot) is mirror-x∘rotate(rot + turn): the symbol's own orientation
        mirror = "x" if flip else ""
        rot2 = (rot + 90 * turns) % 360
        if pins is None:
            ref.resistor(name, "10k", at=at, rot=rot)
            b.resistor(name, "10k", at=t(at), rot=rot2, mirror=mirror)
        else:
            ref.part(name, f"X:{kind}", pins=pins, at=at, rot=rot)
            b.part(name, f"X:{kind}", pins=pins, at=t(at), rot=rot2, mirror=mirror)

    part("R1", "R", (50.8, 50.8), 0)
    part("U1", "U", (76.2, 58.42), 0)
    part("SW1", "S", (60.96, 76.2), 90)
    part("R2", "R", (30.48, 56.5), 90)
    part("R3", "R", (91.44, 56.5), 90)
    part("R4", "R", (101.6, 30.48), 180)
    part("R5", "R", (101.6, 38.1), 0)
    b.power("+5V", at=t(ref.pin_point("R1", "1")))
    path = [ref.pin_point("R1", "2"), (60.96, 54.61), (60.96, 58.42), ref.pin_point("U1", "1")]
    b.wire(*[t(p) for p in path])
    b.wire(t(ref.pin_point("SW1", "2")), t((60.96, 58.42)))
    b.wire(t(ref.pin_point("R2", "1")), t(ref.pin_point("R3", "2")))
    b.label("SENSE", at=t((50.8, 56.5)))
    b.wire(t(ref.pin_point("R4", "1")), t((110.0, 30.48)), t(ref.pin_point("U1", "2")))
    return build_circuit(b.write(tmp / f"vent_{turns}_{flip}_{dx}_{dy}.kicad_sch"))


@settings(max_examples=25, deadline=None)
@given(
    turns=st.integers(0, 3),
    flip=st.booleans(),
    dx=st.integers(-40, 40),
    dy=st.integers(-40, 40),
)
def test_partition_invariant_under_transform(
    tmp_path_factory: pytest.TempPathFactory, turns: int, flip: bool, dx: int, dy: int
) -> None:
    tmp = tmp_path_factory.mktemp("vent")
    base = partition(_draw(tmp, 0, False, 0, 0))
    assert {frozenset({("R1", "2"), ("SW1", "2"), ("U1", "1")})} <= base
    assert partition(_draw(tmp, turns, flip, dx, dy)) == base


def _depth(parent: dict[object, object], key: object) -> int:
    """Steps from ``key`` to its root, read without compressing the path."""
    d = 0
    while parent[key] != key:
        key, d = parent[key], d + 1
    return d


def test_union_find_stays_shallow_on_a_100k_pin_chain() -> None:
    # Union by size keeps every tree at most log2(n) deep (a textbook property of the
    # structure), so joining a 100 000-pin net in a chain, in either order, stays linear.
    # Checked by depth, not by time: no timings in tests.
    from pullproof.nets import _Joiner

    n = 100_000
    for order in (range(n - 1), reversed(range(n - 1))):
        j = _Joiner()
        for i in order:
            j.union(("P", "R", i), ("P", "R", i + 1))
        assert max(_depth(j.parent, k) for k in j.parent) <= n.bit_length()
        assert len({j.find(k) for k in j.parent}) == 1

"""Draw the connectivity fixtures of three format rules, in any dialect (v6, v8, v10).

Each ``draw_*`` function returns ``{file name: schematic text}`` for one invented scenario;
``fixtures/make_connectivity.py`` writes them under ``fixtures/connectivity/`` and
``tests/test_nets_rules.py`` checks their partitions (and redraws the unit case under
whole-sheet transforms for the property test).

* **valve bank** — unit from the instance: a four-channel irrigation valve-feedback board.
  One channel sheet is used four times; it draws unit 1 of a quad buffer U1, and each
  sheet instance places another unit (1…4) of the same U1.
* **hive door** — same-name joins: on the beehive door sheet a connector's local labels
  ``GND`` and ``ALARM`` join the ground net and the global ``ALARM`` net, because a ``GND``
  power symbol and an ``ALARM`` global label are on that sheet; the pest-trap sheet uses the
  same local names with neither present, and its nets stay local.
* **lid bus** — bus groups: an aquarium lid latch reached through a sheet pin
  ``LID{OPEN CLOSED}``, a bare group ``{SDA SCL}`` and a group holding a vector
  ``PORT{D[0..1] CLK}``; a ``~{RESET}`` overbar label is a plain name, not a group.
"""

from __future__ import annotations

import random
import uuid
from collections.abc import Iterator
from contextlib import contextmanager

import builder
from builder import SWITCH_PINS, V6, Pin, SchematicBuilder

__all__ = [
    "QUAD_BUFFER_PINS",
    "QUAD_GATES",
    "draw_hive_door",
    "draw_lid_bus",
    "draw_valve_bank",
    "members_of_lid_bus",
    "seeded_uuids",
]

Point = tuple[float, float]

# A quad buffer drawn as four gate units with the same geometry and a power unit 5.
QUAD_BUFFER_PINS = (
    *tuple(
        pin
        for gate, (a, y) in enumerate(((1, 2), (3, 4), (5, 6), (9, 8)), start=1)
        for pin in (
            Pin(str(a), (-7.62, 0), "input", f"A{gate}", gate),
            Pin(str(y), (7.62, 0), "output", f"Y{gate}", gate),
        )
    ),
    Pin("14", (0, 12.7), "power_in", "VCC", 5),
    Pin("7", (0, -12.7), "power_in", "GND", 5),
)
# Unit k's pins (input, output), as the valve-bank test expects them.
QUAD_GATES = {1: ("1", "2"), 2: ("3", "4"), 3: ("5", "6"), 4: ("9", "8")}
TWO_PIN_JACK = (Pin("1", (5.08, 0), "passive", "1"), Pin("2", (5.08, -2.54), "passive", "2"))
FOUR_PIN_JACK = tuple(Pin(str(i + 1), (5.08, -2.54 * i), "passive", str(i + 1)) for i in range(4))
CAP_PINS = (Pin("1", (0, 3.81)), Pin("2", (0, -3.81)))


@contextmanager
def seeded_uuids(seed: int) -> Iterator[None]:
    """Make the builder's UUIDs come from ``seed`` (so regenerated files are identical)."""
    rng = random.Random(seed)
    saved = builder._uuid  # type: ignore[attr-defined]
    builder._uuid = type(  # type: ignore[attr-defined]
        "SeededUuid", (), {"uuid4": staticmethod(lambda: uuid.UUID(int=rng.getrandbits(128)))}
    )
    try:
        yield
    finally:
        builder._uuid = saved  # type: ignore[attr-defined]


def _paths(root: SchematicBuilder, sheet_uuid: str) -> str:
    """The instance path a sub-sheet's placements are keyed by, in the root's dialect."""
    return f"/{sheet_uuid}" if root.version <= V6 else f"/{root.uuid}/{sheet_uuid}"


def draw_valve_bank(
    version: int, *, turns: int = 0, flip: bool = False, shift: Point = (0.0, 0.0)
) -> dict[str, str]:
    """The four-channel valve-feedback board; the channel sheet may be drawn transformed
    (``turns`` quarter turns, then a flip about the horizontal axis, then ``shift`` mm)."""

    def t(p: Point) -> Point:
        u, v = p
        for _ in range(turns):
            u, v = v, -u  # a quarter turn counter-clockwise on screen (Y down)
        if flip:
            v = -v
        return round(u + shift[0], 4), round(v + shift[1], 4)

    rot = (90 * turns) % 360
    mirror = "x" if flip else ""
    root = SchematicBuilder(version=version)
    blocks = [
        root.sheet(
            f"CH{k}",
            "channel.kicad_sch",
            at=(101.6, 25.4 * k),
            pins={"FLOW": (101.6, 25.4 * k + 5.08)},
        )
        for k in range(1, 5)
    ]
    root.part("J1", "Connector:Conn_01x04", pins=FOUR_PIN_JACK, at=(50.8, 12.7), value="VALVES")
    for k in range(1, 5):
        x, (px, py) = 66.04 + 5.08 * k, root.pin_point("J1", str(k))  # one riser per channel
        root.wire((px, py), (x, py), (x, 25.4 * k + 5.08), (101.6, 25.4 * k + 5.08))
    root.part(
        "U1", "Logic:QuadBuffer", pins=QUAD_BUFFER_PINS, at=(152.4, 50.8), unit=5, value="QUAD_BUF"
    )
    root.power("+5V", at=root.pin_point("U1", "14", 5))
    root.power("GND", at=root.pin_point("U1", "7", 5))

    ch = SchematicBuilder(version=version, v6_child=version <= V6)
    paths = [_paths(root, b) for b in blocks]

    def per(prefix: str) -> dict[str, str | tuple[str, int]]:
        return {p: f"{prefix}{k}1" for k, p in enumerate(paths, start=1)}

    ch.resistor("R", "10k", at=t((60.96, 38.1)), rot=rot, mirror=mirror, instances=per("R"))
    ch.part(
        "J",
        "Connector:Conn_01x02",
        pins=TWO_PIN_JACK,
        at=t((40.64, 50.8)),
        rot=rot,
        mirror=mirror,
        value="FLOW_SENSOR",
        instances=per("J"),
    )
    units: dict[str, str | tuple[str, int]] = {p: ("U1", k) for k, p in enumerate(paths, start=1)}
    ch.part(
        "U1",
        "Logic:QuadBuffer",
        pins=QUAD_BUFFER_PINS,
        at=t((76.2, 50.8)),
        rot=rot,
        mirror=mirror,
        unit=1,
        value="QUAD_BUF",
        instances=units,
    )
    plain = SchematicBuilder()  # the untransformed drawing, used only for pin points
    plain.resistor("R", "10k", at=(60.96, 38.1))
    plain.part("J", "X:J", pins=TWO_PIN_JACK, at=(40.64, 50.8))
    plain.part("U1", "X:U", pins=QUAD_BUFFER_PINS, at=(76.2, 50.8))
    ch.power("+5V", at=t(plain.pin_point("R", "1")))
    ch.power("GND", at=t(plain.pin_point("J", "2")))
    ch.wire(t(plain.pin_point("R", "2")), t((60.96, 50.8)), t(plain.pin_point("U1", "1")))
    ch.wire(t(plain.pin_point("J", "1")), t((60.96, 50.8)))
    ch.wire(t(plain.pin_point("U1", "2")), t((91.44, 50.8)))
    ch.label("FLOW", at=t((91.44, 50.8)), kind="hierarchical_label")
    if version <= V6:
        root.adopt_v6(ch)
    return {"valve_bank.kicad_sch": root.text(), "channel.kicad_sch": ch.text()}


def draw_hive_door(version: int) -> dict[str, str]:
    """The beehive door and pest-trap sheets (same-name joins on one sheet instance)."""
    root = SchematicBuilder(version=version)
    door = root.sheet("DOOR", "door.kicad_sch", at=(101.6, 25.4))
    trap = root.sheet("TRAP", "trap.kicad_sch", at=(101.6, 76.2))
    root.resistor("R1", "10k", at=(50.8, 50.8))
    root.power("+3V3", at=root.pin_point("R1", "1"))
    root.label("ALARM", at=root.pin_point("R1", "2"), kind="global_label")
    root.part("C1", "Device:C", pins=CAP_PINS, at=(76.2, 50.8), value="100n")
    root.power("+3V3", at=root.pin_point("C1", "1"))
    root.power("GND", at=root.pin_point("C1", "2"))

    child = version <= V6
    d = SchematicBuilder(version=version, v6_child=child)
    dp = _paths(root, door)
    d.part(
        "J2",
        "Connector:Conn_01x02",
        pins=TWO_PIN_JACK,
        at=(40.64, 50.8),
        value="DOOR",
        instances={dp: "J2"},
    )
    d.label("ALARM", at=d.pin_point("J2", "1"))
    d.label("GND", at=d.pin_point("J2", "2"))
    d.resistor("R3", "47k", at=(76.2, 50.8), instances={dp: "R3"})
    d.power("+3V3", at=d.pin_point("R3", "1"))
    d.label("ALARM", at=d.pin_point("R3", "2"), kind="global_label")
    d.part("C2", "Device:C", pins=CAP_PINS, at=(101.6, 50.8), value="100n", instances={dp: "C2"})
    d.power("+3V3", at=d.pin_point("C2", "1"))
    d.power("GND", at=d.pin_point("C2", "2"))

    tr = SchematicBuilder(version=version, v6_child=child)
    tp = _paths(root, trap)
    tr.part(
        "J3",
        "Connector:Conn_01x02",
        pins=TWO_PIN_JACK,
        at=(40.64, 50.8),
        value="TRAP",
        instances={tp: "J3"},
    )
    tr.label("ALARM", at=tr.pin_point("J3", "1"))
    tr.label("GND", at=tr.pin_point("J3", "2"))
    tr.resistor("R5", "10k", at=(76.2, 50.8), instances={tp: "R5"})
    tr.label("ALARM", at=tr.pin_point("R5", "1"))
    tr.label("GND", at=tr.pin_point("R5", "2"))
    if child:
        root.adopt_v6(d).adopt_v6(tr)
    return {
        "hive_door.kicad_sch": root.text(),
        "door.kicad_sch": d.text(),
        "trap.kicad_sch": tr.text(),
    }


# Sheet pins of the latch block and the bus group label drawn beside each.
_LID_PINS = ("LID{OPEN CLOSED}", "{SDA SCL}", "PORT{D[0..1] CLK}")
_LID_MEMBERS = (
    ("LID.OPEN", "LID.CLOSED"),
    ("SDA", "SCL"),
    ("PORT.D0", "PORT.D1", "PORT.CLK"),
)


def draw_lid_bus(version: int) -> dict[str, str]:
    """The aquarium lid latch reached through bus groups on sheet pins."""
    root = SchematicBuilder(version=version)
    pins = {name: (101.6, 30.48 + 5.08 * i) for i, name in enumerate(_LID_PINS)}
    latch = root.sheet("LATCH", "latch.kicad_sch", at=(101.6, 25.4), pins=pins)
    for name, (x, y) in pins.items():
        root.bus((x, y), (86.36, y))
        root.label(name, at=(93.98, y))  # a group label on the bus, as drawn in the editor
    n = 0
    for members in _LID_MEMBERS:
        for member in members:
            n += 1
            root.resistor(f"R{n}", "10k", at=(20.32 * n, 76.2))
            root.power("+3V3", at=root.pin_point(f"R{n}", "1"))
            root.label(member, at=root.pin_point(f"R{n}", "2"))
    for ref in ("R8", "R9"):  # an overbar name is one plain net, not a bus group
        root.resistor(ref, "10k", at=(20.32 * int(ref[1:]), 127.0))
        root.power("+3V3", at=root.pin_point(ref, "1"))
        root.label("~{RESET}", at=root.pin_point(ref, "2"))

    child = version <= V6
    la = SchematicBuilder(version=version, v6_child=child)
    lp = _paths(root, latch)
    for i, name in enumerate(_LID_PINS):
        la.label(name, at=(25.4, 25.4 + 5.08 * i), kind="hierarchical_label")
    n = 10
    for members in _LID_MEMBERS:
        for member in members:
            n += 1
            la.part(
                f"SW{n}",
                "Switch:SW_Push",
                pins=SWITCH_PINS,
                at=(20.32 * (n - 10), 76.2),
                value="LATCH",
                instances={lp: f"SW{n}"},
            )
            la.label(member, at=la.pin_point(f"SW{n}", "1"))
            la.power("GND", at=la.pin_point(f"SW{n}", "2"))
    if child:
        root.adopt_v6(la)
    return {"lid_bus.kicad_sch": root.text(), "latch.kicad_sch": la.text()}


def members_of_lid_bus() -> list[tuple[str, str]]:
    """(root resistor, latch switch) pairs that the bus groups must join."""
    flat = [m for group in _LID_MEMBERS for m in group]
    return [(f"R{i}", f"SW{10 + i}") for i in range(1, len(flat) + 1)]

"""Connectivity inside one sheet file: which drawn items touch.

Items connect where their points are equal (wire ends, pin points, junctions,
sheet pins, label anchors). A wire end, junction or label anchored on another
wire's interior joins that wire. Points and segments live in hash grids, so no
step scans pairs. The result is the same for every instance of the file; names
and hierarchy are applied per instance by :mod:`pullproof.nets`.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from .busnames import bus_members
from .geometry import place_pin
from .model import LibPin, LibSymbol, Point, SchematicFile, Wire
from .reader import unescape

__all__ = ["PowerPin", "SheetGraph", "sheet_graph"]

_CELL = 5080  # µm; two grid pitches of 2.54 mm


class _UnionFind:
    __slots__ = ("parent",)

    def __init__(self) -> None:
        self.parent: list[int] = []

    def add(self) -> int:
        self.parent.append(len(self.parent))
        return len(self.parent) - 1

    def find(self, i: int) -> int:
        parent = self.parent
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    def union(self, a: int, b: int) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            self.parent[max(ra, rb)] = min(ra, rb)


class _Layer:
    """Points and segments of one kind (wires, or buses) joined by a union-find."""

    def __init__(self, segments: Iterable[Wire]) -> None:
        self.uf = _UnionFind()
        self.points: dict[Point, int] = {}
        self.segments = list(segments)
        self.grid: dict[tuple[int, int], list[int]] = defaultdict(list)
        for s_index, seg in enumerate(self.segments):
            self.uf.union(self.point(seg.a), self.point(seg.b))
            x0, x1 = sorted((seg.a[0] // _CELL, seg.b[0] // _CELL))
            y0, y1 = sorted((seg.a[1] // _CELL, seg.b[1] // _CELL))
            for cx in range(x0, x1 + 1):
                for cy in range(y0, y1 + 1):
                    self.grid[cx, cy].append(s_index)

    def point(self, p: Point) -> int:
        node = self.points.get(p)
        if node is None:
            node = self.points[p] = self.uf.add()
        return node

    def on_segment(self, p: Point) -> list[int]:
        """Indexes of the segments whose closed extent holds ``p``."""
        found = []
        for s_index in self.grid.get((p[0] // _CELL, p[1] // _CELL), ()):
            a, b = self.segments[s_index].a, self.segments[s_index].b
            cross = (b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0])
            if (
                cross == 0
                and min(a[0], b[0]) <= p[0] <= max(a[0], b[0])
                and min(a[1], b[1]) <= p[1] <= max(a[1], b[1])
            ):
                found.append(s_index)
        return found

    def attach(self, p: Point, *, interior: bool) -> int:
        """The node of point ``p``, joined to any segment it lies on when ``interior``."""
        node = self.point(p)
        if interior:
            for s_index in self.on_segment(p):
                self.uf.union(node, self.point(self.segments[s_index].a))
        return node


@dataclass(frozen=True)
class PowerPin:
    """A pin that joins a net by name: a power symbol's pin, or a hidden power input."""

    group: int
    name: str
    scope: str  # "global" or "local"
    symbol: bool  # true for a power symbol (it names a rail), false for a hidden pin


@dataclass(frozen=True)
class SheetGraph:
    """Groups of touching items in one file; group numbers are file-local."""

    pins: tuple[tuple[tuple[LibPin, int], ...], ...]  # per placement: (pin, group)
    labels: tuple[int, ...]  # per label: group (-1 for a vector label)
    sheet_pins: tuple[tuple[int, ...], ...]  # per sheet block, per pin: group (-1 for vector)
    power: tuple[PowerPin, ...]
    buses: tuple[tuple[tuple[str, int, int], ...], ...]  # per bus: ("label"|"pin", i, j)


def _unit_pins(lib: LibSymbol, unit: int, style: int) -> list[LibPin]:
    return [p for p in lib.pins if p.unit in (0, unit) and p.body_style in (0, style)]


def sheet_graph(
    model: SchematicFile, libs: list[LibSymbol | None], units: Sequence[int] | None = None
) -> SheetGraph:
    """Join the items of ``model``; ``libs`` gives each placement's library symbol.

    ``units`` gives the unit each placement stands for in one sheet instance (a sheet
    used more than once may place another unit of a part than the one drawn); by
    default the drawn ``(unit n)``. The pins, and so the points, are those of that unit.
    """
    if units is None:
        units = [sym.unit for sym in model.symbols]
    wires = _Layer(model.wires)
    # Wire ends and junctions on another wire's interior join it.
    for seg in model.wires:
        wires.attach(seg.a, interior=True)
        wires.attach(seg.b, interior=True)
    for junction in model.junctions:
        wires.attach(junction, interior=True)
    buses = _Layer(model.buses)
    for seg in model.buses:
        buses.attach(seg.a, interior=True)
        buses.attach(seg.b, interior=True)

    placed: list[list[tuple[LibPin, int]]] = []
    power: list[tuple[int, str, str, bool]] = []
    for sym, lib, unit in zip(model.symbols, libs, units, strict=True):
        row: list[tuple[LibPin, int]] = []
        if lib is not None:
            for pin in _unit_pins(lib, unit, sym.body_style):
                node = wires.point(place_pin(pin.at, sym.at, sym.rotation, sym.mirror))
                row.append((pin, node))
                if pin.type == "power_in" and lib.power:
                    value = unescape(sym.properties.get("Value", ""))
                    power.append((node, value, lib.power_scope, True))
                elif pin.type == "power_in" and pin.hidden:
                    power.append((node, pin.name, "global", False))
        placed.append(row)

    labels: list[int] = []
    bus_items: dict[int, list[tuple[str, int, int]]] = defaultdict(list)
    for i, label in enumerate(model.labels):
        if bus_members(label.name):
            labels.append(-1)
            bus_items[buses.attach(label.at, interior=True)].append(("label", i, 0))
        else:
            labels.append(wires.attach(label.at, interior=True))
    sheet_pins: list[tuple[int, ...]] = []
    for b, blk in enumerate(model.sheets):
        row_pins: list[int] = []
        for j, sp in enumerate(blk.pins):
            if bus_members(sp.name):
                row_pins.append(-1)
                bus_items[buses.attach(sp.at, interior=True)].append(("pin", b, j))
            else:
                row_pins.append(wires.point(sp.at))
        sheet_pins.append(tuple(row_pins))

    find = wires.uf.find
    bfind = buses.uf.find
    grouped: dict[int, list[tuple[str, int, int]]] = defaultdict(list)
    for node, items in bus_items.items():
        grouped[bfind(node)].extend(items)
    return SheetGraph(
        pins=tuple(tuple((p, find(n)) for p, n in row) for row in placed),
        labels=tuple(-1 if n < 0 else find(n) for n in labels),
        sheet_pins=tuple(tuple(-1 if n < 0 else find(n) for n in row) for row in sheet_pins),
        power=tuple(PowerPin(find(n), name, scope, sym) for n, name, scope, sym in power),
        buses=tuple(tuple(items) for items in grouped.values()),
    )

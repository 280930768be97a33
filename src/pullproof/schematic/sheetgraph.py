"""Connectivity inside one sheet file: which drawn items touch.

Items connect where their points are equal (wire ends, pin points, junctions,
sheet pins, label anchors). A wire end, junction or label anchored on another
wire's interior joins that wire. Points live in a hash table and segments are
indexed by the line they lie on, so no step scans pairs and none depends on a
segment's length. The result is the same for every instance of the file; names
and hierarchy are applied per instance by :mod:`pullproof.nets`.
"""

from __future__ import annotations

import heapq
import math
from collections import defaultdict
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from ..errors import SchematicError
from ..limits import MAX_WIRE_DIRECTIONS
from .busnames import bus_members
from .geometry import place_pin
from .model import LibPin, LibSymbol, Point, SchematicFile, Wire
from .reader import unescape

__all__ = ["PowerPin", "SheetGraph", "sheet_graph"]


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
    """Points and segments of one kind (wires, or buses) joined by a union-find.

    A point joins a segment whose interior it lies on. Segments are indexed by the line
    they lie on (direction reduced to lowest terms, and the line's offset), and the
    points asked about are swept along each line once: nothing is ever done per cell or
    per unit of a segment's length, and overlapping segments cost no more than others.
    ``attach`` records the question; :meth:`settle` answers them all before groups are read.
    """

    def __init__(self, segments: Iterable[Wire]) -> None:
        self.uf = _UnionFind()
        self.points: dict[Point, int] = {}
        self.lines: dict[tuple[int, int, int], list[tuple[int, int, int]]] = defaultdict(list)
        self.pending: list[tuple[Point, int]] = []
        for seg in segments:
            a_node = self.point(seg.a)
            self.uf.union(a_node, self.point(seg.b))
            if seg.a == seg.b:
                continue
            key, t0, t1 = _on_line(seg.a, seg.b)
            self.lines[key].append((t0, t1, a_node))
        self.directions = sorted({(k[0], k[1]) for k in self.lines})
        if len(self.directions) > MAX_WIRE_DIRECTIONS:
            raise _TooManyDirections(len(self.directions))

    def point(self, p: Point) -> int:
        node = self.points.get(p)
        if node is None:
            node = self.points[p] = self.uf.add()
        return node

    def attach(self, p: Point, *, interior: bool) -> int:
        """The node of point ``p``, to be joined to any segment it lies on when ``interior``."""
        node = self.point(p)
        if interior:
            self.pending.append((p, node))
        return node

    def settle(self) -> None:
        """Join every attached point to the segments whose closed extent holds it."""
        asked: dict[tuple[int, int, int], list[tuple[int, int]]] = defaultdict(list)
        for (x, y), node in self.pending:
            for ux, uy in self.directions:
                key = (ux, uy, ux * y - uy * x)
                if key in self.lines:
                    asked[key].append((ux * x + uy * y, node))
        self.pending.clear()
        for key, queries in asked.items():
            self._sweep(sorted(self.lines[key]), sorted(queries))

    def _sweep(self, segs: list[tuple[int, int, int]], queries: list[tuple[int, int]]) -> None:
        """One line: segments (t0, t1, node) and points (t, node), both sorted by t."""
        active: list[tuple[int, int]] = []  # min-heap of (t1, node): the first to end on top
        i = 0
        for t, node in queries:
            while i < len(segs) and segs[i][0] <= t:
                heapq.heappush(active, (segs[i][1], segs[i][2]))
                i += 1
            while active and active[0][0] < t:  # ended before this point: gone for good
                heapq.heappop(active)
            if not active:
                continue
            # Every active segment holds t; once joined they are one group, and the one
            # reaching furthest holds every later point any of them holds.
            for _, seg_node in active:
                self.uf.union(node, seg_node)
            active[:] = [max(active)]


class _TooManyDirections(ValueError):
    """More distinct wire directions in one file than the connectivity search allows."""

    def __init__(self, count: int) -> None:
        super().__init__(count)
        self.count = count


def _on_line(a: Point, b: Point) -> tuple[tuple[int, int, int], int, int]:
    """The line through ``a`` and ``b`` as (ux, uy, offset), and the span (t0, t1) on it.

    (ux, uy) is the direction in lowest terms, pointing right (or down); a point (x, y)
    lies on the line when ux·y − uy·x equals the offset, at position t = ux·x + uy·y.
    """
    dx, dy = b[0] - a[0], b[1] - a[1]
    g = math.gcd(dx, dy)
    ux, uy = dx // g, dy // g
    if ux < 0 or (ux == 0 and uy < 0):
        ux, uy = -ux, -uy
    ta, tb = ux * a[0] + uy * a[1], ux * b[0] + uy * b[1]
    return (ux, uy, ux * a[1] - uy * a[0]), min(ta, tb), max(ta, tb)


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
    try:
        wires, buses = _Layer(model.wires), _Layer(model.buses)
    except _TooManyDirections as exc:
        raise SchematicError(
            f"{model.name}: wires or buses in {exc.count} directions; at most "
            f"{MAX_WIRE_DIRECTIONS} are followed (horizontal, vertical and 45° count as four)"
        ) from None
    # Wire ends and junctions on another wire's interior join it.
    for seg in model.wires:
        wires.attach(seg.a, interior=True)
        wires.attach(seg.b, interior=True)
    for junction in model.junctions:
        wires.attach(junction, interior=True)
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

    wires.settle()
    buses.settle()
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

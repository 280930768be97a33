"""Connectivity: a root schematic and its sheets → a :class:`~pullproof.circuit.Circuit`.

Within a sheet file, touching items form groups (:mod:`pullproof.schematic.sheetgraph`).
A sheet instance places, for each symbol, the unit its own ``instances`` entry names (a
sheet used four times may place units 1…4 of one drawn symbol), so each distinct unit
assignment of a file gets its own groups. Across the hierarchy, groups join by name:

* a power symbol (its ``(power)`` flag) joins every net of its Value; a hidden
  ``power_in`` pin of an ordinary part joins the net named by the pin name;
  ``power_out`` flag symbols join nothing;
* a ``global_label`` joins by name everywhere;
* a local ``label`` joins by name within its sheet instance, and so does a
  ``hierarchical_label``, which also joins the parent's sheet pin of that name;
* a local ``label`` whose name is that of a power symbol or global label *on the same
  sheet instance* joins that global net as well (same-name rule); on a sheet without
  one it stays local;
* bus names stand for their members (:mod:`pullproof.schematic.busnames`): vectors
  ``A[0..7]`` join member by member in order, groups ``NAME{A B}`` by member name.

Net naming rule (deterministic, applied in this order; ties broken by character order,
so the drawing order never matters):

1. the first power-symbol name — e.g. ``+3V3`` wins over ``VDD_IO`` and over any label;
2. else the first global label name;
3. else the first hidden power-pin name;
4. else the local or hierarchical label in the shallowest sheet instance (ties:
   sheet path, then name), written as the instance path plus the name — ``/KEY_UP``,
   ``/PSU/FB``;
5. else ``net@REF.PIN`` for the member that sorts first (natural order).

A name already taken by another net gets ``#2``, ``#3`` … appended.
"""

from __future__ import annotations

import functools
import os
import re
from collections import defaultdict
from collections.abc import Hashable

from .circuit import Circuit, Net, NetMember, Part, PartPin, Placement, SheetInstance
from .errors import SchematicError
from .limits import InputPolicy
from .schematic import LibSymbol, SymbolPlacement
from .schematic.busnames import BusName, bus_members, parse_bus_name
from .schematic.hierarchy import Hierarchy, Instance, load_hierarchy
from .schematic.sheetgraph import SheetGraph, sheet_graph

__all__ = ["build_circuit", "circuit_from_hierarchy", "natural_key"]

_DIGITS = re.compile(r"(\d+)")
_PROPS_NOT_FIELDS = frozenset({"Reference", "Value"})


@functools.lru_cache(maxsize=65536)  # pin numbers and references recur in every sort
def natural_key(text: str) -> tuple[tuple[int, int | str], ...]:
    """Sort key that orders R2 before R10 and pin 2 before pin 10."""
    # Odd items of the split are the digit runs; a run too long for int() sorts as text.
    return tuple(
        [
            (0, int(chunk)) if i % 2 and len(chunk) <= 100 else (1, chunk)
            for i, chunk in enumerate(_DIGITS.split(text))
            if chunk
        ]
    )


class _Joiner:
    """Union-find over hashable keys (groups, names, pins), by size with path halving, so a
    net of any size (a ground of 100 000 pins) costs near-constant time per join."""

    __slots__ = ("parent", "size")

    def __init__(self) -> None:
        self.parent: dict[Hashable, Hashable] = {}
        self.size: dict[Hashable, int] = {}

    def find(self, key: Hashable) -> Hashable:
        parent = self.parent
        up = parent.setdefault(key, key)
        while up != key:
            grand = parent[up]
            parent[key] = grand  # halve the path: every node on it now skips one
            key, up = grand, parent[grand]
        return key

    def union(self, a: Hashable, b: Hashable) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return
        size = self.size
        sa, sb = size.get(ra, 1), size.get(rb, 1)
        if sa > sb:
            ra, rb = rb, ra
        self.parent[ra] = rb  # the smaller tree goes under the larger
        size[rb] = sa + sb


def _reference(sym: SymbolPlacement, inst: Instance, hier: Hierarchy) -> tuple[str, int]:
    """Reference and unit of ``sym`` in sheet instance ``inst`` (v7+ instances, v6 table)."""
    for si in sym.instances:
        if si.path == inst.uuid_path:
            return si.reference, si.unit
    tail = inst.v6_path
    for si in sym.instances:  # a root saved under another project: match the sheet chain
        if (tail and si.path.endswith(tail)) or (not tail and si.path.count("/") == 1):
            return si.reference, si.unit
    table = hier.models[hier.root_key].symbol_instances
    hit = table.get(f"{inst.v6_path}/{sym.uuid}")
    if hit is not None:
        return hit.reference, hit.unit
    return sym.properties.get("Reference", ""), sym.unit


def _libs(hier: Hierarchy, key: str) -> list[LibSymbol | None]:
    model = hier.models[key]
    libs: list[LibSymbol | None] = []
    for sym in model.symbols:
        lib = model.lib_symbols.get(sym.lib_key)
        if lib is None:
            where = hier.texts[key].locate(sym.span[0])
            raise SchematicError(
                f"symbol {sym.lib_id!r} has no library symbol {sym.lib_key!r} in lib_symbols",
                where,
            )
        libs.append(lib)
    return libs


class _Builder:
    def __init__(self, hier: Hierarchy) -> None:
        self.hier = hier
        self.join = _Joiner()
        self.libs = {key: _libs(hier, key) for key in hier.models}
        # One graph per file and per unit assignment: instances that place the drawn units
        # share the first; a sheet instance placing other units gets a graph of its own.
        self.graphs: dict[tuple[str, tuple[int, ...]], SheetGraph] = {}
        self.refs: dict[int, list[tuple[str, int]]] = {
            inst.index: [_reference(sym, inst, hier) for sym in hier.models[inst.file].symbols]
            for inst in hier.instances
        }
        self.names: dict[Hashable, list[tuple[int, str, str]]] = defaultdict(list)
        self.members: dict[tuple[str, str], NetMember] = {}
        self.parts: dict[str, list[tuple[SymbolPlacement, Instance, int]]] = defaultdict(list)

    def name(self, key: Hashable, rank: int, path: str, text: str) -> None:
        self.names[key].append((rank, path, text))

    def scope(self, inst: Instance, kind: str, name: str) -> Hashable:
        if kind == "global_label":
            return ("G", name)
        return ("L", inst.index, name)

    def graph(self, inst: Instance) -> SheetGraph:
        """The sheet graph of ``inst``'s file with the units this instance places."""
        units = tuple(unit for _, unit in self.refs[inst.index])
        key = (inst.file, units)
        graph = self.graphs.get(key)
        if graph is None:
            graph = self.graphs[key] = sheet_graph(
                self.hier.models[inst.file], self.libs[inst.file], units
            )
        return graph

    def instance(self, inst: Instance) -> None:
        hier, join = self.hier, self.join
        model = hier.models[inst.file]
        graph = self.graph(inst)
        i = inst.index
        # Names that join everywhere and are present on this sheet instance: a local label
        # of the same name on this sheet joins that net too (same-name rule).
        present: set[str] = set()
        for pp in graph.power:
            key: Hashable = ("G", pp.name) if pp.scope == "global" else ("L", i, pp.name)
            join.union(("g", i, pp.group), key)
            self.name(key, 0 if pp.symbol else 2, "", pp.name)
            if pp.symbol and pp.scope == "global":
                present.add(pp.name)
        present.update(lb.name for lb in model.labels if lb.kind == "global_label")
        for label, group in zip(model.labels, graph.labels, strict=True):
            members = bus_members(label.name)
            for text in members or (label.name,):
                key = self.scope(inst, label.kind, text)
                if group >= 0:
                    join.union(("g", i, group), key)
                rank = 1 if label.kind == "global_label" else 3
                self.name(key, rank, "" if rank == 1 else inst.path, text)
                if label.kind == "label" and text in present:
                    join.union(key, ("G", text))
        if inst.parent >= 0:  # sheet pins of this instance's block in the parent
            parent = hier.instances[inst.parent]
            blk = hier.models[parent.file].sheets[inst.block]
            groups = self.graph(parent).sheet_pins[inst.block]
            for sp, group in zip(blk.pins, groups, strict=True):
                if group >= 0:
                    join.union(("g", parent.index, group), ("L", i, sp.name))
        for sym, row, (ref, unit) in zip(model.symbols, graph.pins, self.refs[i], strict=True):
            if not ref or ref.startswith("#"):
                continue  # virtual: power symbols and flags are not parts
            self.parts[ref].append((sym, inst, unit))
            for pin, group in row:
                pkey = ("P", ref, pin.number)
                join.union(("g", i, group), pkey)
                self.members.setdefault(
                    (ref, pin.number), NetMember(ref, pin.number, pin.name, pin.type)
                )

    def buses(self) -> None:
        """Join the items that share one bus: vectors member by member in order (``A[0..7]``
        to ``D[0..7]``); where a group is on the bus, members also join by short name (``CLK``
        of ``NAME{D[0..3] CLK}`` with ``CLK`` of ``{CLK}``)."""
        children: dict[int, dict[int, Instance]] = defaultdict(dict)
        for c in self.hier.instances:
            if c.parent >= 0:
                children[c.parent][c.block] = c
        for inst in self.hier.instances:
            for items in self.graph(inst).buses:
                expanded = self.bus_items(inst, items, children[inst.index])
                vectors = [keys for parsed, keys in expanded if not parsed.group]
                for other in vectors[1:]:
                    for x, y in zip(vectors[0], other, strict=False):
                        self.join.union(x, y)
                if any(parsed.group for parsed, _ in expanded):
                    by_short: dict[str, Hashable] = {}
                    for parsed, keys in expanded:
                        for short, key in zip(parsed.shorts, keys, strict=True):
                            self.join.union(by_short.setdefault(short, key), key)

    def bus_items(
        self, inst: Instance, items: tuple[tuple[str, int, int], ...], kids: dict[int, Instance]
    ) -> list[tuple[BusName, list[Hashable]]]:
        """Each bus item's expansion and the name keys of its members in ``inst``."""
        model = self.hier.models[inst.file]
        out: list[tuple[BusName, list[Hashable]]] = []
        for kind, a, b in items:
            if kind == "label":
                label = model.labels[a]
                parsed = parse_bus_name(label.name)
                if parsed is not None:
                    out.append((parsed, [self.scope(inst, label.kind, m) for m in parsed.members]))
                continue
            parsed = parse_bus_name(model.sheets[a].pins[b].name)
            child = kids.get(a)
            if parsed is not None and child is not None:
                out.append((parsed, [("L", child.index, m) for m in parsed.members]))
        return out

    def circuit(self, root: str) -> Circuit:
        for inst in self.hier.instances:
            self.instance(inst)
        self.buses()
        find = self.join.find
        by_root: dict[Hashable, list[NetMember]] = defaultdict(list)
        for (ref, pin), member in self.members.items():
            by_root[find(("P", ref, pin))].append(member)
        names_by_root: dict[Hashable, list[tuple[int, str, str]]] = defaultdict(list)
        for key, names in self.names.items():
            names_by_root[find(key)].extend(names)
        nets = [self.net(members, names_by_root.get(r, [])) for r, members in by_root.items()]
        nets = _unique_names(nets)
        return Circuit(
            root=root,
            sheets=tuple(SheetInstance(s.path, s.file, s.name) for s in self.hier.instances),
            parts=tuple(sorted(self.make_parts(), key=lambda p: natural_key(p.ref))),
            nets=tuple(sorted(nets, key=lambda n: natural_key(n.name))),
            files=dict(self.hier.absolute),
        )

    def net(self, members: list[NetMember], names: list[tuple[int, str, str]]) -> Net:
        members.sort(key=lambda m: (natural_key(m.ref), natural_key(m.pin)))
        labels = tuple(sorted({text for _, _, text in names if text}))
        power = any(rank == 0 for rank, _, _ in names)
        named = [(r, p.count("/"), p, t) for r, p, t in names if t]
        if named:
            rank, _, path, text = min(named)
            name = text if rank < 3 else f"{path}{text}"
        else:
            name = f"net@{members[0].ref}.{members[0].pin}"
        return Net(name, tuple(members), power, labels)

    def make_parts(self) -> list[Part]:
        parts = []
        by_ref: dict[str, list[tuple[str, NetMember]]] = defaultdict(
            list
        )  # one pass, not one per part
        for (r, number), m in self.members.items():
            by_ref[r].append((number, m))
        for ref, units in self.parts.items():
            fields: dict[str, str] = {}
            pins: dict[str, PartPin] = {}
            placements = []
            for sym, inst, unit in units:
                for k, v in sym.properties.items():
                    if k not in _PROPS_NOT_FIELDS:
                        fields.setdefault(k, v)
                placements.append(Placement(inst.file, inst.path, unit, sym.span, sym.uuid))
            for number, m in by_ref.get(ref, ()):
                pins[number] = PartPin(number, m.name, m.type)
            first, inst0, _ = units[0]
            parts.append(
                Part(
                    ref=ref,
                    value=first.properties.get("Value", ""),
                    lib_id=first.lib_id,
                    sheet=inst0.path,
                    fields=fields,
                    pins=tuple(sorted(pins.values(), key=lambda p: natural_key(p.number))),
                    placements=tuple(placements),
                    dnp=any(s.dnp for s, _, _ in units),
                    in_bom=all(s.in_bom for s, _, _ in units),
                    on_board=all(s.on_board for s, _, _ in units),
                )
            )
        return parts


def _unique_names(nets: list[Net]) -> list[Net]:
    nets.sort(key=lambda n: (natural_key(n.name), natural_key(n.members[0].ref)))
    seen: dict[str, int] = {}
    out = []
    for net in nets:
        count = seen.get(net.name, 0) + 1
        seen[net.name] = count
        if count > 1:
            net = Net(f"{net.name}#{count}", net.members, net.power, net.labels)
        out.append(net)
    return out


def build_circuit(root: str | os.PathLike[str], policy: InputPolicy | None = None) -> Circuit:
    """Read ``root`` and its sheets and return the connected circuit.

    :param root: the root ``.kicad_sch`` file.
    :param policy: size limits and whether sheets may lie outside the root's folder.
    :raises SchematicSyntaxError: malformed text in any file (``FILE:LINE:COL``).
    :raises SchematicError: a file is missing, unreadable, not a schematic, or a
        sheet includes itself.
    """
    return circuit_from_hierarchy(load_hierarchy(root, policy), os.fspath(root))


def circuit_from_hierarchy(hier: Hierarchy, root: str) -> Circuit:
    """Connect an already-read hierarchy (e.g. texts edited in memory before writing)."""
    return _Builder(hier).circuit(root)

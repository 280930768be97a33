"""Typed records of one schematic file, as drawn (no connectivity yet).

Coordinates are integers in micrometres (``Point``): sheet coordinates have Y
down; library pin coordinates are kept as written in the library (Y up) and
placed by :mod:`pullproof.schematic.geometry`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

__all__ = [
    "Label",
    "LibPin",
    "LibSymbol",
    "Point",
    "SchematicFile",
    "SheetBlock",
    "SheetPin",
    "SymbolInstance",
    "SymbolPlacement",
    "Wire",
]

Point = tuple[int, int]
Span = tuple[int, int]


@dataclass(frozen=True)
class LibPin:
    """A pin of a library symbol: ``at`` is its connection point in library coordinates."""

    number: str
    name: str
    type: str
    at: Point
    unit: int  # 0 = common to all units
    body_style: int  # 0 = common to all body styles
    hidden: bool = False


@dataclass(frozen=True)
class LibSymbol:
    """An embedded library symbol; ``power`` is its ``(power)`` flag (``local`` in v10 scope)."""

    name: str
    power: bool
    pins: tuple[LibPin, ...]
    power_scope: str = "global"  # "global" or "local" (v10 `(power local)`)


@dataclass(frozen=True)
class SymbolInstance:
    """A reference and unit for one sheet-instance path (``instances``, ``symbol_instances``)."""

    path: str
    reference: str
    unit: int


@dataclass(frozen=True)
class SymbolPlacement:
    """One placed symbol (one unit of a part) on a sheet."""

    lib_key: str  # lib_name when present, else lib_id: the key into lib_symbols
    lib_id: str
    at: Point
    rotation: int  # 0, 90, 180 or 270
    mirror: str  # "", "x" or "y"
    unit: int
    body_style: int
    properties: Mapping[str, str]
    uuid: str
    span: Span
    instances: tuple[SymbolInstance, ...] = ()
    dnp: bool = False
    in_bom: bool = True
    on_board: bool = True

    def __post_init__(self) -> None:
        if not isinstance(self.properties, MappingProxyType):
            object.__setattr__(self, "properties", MappingProxyType(dict(self.properties)))
        if self.rotation not in (0, 90, 180, 270):
            raise ValueError(f"rotation must be a multiple of 90, not {self.rotation}")


@dataclass(frozen=True)
class Wire:
    """A wire segment (or a bus segment, when held in ``SchematicFile.buses``)."""

    a: Point
    b: Point


@dataclass(frozen=True)
class Label:
    """A net label: ``kind`` is ``label``, ``global_label`` or ``hierarchical_label``."""

    kind: str
    name: str  # unescaped
    at: Point
    span: Span


@dataclass(frozen=True)
class SheetPin:
    """A pin on a sheet block; joins the sub-sheet's hierarchical label of the same name."""

    name: str  # unescaped
    at: Point
    span: Span


@dataclass(frozen=True)
class SheetBlock:
    """A sheet block drawn on a parent sheet: its name, file and pins."""

    name: str
    file: str  # as written (relative to the root's folder)
    file_span: Span  # span of the Sheetfile property, for error positions
    uuid: str
    pins: tuple[SheetPin, ...]
    span: Span


@dataclass(frozen=True)
class SchematicFile:
    """Everything read from one ``.kicad_sch`` file."""

    name: str  # as the user or the parent sheet named it
    version: int
    uuid: str
    lib_symbols: Mapping[str, LibSymbol]
    symbols: tuple[SymbolPlacement, ...]
    wires: tuple[Wire, ...]
    buses: tuple[Wire, ...]
    junctions: tuple[Point, ...]
    no_connects: tuple[Point, ...]
    labels: tuple[Label, ...]
    sheets: tuple[SheetBlock, ...]
    # v6 root only: sheet-instance path + "/" + symbol uuid → reference and unit
    symbol_instances: Mapping[str, SymbolInstance] = field(default_factory=dict)

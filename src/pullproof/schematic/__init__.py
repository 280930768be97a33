"""The schematic model and its reader: one ``.kicad_sch`` file at a time."""

from __future__ import annotations

from .model import (
    Label,
    LibPin,
    LibSymbol,
    Point,
    SchematicFile,
    SheetBlock,
    SheetPin,
    SymbolInstance,
    SymbolPlacement,
    Wire,
)
from .reader import read_path, read_text, unescape

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
    "read_path",
    "read_text",
    "unescape",
]

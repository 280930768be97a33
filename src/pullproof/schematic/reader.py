"""Schematic text → :class:`SchematicFile` (format versions 6 to 10).

Reads only what connectivity and the reports need; unknown elements are skipped,
never fatal. Names are unescaped here (``{slash}`` → ``/`` …) so every later
stage compares plain text.
"""

from __future__ import annotations

import itertools
import re
from pathlib import Path
from types import MappingProxyType

from ..errors import SchematicError, SourceText, excerpt
from ..limits import DEFAULT_MAX_FILE_BYTES, MAX_BUS_MEMBERS, MAX_COORDINATE_MM, TokenBudget
from ..sexpr import Node, parse
from ..textfile import decode_utf8, read_regular
from .geometry import to_um
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

__all__ = ["read_path", "read_text", "unescape"]

_ESCAPES = MappingProxyType(
    {
        "slash": "/",
        "backslash": "\\",
        "lt": "<",
        "gt": ">",
        "colon": ":",
        "dblquote": '"',
        "quote": "'",
        "tab": "\t",
        "return": "\n",
        "space": " ",
    }
)
_ESCAPE_RE = re.compile(r"\{(" + "|".join(_ESCAPES) + r")\}")
_SUB_SYMBOL = re.compile(r"^(?P<base>.*)_(?P<unit>\d{1,9})_(?P<style>\d{1,9})$")
_LABEL_KINDS = frozenset({"label", "global_label", "hierarchical_label"})
_VECTOR_RANGE = re.compile(r"\[(\d+)\.\.(\d+)\]")
# The first list of a schematic, and the heads of the format's other files (named, never
# quoted: nothing of a file that is not a schematic is shown).
_HEAD = re.compile(r"\s*\(\s*(?P<head>[^\s()\"]{1,40})")
_OTHER_FILES = MappingProxyType(
    {
        "kicad_pcb": "a board",
        "kicad_symbol_lib": "a symbol library",
        "footprint": "a footprint",
        "module": "a footprint",
        "kicad_wks": "a drawing sheet",
        "fp_lib_table": "a footprint library table",
        "sym_lib_table": "a symbol library table",
    }
)


def unescape(name: str) -> str:
    """Replace the format's ``{slash}``-style escapes by the characters they stand for."""
    if "{" not in name:
        return name
    return _ESCAPE_RE.sub(lambda m: _ESCAPES[m.group(1)], name)


class _Reader:
    """Reads one parsed file; keeps the source to place errors."""

    def __init__(self, src: SourceText) -> None:
        self.src = src

    def error(self, node: Node, message: str) -> SchematicError:
        return SchematicError(message, self.src.locate(node.span[0]))

    def num(self, node: Node, index: int) -> float:
        value = node.atom(index)
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.error(node, f"expected a number as item {index + 1} of ({node.head} …)")
        return float(value)

    def text(self, node: Node, index: int = 0) -> str:
        value = node.atom(index)
        if not isinstance(value, str):
            raise self.error(node, f"expected text as item {index + 1} of ({node.head} …)")
        return str(value)

    def child_text(self, node: Node, head: str, default: str = "") -> str:
        sub = node.first(head)
        return default if sub is None else self.text(sub)

    def child_int(self, node: Node, head: str, default: int) -> int:
        sub = node.first(head)
        return default if sub is None else round(self.num(sub, 0))

    def coordinate(self, node: Node, index: int) -> int:
        value = self.num(node, index)
        if not -MAX_COORDINATE_MM <= value <= MAX_COORDINATE_MM:
            raise self.error(
                node,
                f"coordinate {value:g} mm is outside the sheet (at most ±{MAX_COORDINATE_MM} mm)",
            )
        return to_um(value)

    def point(self, node: Node) -> Point:
        return self.coordinate(node, 0), self.coordinate(node, 1)

    def name(self, node: Node) -> str:
        """An unescaped label or sheet-pin name; the members a bus name stands for are bounded.

        Every member a bus name expands to comes from a range ``[a..b]`` in it (or is one
        word of a group, bounded by the name's length), so the ranges are counted.
        """
        text = unescape(self.text(node))
        members = 0
        for a, b in _VECTOR_RANGE.findall(text):
            wide = max(len(a), len(b)) > 9  # more digits than any bus: too many, unread
            members += MAX_BUS_MEMBERS + 1 if wide else abs(int(b) - int(a)) + 1
            if members > MAX_BUS_MEMBERS:
                raise self.error(
                    node, f"bus {excerpt(text)} has more than {MAX_BUS_MEMBERS} members"
                )
        return text

    def at(self, node: Node) -> tuple[Point, float]:
        sub = node.first("at")
        if sub is None:
            raise self.error(node, f"({node.head} …) has no (at x y) position")
        angle = self.num(sub, 2) if len(sub.atoms()) > 2 else 0.0
        return self.point(sub), angle

    def properties(self, node: Node) -> dict[str, str]:
        props: dict[str, str] = {}
        for p in node.nodes("property"):
            props[self.text(p, 0)] = self.text(p, 1)
        return props

    def lib_symbol(self, node: Node) -> LibSymbol:
        name = self.text(node)
        power = node.first("power")
        pins: list[LibPin] = []
        for unit, style, holder in [(0, 0, node)] + [
            self.sub_symbol(sub) for sub in node.nodes("symbol")
        ]:
            for p in holder.nodes("pin"):
                pins.append(self.lib_pin(p, unit, style))
        scope = "local" if power is not None and power.atom(0) == "local" else "global"
        return LibSymbol(name, power is not None, tuple(pins), scope)

    def sub_symbol(self, node: Node) -> tuple[int, int, Node]:
        m = _SUB_SYMBOL.match(self.text(node))
        if m is None:
            return 0, 0, node
        return int(m["unit"]), int(m["style"]), node

    def lib_pin(self, node: Node, unit: int, style: int) -> LibPin:
        kind = str(node.atom(0, "unspecified"))
        name = self.child_text(node, "name")
        number = self.child_text(node, "number")
        point, _ = self.at(node)
        return LibPin(
            number=number,
            name="" if name == "~" else unescape(name),
            type=kind,
            at=point,
            unit=unit,
            body_style=style,
            hidden=node.has_flag("hide"),
        )

    def placement(self, node: Node) -> SymbolPlacement:
        lib_id = self.child_text(node, "lib_id")
        point, angle = self.at(node)
        rotation = round(angle) % 360
        if rotation % 90 or abs(angle - round(angle)) > 1e-9:
            raise self.error(
                node.first("at") or node, f"rotation {angle:g} is not a multiple of 90"
            )
        mirror_node = node.first("mirror")
        mirror = "" if mirror_node is None else str(mirror_node.atom(0, ""))
        instances: list[SymbolInstance] = []
        for holder in node.nodes("instances"):
            for project in holder.nodes("project"):
                for path in project.nodes("path"):
                    instances.append(self.instance(path))
        style = self.child_int(node, "body_style", self.child_int(node, "convert", 1))
        return SymbolPlacement(
            lib_key=self.child_text(node, "lib_name") or lib_id,
            lib_id=lib_id,
            at=point,
            rotation=rotation,
            mirror=mirror if mirror in ("x", "y") else "",
            unit=self.child_int(node, "unit", 1),
            body_style=style,
            properties=self.properties(node),
            uuid=self.child_text(node, "uuid"),
            span=node.span,
            instances=tuple(instances),
            dnp=node.has_flag("dnp"),
            in_bom=node.first("in_bom") is None or node.has_flag("in_bom"),
            on_board=node.first("on_board") is None or node.has_flag("on_board"),
        )

    def instance(self, node: Node) -> SymbolInstance:
        return SymbolInstance(
            path=self.text(node),
            reference=self.child_text(node, "reference"),
            unit=self.child_int(node, "unit", 1),
        )

    def segments(self, node: Node) -> list[Wire]:
        pts = node.first("pts")
        if pts is None:
            return []
        xy = [self.point(p) for p in pts.nodes("xy")]
        return [Wire(a, b) for a, b in itertools.pairwise(xy)]

    def sheet(self, node: Node) -> SheetBlock:
        props = {p.atom(0): p for p in node.nodes("property")}
        name_node = props.get("Sheetname") or props.get("Sheet name")
        file_node = props.get("Sheetfile") or props.get("Sheet file")
        if file_node is None:
            raise self.error(node, "sheet has no Sheetfile property")
        pins = tuple(SheetPin(self.name(p), self.at(p)[0], p.span) for p in node.nodes("pin"))
        return SheetBlock(
            name="" if name_node is None else self.text(name_node, 1),
            file=self.text(file_node, 1),
            file_span=file_node.span,
            uuid=self.child_text(node, "uuid"),
            pins=pins,
            span=node.span,
        )

    def read(self, root: Node) -> SchematicFile:
        lib: dict[str, LibSymbol] = {}
        symbols: list[SymbolPlacement] = []
        wires: list[Wire] = []
        buses: list[Wire] = []
        junctions: list[Point] = []
        no_connects: list[Point] = []
        labels: list[Label] = []
        sheets: list[SheetBlock] = []
        instances: dict[str, SymbolInstance] = {}
        for node in root.nodes():
            head = node.head
            if head == "lib_symbols":
                for sym in node.nodes("symbol"):
                    ls = self.lib_symbol(sym)
                    lib[ls.name] = ls
            elif head == "symbol":
                symbols.append(self.placement(node))
            elif head == "wire":
                wires.extend(self.segments(node))
            elif head == "bus":
                buses.extend(self.segments(node))
            elif head == "junction":
                junctions.append(self.at(node)[0])
            elif head == "no_connect":
                no_connects.append(self.at(node)[0])
            elif head in _LABEL_KINDS:
                labels.append(Label(head, self.name(node), self.at(node)[0], node.span))
            elif head == "sheet":
                sheets.append(self.sheet(node))
            elif head == "symbol_instances":
                for path in node.nodes("path"):
                    inst = self.instance(path)
                    instances[inst.path] = inst
        return SchematicFile(
            name=self.src.name,
            version=self.child_int(root, "version", 0),
            uuid=self.child_text(root, "uuid"),
            lib_symbols=MappingProxyType(lib),
            symbols=tuple(symbols),
            wires=tuple(wires),
            buses=tuple(buses),
            junctions=tuple(junctions),
            no_connects=tuple(no_connects),
            labels=tuple(labels),
            sheets=tuple(sheets),
            symbol_instances=MappingProxyType(instances),
        )


def read_text(text: str, name: str, budget: TokenBudget | None = None) -> SchematicFile:
    """Read schematic text.

    :param text: the file's text.
    :param name: the file name used in error messages.
    :raises SchematicSyntaxError: malformed S-expression text.
    :raises SchematicError: well-formed text that is not a readable schematic.
    """
    src = SourceText(name, text)
    _check_head(src)
    return _Reader(src).read(parse(text, name, budget))


def _check_head(src: SourceText) -> None:
    """Refuse text that does not open with ``(kicad_sch`` before anything of it is parsed.

    A sheet reference may name any file; the error must not show what that file holds.
    """
    m = _HEAD.match(src.text)
    head = m.group("head") if m else ""
    if head == "kicad_sch" or not src.text.strip():  # an empty file: the parser says so
        return
    what = _OTHER_FILES.get(head)
    found = f"it is {what} file ({head})" if what else "it does not start with '(kicad_sch'"
    where = src.locate(len(src.text) - len(src.text.lstrip()))
    raise SchematicError(f"not a schematic: {found}", where)


def read_path(
    path: Path,
    name: str,
    max_bytes: int = DEFAULT_MAX_FILE_BYTES,
    budget: TokenBudget | None = None,
) -> tuple[SchematicFile, str]:
    """Read a schematic file; return the model and the text (for later splicing).

    :raises Unreadable: the file cannot be opened, is not a regular file or is larger
        than ``max_bytes`` (the caller knows where it was named).
    :raises SchematicError: the bytes are not UTF-8 text, or the text is not a schematic.
    """
    text = decode_utf8(read_regular(path, max_bytes), name, SchematicError, "file")
    if text.startswith("\ufeff"):
        text = " " + text[1:]  # same length, so spans still index the file's text
    return read_text(text, name, budget), text

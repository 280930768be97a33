"""Write valid schematic text from a small description, for tests and benchmarks.

Example — a pull-up from +5V to an input of a Schmitt inverter::

    b = SchematicBuilder()
    b.resistor("R1", "10k", at=(50.8, 50.8))                    # pins 1 (top), 2 (bottom)
    b.power("+5V", at=b.pin_point("R1", "1"))
    b.part("U1", "Logic:74HC14", pins=HEX_INVERTER_PINS, at=(76.2, 58.42), value="74HC14")
    b.wire(b.pin_point("R1", "2"), b.pin_point("U1", "1"))
    b.write(tmp_path / "board.kicad_sch")

Coordinates are millimetres on the sheet (Y down). A :class:`Pin` gives its
connection point in library coordinates (Y up), as the format stores it. Every
method returns the builder, except ``pin_point``/``text``/``sheet``.
``version`` picks the dialect: 20211123 (v6: ``symbol_instances`` in the root,
``(convert n)``), 20231120 (v8, default), 20260306 (v10: tabs, ``(power global)``,
``(body_style n)``, ``(hide yes)``).
"""

from __future__ import annotations

import itertools
import uuid as _uuid
from dataclasses import dataclass, field
from pathlib import Path

__all__ = [
    "HEX_INVERTER_PINS",
    "RESISTOR_PINS",
    "SWITCH_PINS",
    "Pin",
    "SchematicBuilder",
]

V6, V8, V10 = 20211123, 20231120, 20260306


@dataclass(frozen=True)
class Pin:
    """A library pin: number, connection point (mm, Y up), type, name, unit (0 = all units)."""

    number: str
    at: tuple[float, float]
    type: str = "passive"
    name: str = ""
    unit: int = 0
    hidden: bool = False


RESISTOR_PINS = (Pin("1", (0, 3.81)), Pin("2", (0, -3.81)))
SWITCH_PINS = (Pin("1", (-5.08, 0)), Pin("2", (5.08, 0)))
# A 74HC14-like hex Schmitt inverter: gates are units 1-6, supply pins in unit 7.
HEX_INVERTER_PINS = (
    *tuple(
        pin
        for gate, (a, y) in enumerate(((1, 2), (3, 4), (5, 6), (9, 8), (11, 10), (13, 12)), start=1)
        for pin in (
            Pin(str(a), (-7.62, 0), "input", "", gate),
            Pin(str(y), (7.62, 0), "output", "", gate),
        )
    ),
    Pin("14", (0, 12.7), "power_in", "VCC", 7),
    Pin("7", (0, -12.7), "power_in", "GND", 7),
)


def _mm(value: float) -> str:
    text = f"{value:.4f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _ref_unit(value: str | tuple[str, int], drawn: int) -> tuple[str, int]:
    return (value, drawn) if isinstance(value, str) else value


def _q(text: str) -> str:
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


@dataclass
class _Placed:
    ref: str
    lib_id: str
    at: tuple[float, float]
    rot: int
    mirror: str
    unit: int
    value: str
    fields: dict[str, str]
    uuid: str
    instances: dict[str, str | tuple[str, int]]
    dnp: bool
    on_board: bool = True


@dataclass
class SchematicBuilder:
    """Accumulates parts, wires, labels, power symbols and sheets; renders schematic text."""

    version: int = V8
    uuid: str = field(default_factory=lambda: str(_uuid.uuid4()))
    _libs: dict[str, tuple[tuple[Pin, ...], str]] = field(default_factory=dict)
    _placed: list[_Placed] = field(default_factory=list)
    _by_ref: dict[str, list[_Placed]] = field(default_factory=dict)  # pin_point's index
    _items: list[str] = field(default_factory=list)
    _v6_table: list[tuple[str, str, int]] = field(default_factory=list)
    _v6_adopted: list[tuple[str, str, int]] = field(default_factory=list)
    _power_count: int = 0
    v6_child: bool = False  # a v6 sub-sheet: its references live in the root's table

    # -- parts ------------------------------------------------------------------------------
    def part(
        self,
        ref: str,
        lib_id: str,
        *,
        pins: tuple[Pin, ...] | list[Pin],
        at: tuple[float, float],
        rot: int = 0,
        mirror: str = "",
        unit: int = 1,
        value: str = "",
        fields: dict[str, str] | None = None,
        instances: dict[str, str | tuple[str, int]] | None = None,
        dnp: bool = False,
        power: str = "",
        on_board: bool = True,
    ) -> SchematicBuilder:
        """Place one unit of a part. ``power`` ("global"/"local") marks a power symbol library;
        ``on_board=False`` writes the part as excluded from the board.

        ``instances`` maps sheet-instance uuid paths to a reference, or to (reference, unit)
        when that instance places another unit than the drawn ``unit`` (sheets used twice).
        """
        self._libs.setdefault(lib_id, (tuple(pins), power))
        placed = _Placed(
            ref,
            lib_id,
            at,
            rot,
            mirror,
            unit,
            value or lib_id.split(":")[-1],
            dict(fields or {}),
            str(_uuid.uuid4()),
            dict(instances or {}),
            dnp,
            on_board,
        )
        self._placed.append(placed)
        self._by_ref.setdefault(ref, []).append(placed)
        return self

    def resistor(
        self, ref: str, value: str, *, at: tuple[float, float], rot: int = 0, **kw: object
    ) -> SchematicBuilder:
        """A two-pin resistor ``Device:R``; pin 1 is 3.81 mm above the anchor when unrotated."""
        return self.part(ref, "Device:R", pins=RESISTOR_PINS, at=at, rot=rot, value=value, **kw)  # type: ignore[arg-type]

    def power(self, name: str, *, at: tuple[float, float], lib_id: str = "") -> SchematicBuilder:
        """A power symbol whose single hidden power-in pin sits at ``at``; names the net."""
        self._power_count += 1
        lib = lib_id or f"power:{name}"
        pin = Pin("1", (0, 0), "power_in", "" if self.version >= V10 else name, hidden=True)
        return self.part(
            f"#PWR{self._power_count:03d}", lib, pins=(pin,), at=at, value=name, power="global"
        )

    def flag(self, *, at: tuple[float, float]) -> SchematicBuilder:
        """A power flag (power-out pin): marks a net as driven, joins nothing."""
        self._power_count += 1
        pin = Pin("1", (0, 0), "power_out", "pwr")
        return self.part(
            f"#FLG{self._power_count:03d}",
            "power:PWR_FLAG",
            pins=(pin,),
            at=at,
            value="PWR_FLAG",
            power="global",
        )

    def pin_point(self, ref: str, number: str, unit: int | None = None) -> tuple[float, float]:
        """Where pin ``number`` of the placed ``ref`` lands on the sheet (mm).

        Computed with complex numbers (independently of pullproof's geometry module):
        flip Y, turn by −90° per quarter turn, then mirror about the anchor.
        """
        for p in self._by_ref.get(ref, ()):
            if unit is not None and p.unit != unit:
                continue
            for pin in self._libs[p.lib_id][0]:
                if pin.number == number and pin.unit in (0, p.unit):
                    z = complex(pin.at[0], -pin.at[1]) * (-1j) ** (p.rot // 90)
                    if p.mirror == "x":
                        z = z.conjugate()
                    elif p.mirror == "y":
                        z = -z.conjugate()
                    return round(p.at[0] + z.real, 4), round(p.at[1] + z.imag, 4)
        raise KeyError(f"{ref} has no pin {number}")

    # -- drawing ----------------------------------------------------------------------------
    def wire(self, *points: tuple[float, float]) -> SchematicBuilder:
        """A wire through ``points`` (one segment per consecutive pair)."""
        for a, b in itertools.pairwise(points):
            self._items.append(
                f"(wire (pts (xy {_mm(a[0])} {_mm(a[1])}) (xy {_mm(b[0])} {_mm(b[1])}))"
                f" (stroke (width 0) (type default)) (uuid {_q(str(_uuid.uuid4()))}))"
            )
        return self

    def bus(self, *points: tuple[float, float]) -> SchematicBuilder:
        """A bus line through ``points``; it carries nothing but joins vector names."""
        for a, b in itertools.pairwise(points):
            self._items.append(
                f"(bus (pts (xy {_mm(a[0])} {_mm(a[1])}) (xy {_mm(b[0])} {_mm(b[1])})))"
            )
        return self

    def junction(self, at: tuple[float, float]) -> SchematicBuilder:
        self._items.append(f"(junction (at {_mm(at[0])} {_mm(at[1])}) (diameter 0))")
        return self

    def no_connect(self, at: tuple[float, float]) -> SchematicBuilder:
        self._items.append(f"(no_connect (at {_mm(at[0])} {_mm(at[1])}))")
        return self

    def label(self, name: str, *, at: tuple[float, float], kind: str = "label") -> SchematicBuilder:
        """A ``label``, ``global_label`` or ``hierarchical_label`` anchored at ``at``."""
        shape = "" if kind == "label" else " (shape input)"
        self._items.append(f"({kind} {_q(name)}{shape} (at {_mm(at[0])} {_mm(at[1])} 0))")
        return self

    def sheet(
        self,
        name: str,
        file: str,
        *,
        at: tuple[float, float],
        pins: dict[str, tuple[float, float]] | None = None,
        uuid: str = "",
    ) -> str:
        """A sheet block using ``file``; ``pins`` maps pin names to points. Returns its uuid."""
        sheet_uuid = uuid or str(_uuid.uuid4())
        name_key, file_key = (
            ("Sheet name", "Sheet file") if self.version <= V6 else ("Sheetname", "Sheetfile")
        )
        body = "".join(
            f" (pin {_q(n)} input (at {_mm(p[0])} {_mm(p[1])} 0))" for n, p in (pins or {}).items()
        )
        self._items.append(
            f"(sheet (at {_mm(at[0])} {_mm(at[1])}) (size 20 20) (uuid {_q(sheet_uuid)})"
            f" (property {_q(name_key)} {_q(name)} (at 0 0 0))"
            f" (property {_q(file_key)} {_q(file)} (at 0 0 0)){body})"
        )
        return sheet_uuid

    # -- output -----------------------------------------------------------------------------
    def _lib_text(self, lib_id: str, pins: tuple[Pin, ...], power: str) -> str:
        v10 = self.version >= V10
        flag = ""
        if power:
            flag = f" (power {power})" if v10 else " (power)"
        name = lib_id.split(":")[-1]
        units: dict[int, list[str]] = {}
        for pin in pins:
            hide = (" (hide yes)" if v10 else " hide") if pin.hidden else ""
            units.setdefault(pin.unit, []).append(
                f"(pin {pin.type} line (at {_mm(pin.at[0])} {_mm(pin.at[1])} 0) (length 2.54)"
                f"{hide} (name {_q(pin.name or '~')}) (number {_q(pin.number)}))"
            )
        subs = " ".join(
            f"(symbol {_q(f'{name}_{u}_1')} {' '.join(texts)})"
            for u, texts in sorted(units.items())
        )
        return f"(symbol {_q(lib_id)}{flag} (in_bom yes) (on_board yes) {subs})"

    def _placed_text(self, p: _Placed) -> str:
        style = "body_style" if self.version >= V10 else "convert"
        mirror = f" (mirror {p.mirror})" if p.mirror else ""
        props = {"Reference": p.ref, "Value": p.value, **p.fields}
        text = "".join(f" (property {_q(k)} {_q(v)} (at 0 0 0))" for k, v in props.items())
        inst = ""
        if self.version > V6:
            paths = p.instances or {f"/{self.uuid}": p.ref}
            inst = (
                ' (instances (project "fixture"'
                + "".join(
                    f" (path {_q(path)} (reference {_q(r)}) (unit {u}))"
                    for path, (r, u) in ((k, _ref_unit(v, p.unit)) for k, v in paths.items())
                )
                + "))"
            )
        elif not self.v6_child:
            self._v6_table.append((f"/{p.uuid}", p.ref, p.unit))
        dnp = " (dnp yes)" if p.dnp else (" (dnp no)" if self.version > V6 else "")
        return (
            f"(symbol (lib_id {_q(p.lib_id)}) (at {_mm(p.at[0])} {_mm(p.at[1])} {p.rot}){mirror}"
            f" (unit {p.unit}) ({style} 1) (in_bom yes) (on_board {'yes' if p.on_board else 'no'})"
            f"{dnp}"
            f" (uuid {_q(p.uuid)}){text}{inst})"
        )

    def text(self) -> str:
        """The schematic text."""
        self._v6_table.clear()
        ind = "\t" if self.version >= V10 else "  "
        lines = [
            "(kicad_sch",
            f"{ind}(version {self.version})",
            f'{ind}(generator "pullproof-tests")',
            f"{ind}(uuid {_q(self.uuid)})",
            f'{ind}(paper "A4")',
            f"{ind}(lib_symbols",
            *(f"{ind}{ind}{self._lib_text(k, *v)}" for k, v in self._libs.items()),
            f"{ind})",
            *(f"{ind}{item}" for item in self._items),
            *(f"{ind}{self._placed_text(p)}" for p in self._placed),
        ]
        if self._v6_table or self._v6_adopted:
            rows = "".join(
                f" (path {_q(path)} (reference {_q(r)}) (unit {u}))"
                for path, r, u in (*self._v6_table, *self._v6_adopted)
            )
            lines.append(f"{ind}(symbol_instances{rows})")
        lines.append(")")
        return "\n".join(lines) + "\n"

    def adopt_v6(self, child: SchematicBuilder) -> SchematicBuilder:
        """Write ``child``'s references into this v6 root's ``symbol_instances`` table.

        The child's placements give ``instances`` keyed by v6 sheet paths (``/SHEET-UUID``);
        each becomes a row ``/SHEET-UUID/SYMBOL-UUID``, as the v6 root stores them.
        """
        for p in child._placed:
            for path, value in p.instances.items():
                ref, unit = _ref_unit(value, p.unit)
                self._v6_adopted.append((f"{path}/{p.uuid}", ref, unit))
        return self

    def write(self, path: str | Path) -> Path:
        """Write the text to ``path`` (UTF-8) and return the path."""
        out = Path(path)
        out.write_text(self.text(), encoding="utf-8")
        return out

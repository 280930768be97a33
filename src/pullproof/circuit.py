"""The connected circuit: placed parts, their pins, and the nets joining them.

Produced by :mod:`pullproof.nets` from the schematic model; read by everything
downstream (detection, review, reports). Frozen values only: nothing here points
back at the reader or the connectivity engine.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

__all__ = ["Circuit", "Net", "NetMember", "Part", "PartPin", "Placement", "RefDes", "SheetInstance"]

RefDes = str
NetName = str


@dataclass(frozen=True)
class PartPin:
    """One pin of a part (all units merged): number, name and electrical type.

    ``type`` is the schematic format's electrical type word: ``input``,
    ``output``, ``bidirectional``, ``tri_state``, ``passive``, ``free``,
    ``unspecified``, ``power_in``, ``power_out``, ``open_collector``,
    ``open_emitter``, ``no_connect``.
    """

    number: str
    name: str
    type: str


@dataclass(frozen=True)
class Placement:
    """Where one placed symbol (one unit) of a part sits in the source files.

    ``file`` is the sheet file path as given (relative to the root's folder),
    ``span`` the (start, end) character offsets of the ``(symbol …)`` node in
    that file's text, so a writer can splice fields without re-serialising.
    """

    file: str
    sheet_path: str
    unit: int
    span: tuple[int, int]
    uuid: str = ""


@dataclass(frozen=True)
class Part:
    """A placed part with one reference designator (all its units merged)."""

    ref: RefDes
    value: str
    lib_id: str
    sheet: str  # sheet instance path of the first unit, e.g. "/" or "/PSU/"
    fields: Mapping[str, str]  # every property except Reference and Value, as written
    pins: tuple[PartPin, ...]
    placements: tuple[Placement, ...] = ()
    dnp: bool = False
    in_bom: bool = True
    on_board: bool = True

    def __post_init__(self) -> None:
        if not self.ref:
            raise ValueError("a part needs a reference")
        if not isinstance(self.fields, MappingProxyType):
            object.__setattr__(self, "fields", MappingProxyType(dict(self.fields)))

    def pin(self, number: str) -> PartPin | None:
        """The pin with this number, or None."""
        for p in self.pins:
            if p.number == number:
                return p
        return None

    def field(self, name: str) -> str | None:
        """A field's text looked up case-insensitively, or None when absent or blank."""
        for key, text in self.fields.items():
            if key.casefold() == name.casefold():
                return text if text.strip() else None
        return None


@dataclass(frozen=True)
class NetMember:
    """A (reference, pin number) on a net, with the pin's name and electrical type."""

    ref: RefDes
    pin: str
    name: str
    type: str


@dataclass(frozen=True)
class Net:
    """One electrical net.

    ``name`` follows the naming rule documented in :mod:`pullproof.nets`.
    ``power`` is true when a power symbol names the net (a rail or ground
    candidate); ``labels`` lists every label/power name seen on it (unescaped).
    """

    name: NetName
    members: tuple[NetMember, ...]
    power: bool = False
    labels: tuple[str, ...] = ()


@dataclass(frozen=True)
class SheetInstance:
    """One instance of a sheet in the hierarchy: its path and file (relative to the root)."""

    path: str
    file: str
    name: str = ""


@dataclass(frozen=True)
class Circuit:
    """Everything connectivity produces for one root schematic."""

    root: str  # the root file as the user named it
    sheets: tuple[SheetInstance, ...]
    parts: tuple[Part, ...]
    nets: tuple[Net, ...]
    files: Mapping[str, str] = field(default_factory=dict)  # sheet file → absolute path read

    def part(self, ref: RefDes) -> Part | None:
        """The part with this reference, or None."""
        return self._parts_by_ref.get(ref)

    def net_of(self, ref: RefDes, pin: str) -> Net | None:
        """The net holding (ref, pin), or None."""
        return self._net_by_pin.get((ref, pin))

    @property
    def _parts_by_ref(self) -> dict[RefDes, Part]:
        cache = self.__dict__.get("_pbr")
        if cache is None:
            cache = {p.ref: p for p in self.parts}
            object.__setattr__(self, "_pbr", cache)
        return cache

    @property
    def _net_by_pin(self) -> dict[tuple[str, str], Net]:
        cache = self.__dict__.get("_nbp")
        if cache is None:
            cache = {(m.ref, m.pin): n for n in self.nets for m in n.members}
            object.__setattr__(self, "_nbp", cache)
        return cache

"""Bus names: which member nets a label, hierarchical label or sheet pin stands for.

Two forms, as the schematic format defines them:

* a **vector** ``A[0..3]`` stands for ``A0 A1 A2 A3`` (a descending range counts down);
* a **group** ``NAME{A B C}`` stands for ``NAME.A NAME.B NAME.C``, a bare group ``{A B}``
  for ``A B``; a member may itself be a vector (``{D[0..3] CLK}`` → ``D0 … D3 CLK``).

Braces preceded by ``~``, ``_`` or ``^`` are text markup (overbar, subscript,
superscript), not a group: ``~{RESET}`` is one plain net name.

Each member also has a *short* name, the part a group member is matched by on a bus
shared with other groups (``CLK`` for ``NAME.CLK``); for a vector it is the member
itself.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

__all__ = ["BusName", "bus_members", "parse_bus_name"]

_VECTOR = re.compile(r"^(?P<prefix>.*?)\[(?P<a>\d+)\.\.(?P<b>\d+)\]$")
# A group: an optional prefix that does not end in a markup character, then {members}.
_GROUP = re.compile(r"^(?P<prefix>(?:[^{}]*[^{}~_^])?)\{(?P<body>[^{}]*)\}$")
_MEMBER_SPLIT = re.compile(r"[\s,]+")


@dataclass(frozen=True)
class BusName:
    """The expansion of one bus name: full member names and the short names they match by."""

    members: tuple[str, ...]
    shorts: tuple[str, ...]
    group: bool


def _vector(name: str) -> tuple[str, ...] | None:
    m = _VECTOR.match(name)
    if m is None:
        return None
    a, b = int(m["a"]), int(m["b"])
    step = 1 if b >= a else -1
    return tuple(f"{m['prefix']}{i}" for i in range(a, b + step, step))


def parse_bus_name(name: str) -> BusName | None:
    """The members ``name`` stands for, or None for a plain (single-net) name."""
    vector = _vector(name)
    if vector is not None:
        return BusName(vector, vector, group=False)
    m = _GROUP.match(name)
    if m is None:
        return None
    words = [w for w in _MEMBER_SPLIT.split(m["body"]) if w]
    if not words:
        return None
    prefix = f"{m['prefix']}." if m["prefix"] else ""
    shorts: list[str] = []
    for word in words:
        shorts.extend(_vector(word) or (word,))
    return BusName(tuple(prefix + s for s in shorts), tuple(shorts), group=True)


def bus_members(name: str) -> tuple[str, ...]:
    """The member names of a bus name (vector or group); empty for a plain name."""
    parsed = parse_bus_name(name)
    return () if parsed is None else parsed.members

"""The ``pullproof nets`` report: a readable table, or the ``pullproof.nets/1`` JSON."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from ..circuit import Circuit
from .safe_text import for_terminal

__all__ = ["SCHEMA", "nets_json", "nets_table"]

SCHEMA = "pullproof.nets/1"


def nets_json(circuit: Circuit) -> dict[str, Any]:
    """The ``pullproof.nets/1`` document (see DESIGN, "Contract: pullproof nets ROOT --json")."""
    return {
        "schema": SCHEMA,
        "root": Path(circuit.root).name,
        "sheets": [{"path": s.path, "file": s.file} for s in circuit.sheets],
        "parts": [
            {
                "ref": p.ref,
                "value": p.value,
                "lib_id": p.lib_id,
                "sheet": p.sheet,
                "fields": dict(p.fields),
            }
            for p in circuit.parts
        ],
        "nets": [
            {
                "name": n.name,
                "members": [{"ref": m.ref, "pin": m.pin, "type": m.type} for m in n.members],
            }
            for n in circuit.nets
        ],
    }


def nets_table(circuit: Circuit) -> str:
    """One block per net: the name (with ``[power]`` for rails), then its members."""
    lines = [
        f"{Path(circuit.root).name}: {len(circuit.sheets)} sheet(s), "
        f"{len(circuit.parts)} part(s), {len(circuit.nets)} net(s)",
        "",
    ]
    names = [for_terminal(n.name, keep="") for n in circuit.nets]  # escaped, then measured
    pairs = list(zip(names, circuit.nets, strict=True))
    width = max((len(name) + 8 * n.power for name, n in pairs), default=0)
    for name, net in pairs:
        tag = f"{name} [power]" if net.power else name
        pins = " ".join(f"{m.ref}.{m.pin}" + (f"({m.name})" if m.name else "") for m in net.members)
        lines.append(f"{tag:<{width}}  {pins}")
    return "\n".join(lines) + "\n"

"""Plain Values on a real-world schematic resolve to the right family or resistance."""

from __future__ import annotations

from pathlib import Path

import pytest

from pullproof.families import PartKind, PartLibrary, resolve_part
from pullproof.nets import build_circuit
from pullproof.rules import load_rules

SHARED = Path(__file__).parents[2] / ".." / "shared" / "realworld"
BUTTONBAR = SHARED / "bablokb-buttonbar" / "buttonbar.kicad_sch"

pytestmark = pytest.mark.skipif(
    not BUTTONBAR.is_file(), reason=f"real-world schematics not present at {SHARED}"
)


def test_buttonbar_values_resolve() -> None:
    circuit = build_circuit(BUTTONBAR)
    rules = load_rules(BUTTONBAR)
    seen_logic = False
    for part in circuit.parts:
        info = resolve_part(part, PartLibrary(), rules)
        if info.kind is PartKind.RESISTOR and info.resistor and info.resistor.ohms:
            # every resistor Value on this board is a plain code such as 10k or 4k7
            assert info.resistor.ohms.magnitude("ohm") > 0, part.value
        if "74HC14" in part.value:
            # the hex Schmitt inverter drawn as seven units (SOURCES.md)
            seen_logic = True
            assert info.kind is PartKind.LOGIC
            assert info.family == "HC"
            assert info.inputs is not None and info.inputs.schmitt
    assert seen_logic


def test_buttonbar_resistor_values_are_read() -> None:
    circuit = build_circuit(BUTTONBAR)
    rules = load_rules(BUTTONBAR)
    values = {
        p.value: resolve_part(p, PartLibrary(), rules).resistor
        for p in circuit.parts
        if p.lib_id.endswith(":R") or p.ref.startswith("R")
    }
    assert values, "no resistors found"
    for text, info in values.items():
        assert info is not None and info.ohms is not None, text

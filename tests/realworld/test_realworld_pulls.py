"""Detection against the answer keys of three public designs, and general rules on all eight.

../shared/realworld/{buspirate6,z80-512k,tt-demo}/pulls.json list, read by hand from each
schematic, every resistor (or array element) with one end on a rail: ``logic_pulls`` and
``others`` (each with a class: led-series, divider, usb-cc …). Entries marked ``doubt``
could be classed either way; where this test judges one, it says which way and why. The
classes are facts of the trade (common practice); see ../shared/realworld/SOURCES.md.
"""

from __future__ import annotations

import json
from functools import cache
from pathlib import Path
from typing import Any

import pytest

from pullproof.elements import not_fitted
from pullproof.families.kinds import PartKind
from pullproof.families.match import classify
from pullproof.nets import build_circuit
from pullproof.results import ReviewResult
from pullproof.review import review
from pullproof.supplies import read_supply_name, supply_function

SHARED = Path(__file__).resolve().parents[2] / ".." / "shared" / "realworld"
KEYED = ("buspirate6", "z80-512k", "tt-demo")

pytestmark = pytest.mark.skipif(
    not all((SHARED / d / "pulls.json").is_file() for d in KEYED),
    reason=f"real-world answer keys not present at {SHARED}",
)

# The words a skipped reason must contain to name each class of the answer keys.
CLASS_WORDS: dict[str, tuple[str, ...]] = {
    "led-series": ("LED series",),
    "usb-cc": ("USB-C configuration",),
    "divider": ("divider",),
    "current-sense": ("current-sense", "shunt"),
    "transistor-base": ("transistor base",),
    "bias-analog": ("analog",),
    "supply-filter": ("filter",),
    "switch-series": ("series resistor in front of a switch",),
    "analog-mux-series": ("analog",),
    "load-bleed": ("load or bleed",),
    "shield-bleed": ("shield",),
}

# Doubt entries judged one way, and why (each a general rule, not a name).
DOUBT: dict[tuple[str, str, str], tuple[str, str]] = {
    # the part is marked dnp: a resistor that is not there is listed as not fitted
    ("buspirate6", "R102", ""): ("skipped", "not fitted"),
    # one pull-down on an ADC-capable GPIO; the other leg sits beyond a series resistor, so
    # on its own net this is a pull on a pin that reads logic levels too
    ("buspirate6", "R407", ""): ("judged", ""),
    # the net holds the MCU's GPIO itself; the MOSFET gate is behind a 200 Ω resistor, so
    # the pull defines the GPIO's level while the MCU is in reset
    ("buspirate6", "R613", ""): ("judged", ""),
}


def _root(design: str) -> Path:
    files = json.loads((SHARED / design / "files.json").read_text(encoding="utf-8"))
    return SHARED / design / files["root_schematic"]


@cache
def reviewed(design: str) -> ReviewResult:
    return review(_root(design))


def _key(entry: dict[str, Any]) -> tuple[str, str]:
    return entry["ref"], entry.get("element", "")


def _judged(result: ReviewResult) -> set[tuple[str, str]]:
    return {(e.ref, e.element) for n in result.networks for e in n.network.resistor.members}


def _skipped(result: ReviewResult) -> dict[tuple[str, str], str]:
    return {(s.ref, s.element): s.reason for s in result.skipped}


def _entries(kind: str) -> list[tuple[str, dict[str, Any]]]:
    out = []
    for design in KEYED:
        path = SHARED / design / "pulls.json"
        if path.is_file():
            out.extend((design, e) for e in json.loads(path.read_text("utf-8"))[kind])
    return out


def _id(item: tuple[str, dict[str, Any]]) -> str:
    design, e = item
    return f"{design}-{e['ref']}" + (f"-{e['element']}" if e.get("element") else "")


LOGIC = _entries("logic_pulls")
OTHERS = _entries("others")


@pytest.mark.parametrize(("design", "entry"), LOGIC, ids=[_id(x) for x in LOGIC])
def test_every_logic_pull_is_judged(design: str, entry: dict[str, Any]) -> None:
    result = reviewed(design)
    key = _key(entry)
    doubt = DOUBT.get((design, *key))
    if "doubt" in entry:
        assert doubt is not None, f"say how {key} (doubt: {entry['doubt']}) is judged"
    if doubt is not None and doubt[0] == "skipped":
        assert doubt[1] in _skipped(result).get(key, ""), _skipped(result).get(key)
        return
    assert key in _judged(result), _skipped(result).get(key, "neither judged nor skipped")


@pytest.mark.parametrize(("design", "entry"), OTHERS, ids=[_id(x) for x in OTHERS])
def test_every_other_resistor_is_skipped_naming_its_class(
    design: str, entry: dict[str, Any]
) -> None:
    result = reviewed(design)
    key = _key(entry)
    doubt = DOUBT.get((design, *key))
    if "doubt" in entry:
        assert doubt is not None, f"say how {key} (doubt: {entry['doubt']}) is judged"
    if doubt is not None and doubt[0] == "judged":
        assert key in _judged(result)
        return
    assert key not in _judged(result)
    reason = _skipped(result).get(key)
    assert reason is not None, f"{key} ({entry['class']}) is not in skipped"
    words = CLASS_WORDS[entry["class"]]
    assert any(w in reason for w in words), (entry["class"], reason)
    if entry.get("dnp"):
        assert reason.startswith("not fitted"), reason


@pytest.mark.parametrize("design", KEYED)
def test_nothing_outside_the_key_is_judged(design: str) -> None:
    key = json.loads((SHARED / design / "pulls.json").read_text(encoding="utf-8"))
    listed = {_key(e) for e in (*key["logic_pulls"], *key["others"])}
    assert _judged(reviewed(design)) <= listed


# ------------------------------------------------------------------ all eight designs

ALL = (
    sorted(p.name for p in SHARED.iterdir() if (p / "files.json").is_file())
    if SHARED.is_dir()
    else []
)


@pytest.mark.parametrize("design", ALL)
def test_every_part_not_fitted_is_listed(design: str) -> None:
    circuit = build_circuit(_root(design))
    skipped = _skipped(reviewed(design))
    for part in circuit.parts:
        if classify(part) is PartKind.RESISTOR and not_fitted(part):
            reasons = [r for (ref, _), r in skipped.items() if ref == part.ref]
            assert reasons and all(r.startswith("not fitted") for r in reasons), part.ref


@pytest.mark.parametrize("design", ALL)
def test_no_rail_is_a_signal_name_with_a_voltage_in_it(design: str) -> None:
    # a rail is a power symbol, a whole supply name, or a net that powers something; never
    # a label such as PULLUP_EN_3V3 whose voltage sits inside a signal name
    circuit = build_circuit(_root(design))
    by_name = {n.name.rsplit("/", 1)[-1]: n for n in circuit.nets}
    for result in reviewed(design).networks:
        rail = result.network.rail
        if rail.ground:
            continue
        net = by_name.get(rail.name) or next(
            (n for n in circuit.nets if rail.name in n.labels), None
        )
        assert net is not None, rail.name
        assert net.power or read_supply_name(rail.name) is not None or supply_function(net), (
            result.network.net,
            rail.name,
        )

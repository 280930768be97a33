"""Resolving pulled nets into pull networks: rails, parallel pulls, inputs through a resistor.

Numbers: 74HC levels from JEDEC JESD7A (from memory); 5 % rail tolerance is the rules
default (common practice); parallel resistance 1 / (1/R1 + 1/R2) is a fact of the trade.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from builder import SWITCH_PINS
from placer import LabelPlacer
from pullproof.detect import Resolver, UnknownRail
from pullproof.families.match import PartLibrary, resolve_part
from pullproof.nets import build_circuit
from pullproof.network import Direction, PullNetwork
from pullproof.review import _kind_word
from pullproof.rules import load_rules
from pullproof.topology import Topology, find_pulls

Resolved = dict[str, PullNetwork | UnknownRail]
PANEL = Path(__file__).resolve().parents[1] / "fixtures" / "review" / "interlock_panel.kicad_sch"


def scan(root: Path) -> tuple[Resolver, Topology]:
    """The resolver and the topology of one schematic, with no part library."""
    circuit = build_circuit(root)
    rules = load_rules(root)
    infos = {p.ref: resolve_part(p, PartLibrary(), rules) for p in circuit.parts}
    resolver = Resolver(circuit, infos, rules)
    return resolver, find_pulls(circuit, lambda p: _kind_word(infos[p.ref]), resolver.rail_key)


@pytest.fixture(scope="module")
def resolved() -> Resolved:
    resolver, topo = scan(PANEL)
    out: dict[str, PullNetwork | UnknownRail] = {}
    for site in topo.sites:
        if site.ups and site.downs:
            continue
        direction = Direction.UP if site.ups else Direction.DOWN
        out[site.net.name] = resolver.resolve(site, direction, site.ups or site.downs)
    return out


def network(resolved: Resolved, name: str) -> PullNetwork:
    n = resolved[name]
    assert isinstance(n, PullNetwork)
    return n


def test_rail_from_name_with_default_tolerance(
    resolved: Resolved,
) -> None:
    rail = network(resolved, "/START_BTN").rail
    assert rail.name == "+5V"
    # 5 V ± 5 %: the default rail_tolerance, a common regulator accuracy (common practice)
    assert rail.v_min.magnitude("V") == pytest.approx(4.75)
    assert rail.v_max.magnitude("V") == pytest.approx(5.25)


def test_rail_from_rules_file(resolved: Resolved) -> None:
    rail = network(resolved, "/DOOR_REED").rail
    assert (rail.v_min.magnitude("V"), rail.v_max.magnitude("V")) == (12.0, 12.0)


def test_parallel_pulls_combine(resolved: Resolved) -> None:
    res = network(resolved, "/FEED_HOLD").resistor
    assert res.refs == ("R19", "R20")
    assert res.ohms.magnitude("ohm") == pytest.approx(10e3)  # 20 k ∥ 20 k
    assert res.ohms.source.where == "R19 ∥ R20 in parallel"


def test_input_through_series_resistor(resolved: Resolved) -> None:
    (inp,) = network(resolved, "/JOG_RAW").inputs
    assert (inp.ref, inp.series_ref, inp.family) == ("U1", "R18", "HC")
    assert inp.series_ohms is not None and inp.series_ohms.magnitude("ohm") == 1e3
    # evaluated at both supply corners of the 74HC14's own +5V rail
    assert [c.vdd.magnitude("V") for c in inp.corners][:: len(inp.corners) - 1] == [4.75, 5.25]


def test_switch_pulls_against_the_pull(resolved: Resolved) -> None:
    (sw,) = network(resolved, "/STOP_BTN").switches
    assert (sw.ref, sw.other_side, sw.pulls_against) == ("SW2", "+5V", True)
    assert network(resolved, "/STOP_BTN").opposite_rail is not None


def test_unknown_input_is_missing_data(resolved: Resolved) -> None:
    (inp,) = network(resolved, "/LAMP_EN").inputs
    assert inp.corners == ()
    assert [m.what for m in inp.missing] == ["input data of U7"]


def test_power_symbol_without_voltage_is_an_unknown_rail(tmp_path: Path) -> None:
    bench = LabelPlacer(frozenset({"VLOGIC", "GND"}))
    bench.resistor("R1", "10k", "VLOGIC", "KEY")
    bench.place("SW1", "Switch:SW_Push", SWITCH_PINS, "KEY", {"1": "KEY", "2": "GND"})
    resolver, topo = scan(bench.b.write(tmp_path / "kiln.kicad_sch"))
    (site,) = topo.sites
    got = resolver.resolve(site, Direction.UP, site.ups)
    assert isinstance(got, UnknownRail)
    assert (got.rail, got.refs) == ("VLOGIC", ("R1",))


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("up 30k..50k", (30e3, 50e3, "up")),
        ("30k..50k", (30e3, 50e3, "up")),  # most microcontroller pulls are pull-ups
        ("down 47k", (47e3, 47e3, "down")),
        ("DOWN 4k7 .. 10k", (4.7e3, 10e3, "down")),
    ],
)
def test_enabled_internal_pull_field(text: str, expected: tuple[float, float, str]) -> None:
    from pullproof.circuit import Part
    from pullproof.detect import enabled_internal_pull

    part = Part("U1", "MCU", "x:y", "/", {"pullproof.internal_pull": text}, ())
    found = enabled_internal_pull(part)
    assert found is not None
    (lo, hi), way = found
    assert (lo.magnitude("ohm"), hi.magnitude("ohm"), way.value) == pytest.approx(expected)
    assert lo.source.where == "field 'pullproof.internal_pull' on U1"


def test_enabled_internal_pull_field_error() -> None:
    from pullproof.circuit import Part
    from pullproof.detect import enabled_internal_pull
    from pullproof.errors import ValueParseError

    part = Part("U1", "MCU", "x:y", "/", {"pullproof.internal_pull": "sideways 4k7"}, ())
    with pytest.raises(ValueParseError) as info:
        enabled_internal_pull(part)
    assert str(info.value) == (
        "field 'pullproof.internal_pull' of U1: cannot read 'sideways 4k7'; "
        "expected [up|down] MIN..MAX, e.g. up 30k..50k, or none"
    )


def test_unknown_rail_network_is_incomplete_and_its_chart_says_unknown(tmp_path: Path) -> None:
    from pullproof.report.chart import chart_text
    from pullproof.results import Verdict
    from pullproof.review import review

    bench = LabelPlacer(frozenset({"VLOGIC", "GND"}))
    bench.resistor("R1", "10k", "VLOGIC", "KEY")
    bench.place("SW1", "Switch:SW_Push", SWITCH_PINS, "KEY", {"1": "KEY", "2": "GND"})
    result = review(bench.b.write(tmp_path / "kiln.kicad_sch"))
    (net,) = result.networks
    assert net.verdict is Verdict.INCOMPLETE and net.bounds == ()
    # Nothing was computed, so neither side of the window may read as "no limit".
    text = chart_text(net)
    assert "lower limit unknown" in text and "upper limit unknown" in text
    assert "no upper limit" not in text

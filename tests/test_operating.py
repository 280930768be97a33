"""The operating point at the fitted value and at each candidate, against hand calculations.

Sources: Ohm's law and Joule heating (P = V²/R) with REFERENCES.md Example 7 (24 V pull-up,
2.2 kΩ); JEDEC JESD7A 74HC levels and leakage, Example 1 (from memory); the 74LS family
table, Example 3 (confirmed in educational handbook tables); the RC step response (§5,
circuit theory) and UM10204 §7.1 (0.8473 constant confirmed), Example 2; IEC 60062 code
examples (§2).
"""

from __future__ import annotations

import json
import math
from dataclasses import replace
from typing import Any

import pytest

from netfactory import GND, cap, driver, inp, levels, network, rail, resistor, rules, src, switch
from pullproof.evaluate import evaluate, recommend
from pullproof.operating import operating_point, operating_points
from pullproof.provenance import Status
from pullproof.report.console import review_table
from pullproof.report.review_json import review_json
from pullproof.results import Figure, ReviewResult

REL = 1e-9
HC45 = levels(4.5, 3.15, 1.35, 1e-6, 1e-6)  # JESD7A 74HC at VCC 4.5 V, ±1 µA (from memory)
LS = levels(4.75, 2.0, 0.8, 20e-6, 0.4e-3)  # 74LS: IIH 20 µA, IIL 0.4 mA (handbook, confirmed)
I2C_INPUT = levels(3.3, 2.31, 0.99, 0.0, 0.0)  # UM10204 0.7/0.3·VDD (confirmed, secondary)


def value(f: Figure, unit: str) -> float:
    assert f.value is not None, (f.note, f.missing)
    return f.value.magnitude(unit)


def industrial_input(ohms: float = 2.2e3, **kw: Any) -> Any:
    """REFERENCES Example 7: a 24 V DC pull-up, a switch to 0 V, an exact resistor."""
    lv = levels(24.0, 15.0, 5.0, 0.0, 0.0)
    return network(
        inp(lv),
        pull_rail=rail("+24V", 24.0),
        res=resistor(ohms, power=kw.pop("power", 1.0), wv=200.0),  # 2512: 200 V (common practice)
        switches=(switch(contact_max=0.1),),  # a 100 mA contact
        net_rules=kw.pop("net_rules", rules(derating=0.5)),
        **kw,
    )


def test_current_and_dissipation_while_pressed() -> None:
    op = operating_point(industrial_input())
    # Example 7 (Ohm's law): 24 V / 2.2 kΩ = 10.91 mA through the closed switch
    assert value(op.current_max, "A") == pytest.approx(24 / 2200, rel=REL)
    assert value(op.current_min, "A") == pytest.approx(24 / 2200, rel=REL)
    # Example 7 (Joule heating): P = 24² / 2200 = 0.2618 W
    assert value(op.power, "W") == pytest.approx(0.2618, rel=1e-4)
    # with a 2512 part (1 W, common practice) at 50 % derating: 0.2618 / 0.5 W = 52.4 %
    assert op.power.note.startswith("52.4 % of the 500 mW the rules allow")
    assert op.current_max.formula == "I_max = V_max / R_lo"
    assert op.current_max.substituted == "(24 V − 0 V) / 2.2 kΩ"
    assert op.power.formula == "P = V_max² / R_lo"


def test_current_range_over_the_band() -> None:
    # Ohm's law over the band: 10 kΩ ±5 % on a 4.75–5.25 V rail (rules default 5 %, common
    # practice): I_max = 5.25 V / 9.5 kΩ, I_min = 4.75 V / 10.5 kΩ
    net = network(inp(HC45), pull_rail=rail("+5V", 4.75, 5.25), res=resistor(10e3, 0.05),
                  switches=(switch(),))  # fmt: skip
    op = operating_point(net)
    assert op.band == (pytest.approx(9.5e3), pytest.approx(10.5e3))
    assert value(op.current_max, "A") == pytest.approx(5.25 / 9.5e3, rel=REL)
    assert value(op.current_min, "A") == pytest.approx(4.75 / 10.5e3, rel=REL)
    assert value(op.power, "W") == pytest.approx(5.25**2 / 9.5e3, rel=REL)


def test_nothing_held_means_only_leakage() -> None:
    op = operating_point(network(inp(HC45), pull_rail=rail("+5V", 4.5)))
    assert op.current_max.value is None and op.power.value is None
    assert op.current_max.note == "Nothing on the net holds the line the other way."
    assert op.edge.note == "Nothing on the net moves the line, so the pull makes no edge."


def test_idle_level_of_a_pull_up_with_worst_leakage() -> None:
    # Example 1 with ±5 % applied: 1.2 MΩ reaches 1.26 MΩ; 4.5 V − 1.26 MΩ × 1 µA = 3.24 V,
    # 90 mV above V_IH,min = 3.15 V (JESD7A, from memory)
    op = operating_point(network(inp(HC45), pull_rail=rail("+5V", 4.5), res=resistor(1.2e6, 0.05)))
    assert value(op.idle, "V") == pytest.approx(3.24, rel=REL)
    assert op.idle.formula == "V_idle = V_min − ΣI_high · R_hi"
    assert op.idle.note == "90 mV above V_IH,min(U1) = 3.15 V."


def test_idle_level_of_a_pull_down_on_ttl() -> None:
    # Example 3: 1.8 kΩ ±5 % reaches 1.89 kΩ; 1.89 kΩ × 0.4 mA = 0.756 V, 44 mV below
    # V_IL,max = 0.8 V (74LS family table, confirmed)
    net = network(inp(LS), direction="down", res=resistor(1.8e3, 0.05))
    op = operating_point(net)
    assert value(op.idle, "V") == pytest.approx(0.756, rel=REL)
    assert op.idle.formula == "V_idle = ΣI_low · R_hi"
    assert op.idle.note == "44 mV below V_IL,max(U1) = 800 mV."


def test_idle_level_unknown_names_the_missing_value() -> None:
    net = network(inp(levels(5.0, 3.5, 1.5, None, None)), pull_rail=rail("+5V", 5.0))
    op = operating_point(net)
    assert op.idle.value is None
    assert [m.what for m in op.idle.missing] == ["I_high of U1 pin 1"]


@pytest.mark.parametrize(
    ("ohms", "t_r"),
    [
        (1.0e3, 169.5e-9),  # Example 2 back-check: 0.8473 · 1.0 kΩ · 200 pF (UM10204 §7.1)
        (1.5e3, 254.2e-9),  # Example 2 back-check: 0.8473 · 1.5 kΩ · 200 pF
        (1.6e3, 271.1e-9),  # Example 2 back-check: 0.8473 · 1.6 kΩ · 200 pF
    ],
)
def test_i2c_rise_time_at_each_candidate(ohms: float, t_r: float) -> None:
    net = network(
        inp(I2C_INPUT, schmitt=True),
        pull_rail=rail("+3V3", 3.3),
        res=resistor(1.2e3, power=0.1, wv=50.0),
        net_rules=rules(i2c_mode="fast", bus_capacitance=200e-12),
    )
    rec = recommend(net, (966.7, 1770.3))
    point = next(p for p in rec.points if p.ohms == pytest.approx(ohms))
    assert point.edge == pytest.approx(t_r, rel=1e-3)
    # on a bus the devices hold the line low: (3.3 V − 0 V) / 1.5 kΩ = 2.2 mA (Ohm's law)
    assert point.current_max == pytest.approx(3.3 / ohms, rel=REL)
    # the fitted value's point says which edge it is
    assert operating_point(net).edge.symbol == "t_r"


def test_open_drain_edge_starts_at_v_ol() -> None:
    # RC step response (§5): from 10 % to 90 % of a 1 V rail takes ln 9 · RC; the open-drain
    # driver leaves the line at V_OL = 0.1 V; 10 kΩ · 100 pF · ln 9 = 2.197 µs
    net = network(
        inp(levels(1.0, 0.9, 0.3, 0.0, 0.0, c_in=0.0)),
        pull_rail=rail("+1V", 1.0),
        res=resistor(10e3),
        drivers=(driver("U9", v_ol=0.1),),
        capacitors=(cap(100e-12),),
    )
    op = operating_point(net)
    assert value(op.edge, "s") == pytest.approx(10e3 * 100e-12 * math.log(9), rel=REL)
    assert op.edge.formula == "t = R_hi · C · ln((V − V_OL)/(V − V_IH,min))"
    assert "from V_OL(U9) = 100 mV" in op.edge.note


def test_edge_with_wiring_capacitance_on_a_plain_line() -> None:
    # RC step response (§5): 30 % → 70 % takes ln(7/3) · RC; C = 90 pF of cable + 10 pF pin;
    # 10 kΩ · 100 pF · 0.8473 = 847.3 ns
    net = network(
        inp(levels(5.0, 3.5, 1.5, 0.0, 0.0, c_in=10e-12)),
        pull_rail=rail("+5V", 5.0),
        res=resistor(10e3),
        switches=(switch(),),
        net_rules=rules(wiring_capacitance=90e-12),
    )
    op = operating_point(net)
    assert value(op.edge, "s") == pytest.approx(10e3 * 100e-12 * math.log(7 / 3), rel=REL)
    assert [t.symbol for t in op.edge.terms][:3] == ["R_hi", "C_wiring", "C_in(U1 pin 1)"]


def test_edge_unknown_when_a_pin_capacitance_is_missing() -> None:
    net = network(inp(HC45), pull_rail=rail("+5V", 4.5), switches=(switch(),))
    op = operating_point(net)
    assert op.edge.value is None
    assert [m.what for m in op.edge.missing] == ["C_in of U1 pin 1"]


def test_figures_keep_provenance_with_the_weakest_status() -> None:
    op = operating_point(network(inp(HC45), pull_rail=rail("+5V", 4.5), res=resistor(1.2e6)))
    assert op.idle.value is not None
    assert op.idle.value.source.where == "V_idle = V_min − ΣI_high · R_hi = 4.5 V − 1 µA · 1.2 MΩ"
    assert op.idle.value.source.status is Status.USER
    # a leakage recorded from memory makes the idle level a from-memory number too
    assert HC45.i_high is not None
    memory = replace(HC45.i_high, source=replace(HC45.i_high.source, status=Status.FROM_MEMORY))
    hc = replace(HC45, i_high=memory)
    op = operating_point(network(inp(hc), pull_rail=rail("+5V", 4.5), res=resistor(1.2e6)))
    assert op.idle.value is not None and op.idle.value.source.status is Status.FROM_MEMORY


def test_candidate_numbers_match_a_full_point_at_the_same_value() -> None:
    # a candidate's plain numbers are the full operating point's, at the candidate's value
    net = industrial_input(12e3, power=0.1)
    full = operating_point(replace(net, resistor=replace(net.resistor, ohms=src(15e3, "ohm"))))
    (light,) = operating_points(net, (15e3,))
    assert light.figures == pytest.approx(full.values().figures)
    assert light.band == pytest.approx(full.band)


def test_evaluate_gives_the_fitted_and_every_candidate_point() -> None:
    net = industrial_input(12e3, power=0.1)
    r = evaluate(net)
    assert r.operating is not None and r.operating.ohms == 12e3
    assert r.recommendation is not None
    assert [p.ohms for p in r.recommendation.points] == list(r.recommendation.candidates)
    # Example 7's alternative: 12 kΩ gives 24 V / 12 kΩ = 2.0 mA of switch current
    assert value(r.operating.current_max, "A") == pytest.approx(2.0e-3, rel=REL)


def _result(r: Any) -> ReviewResult:
    return ReviewResult("hive.kicad_sch", (r,), (), ())


def test_json_carries_the_operating_point_and_candidate_codes() -> None:
    r = evaluate(industrial_input(12e3, power=0.1))
    doc = json.loads(json.dumps(review_json(_result(r)), allow_nan=False))
    (n,) = doc["networks"]
    op = n["operating_point"]
    assert op["rkm"] == "12K"  # IEC 60062: K as the decimal marker (47K is a standard example)
    assert op["current_max"]["value"] == pytest.approx(2.0e-3)  # Ohm's law, Example 7
    assert op["current_max"]["unit"] == "A" and op["power"]["unit"] == "W"
    assert op["edge_time"]["value"] is None
    assert [m["what"] for m in op["edge_time"]["missing"]] == ["C_in of U1 pin 1"]
    rec = n["recommendation"]
    assert [c["ohms"] for c in rec["candidates"]] == rec["candidates_ohms"]
    # Ohm's law at each candidate's lowest resistance: 24 V / R_lo
    for c in rec["candidates"]:
        brief = c["operating_point"]
        assert brief["current_max_amps"] == pytest.approx(24 / brief["band_ohms"][0], rel=REL)
    assert rec["pick_rkm"] == next(
        c["rkm"] for c in rec["candidates"] if c["ohms"] == rec["pick_ohms"]
    )


@pytest.mark.parametrize(
    ("series", "window", "codes"),
    [
        # IEC 60062 examples 1K0 (REFERENCES §2); the other codes follow the same rule.
        # Example 2 window, E24 (UM10204 §7.1): 1.0 k … 1.6 k
        ("E24", (966.7, 1770.3), ["1K0", "1K1", "1K2", "1K3", "1K5", "1K6"]),
        # IEC 60062 examples 4K7 and 8K2 (REFERENCES §2)
        ("E12", (4.5e3, 8.5e3), ["4K7", "5K6", "6K8", "8K2"]),
        # IEC 60062 examples R47 and 4R7 (REFERENCES §2)
        ("E6", (0.45, 5.0), ["R47", "R68", "1R0", "1R5", "2R2", "3R3", "4R7"]),
        # IEC 60062 examples 47K and 470K (REFERENCES §2)
        ("E6", (40e3, 500e3), ["47K", "68K", "100K", "150K", "220K", "330K", "470K"]),
    ],
)
def test_candidate_codes_follow_iec_60062(
    series: str, window: tuple[float, float], codes: list[str]
) -> None:
    net = industrial_input(net_rules=rules(series=series, derating=0.5))
    r = replace(evaluate(net), recommendation=recommend(net, window))
    doc = review_json(_result(r))
    assert [c["rkm"] for c in doc["networks"][0]["recommendation"]["candidates"]] == codes


def test_console_shows_one_line_per_network() -> None:
    text = review_table(_result(evaluate(industrial_input())))
    # Example 7: 10.91 mA and 0.2618 W while the switch is closed (Ohm's law, Joule heating)
    assert "  /SENSE: 10.9 mA and 262 mW while held the other way" in text


def test_pull_down_point_through_a_switch_to_the_rail() -> None:
    # Ohm's law: a pull-down of 4.7 kΩ with a switch to a 5 V rail: 5 V / 4.7 kΩ = 1.064 mA
    net = network(inp(LS), direction="down", res=resistor(4.7e3),
                  opposite_rail=rail("+5V", 5.0), switches=(switch(),))  # fmt: skip
    op = operating_point(net)
    assert value(op.current_max, "A") == pytest.approx(5.0 / 4.7e3, rel=REL)
    assert GND.ground

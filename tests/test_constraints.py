"""Each constraint against a hand calculation from a named source.

Sources (see /work/shared/REFERENCES.md for each value's status, carried over here):
JEDEC JESD7A 74HC levels (from memory); 74LS/74 family tables (confirmed in educational
handbook tables); I2C-bus specification UM10204 §7.1 (equations confirmed; t_r from
memory); RC step response (circuit theory); chip-resistor ratings (common practice).
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import Any

import pytest

from netfactory import GND, cap, driver, inp, levels, network, rail, resistor, rules, switch
from pullproof.constraints import BUILTIN, ConstraintPluginError, registry
from pullproof.constraints import _common as common
from pullproof.constraints.contact import contact_rating, wetting_current
from pullproof.constraints.debounce import debounce_holdoff
from pullproof.constraints.driver import driver_sink, opto_output
from pullproof.constraints.edges import edge_rate
from pullproof.constraints.levels import high_level_holds, low_level_holds
from pullproof.constraints.power import resistor_power, working_voltage
from pullproof.constraints.preferred import preferred_range
from pullproof.constraints.tolerance import input_tolerance
from pullproof.results import Bound, BoundKind, Check

REL = 1e-9

HC45 = levels(4.5, 3.15, 1.35, 1e-6, 1e-6)  # JESD7A 74HC at VCC 4.5 V, ±1 µA (from memory)
HC60 = levels(6.0, 4.2, 1.8, 1e-6, 1e-6)  # JESD7A 74HC at VCC 6.0 V (from memory)
HC20 = levels(2.0, 1.5, 0.5, 0.1e-6, 0.1e-6)  # JESD7A 74HC at VCC 2.0 V, 25 °C leakage
# 74LS: VIH 2.0 V, VIL 0.8 V, IIH 20 µA, IIL 0.4 mA (educational tables, confirmed)
LS = levels(4.75, 2.0, 0.8, 20e-6, 0.4e-3)


def only(items: tuple[Bound | Check, ...]) -> Bound:
    assert len(items) == 1, items
    b = items[0]
    assert isinstance(b, Bound)
    return b


def ohms(items: tuple[Bound | Check, ...]) -> float:
    b = only(items)
    assert b.ohms is not None, b.missing
    return b.ohms


# ---------------------------------------------------------------- high level holds

HIGH_CASES: list[tuple[str, Any, float]] = [
    # JESD7A 74HC, REFERENCES Example 1: (4.5 − 3.15) V / 1 µA (from memory)
    ("74HC at 4.5 V", network(inp(HC45), pull_rail=rail("+5V", 4.5)), 1.35e6),
    # JESD7A 74HC, Example 1 variant: (6.0 − 4.2) V / 1 µA (from memory)
    ("74HC at 6.0 V", network(inp(HC60), pull_rail=rail("+6V", 6.0)), 1.8e6),
    # JESD7A 74HC, Example 1 variant: (2.0 − 1.5) V / 0.1 µA (from memory)
    ("74HC at 2.0 V", network(inp(HC20), pull_rail=rail("+2V", 2.0)), 5.0e6),
    # 74LS one input at 4.75 V: 2.75 V / 20 µA (educational tables, confirmed)
    ("one 74LS", network(inp(LS), pull_rail=rail("+5V", 4.75, 5.25)), 137.5e3),
    # ten 74LS-style inputs on a 4.75 V rail: 2.75 V / 200 µA (common practice)
    (
        "ten 74LS",
        network(*(inp(LS, ref=f"U{i}") for i in range(10)), pull_rail=rail("+5V", 4.75, 5.25)),
        13.75e3,
    ),
    # same supply: only the 4.5 V corner lies on a 4.5–5.5 V rail (JESD7A, from memory)
    (
        "74HC corners, same supply",
        network(inp(HC20, HC45, HC60), pull_rail=rail("+5V", 4.5, 5.5)),
        1.35e6,
    ),
    # another supply: the rail minimum meets the highest VIH over the corners,
    # (5.0 − 4.2) V / 1 µA (JESD7A, from memory; worst-case rule common practice)
    (
        "74HC corners, other supply",
        network(inp(HC45, HC60, same_supply_as_pull=False), pull_rail=rail("+5V", 5.0)),
        0.8e6,
    ),
    # series resistor drop: (4.5 − 3.15 − 1 µA · 100 kΩ) V / 1 µA (Ohm's law, common practice)
    (
        "through 100 kΩ series",
        network(inp(HC45, series_ohms=100e3, series_ref="R7"), pull_rail=rail("+5V", 4.5)),
        1.25e6,
    ),
    # driver off-state leakage adds: 1.35 V / (1 µA + 1 µA) (Ohm's law, common practice)
    (
        "with leaking driver",
        network(inp(HC45), pull_rail=rail("+5V", 4.5), drivers=(driver(i_off=1e-6),)),
        0.675e6,
    ),
    # noise margin m = 0.35 V: (4.5 − 3.15 − 0.35) V / 1 µA (JESD7A from memory; margin rule)
    (
        "with margin",
        network(inp(HC45), pull_rail=rail("+5V", 4.5), net_rules=rules(margin=0.35)),
        1.0e6,
    ),
]


@pytest.mark.parametrize(("name", "net", "expected"), HIGH_CASES, ids=[c[0] for c in HIGH_CASES])
def test_high_level_holds(name: str, net: Any, expected: float) -> None:
    b = only(high_level_holds(net))
    assert (b.kind, b.hard) == (BoundKind.MAX, True)
    assert b.ohms == pytest.approx(expected, rel=REL)


def test_high_level_holds_text() -> None:
    # JESD7A 74HC Example 1 (from memory)
    b = only(high_level_holds(network(inp(HC45), pull_rail=rail("+5V", 4.5))))
    assert b.substituted == "(4.5 V − 3.15 V − 0 V) / 1 µA"
    assert b.corner == "worst at U1 pin 1: U1 powered from +5V at 4.5 V"
    assert [t.symbol for t in b.terms] == ["V_min", "V_IH,min(U1)", "m", "I_high(U1)"]


def test_high_level_holds_missing_vih() -> None:
    b = only(high_level_holds(network(inp(levels(5.0, None, 1.5), ref="U2", pin="3"))))
    assert b.ohms is None
    assert [(m.what, m.ref) for m in b.missing] == [("V_IH,min of U2 pin 3", "U2")]


def test_high_level_holds_not_for_pull_down() -> None:
    assert high_level_holds(network(inp(LS), direction="down")) == ()


# ---------------------------------------------------------------- low level holds

LOW_CASES = [
    # 74LS pull-down: 0.8 V / 0.4 mA = 2.0 kΩ (educational tables, confirmed)
    ("74LS", LS, 2.0e3),
    # standard 74 pull-down: 0.8 V / 1.6 mA = 500 Ω (educational tables, confirmed)
    ("standard 74", levels(4.75, 2.0, 0.8, 40e-6, 1.6e-3), 500.0),
    # 74HC at 4.5 V: 1.35 V / 1 µA (JESD7A, from memory)
    ("74HC", HC45, 1.35e6),
]


@pytest.mark.parametrize(("name", "lv", "expected"), LOW_CASES, ids=[c[0] for c in LOW_CASES])
def test_low_level_holds(name: str, lv: Any, expected: float) -> None:
    assert ohms(low_level_holds(network(inp(lv), direction="down"))) == pytest.approx(
        expected, rel=REL
    )


# ---------------------------------------------------------------- resistor power and voltage

WORKSHOP_24V = rail("+24V", 24.0)


def test_resistor_power_example_7() -> None:
    # REFERENCES Example 7: 24 V across an 0603 at 0.1 W with 50 % derating → R ≥ 11.52 kΩ
    # (chip-resistor ratings, common practice)
    net = network(
        inp(HC45),
        pull_rail=WORKSHOP_24V,
        res=resistor(2.2e3, power=0.1),
        switches=(switch(),),
        net_rules=rules(derating=0.5),
    )
    b = only(resistor_power(net))
    assert (b.kind, b.ohms) == (BoundKind.MIN, pytest.approx(11.52e3, rel=REL))
    assert b.substituted == "(24 V − 0 V)² / (100 mW · 50 %)"


def test_resistor_power_dissipation_example_7() -> None:
    # REFERENCES Example 7: 2.2 kΩ at 24 V dissipates 0.2618 W > 1/4 W; a 1/4 W part at full
    # rating needs R ≥ 24²/0.25 = 2304 Ω (common practice)
    net = network(
        inp(HC45), pull_rail=WORKSHOP_24V, res=resistor(2.2e3, power=0.25), switches=(switch(),)
    )
    assert ohms(resistor_power(net)) == pytest.approx(2304.0, rel=REL)


def test_resistor_power_needs_something_pulling_against() -> None:
    # a pull with no switch or driver carries only leakage (common practice)
    assert resistor_power(network(inp(HC45), res=resistor(10e3, power=0.1))) == ()


def test_resistor_power_missing_rating() -> None:
    b = only(resistor_power(network(inp(HC45), switches=(switch(),))))
    assert [m.what for m in b.missing] == ["power rating of R1"]


@pytest.mark.parametrize(
    ("volts", "limit", "ok"),
    [
        (24.0, 25.0, True),  # Example 7: 24 V ≤ the 0201 working voltage 25 V (common practice)
        (48.0, 25.0, False),  # 48 V exceeds the 0201's 25 V (common practice)
        (48.0, 50.0, True),  # 0603: 50 V (common practice)
    ],
)
def test_working_voltage(volts: float, limit: float, ok: bool) -> None:
    net = network(
        inp(HC45), pull_rail=rail("+V", volts), res=resistor(10e3, wv=limit), switches=(switch(),)
    )
    (c,) = working_voltage(net)
    assert isinstance(c, Check) and c.ok is ok


# ---------------------------------------------------------------- switch contacts


def test_contact_rating() -> None:
    # Ohm's law: 12 V over a contact rated 50 mA needs R ≥ 240 Ω (common practice)
    net = network(inp(HC45), pull_rail=rail("+12V", 11.4, 12.0), switches=(switch(),))
    b = only(contact_rating(net))
    assert (b.kind, b.ohms) == (BoundKind.MIN, pytest.approx(240.0, rel=REL))


@pytest.mark.parametrize(
    ("v_min", "wet", "expected"),
    [
        (12.0, 2e-3, 6e3),  # a 2 mA wetting minimum from 12 V caps R at 6 kΩ (common practice)
        (24.0, 10e-3, 2.4e3),  # Example 7: silver contacts, about 10 mA at 24 V (common practice)
    ],
)
def test_wetting_current(v_min: float, wet: float, expected: float) -> None:
    net = network(
        inp(HC45), pull_rail=rail("+V", v_min, v_min + 1), switches=(switch(wetting_min=wet),)
    )
    b = only(wetting_current(net))
    assert (b.kind, b.ohms) == (BoundKind.MAX, pytest.approx(expected, rel=REL))


def test_wetting_current_skips_switch_without_minimum() -> None:
    assert wetting_current(network(inp(HC45), switches=(switch(),))) == ()


# ---------------------------------------------------------------- drivers

I2C_INPUT = levels(3.3, 2.31, 0.99, 10e-6, 10e-6)  # UM10204: 0.7/0.3·VDD, Ii 10 µA (secondary)


@pytest.mark.parametrize(
    ("vdd", "mode", "expected"),
    [
        (3.3, "fast", 966.6666666666666),  # UM10204 §7.1 eq. (2), Example 2 (confirmed)
        (3.3, "fast-plus", 145.0),  # UM10204 §7.1, 20 mA (confirmed)
        (5.0, "standard", 1533.3333333333333),  # UM10204 §7.1, Example 5 (confirmed)
        (1.8, "fast", 720.0),  # UM10204 VOL2 = 0.2·VDD at 2 mA (confirmed, secondary)
    ],
)
def test_driver_sink_i2c(vdd: float, mode: str, expected: float) -> None:
    net = network(
        inp(I2C_INPUT),
        pull_rail=rail("+V", vdd),
        drivers=(driver(i_ol=None, v_ol=None),),
        net_rules=rules(i2c_mode=mode, bus_capacitance=200e-12),
    )
    b = only(driver_sink(net))
    assert b.ohms == pytest.approx(expected, rel=REL)
    assert b.source == "I2C-bus specification UM10204 §7.1 eq. (2)"


def test_driver_sink_74ls() -> None:
    # 74LS output VOL 0.5 V at 8 mA into one 74LS input (IIL 0.4 mA) on a 5.25 V rail:
    # (5.25 − 0.5) V / (8 − 0.4) mA = 625 Ω (educational tables, confirmed)
    net = network(
        inp(LS), pull_rail=rail("+5V", 4.75, 5.25), drivers=(driver(i_ol=8e-3, v_ol=0.5),)
    )
    assert ohms(driver_sink(net)) == pytest.approx(625.0, rel=REL)


def test_driver_sink_cannot_sink_inputs() -> None:
    # ten standard 74 inputs source 16 mA; an 8 mA sink cannot hold them low (confirmed tables)
    std = levels(4.75, 2.0, 0.8, 40e-6, 1.6e-3)
    net = network(*(inp(std, ref=f"U{i}") for i in range(10)), drivers=(driver(i_ol=8e-3),))
    (c,) = driver_sink(net)
    assert isinstance(c, Check) and c.ok is False


def test_opto_output() -> None:
    # CTR 50 % aged to half (end-of-life rule of thumb, common practice, from memory),
    # 5 mA LED, VCE(sat) 0.4 V, 5.5 V rail: (5.5 − 0.4) V / 1.25 mA = 4080 Ω
    opto = driver(
        "U5", "optocoupler", None, None, 0.0, ctr_min=0.5, ageing=0.5, i_f_min=5e-3, vce_sat=0.4
    )
    net = network(
        inp(levels(5.0, 3.5, 1.5, 0.0, 0.0)), pull_rail=rail("+5V", 4.5, 5.5), drivers=(opto,)
    )
    assert ohms(opto_output(net)) == pytest.approx(4080.0, rel=REL)
    assert driver_sink(net) == ()


# ---------------------------------------------------------------- current budget


def test_current_budget() -> None:
    # Ohm's law: a 100 µA budget at 3.3 V needs R ≥ 33 kΩ (common practice)
    net = network(
        inp(HC45),
        pull_rail=rail("+3V3", 3.3),
        switches=(switch(),),
        net_rules=rules(current_budget=100e-6),
    )
    b = only(tuple(i for i in BUILTIN["current-budget"](net)))
    assert (b.kind, b.hard, b.ohms) == (BoundKind.MIN, True, pytest.approx(33e3, rel=REL))


# ---------------------------------------------------------------- edges


@pytest.mark.parametrize(
    ("mode", "c_bus", "expected"),
    [
        ("fast", 200e-12, 1770.3),  # UM10204 §7.1 eq. (1), Example 2 (t_r 300 ns from memory)
        ("standard", 200e-12, 5901.1),  # Example 2 variant (t_r 1000 ns from memory)
        ("fast-plus", 200e-12, 708.1),  # Example 2 variant (t_r 120 ns from memory)
        ("standard", 400e-12, 2950.5),  # Example 5 (t_r 1000 ns from memory)
    ],
)
def test_edge_rate_i2c(mode: str, c_bus: float, expected: float) -> None:
    net = network(
        inp(I2C_INPUT, schmitt=True),
        pull_rail=rail("+3V3", 3.3),
        net_rules=rules(i2c_mode=mode, bus_capacitance=c_bus),
    )
    b = only(edge_rate(net))
    assert b.ohms == pytest.approx(expected, rel=5e-5)


@pytest.mark.parametrize(
    ("vil", "vih", "factor"),
    [
        (0.3, 0.7, math.log(7 / 3)),  # 30 %→70 % takes ln(7/3)·RC (RC step response, §5)
        (0.1, 0.9, math.log(9)),  # 10 %→90 % takes ln 9·RC = 2.1972·RC (RC step response)
        (0.0, 1 - math.exp(-1), 1.0),  # 0→63.2 % takes one RC (RC step response)
    ],
)
@pytest.mark.parametrize("direction", ["up", "down"])
def test_edge_rate_generic(vil: float, vih: float, factor: float, direction: str) -> None:
    if direction == "down" and vil == 0:
        pytest.skip("a falling edge never reaches 0 V")
    # with t_max = factor · 1 µs and C = 1 nF the bound is exactly 1 kΩ
    lv = levels(1.0, vih, vil, 0.0, 0.0, c_in=0.0, max_transition=factor * 1e-6)
    net = network(
        inp(lv),
        direction=direction,
        pull_rail=rail("+1V", 1.0) if direction == "up" else GND,
        opposite_rail=None if direction == "up" else rail("+1V", 1.0),
        switches=(switch(),),
        capacitors=(cap(1e-9),),
    )
    assert ohms(edge_rate(net)) == pytest.approx(1e3, rel=REL)
    # a Schmitt input is exempt from the family's transition limit
    schmitt = network(inp(lv, schmitt=True), switches=(switch(),), capacitors=(cap(1e-9),))
    assert edge_rate(schmitt) == ()


# A 1 V line with V_IL 0.3 V and V_IH 0.9 V, 1 nF, and an allowed edge of ln 9 · 1 µs.
EDGE_LEVELS = levels(1.0, 0.9, 0.3, 0.0, 0.0, c_in=0.0)
LN9_US = math.log(9) * 1e-6


def _driven(*drivers: Any) -> Any:
    return network(
        inp(EDGE_LEVELS),
        pull_rail=rail("+1V", 1.0),
        drivers=drivers,
        capacitors=(cap(1e-9),),
        net_rules=rules(edge_time_max=LN9_US),
    )


def test_open_drain_rising_edge_starts_at_its_v_ol() -> None:
    # RC step response (REFERENCES §5): from 10 % to 90 % of the rail takes ln 9 · RC, so a
    # driver that leaves the line at V_OL = 0.1 V gives R ≤ ln 9 · 1 µs / (1 nF · ln 9) = 1 kΩ.
    b = only(edge_rate(_driven(driver("U9", v_ol=0.1))))
    assert b.ohms == pytest.approx(1e3, rel=REL)
    assert b.formula == "R_hi ≤ t_max / (C · ln((V − V_OL)/(V − V_IH,min)))"
    assert "edge from V_OL(U9) = 100 mV" in b.corner
    assert "starts at V_OL(U9) = 100 mV, where U9 leaves the line" in b.explanation
    assert "V_OL(U9)" in [t.symbol for t in b.terms]


def test_optocoupler_rising_edge_starts_at_its_vce_sat() -> None:
    # the same RC step response from an optocoupler's V_CE(sat) = 0.1 V (REFERENCES §5)
    opto = driver("U5", "optocoupler", None, None, 0.0, ctr_min=1.0, ageing=1.0,
                  i_f_min=0.1, vce_sat=0.1)  # fmt: skip
    b = only(edge_rate(_driven(opto)))
    assert b.ohms == pytest.approx(1e3, rel=REL)
    assert b.formula == "R_hi ≤ t_max / (C · ln((V − V_CE(sat))/(V − V_IH,min)))"


def test_rising_edge_from_the_lowest_driver_level() -> None:
    # two drivers: the lower V_OL (0.1 V) makes the longer edge (RC step response, §5)
    b = only(edge_rate(_driven(driver("U8", v_ol=0.25), driver("U9", v_ol=0.1))))
    assert b.ohms == pytest.approx(1e3, rel=REL)
    assert "V_OL(U9)" in b.corner


@pytest.mark.parametrize("origin", ["default", "assumed"])
def test_default_driver_level_does_not_tighten_the_edge(origin: str) -> None:
    # A default V_OL may not set a hard limit: the edge is timed from V_IL,max = 0.3 V, so
    # R ≤ ln 9 · 1 µs / (1 nF · ln((1 − 0.3)/(1 − 0.9))) = 1 kΩ · ln 9 / ln 7 (RC step response).
    from pullproof.provenance import Origin, Provenance, Sourced
    from pullproof.units import Q_

    guessed = Sourced(Q_(0.1, "V"), Provenance(Origin(origin), "default transistor V_OL"))
    d = driver("Q3", "transistor")
    b = only(edge_rate(_driven(replace(d, v_ol=guessed))))
    assert b.ohms == pytest.approx(1e3 * math.log(9) / math.log(7), rel=REL)
    assert b.formula == "R_hi ≤ t_max / (C · ln((V − V_IL,max)/(V − V_IH,min)))"
    assert "only a default" in b.explanation


def test_driver_level_above_v_il_times_the_band() -> None:
    # a driver that cannot pull below V_IL: the band alone is timed, from V_IL,max = 0.3 V
    b = only(edge_rate(_driven(driver("U9", v_ol=0.5))))
    assert b.ohms == pytest.approx(1e3 * math.log(9) / math.log(7), rel=REL)
    assert "(V_OL(U9) lies above it)" in b.corner


def test_switch_edge_is_timed_through_the_band() -> None:
    # a contact bounces: its edge is timed from V_IL,max (RC step response, §5)
    net = network(
        inp(EDGE_LEVELS),
        pull_rail=rail("+1V", 1.0),
        switches=(switch(),),
        capacitors=(cap(1e-9),),
        net_rules=rules(edge_time_max=LN9_US),
    )
    b = only(edge_rate(net))
    assert b.ohms == pytest.approx(1e3 * math.log(9) / math.log(7), rel=REL)
    assert "from V_IL,max" in b.explanation


def test_capacitance_terms_keep_their_sources() -> None:
    # C = wiring (rules) + every input's C_in + fitted capacitors; each term keeps its source
    lv = levels(1.0, 0.9, 0.3, 0.0, 0.0, c_in=10e-12)
    net = network(
        inp(lv, ref="U1"),
        inp(lv, ref="U2"),
        pull_rail=rail("+1V", 1.0),
        switches=(switch(),),
        capacitors=(cap(100e-12, "C4"),),
        net_rules=rules(edge_time_max=1e-6, wiring_capacitance=380e-12),
    )
    found = common.capacitance(net)
    assert found.farads == pytest.approx(500e-12)
    assert [t.symbol for t in found.terms] == [
        "C_wiring", "C_in(U1 pin 1)", "C_in(U2 pin 1)", "C(C4)"
    ]  # fmt: skip
    # RC step response through the band 0.3 V → 0.9 V: ln 7 · R · 500 pF ≤ 1 µs
    assert ohms(edge_rate(net)) == pytest.approx(1e-6 / (500e-12 * math.log(7)), rel=REL)


def test_missing_input_capacitance_says_how_to_add_it() -> None:
    lv = levels(1.0, 0.9, 0.3, 0.0, 0.0)
    net = network(inp(lv, ref="U1"), switches=(switch(),), net_rules=rules(edge_time_max=1e-6))
    (m,) = only(edge_rate(net)).missing
    assert m.what == "C_in of U1 pin 1"
    assert "pullproof.c_in" in m.hint


# ---------------------------------------------------------------- debounce


@pytest.mark.parametrize("direction", ["up", "down"])
def test_debounce_holdoff(direction: str) -> None:
    # the RC crosses half the rail after ln 2 · RC (RC step response): 5 ms bounce,
    # 100 nF → R ≥ 5 ms / (100 nF · ln 2) = 72.13 kΩ
    lv = levels(5.0, 2.5, 2.5, 0.0, 0.0, vt_plus_min=2.5, vt_minus_max=2.5)
    up = direction == "up"
    net = network(
        inp(lv, schmitt=True),
        direction=direction,
        pull_rail=rail("+5V", 5.0) if up else GND,
        opposite_rail=None if up else rail("+5V", 5.0),
        switches=(switch(bounce=5e-3),),
        capacitors=(cap(100e-9),),
    )
    b = only(debounce_holdoff(net))
    assert (b.kind, b.ohms) == (
        BoundKind.MIN,
        pytest.approx(5e-3 / (100e-9 * math.log(2)), rel=REL),
    )


def test_debounce_non_schmitt_uses_vil() -> None:
    # a non-Schmitt pull-up input may read high above V_IL,max; 74HC 1.35 V at 4.5 V
    # (JESD7A, from memory): 10 ms / (1 µF · ln(4.5 / 3.15))
    net = network(
        inp(HC45),
        pull_rail=rail("+5V", 4.5),
        switches=(switch(),),
        capacitors=(cap(1e-6),),
        net_rules=rules(bounce_time=10e-3),
    )
    assert ohms(debounce_holdoff(net)) == pytest.approx(
        10e-3 / (1e-6 * math.log(4.5 / 3.15)), rel=REL
    )


# ---------------------------------------------------------------- input tolerance


@pytest.mark.parametrize(
    ("rail_v", "same", "v_in_max", "ok"),
    [
        # JESD8C LVCMOS at 3.3 V: VIH max VDD + 0.3 V (from memory): a 5 V pull fails
        (5.0, False, 3.6, False),
        (3.3, False, 3.6, True),
        # powered from the pull rail with no stated limit: its own supply (common practice)
        (3.3, True, None, True),
        # another supply with no stated limit: unknown
        (5.0, False, None, None),
    ],
)
def test_input_tolerance(
    rail_v: float, same: bool, v_in_max: float | None, ok: bool | None
) -> None:
    lv = levels(3.3, 2.0, 0.8, v_in_max=v_in_max)
    (c,) = input_tolerance(network(inp(lv, same_supply_as_pull=same), pull_rail=rail("+V", rail_v)))
    assert isinstance(c, Check) and c.ok is ok


# ---------------------------------------------------------------- preferred range


def test_preferred_range_is_soft() -> None:
    # 1 kΩ … 100 kΩ, a customary logic-pull range (common practice), comes back as soft bounds
    bounds = preferred_range(
        network(inp(HC45), net_rules=rules(preferred_min=1e3, preferred_max=100e3))
    )
    assert [(b.kind, b.ohms, b.hard) for b in bounds if isinstance(b, Bound)] == [
        (BoundKind.MIN, 1e3, False),
        (BoundKind.MAX, 100e3, False),
    ]


# ---------------------------------------------------------------- helpers and registry


@pytest.mark.parametrize(
    ("x", "symbol", "text"),
    [
        (1.35e6, "Ω", "1.35 MΩ"),
        (1e-6, "A", "1 µA"),
        (200e-12, "F", "200 pF"),
        (0.0, "V", "0 V"),
        (966.6666, "Ω", "966.7 Ω"),
        (999.99e-6, "A", "1 mA"),
    ],
)
def test_eng(x: float, symbol: str, text: str) -> None:
    assert common.eng(x, symbol) == text


def test_band_with_tcr() -> None:
    # the band formula of the design: R(1 ± tol)(1 ± TCR·ΔT), ΔT = 65 K for −40…85 °C at 25 °C
    r = resistor(10e3, tol=0.01, tcr=100e-6)
    lo, hi = common.band(r, rules(temp_min=-40.0, temp_max=85.0))
    assert (lo, hi) == (pytest.approx(9835.65, rel=REL), pytest.approx(10165.65, rel=REL))


def test_builtin_registry_lists_every_constraint() -> None:
    assert list(BUILTIN) == [
        "high-level-holds",
        "low-level-holds",
        "resistor-power",
        "contact-rating",
        "wetting-current",
        "driver-sink",
        "opto-output",
        "current-budget",
        "edge-rate",
        "debounce-holdoff",
        "input-tolerance",
        "working-voltage",
        "preferred-range",
    ]


class _EP:
    def __init__(self, name: str, obj: object, fail: bool = False) -> None:
        self.name, self.value, self._obj, self._fail = name, f"aquarium.checks:{name}", obj, fail

    def load(self) -> object:
        if self._fail:
            raise ImportError("No module named 'aquarium'")
        return self._obj


def _plugin(net: Any) -> tuple[Bound | Check, ...]:
    return ()


_plugin.id = "doser-pump"  # type: ignore[attr-defined]
_plugin.title = "Doser pump"  # type: ignore[attr-defined]


@pytest.mark.parametrize(
    ("eps", "message"),
    [
        (
            [_EP("doser", None, fail=True)],
            "constraint entry point 'doser' (aquarium.checks:doser) failed to load: "
            "No module named 'aquarium'",
        ),
        (
            [_EP("doser", object())],
            "constraint entry point 'doser' (aquarium.checks:doser) is not a constraint: "
            "expected an object with 'id' and 'title' strings that is callable",
        ),
        (
            [_EP("doser", BUILTIN["edge-rate"])],
            "constraint entry point 'doser' (aquarium.checks:doser) reuses the id 'edge-rate'",
        ),
    ],
)
def test_registry_plugin_errors(
    monkeypatch: pytest.MonkeyPatch, eps: list[_EP], message: str
) -> None:
    monkeypatch.setattr("pullproof.constraints.entry_points", lambda group: eps)
    with pytest.raises(ConstraintPluginError) as err:
        registry()
    assert str(err.value) == message
    assert err.value.exit_code == 2


def test_registry_loads_plugin(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr("pullproof.constraints.entry_points", lambda group: [_EP("doser", _plugin)])
    reg = registry()
    assert list(reg)[-1] == "doser-pump"
    assert registry(plugins=False) is BUILTIN


def _pump_check(net: Any) -> tuple[Bound | Check, ...]:
    return (Check("doser-pump", "Doser pump", True, False, "I ≤ I_max", "1 ≤ 2", ()),)


_pump_check.id = "doser-pump"  # type: ignore[attr-defined]
_pump_check.title = "Doser pump"  # type: ignore[attr-defined]


def test_review_runs_installed_plugins(monkeypatch: pytest.MonkeyPatch) -> None:
    # The README's "Adding a constraint": an entry point in the group is judged with the
    # built-ins on every network a review evaluates (found once per review).
    from pathlib import Path

    from pullproof.review import review

    calls: list[str] = []

    def eps(group: str) -> list[_EP]:
        calls.append(group)
        return [_EP("doser", _pump_check)]

    monkeypatch.setattr("pullproof.constraints.entry_points", eps)
    root = Path(__file__).parent.parent / "fixtures" / "review" / "interlock_panel.kicad_sch"
    result = review(root)
    judged = [n for n in result.networks if n.checks]
    assert len(judged) > 5
    assert all(any(c.constraint == "doser-pump" for c in n.checks) for n in judged)
    assert calls == ["pullproof.constraints"]

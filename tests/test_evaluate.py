"""Verdicts, windows, margins and recommendations against worked examples.

Sources: JEDEC JESD7A 74HC levels (from memory); 74LS family tables (confirmed in
educational handbook tables); I2C-bus specification UM10204 §7.1 (equations confirmed;
t_r from memory); IEC 60063 E-series (checked also with the `eseries` library).
"""

from __future__ import annotations

from typing import Any

import eseries as ref_eseries
import pytest

from netfactory import GND, driver, inp, levels, network, rail, resistor, rules, switch
from pullproof.constraints import BUILTIN, ConstraintPluginError
from pullproof.evaluate import evaluate, recommend
from pullproof.results import Bound, BoundKind, Verdict

REL = 1e-9
HC45 = levels(4.5, 3.15, 1.35, 1e-6, 1e-6)  # JESD7A 74HC at 4.5 V, ±1 µA (from memory)
LS = levels(4.75, 2.0, 0.8, 20e-6, 0.4e-3)  # 74LS family tables (confirmed)
I2C_INPUT = levels(3.3, 2.31, 0.99, 0.0, 0.0)  # UM10204 0.7/0.3·VDD (confirmed, secondary)


def hc_pullup(ohms: float, tol: float, **kw: Any) -> Any:
    """JESD7A Example 1: a 74HC input at VCC 4.5 V, window max 1.35 MΩ (from memory)."""
    return network(inp(HC45), pull_rail=rail("+5V", 4.5), res=resistor(ohms, tol), **kw)


def i2c_line(series: str = "E24", tol: float = 0.0, policy: str = "centre", **kw: Any) -> Any:
    """UM10204 Example 2: 3.3 V Fast-mode, C_b 200 pF → window 966.7 Ω … 1770.3 Ω."""
    return network(
        inp(I2C_INPUT, schmitt=True),
        pull_rail=rail("+3V3", 3.3),
        res=resistor(1.2e3, tol, power=0.1, wv=50.0),  # an 0603 (common practice)
        drivers=(driver(i_ol=None, v_ol=None),),
        net_rules=rules(i2c_mode="fast", bus_capacitance=200e-12, series=series, policy=policy),
        **kw,
    )


# ---------------------------------------------------------------- verdicts


def test_pass() -> None:
    # JESD7A Example 1 (from memory): 1.0 MΩ ±5 % tops out at 1.05 MΩ < 1.35 MΩ
    r = evaluate(hc_pullup(1e6, 0.05))
    assert r.verdict is Verdict.PASS
    assert r.window == (None, pytest.approx(1.35e6, rel=REL))
    assert r.band == (pytest.approx(0.95e6, rel=REL), pytest.approx(1.05e6, rel=REL))
    assert r.margins == (None, pytest.approx(1.35 / 1.05 - 1, rel=REL))
    assert r.binding == ("high-level-holds",)
    assert r.reason == "R1 (1 MΩ ±5 %) spans 950 kΩ–1.05 MΩ, at least 28.57 % inside the window."


def test_marginal_by_margin() -> None:
    # JESD7A Example 1 (from memory): 1.3 MΩ ±1 % reaches 1.313 MΩ, 2.8 % under 1.35 MΩ
    r = evaluate(hc_pullup(1.3e6, 0.01))
    assert r.verdict is Verdict.MARGINAL
    assert r.reason == (
        "Hard limits are met, but R1 (1.3 MΩ ±1 %) can reach 1.313 MΩ, only 2.818 % inside the "
        "1.35 MΩ at which the leakage still leaves U1 pin 1 above its 3.15 V V_IH,min; the rules "
        "ask for 10 %."
    )


def test_pass_far_inside_says_how_many_times() -> None:
    # JESD7A Example 1 (from memory): 10 kΩ ±5 % reaches 10.5 kΩ against 1.35 MΩ, 129 times over
    r = evaluate(hc_pullup(10e3, 0.05))
    assert r.verdict is Verdict.PASS
    assert r.reason == (
        "R1 (10 kΩ ±5 %) spans 9.5 kΩ–10.5 kΩ, well inside the window: the 1.35 MΩ maximum "
        "is 129× R_hi."
    )


def test_margin_ratio_from_rules() -> None:
    # the same band passes when the rules ask for only 2 % (JESD7A, from memory)
    r = evaluate(hc_pullup(1.3e6, 0.01, net_rules=rules(margin_ratio=0.02)))
    assert r.verdict is Verdict.PASS


def test_marginal_by_soft_bound() -> None:
    r = evaluate(hc_pullup(1e6, 0.05, net_rules=rules(preferred_max=470e3)))
    assert r.verdict is Verdict.MARGINAL
    assert r.reason == (
        "Hard limits are met, but R1 (1 MΩ ±5 %) can reach 1.05 MΩ, above the 470 kΩ where "
        "the preferred range ends."
    )


def test_fail() -> None:
    # REFERENCES Example 1 with ±5 %: 1.3 MΩ × 1.05 > 1.35 MΩ, only 1.2 MΩ fits (from memory)
    r = evaluate(hc_pullup(1.3e6, 0.05))
    assert r.verdict is Verdict.FAIL
    assert r.reason == (
        "R1 (1.3 MΩ ±5 %) can reach 1.365 MΩ, above the 1.35 MΩ at which the leakage still "
        "leaves U1 pin 1 above its 3.15 V V_IH,min."
    )


def test_fail_on_check() -> None:
    # JESD8C LVCMOS at 3.3 V tolerates VDD + 0.3 V (from memory): a 5 V pull-up fails
    lv = levels(3.3, 2.0, 0.8, 1e-6, 1e-6, v_in_max=3.6)
    r = evaluate(network(inp(lv, same_supply_as_pull=False), pull_rail=rail("+5V", 5.0)))
    assert r.verdict is Verdict.FAIL
    assert r.reason == ("The pull rail reaches 5 V but U1 pin 1 tolerates at most 3.6 V.")


def test_incomplete() -> None:
    lv = levels(5.0, None, 1.5)
    r = evaluate(network(inp(lv, ref="U2", pin="3")))
    assert r.verdict is Verdict.INCOMPLETE
    assert [m.what for m in r.missing] == ["V_IH,min of U2 pin 3"]
    assert r.reason == (
        "Cannot judge yet: V_IH,min of U2 pin 3 is unknown; give the part a logic family "
        "(field 'pullproof.family') or a part-library entry."
    )
    assert r.recommendation is None


def test_fail_outranks_incomplete() -> None:
    # 74LS pull-down at most 2.0 kΩ (confirmed tables); a 10 kΩ part fails even though
    # the switch's contact rating is unknown
    net = network(
        inp(LS),
        direction="down",
        pull_rail=GND,
        opposite_rail=rail("+5V", 5.0),
        res=resistor(10e3),
        switches=(switch(contact_max=None),),
    )
    r = evaluate(net)
    assert r.verdict is Verdict.FAIL
    assert [m.what for m in r.missing] == [
        "power rating of R1",
        "contact current rating of SW1",
        "working voltage of R1",
    ]


def test_empty_window_advice() -> None:
    # a 12 V contact rated 1 mA needs ≥ 12 kΩ; its 2 mA wetting minimum needs ≤ 6 kΩ
    # (Ohm's law; wetting current, common practice)
    net = network(
        inp(levels(12.0, 8.0, 4.0, 0.0, 0.0)),
        pull_rail=rail("+12V", 12.0),
        res=resistor(10e3, power=1.0, wv=200.0),
        switches=(switch("SW2", contact_max=1e-3, wetting_min=2e-3),),
    )
    r = evaluate(net)
    assert r.verdict is Verdict.FAIL
    assert r.window == (pytest.approx(12e3, rel=REL), pytest.approx(6e3, rel=REL))
    assert r.reason == (
        "No resistance fits: R must be at least 12 kΩ (at which SW2 carries no more than its "
        "rated 1 mA) but at most 6 kΩ (at which SW2 still gets its 2 mA wetting current)."
    )
    assert r.advice == (
        "Switch contact rating (contact-rating) needs R at least 12 kΩ; relax it with a switch "
        "rated for more current than 1 mA.",
        "Contact wetting current (wetting-current) needs R at most 6 kΩ; relax it with a switch "
        "with a lower wetting current (gold-plated, low-level contacts).",
    )
    assert r.recommendation is None


def test_no_constraint_applies() -> None:
    r = evaluate(network(inp(levels(5.0, 3.5, 1.5, 0.0, 0.0))))
    assert (r.verdict, r.window, r.recommendation) == (Verdict.PASS, (None, None), None)


# ---------------------------------------------------------------- recommendation


@pytest.mark.parametrize(
    ("series", "tol", "expected"),
    [
        # UM10204 Example 2, tolerance not applied (equations confirmed, t_r from memory)
        ("E6", 0.0, [1000.0, 1500.0]),
        ("E12", 0.0, [1000.0, 1200.0, 1500.0]),
        ("E24", 0.0, [1000.0, 1100.0, 1200.0, 1300.0, 1500.0, 1600.0]),
        # with ±1 % the E24 list is unchanged (990 Ω ≥ 966.7 Ω, 1616 Ω ≤ 1770.3 Ω; derived)
        ("E24", 0.01, [1000.0, 1100.0, 1200.0, 1300.0, 1500.0, 1600.0]),
        # with ±5 % 1.0 kΩ drops out: 950 Ω < 966.7 Ω (derived)
        ("E24", 0.05, [1100.0, 1200.0, 1300.0, 1500.0, 1600.0]),
    ],
)
def test_recommendation_example_2(series: str, tol: float, expected: list[float]) -> None:
    rec = evaluate(i2c_line(series, tol)).recommendation
    assert rec is not None
    assert list(rec.candidates) == pytest.approx(expected, rel=REL)
    assert rec.tolerance == tol


def test_recommendation_example_2_e96() -> None:
    # UM10204 Example 2: 25 E96 values from 976 Ω to 1.74 kΩ (IEC 60063; `eseries` library)
    rec = evaluate(i2c_line("E96")).recommendation
    assert rec is not None
    expected = [float(v) for v in ref_eseries.erange(ref_eseries.E96, 966.67, 1770.3)]
    assert list(rec.candidates) == pytest.approx(expected, rel=REL)
    assert (len(rec.candidates), rec.candidates[0], rec.candidates[-1]) == (25, 976.0, 1740.0)


@pytest.mark.parametrize(
    ("policy", "pick", "reason"),
    [
        # geometric centre sqrt(966.7 × 1770.3) = 1308 Ω → 1.3 kΩ (UM10204 Example 2)
        (
            "centre",
            1300.0,
            "1.3 kΩ is the E24 value nearest the window's geometric centre 1.308 kΩ.",
        ),
        ("low-current", 1600.0, "1.6 kΩ is the largest E24 value whose band fits: least current."),
    ],
)
def test_recommendation_policy(policy: str, pick: float, reason: str) -> None:
    rec = evaluate(i2c_line(policy=policy)).recommendation
    assert rec is not None
    assert (rec.pick, rec.reason) == (pick, reason)


def test_recommendation_example_5() -> None:
    # UM10204 Example 5: 5 V Standard-mode, 400 pF → 1533.3 Ω … 2950.5 Ω
    net = network(
        inp(levels(5.0, 3.5, 1.5, 0.0, 0.0), schmitt=True),
        pull_rail=rail("+5V", 5.0),
        res=resistor(2.2e3, power=0.1, wv=50.0),
        drivers=(driver(i_ol=None, v_ol=None),),
        net_rules=rules(i2c_mode="standard", bus_capacitance=400e-12),
    )
    r = evaluate(net)
    assert r.window == (pytest.approx(1533.33, rel=1e-5), pytest.approx(2950.5, rel=5e-5))
    assert r.recommendation is not None
    assert list(r.recommendation.candidates) == [1600.0, 1800.0, 2000.0, 2200.0, 2400.0, 2700.0]
    assert r.verdict is Verdict.PASS


@pytest.mark.parametrize(
    ("tol", "largest"),
    [
        (0.0, 1.3e6),  # REFERENCES Example 1: largest E24 ≤ 1.35 MΩ is 1.3 MΩ (from memory)
        (0.05, 1.2e6),  # with ±5 % applied: 1.2 MΩ (from memory)
    ],
)
def test_low_current_pick_example_1(tol: float, largest: float) -> None:
    r = evaluate(hc_pullup(1e6, tol, net_rules=rules(policy="low-current")))
    assert r.recommendation is not None and r.recommendation.pick == largest


@pytest.mark.parametrize(
    ("tol", "largest"),
    [
        (0.0, 2.0e3),  # REFERENCES Example 3: 74LS pull-down, E24 2.0 kΩ on the edge (confirmed)
        (0.05, 1.8e3),  # with ±5 %: 1.8 kΩ (confirmed tables; derived)
    ],
)
def test_low_current_pick_example_3(tol: float, largest: float) -> None:
    net = network(
        inp(LS), direction="down", res=resistor(1e3, tol), net_rules=rules(policy="low-current")
    )
    r = evaluate(net)
    assert r.recommendation is not None and r.recommendation.pick == largest


def test_open_top_is_capped() -> None:
    # only a minimum (1 kΩ from a window bound): candidates stop at max(1 MΩ, 10 × min)
    rec = recommend(hc_pullup(1e6, 0.0), (1e3, None), soft=())
    assert (rec.candidates[0], rec.candidates[-1]) == (1e3, 1e6)
    assert rec.pick == pytest.approx(33e3)  # nearest to sqrt(1 kΩ · 1 MΩ) = 31.6 kΩ


def test_soft_range_narrows_the_pick() -> None:
    # UM10204 Example 2 window; a preferred maximum of 1.2 kΩ moves the centre pick down
    rec = evaluate(i2c_line()).recommendation
    assert rec is not None
    soft = [Bound("preferred-range", "Preferred range", BoundKind.MAX, 1.2e3, False, "", "", ())]
    narrowed = recommend(i2c_line(), (966.6666, 1770.3), soft=soft)
    assert narrowed.candidates == rec.candidates
    assert narrowed.pick == 1100.0  # nearest sqrt(966.7 × 1200) = 1077 Ω


# ---------------------------------------------------------------- plugins


def test_plugin_failure_is_one_line() -> None:
    class Broken:
        id = "beehive-scale"
        title = "Beehive scale"

        def __call__(self, network: Any) -> tuple[Bound, ...]:
            raise ZeroDivisionError("division by zero")

    reg = {**BUILTIN, "beehive-scale": Broken()}
    with pytest.raises(ConstraintPluginError) as err:
        evaluate(hc_pullup(1e6, 0.05), registry=reg)
    assert str(err.value) == "constraint 'beehive-scale' failed on net /SENSE: division by zero"

"""Findings need certainty, and a default never makes a hard fail.

The fixture is an invented workshop dust-extractor panel: a start button on a 74HC14, a
door switch on a controller chip nothing describes, and an interlock whose contact needs
a wetting current. Checked against: Ohm's law (V/I), the 74HC levels of JEDEC JESD7A (from
memory), and the rules defaults of 5 % tolerance and 200 ppm/K over 0…70 °C around 25 °C
(ΔT = 45 K; common practice).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from builder import HEX_INVERTER_PINS, SWITCH_PINS, Pin
from placer import LabelPlacer
from pullproof.results import BoundKind, ReviewResult, Verdict
from pullproof.review import review

RAILS = frozenset({"+5V", "GND"})
CTRL_PINS = (
    Pin("1", (0, 7.62), "power_in", "VDD"),
    Pin("2", (0, -7.62), "power_in", "VSS"),
    Pin("3", (-7.62, 0), "input", "DOOR"),
)


def _panel(tmp_path: Path, *, ctrl: dict[str, str] | None = None, **button: str) -> Path:
    k = LabelPlacer(RAILS)
    for unit in (1, 7):
        k.b.part("U1", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=k.at(), unit=unit,
                 value="74HC14")  # fmt: skip
    k.join("U1", "14", "+5V", 7)
    k.join("U1", "7", "GND", 7)
    k.join("U1", "1", "START", 1)
    k.resistor("R1", "47k", "+5V", "START", Footprint="Resistor_SMD:R_0603_1608Metric")
    k.place("SW1", "Switch:SW_Push", SWITCH_PINS, "START", {"1": "START", "2": "GND"}, **button)
    # the door switch reaches a controller input with no pull and no data
    k.place("U2", "extractor:CTRL9", CTRL_PINS, "CTRL9", {"1": "+5V", "2": "GND", "3": "DOOR"},
            **(ctrl or {}))  # fmt: skip
    k.place("SW2", "Switch:SW_Push", SWITCH_PINS, "DOOR", {"1": "DOOR", "2": "GND"})
    return k.b.write(tmp_path / "extractor.kicad_sch")


def _start(result: ReviewResult) -> tuple[Verdict, str]:
    (net,) = [n for n in result.networks if n.network.net == "/START"]
    return net.verdict, net.reason


def _door(result: ReviewResult) -> tuple[Verdict, str]:
    (f,) = [f for f in result.findings if f.kind == "floating-input"]
    return f.severity, f.message


def test_an_assumed_wetting_current_is_a_soft_limit(tmp_path: Path) -> None:
    # no wetting current stated: the 0.1 mA default is an assumption, so the 47 kΩ pull
    # (44.25–49.79 kΩ) above 4.75 V / 0.1 mA = 47.5 kΩ is marginal, not a fail
    result = review(_panel(tmp_path))
    verdict, reason = _start(result)
    assert verdict is Verdict.MARGINAL
    assert reason.endswith(
        "above the 47.5 kΩ at which SW1 still gets its 100 µA wetting current; that limit rests "
        "on assumed switch wetting."
    )
    (start,) = [n for n in result.networks if n.network.net == "/START"]
    wet = next(b for b in start.bounds if b.constraint == "wetting-current")
    assert not wet.hard and wet.assumed == ("assumed switch wetting",)
    assert "state the value to make it hard" in wet.explanation


def test_a_stated_wetting_current_makes_it_hard(tmp_path: Path) -> None:
    # stated wetting current and a resistor stated as ±5 %, 200 ppm/K: a certain fail
    root = _panel(tmp_path, **{"pullproof.wetting": "0.1mA"})
    text = root.read_text(encoding="utf-8").replace('"47k"', '"47k 5% 200ppm/K"')
    root.write_text(text, encoding="utf-8")
    verdict, reason = _start(review(root))
    assert verdict is Verdict.FAIL
    assert reason.endswith("above the 47.5 kΩ at which SW1 still gets its 100 µA wetting current.")


def test_a_band_that_crosses_a_limit_only_through_assumed_tolerance(tmp_path: Path) -> None:
    # a stated 1 mA wetting current: R ≤ 4.75 V / 1 mA = 4.75 kΩ. A 4.7 kΩ part meets it
    # nominally; only the assumed ±5 % and 200 ppm/K carry its band (to 4.98 kΩ) across
    k = {"pullproof.wetting": "1mA", "pullproof.contact_max": "50mA"}
    root = _panel(tmp_path, **k)
    text = root.read_text(encoding="utf-8").replace('"47k"', '"4k7"')
    root.write_text(text, encoding="utf-8")
    verdict, reason = _start(review(root))
    assert verdict is Verdict.MARGINAL
    assert reason.endswith(
        "only through the assumed default resistor.tolerance and default resistor.tcr; state "
        "the part's Tolerance and TCR to decide."
    )
    # stated as 1 % and 50 ppm/K the band still reaches 4.758 kΩ: now it is a certain fail
    root.write_text(text.replace('"4k7"', '"4k7 1% 50ppm/K"'), encoding="utf-8")
    verdict, reason = _start(review(root))
    assert verdict is Verdict.FAIL


def test_floating_input_without_data_is_marginal_with_the_hint(tmp_path: Path) -> None:
    severity, message = _door(review(_panel(tmp_path)))
    assert severity is Verdict.MARGINAL
    assert message == (
        "U2 pin DOOR is driven only by SW2 and has no pull: it floats while the contact is "
        "open; many such pins have an internal pull: confirm it and record field "
        "'pullproof.internal_pull' (e.g. up 30k..50k, or none) on the part, or internal_pull "
        "in its part-library entry"
    )


def test_floating_input_fails_when_the_data_say_no_pull(tmp_path: Path) -> None:
    result = review(_panel(tmp_path, ctrl={"pullproof.internal_pull": "none"}))
    severity, message = _door(result)
    assert severity is Verdict.FAIL
    assert message.endswith("and field 'pullproof.internal_pull' on U2 says the pin has none")


def test_floating_input_fails_when_the_part_library_says_no_pull(tmp_path: Path) -> None:
    root = _panel(tmp_path)
    library = tmp_path / "pullproof-parts.toml"
    library.write_text(
        '[part.CTRL9]\nmatch = ["CTRL9"]\nkind = "other"\ninternal_pull = "none"\n',
        encoding="utf-8",
    )
    severity, message = _door(review(root))
    assert severity is Verdict.FAIL
    assert message.endswith("part library entry CTRL9 says the pin has none (internal_pull = none)")


def test_an_enabled_internal_pull_removes_the_finding(tmp_path: Path) -> None:
    result = review(_panel(tmp_path, ctrl={"pullproof.internal_pull": "up 30k..50k"}))
    assert [f for f in result.findings if f.kind == "floating-input"] == []


@pytest.mark.parametrize("kind", [BoundKind.MIN, BoundKind.MAX])
def test_no_hard_limit_rests_on_an_assumption(tmp_path: Path, kind: BoundKind) -> None:
    # whatever the network, a limit that lists an assumed term is soft
    result = review(_panel(tmp_path))
    for n in result.networks:
        for b in n.bounds:
            if b.kind is kind and b.assumed:
                assert not b.hard, (n.network.net, b.constraint)

"""Hazardous voltage by value: the IEC 61140 extra-low-voltage limits, AC rails, mains voltage.

Sources: IEC 61140 ELV band, 50 V AC rms and 120 V ripple-free DC, "does not exceed" read as
inclusive (REFERENCES.md §7, confirmed; Example 7 control cases: 120 V DC and 50 V AC give
no warning, 121 V DC does); chip-resistor working voltages by size, 0603 50 V and 0805
150 V (REFERENCES §6, common practice); series resistors share a voltage in proportion to
their resistance (Ohm's law).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from builder import Pin
from placer import LabelPlacer
from pullproof.errors import RulesError
from pullproof.hazard import ELV_AC_RMS, ELV_DC, exceeds_elv
from pullproof.report.console import review_table
from pullproof.report.note import render_note
from pullproof.report.review_json import review_json
from pullproof.results import ReviewResult, Verdict
from pullproof.review import review
from pullproof.rules import load_rules

OPTO = (
    Pin("1", (-7.62, 2.54), "passive", "A"),
    Pin("2", (-7.62, -2.54), "passive", "K"),
    Pin("3", (7.62, -2.54), "passive", "E"),
    Pin("4", (7.62, 2.54), "open_collector", "C"),
)
GATE = (Pin("1", (-7.62, 2.54), "input"), Pin("3", (7.62, 0), "output"))


def test_elv_limits_are_the_iec_61140_band() -> None:
    # IEC 61140: 50 V AC rms, 120 V ripple-free DC (REFERENCES §7, confirmed)
    assert (ELV_AC_RMS, ELV_DC) == (50.0, 120.0)


@pytest.mark.parametrize(
    ("volts", "ac", "hazardous"),
    [
        (120.0, False, False),  # IEC 61140: 120 V DC is still ELV (inclusive limit)
        (121.0, False, True),  # IEC 61140: 121 V DC exceeds ELV
        (50.0, True, False),  # IEC 61140: 50 V AC rms is still ELV (inclusive limit)
        (51.0, True, True),  # IEC 61140: 51 V AC rms exceeds ELV
        (-121.0, False, True),  # a negative rail counts by magnitude (IEC 61140)
        (24.0, False, False),  # Example 7: 24 V DC needs no caution
        (230.0, True, True),  # Example 7: 230 V AC needs the caution
    ],
)
def test_exceeds_elv_at_and_beyond_each_bound(volts: float, ac: bool, hazardous: bool) -> None:
    assert exceeds_elv(volts, ac=ac) is hazardous


RELAY = (
    Pin("1", (-5.08, 2.54), "passive", "COIL+"),
    Pin("2", (-5.08, -2.54), "passive", "COIL-"),
    Pin("3", (5.08, 2.54), "passive", "COM"),
    Pin("4", (5.08, -2.54), "passive", "NO"),
)


def rules_file(tmp_path: Path, rail: str) -> None:
    (tmp_path / "pullproof.toml").write_text(
        f'[rails]\n"+3V3" = "3V3"\nHV = {rail}\n', encoding="utf-8"
    )


def kiln(tmp_path: Path, rail: str) -> ReviewResult:
    """A kiln controller: a relay whose coil sits on the element supply HV; its contact pulls
    the door-sense input low against a 3.3 V pull-up."""
    bench = LabelPlacer(frozenset({"+3V3", "GND", "HV"}))
    bench.place("K1", "Relay:Relay_SPST", RELAY, "KILN_RELAY",
                {"1": "HV", "2": "GND", "3": "SENSE", "4": "GND"})  # fmt: skip
    bench.resistor("R2", "10k", "+3V3", "SENSE", Footprint="R_0603_1608Metric")
    bench.place("U2", "74xx:74HC14", GATE, "74HC14", {"1": "SENSE"})
    rules_file(tmp_path, rail)
    return review(bench.b.write(tmp_path / "kiln.kicad_sch"))


def kiln_opto(tmp_path: Path, rail: str, **fields: str) -> ReviewResult:
    """The same input sensed by an optocoupler whose LED is fed from HV through R1 (0603)."""
    bench = LabelPlacer(frozenset({"+3V3", "GND", "HV"}))
    bench.resistor("R1", "100k", "HV", "LED_A", Footprint="R_0603_1608Metric", **fields)
    bench.place("U1", "Isolator:Opto_NPN", OPTO, "PC817",
                {"1": "LED_A", "2": "GND", "3": "GND", "4": "SENSE"},
                **{"pullproof.ctr_min": "50%", "pullproof.i_f": "1mA"})  # fmt: skip
    bench.resistor("R2", "10k", "+3V3", "SENSE", Footprint="R_0603_1608Metric")
    bench.place("U2", "74xx:74HC14", GATE, "74HC14", {"1": "SENSE"})
    rules_file(tmp_path, rail)
    return review(bench.b.write(tmp_path / "kiln.kicad_sch"))


def sense(result: ReviewResult) -> tuple[bool, str]:
    n = next(nr.network for nr in result.networks if nr.network.net == "/SENSE")
    return n.mains_adjacent, n.mains_reason


@pytest.mark.parametrize(
    ("rail", "marked"),
    [
        ('"120V"', False),  # IEC 61140: at the 120 V DC limit, not beyond it
        ('"121V"', True),  # IEC 61140: beyond 120 V ripple-free DC
        ('"50VAC"', False),  # IEC 61140: at the 50 V AC rms limit
        ('"51VAC"', True),  # IEC 61140: beyond 50 V AC rms (as DC it would not count)
        ('{ nominal = "51V", ac = true }', True),  # the same rail written with ac = true
        ('{ nominal = "51V" }', False),  # 51 V DC is extra-low voltage (IEC 61140)
    ],
)
def test_network_sharing_a_part_with_a_hazardous_rail_is_marked(
    tmp_path: Path, rail: str, marked: bool
) -> None:
    result = kiln(tmp_path, rail)
    adjacent, reason = sense(result)
    assert adjacent is marked
    if marked:
        assert reason.startswith("K1 also connects to HV, which is at ")
        assert "above the extra-low-voltage limit" in reason and "(IEC 61140)" in reason
        assert [h.net for h in result.hazardous_nets] == ["HV"]
    else:
        assert reason == "" and result.hazardous_nets == ()


def test_cautions_show_in_every_output(tmp_path: Path) -> None:
    result = kiln(tmp_path, '"121V"')
    html = render_note(result, title="kiln", date="2031-05-04")
    assert html.count('class="caution-mains"') == 1
    assert "Local codes and licensed practice take precedence" in html
    text = review_table(result)
    assert "\nsafety:\n  /SENSE is next to hazardous voltage: K1 also connects to HV" in text
    assert "local codes and licensed practice take precedence" in text
    doc = review_json(result)
    assert "local codes and licensed practice" in doc["hazardous"]["caution"]
    sense_net = next(n for n in doc["networks"] if n["net"] == "/SENSE")
    assert sense_net["mains_adjacent"] is True and sense_net["hazard_reason"].startswith("K1")


def test_no_caution_within_extra_low_voltage(tmp_path: Path) -> None:
    result = kiln(tmp_path, '"24V"')  # Example 7: 24 V DC needs no SELV caution
    assert "safety:" not in review_table(result)
    assert review_json(result)["hazardous"] == {"nets": [], "resistors": [], "caution": ""}


def test_resistor_tied_to_a_hazardous_rail_is_checked_against_its_working_voltage(
    tmp_path: Path,
) -> None:
    # 121 V DC across R1 alone (the chain ends at the LED); R1 states a 50 V working voltage
    result = kiln_opto(tmp_path, '"121V"', **{"pullproof.working_voltage": "50V"})
    (c,) = result.resistor_voltages
    assert (c.ref, c.chain, c.volts, c.working, c.ok) == ("R1", ("R1",), 121.0, 50.0, False)
    assert c.text == "up to 121 V DC sits across R1, above its 50 V working voltage (DC)"
    f = next(f for f in result.findings if f.kind == "resistor-working-voltage")
    assert (f.severity, f.net, f.refs) == (Verdict.FAIL, "HV", ("R1",))


def test_a_working_voltage_read_from_the_chip_size_makes_it_marginal(tmp_path: Path) -> None:
    # the 0603's 50 V is only what the size usually carries (common practice): not certain
    result = kiln_opto(tmp_path, '"121V"')
    f = next(f for f in result.findings if f.kind == "resistor-working-voltage")
    assert f.severity is Verdict.MARGINAL
    assert "this rests on assumed working voltage of size 0603" in f.message


def test_an_opto_fed_from_a_hazardous_rail_marks_its_output_network(tmp_path: Path) -> None:
    adjacent, reason = sense(kiln_opto(tmp_path, '"121V"'))  # IEC 61140: beyond 120 V DC
    assert adjacent and reason.startswith("U1 also connects to")


def test_a_capacitor_to_a_hazardous_rail_marks_the_network(tmp_path: Path) -> None:
    # a kiln's door-sense line coupled by C1 to the 121 V DC element supply (IEC 61140: > 120 V)
    bench = LabelPlacer(frozenset({"+3V3", "GND", "HV"}))
    bench.resistor("R2", "10k", "+3V3", "SENSE", Footprint="R_0603_1608Metric")
    bench.place("U2", "74xx:74HC14", GATE, "74HC14", {"1": "SENSE"})
    bench.place("C1", "Device:C", (Pin("1", (0, 3.81)), Pin("2", (0, -3.81))), "1n",
                {"1": "SENSE", "2": "HV"})  # fmt: skip
    rules_file(tmp_path, '"121V"')
    adjacent, reason = sense(review(bench.b.write(tmp_path / "kiln.kicad_sch")))
    assert adjacent and reason.startswith("C1 ties it to HV, which is at 121 V DC")


def mains_sense(tmp_path: Path, mains_voltage: str | None) -> ReviewResult:
    """A pump controller: two 0805 resistors in series from the mains live into an opto LED."""
    bench = LabelPlacer(frozenset({"+3V3", "GND"}))
    rated = {"pullproof.working_voltage": "150V"}  # an 0805's usual rating, stated
    bench.resistor("R1", "100k", "AC_L", "MID", Footprint="R_0805_2012Metric", **rated)
    bench.resistor("R3", "100k", "MID", "LED_A", Footprint="R_0805_2012Metric", **rated)
    bench.place("U1", "Isolator:Opto_NPN", OPTO, "PC817",
                {"1": "LED_A", "2": "AC_N", "3": "GND", "4": "SENSE"},
                **{"pullproof.ctr_min": "50%", "pullproof.i_f": "1mA"})  # fmt: skip
    bench.resistor("R2", "10k", "+3V3", "SENSE", Footprint="R_0603_1608Metric")
    bench.place("U2", "74xx:74HC14", GATE, "74HC14", {"1": "SENSE"})
    rules = '[rails]\n"+3V3" = "3V3"\n'
    if mains_voltage is not None:
        rules = f'mains_voltage = "{mains_voltage}"\n' + rules
    (tmp_path / "pullproof.toml").write_text(rules, encoding="utf-8")
    return review(bench.b.write(tmp_path / "pump.kicad_sch"))


def test_mains_voltage_feeds_the_working_voltage_check_of_a_series_chain(tmp_path: Path) -> None:
    # 230 V AC over two 100 kΩ ±5 % (rules default tolerance) in series: the worst share of one
    # is 230 · 105 / (105 + 95) = 120.75 V (Ohm's law), within 150 V for an 0805 (common practice)
    result = mains_sense(tmp_path, "230VAC")
    got = {c.ref: (c.chain, c.ok) for c in result.resistor_voltages}
    assert got == {"R1": (("R1", "R3"), True), "R3": (("R1", "R3"), True)}
    assert next(c for c in result.resistor_voltages if c.ref == "R1").volts == pytest.approx(
        230 * 105 / 200
    )
    adjacent, reason = sense(result)
    assert adjacent and reason.startswith("U1 also connects to /AC_N, which matches a mains")
    assert "230 V AC" in reason


def test_a_higher_mains_voltage_fails_the_chain(tmp_path: Path) -> None:
    # 400 V AC (a three-phase line) over the same chain: 400 · 105 / 200 = 210 V > 150 V
    result = mains_sense(tmp_path, "400VAC")
    f = [f for f in result.findings if f.kind == "resistor-working-voltage"]
    assert {x.severity for x in f} == {Verdict.FAIL}
    assert "up to 210 V AC sits across R1 (its share of the chain R1 + R3), above its 150 V" in (
        f[0].message
    )


def test_the_default_mains_voltage_never_makes_a_hard_fail(tmp_path: Path) -> None:
    # With a single 0603 (50 V, common practice) on the line, even 230 V fails its working
    # voltage; without mains_voltage in the rules that rests on the default, so it is marginal.
    bench = LabelPlacer(frozenset({"GND"}))
    bench.resistor("R1", "1M", "AC_L", "LED_A", Footprint="R_0603_1608Metric")
    bench.place("U1", "Isolator:Opto_NPN", OPTO, "PC817", {"1": "LED_A", "2": "AC_N"},
                **{"pullproof.ctr_min": "50%"})  # fmt: skip
    result = review(bench.b.write(tmp_path / "lamp.kicad_sch"))
    f = next(f for f in result.findings if f.kind == "resistor-working-voltage")
    assert f.severity is Verdict.MARGINAL
    assert "this rests on default mains_voltage" in f.message
    assert f.message.endswith(
        "which no field, part library or rules key states: state them to make it certain"
    )


@pytest.mark.parametrize(
    ("text", "ac"),
    [
        ('HV = "230VAC"', True),
        ('HV = { nominal = "230V", ac = true }', True),
        ('HV = { nominal = "230V", ac = false }', False),
        ('HV = "230V"', False),
    ],
)
def test_rails_keep_the_ac_mark(tmp_path: Path, text: str, ac: bool) -> None:
    (tmp_path / "pullproof.toml").write_text(f"[rails]\n{text}\n", encoding="utf-8")
    spec = load_rules(tmp_path / "x.kicad_sch").rail("HV")
    assert spec is not None and spec.ac is ac
    assert spec.nominal is not None and spec.nominal.magnitude("V") == 230.0


def test_ac_flag_must_be_true_or_false(tmp_path: Path) -> None:
    (tmp_path / "pullproof.toml").write_text(
        '[rails]\nHV = { nominal = "230V", ac = "yes" }\n', encoding="utf-8"
    )
    with pytest.raises(RulesError) as info:
        load_rules(tmp_path / "x.kicad_sch")
    assert str(info.value).endswith("rules key 'rails.HV.ac': write true or false")

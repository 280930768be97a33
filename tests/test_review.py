"""End-to-end review of the workshop interlock panel fixture: verdicts, bounds and JSON keys.

The fixture (fixtures/review/, written by fixtures/make_review_fixture.py) has one net per
situation. Number sources, carried over from REFERENCES.md with their status:
JEDEC JESD7A 74HC levels (from memory); 74LS IIL = 0.4 mA, IIH = 20 µA, VIL = 0.8 V,
VIH = 2.0 V (handbook tables, confirmed); UM10204 §7.1 I2C equations (confirmed);
wetting current of a silver contact (common practice); resistor power derating to 50 %
(common practice); the 3.3 V microcontroller numbers are the example part library's.
"""

from __future__ import annotations

import json
import math
from functools import cache
from pathlib import Path
from typing import Any

import pytest

from pullproof.report.console import review_table
from pullproof.report.review_json import SCHEMA, review_json
from pullproof.results import ReviewResult, Verdict
from pullproof.review import Selection, parse_ref_list, parse_where, review

REPO = Path(__file__).resolve().parents[1]
PANEL = REPO / "fixtures" / "review" / "interlock_panel.kicad_sch"
MCU_PARTS = REPO / "fixtures" / "parts" / "generic_mcu33.toml"
REL = 1e-9


@cache
def panel() -> ReviewResult:
    return review(PANEL, parts=[MCU_PARTS])


def net(name: str) -> dict[str, Any]:
    doc = review_json(panel())
    return next(n for n in doc["networks"] if n["net"] == name)


def bound(name: str, constraint: str) -> dict[str, Any]:
    return next(b for b in net(name)["bounds"] if b["constraint"] == constraint)


# net → (verdict, why; the source of the deciding numbers)
VERDICTS = {
    # 10 k on a 74HC14 input at 5 V: JESD7A leakage 1 µA (from memory) allows > 1 MΩ; the
    # default gold-contact wetting 0.1 mA caps it at 47.5 kΩ (common practice).
    "/START_BTN": ("pass", "10 k well inside 551 Ω … 47.5 kΩ"),
    # 4k7 pull-down on a 74LS input: IIL 0.4 mA, VIL 0.8 V → 2.0 kΩ (handbook, confirmed).
    "/STOP_BTN": ("fail", "above the 2.0 kΩ low-level limit"),
    # 10 k pull-up on a 74LS input: (4.75 − 2.0 − 0.1) V / 20 µA = 132.5 kΩ (handbook).
    "/GUARD_CLOSED": ("pass", "10 k well under the limits"),
    # Silver reed contact needing 2 mA from 12 V: R ≤ 6 kΩ (common practice), 10 k fails.
    "/DOOR_REED": ("fail", "wetting current"),
    # Lid switch on the 3.3 V microcontroller (example part data).
    "/LID_SW": ("pass", "10 k inside 218 Ω … 33 kΩ"),
    # Open-drain buffer sinking 4 mA at 0.4 V: R ≥ 725 Ω, so 470 Ω fails (driver sink).
    "/SPINDLE_OK": ("fail", "driver sink"),
    # UM10204 §7.1, Fast-mode, 3.3 V, 200 pF: window 966.7 Ω … 1770.3 Ω (confirmed).
    "/I2C_SDA": ("pass", "1k2 inside the I2C window"),
    "/I2C_SCL": ("fail", "2k2 above the rise-time limit"),
    # A 5 V pull-up on a pin that tolerates VDD + 0.3 V = 3.6 V (example part data).
    "/TOOL_PROBE": ("fail", "input tolerance"),
    # An input of a part nobody described: no family, no part-library entry.
    "/LAMP_EN": ("incomplete", "unknown family"),
    # A pull on a net that reaches only a switch, or only a connector (forced by role=pull).
    "/SPARE_KEY": ("incomplete", "no logic input"),
    "/REMOTE_IN": ("incomplete", "no logic input"),
    # RC filter: pull-up, 1 k series resistor, 100 nF into a 74HC14 input.
    "/JOG_RAW": ("pass", "input reached through the series resistor"),
    # Two 20 k in parallel = 10 k.
    "/FEED_HOLD": ("pass", "parallel pulls combined"),
    # 820 Ω: no hard limit broken, but below the preferred 1 kΩ (rules default).
    "/SPEED_SEL": ("marginal", "below the preferred range"),
}


def test_every_network_has_its_verdict() -> None:
    got = {r.network.net: r.verdict.value for r in panel().networks}
    assert got == {k: v for k, (v, _) in VERDICTS.items()}
    assert len(got) >= 12


# (net, constraint, kind, ohms): end-to-end bounds through the schematic
BOUNDS = [
    # 74LS pull-down, REFERENCES.md §9 Example 3: 0.8 V / 0.4 mA = 2.0 kΩ (handbook, confirmed)
    ("/STOP_BTN", "low-level-holds", "max", 2000.0),
    # 74LS pull-up: (4.75 − 2.0 − 0.1 margin) / 20 µA (handbook IIH and VIH, confirmed)
    ("/GUARD_CLOSED", "high-level-holds", "max", 132500.0),
    # 74HC14 Schmitt input at VCC 4.75 V: VT+ max 0.7 VCC, II 1 µA (JESD7A, from memory)
    ("/START_BTN", "high-level-holds", "max", (4.75 - 0.7 * 4.75 - 0.1) / 1e-6),
    # 2 mA wetting from 12 V caps the pull at 6 kΩ (common practice)
    ("/DOOR_REED", "wetting-current", "max", 6000.0),
    # 12 V² / (0.1 W 0603 × 50 % derating) (common practice)
    ("/DOOR_REED", "resistor-power", "min", 2880.0),
    # (3.3 − 0.4) V / (4 mA − 1 µA) (driver sink; the buffer's fields)
    ("/SPINDLE_OK", "driver-sink", "min", 2.9 / (4e-3 - 1e-6)),
    # UM10204 §7.1 eq. (2): (3.3 − 0.4) V / 3 mA = 966.7 Ω (confirmed)
    ("/I2C_SDA", "driver-sink", "min", 2.9 / 3e-3),
    # UM10204 §7.1 eq. (1): 300 ns / (0.8473 × 200 pF) = 1770.3 Ω (equation confirmed;
    # Fast-mode t_r 300 ns from memory)
    ("/I2C_SDA", "edge-rate", "max", 300e-9 / (0.8473 * 200e-12)),
    # 1 k series resistor adds its drop: 1 kΩ × 1 µA = 1 mV (JESD7A leakage, from memory)
    ("/JOG_RAW", "high-level-holds", "max", (4.75 - 0.7 * 4.75 - 0.1 - 1e-3) / 1e-6),
]


# Limits resting on a rating no field or part library states (the 0603 size's generic power
# rating) are soft and titled "(assumed)"; every other listed limit is hard.
ASSUMED_LIMITS = {("/DOOR_REED", "resistor-power")}


@pytest.mark.parametrize(("name", "constraint", "kind", "ohms"), BOUNDS)
def test_bounds_through_the_schematic(name: str, constraint: str, kind: str, ohms: float) -> None:
    b = bound(name, constraint)
    assert b["kind"] == kind
    assumed = (name, constraint) in ASSUMED_LIMITS
    assert b["hard"] is not assumed
    assert b["title"].endswith("(assumed)") is assumed and bool(b["assumed"]) is assumed
    assert b["ohms"] == pytest.approx(ohms, rel=1e-6)


def test_input_tolerance_check_and_finding() -> None:
    # The example MCU pin tolerates VDD + 0.3 V = 3.6 V; a 5 V ± 5 % rail reaches 5.25 V.
    check = next(c for c in net("/TOOL_PROBE")["checks"] if c["constraint"] == "input-tolerance")
    assert check["ok"] is False
    assert check["substituted"] == "5.25 V ≤ 3.6 V"
    f = next(f for f in panel().findings if f.kind == "rail-above-input-tolerance")
    assert (f.net, f.refs, f.severity) == ("/TOOL_PROBE", ("R9", "U3"), Verdict.FAIL)
    # reasons and findings read as sentences naming the parts
    assert net("/TOOL_PROBE")["reason"] == (
        "The pull rail reaches 5.25 V but U3 pin 7 tolerates at most 3.6 V."
    )
    assert f.message == (
        "R9 pulls /TOOL_PROBE to +5V: the pull rail reaches 5.25 V but U3 pin 7 tolerates at "
        "most 3.6 V"
    )
    assert check["sentence"] == "the pull rail reaches 5.25 V but U3 pin 7 tolerates at most 3.6 V"


def test_parallel_pulls_are_one_network() -> None:
    n = net("/FEED_HOLD")
    assert [r["ref"] for r in n["resistors"]] == ["R19", "R20"]
    assert all(r["value_ohms"] == pytest.approx(10000.0) for r in n["resistors"])


def test_series_resistor_input() -> None:
    inputs = net("/JOG_RAW")["inputs"]
    assert inputs == [{"ref": "U1", "pin": "5", "family": "HC", "via": "R18"}]


# kind → (severity, net, refs)
FINDINGS = [
    ("up-and-down", "fail", "/COOLANT_SEL", ["R13", "R14"]),
    ("floating-input", "fail", "/ESTOP_LOOP", ["SW5", "U1"]),  # a logic IC: certain to float
    ("floating-input", "marginal", "/AUX_BTN", ["SW10", "U3"]),  # MCU: internal pull possible
    ("rail-above-input-tolerance", "fail", "/TOOL_PROBE", ["R9", "U3"]),
    ("pull-without-input", "incomplete", "/SPARE_KEY", ["R16"]),
    ("pull-without-input", "incomplete", "/REMOTE_IN", ["R22"]),
]


def test_findings() -> None:
    got = sorted(
        (f["kind"], f["severity"], f["net"], f["refs"]) for f in review_json(panel())["findings"]
    )
    assert got == sorted(FINDINGS)


def test_floating_input_messages() -> None:
    by_net = {f.net: f.message for f in panel().findings if f.kind == "floating-input"}
    # a 74HC14 input: its family data list no internal pull, so the finding is certain
    assert by_net["/ESTOP_LOOP"] == (
        "U1 pin 3 is driven only by SW5 and has no pull: it floats while the contact is open, "
        "and HC logic inputs have no internal pull (its family data)"
    )
    # a microcontroller pin: many have an internal pull, so it asks for confirmation
    assert by_net["/AUX_BTN"].endswith(
        "many such pins have an internal pull: confirm it and record field "
        "'pullproof.internal_pull' (e.g. up 30k..50k, or none) on the part, or internal_pull "
        "in its part-library entry"
    )
    # U6 declares pullproof.internal_pull: its pendant button is not reported
    assert "/PENDANT_BTN" not in by_net


SKIPPED = {
    "R11": ("/TEMP_SENSE", "divider into an analog or feedback node: the net reaches U3 pin "
            "PA5_ADC5"),
    "R12": ("/TEMP_SENSE", "divider into an analog or feedback node: the net reaches U3 pin "
            "PA5_ADC5"),
    "R13": ("/COOLANT_SEL", "part of an up/down divider on a logic input (see the finding)"),
    "R14": ("/COOLANT_SEL", "part of an up/down divider on a logic input (see the finding)"),
    "R15": ("/LED_RUN", "LED series resistor: the net reaches only a diode (D1)"),
    "R21": ("/TEST_POINT", "marked not a pull by its 'pullproof.role' field"),
}  # fmt: skip


def test_skipped_with_reasons() -> None:
    got = {s.ref: (s.net, s.reason) for s in panel().skipped}
    assert got == SKIPPED


def _is_num_or_null(x: object) -> bool:
    return x is None or (isinstance(x, float | int) and not isinstance(x, bool))


def test_json_contract_keys_and_types() -> None:
    # DESIGN.md "Contract: pullproof review ROOT --json" (pullproof.review/1)
    doc = json.loads(json.dumps(review_json(panel()), ensure_ascii=False))
    assert doc["schema"] == SCHEMA == "pullproof.review/1"
    assert isinstance(doc["root"], str) and doc["root"].endswith("interlock_panel.kicad_sch")
    for n in doc["networks"]:
        assert isinstance(n["net"], str)
        assert n["direction"] in ("up", "down")
        assert isinstance(n["rail"], str)
        for r in n["resistors"]:
            assert isinstance(r["ref"], str) and r["element"] is None  # no arrays on this panel
            assert _is_num_or_null(r["value_ohms"]) and _is_num_or_null(r["tolerance"])
        for i in n["inputs"]:
            assert isinstance(i["ref"], str) and isinstance(i["pin"], str)
            assert i["family"] is None or isinstance(i["family"], str)
        assert isinstance(n["window_ohms"], list) and len(n["window_ohms"]) == 2
        assert all(_is_num_or_null(x) for x in n["window_ohms"])
        assert n["verdict"] in {"pass", "marginal", "fail", "incomplete"}
        assert _is_num_or_null(n["recommended_ohms"])
        for b in n["bounds"]:
            assert isinstance(b["constraint"], str)
            assert b["kind"] in ("min", "max")
            assert _is_num_or_null(b["ohms"]) and isinstance(b["hard"], bool)
            assert isinstance(b["formula"], str) and isinstance(b["substituted"], str)
    for f in doc["findings"]:
        assert isinstance(f["kind"], str) and isinstance(f["message"], str)
        assert f["severity"] in {"pass", "marginal", "fail", "incomplete"}
        assert isinstance(f["net"], str) and all(isinstance(r, str) for r in f["refs"])
    for s in doc["skipped"]:
        assert {k: type(v) for k, v in s.items()} == {
            "ref": str,
            "element": type(None),  # "1-8" for an element of a resistor array
            "net": str,
            "reason": str,
        }


def test_json_has_no_nan() -> None:
    text = json.dumps(review_json(panel()), allow_nan=False)  # raises on NaN or infinity
    assert "NaN" not in text


def test_console_lists_every_network() -> None:
    text = review_table(panel())
    for name, (verdict, _) in VERDICTS.items():
        line = next(ln for ln in text.splitlines() if ln.startswith(name + " "))
        assert verdict.upper() in line, line
    assert text.rstrip().endswith(
        "15 networks (fail 5, incomplete 3, marginal 1, pass 6); 6 findings"
    )


def test_a_rail_with_unknown_voltage_is_incomplete(tmp_path: Path) -> None:
    from builder import HEX_INVERTER_PINS, SchematicBuilder

    b = SchematicBuilder()
    b.resistor("R1", "10k", at=(50.8, 50.8))
    b.power("VLOGIC", at=b.pin_point("R1", "1"))
    b.part("U1", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=(76.2, 58.42), value="74HC14")
    b.label("KEY", at=b.pin_point("R1", "2"))
    b.label("KEY", at=b.pin_point("U1", "1"))
    result = review(b.write(tmp_path / "bench.kicad_sch"))
    (r,) = result.networks
    assert r.verdict is Verdict.INCOMPLETE
    assert r.reason == (
        "Cannot judge yet: the voltage of rail VLOGIC is unknown; "
        'add [rails] VLOGIC = "3V3" (its nominal voltage) to pullproof.toml.'
    )
    (tmp_path / "pullproof.toml").write_text('[rails]\nVLOGIC = "5V"\n', encoding="utf-8")
    assert review(tmp_path / "bench.kicad_sch").networks[0].verdict is Verdict.PASS


def _hive_lid(tmp_path: Path, rules: str) -> ReviewResult:
    """A beehive scale: the hive-lid switch at the end of a cable, into a 74HC00 gate."""
    from builder import SWITCH_PINS, Pin
    from placer import LabelPlacer

    bench = LabelPlacer(frozenset({"+5V", "GND"}))
    bench.resistor("R1", "10k", "+5V", "HIVE_LID", Footprint="R_0603_1608Metric")
    bench.place("SW1", "Switch:SW_Reed", SWITCH_PINS, "LID_REED", {"1": "HIVE_LID", "2": "GND"})
    gate = (Pin("1", (-7.62, 2.54), "input"), Pin("3", (7.62, 0), "output"))
    fields = {"pullproof.vih": "3.5V", "pullproof.vil": "1.5V", "pullproof.c_in": "10pF"}
    bench.place("U1", "74xx:74HC00", gate, "74HC00", {"1": "HIVE_LID"}, **fields)
    (tmp_path / "pullproof.toml").write_text(rules, encoding="utf-8")
    return review(bench.b.write(tmp_path / "hive.kicad_sch"))


HIVE_RULES = """\
edge_time = "10us"
[rails]
"+5V" = { nominal = "5V", tolerance = "0%" }
[[net]]
match = "*HIVE_LID"
capacitance = "490pF"   # five metres of cable to the lid
"""


def test_capacitance_on_a_line_that_is_not_i2c(tmp_path: Path) -> None:
    (r,) = _hive_lid(tmp_path, HIVE_RULES).networks
    b = next(b for b in r.bounds if b.constraint == "edge-rate")
    # RC step response (REFERENCES §5): V_IL 1.5 V = 0.3·5 V and V_IH 3.5 V = 0.7·5 V, so the
    # band takes ln(7/3)·RC (the 0.8473 constant of UM10204 §7.1); C = 490 pF cable + 10 pF pin:
    # R ≤ 10 µs / (ln(7/3) · 500 pF) = 23.60 kΩ
    assert b.ohms == pytest.approx(10e-6 / (math.log(7 / 3) * 500e-12), rel=1e-9)
    sources = {t.symbol: t.value.source.where for t in b.terms}
    assert sources["C_wiring"] == "rules key net.capacitance (pullproof.toml:6)"
    assert sources["C_in(U1 pin 1)"] == "field 'pullproof.c_in' on U1"
    assert r.network.notes == ()


def test_wiring_capacitance_is_not_added_to_an_i2c_bus_figure(tmp_path: Path) -> None:
    rules = HIVE_RULES.replace('match = "*HIVE_LID"', 'match = "*HIVE_LID"\ni2c = "standard"')
    (r,) = _hive_lid(tmp_path, rules).networks
    b = next(b for b in r.bounds if b.title.startswith("I2C rise time"))
    # UM10204 §7.1 eq. (1) with the default bus capacitance: 1000 ns / (0.8473 · 100 pF)
    assert b.ohms == pytest.approx(1000e-9 / (0.8473 * 100e-12), rel=1e-9)
    assert not b.hard  # the default bus capacitance is an assumption
    (note,) = r.network.notes
    assert note.startswith("the wiring capacitance from rules key net.capacitance")


@pytest.mark.parametrize(
    ("span", "leakage", "which"),
    [
        # JESD7A 74HC input leakage: ±0.1 µA at 25 °C, ±1.0 µA over temperature (from memory)
        (("25°C", "25°C"), 0.1e-6, "the 25 °C figure"),
        (("0°C", "70°C"), 1.0e-6, "the figure over temperature"),
        (("25°C", "40°C"), 1.0e-6, "the figure over temperature"),
    ],
)
def test_leakage_figure_follows_the_temperature_span(
    tmp_path: Path, span: tuple[str, str], leakage: float, which: str
) -> None:
    from builder import Pin
    from placer import LabelPlacer

    bench = LabelPlacer(frozenset({"+2V", "GND"}))
    bench.resistor("R1", "1M", "+2V", "PROBE")
    gate = (Pin("1", (-7.62, 2.54), "input"), Pin("3", (7.62, 0), "output"))
    bench.place("U1", "74xx:74HC00", gate, "74HC00", {"1": "PROBE"})
    (tmp_path / "pullproof.toml").write_text(
        f'margin = "0V"\n[rails]\n"+2V" = {{ nominal = "2V", tolerance = "0%" }}\n'
        f'[temperature]\nmin = "{span[0]}"\nmax = "{span[1]}"\n',
        encoding="utf-8",
    )
    (r,) = review(bench.b.write(tmp_path / "probe.kicad_sch")).networks
    b = next(b for b in r.bounds if b.constraint == "high-level-holds")
    # REFERENCES Example 1 and its variant: (2.0 − 1.5) V / I_IH (JESD7A levels, from memory)
    assert b.ohms == pytest.approx(0.5 / leakage, rel=1e-9)
    term = next(t for t in b.terms if t.symbol.startswith("I_high"))
    assert which in term.value.source.reason


# ------------------------------------------------------------------ selection


@pytest.mark.parametrize(
    ("text", "refs"),
    [
        ("R3", {"R3"}),
        ("R3,R7-R9", {"R3", "R7", "R8", "R9"}),
        ("R7-9", {"R7", "R8", "R9"}),
        (" R1 , R2 ", {"R1", "R2"}),
    ],
)
def test_parse_ref_list(text: str, refs: set[str]) -> None:
    assert parse_ref_list(text) == frozenset(refs)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("R1,,R2", "--ref: empty item in 'R1,,R2'; expected e.g. R3,R7-R12"),
        ("R9-R7", "--ref: range 'R9-R7' runs backwards; expected e.g. R7-R12"),
    ],
)
def test_parse_ref_list_errors(text: str, message: str) -> None:
    with pytest.raises(ValueError) as err:
        parse_ref_list(text)
    assert str(err.value) == message


def test_parse_where() -> None:
    assert parse_where(["Tolerance=1%", " Value = 4k* "]) == (("Tolerance", "1%"), ("Value", "4k*"))
    with pytest.raises(ValueError, match=r"--where: cannot read 'Tolerance'; expected FIELD=VALUE"):
        parse_where(["Tolerance"])


@pytest.mark.parametrize(
    ("select", "nets"),
    [
        (Selection(refs=frozenset({"R1", "R2"})), {"/START_BTN", "/STOP_BTN"}),
        (Selection(where=(("Tolerance", "1%"),)),
         {"/STOP_BTN", "/GUARD_CLOSED", "/LID_SW", "/I2C_SDA", "/I2C_SCL"}),
        (Selection(refs=frozenset({"R2", "R3"}), where=(("Value", "10K"),)), {"/GUARD_CLOSED"}),
    ],
)  # fmt: skip
def test_selection_restricts_networks(select: Selection, nets: set[str]) -> None:
    result = review(PANEL, parts=[MCU_PARTS], select=select)
    assert {r.network.net for r in result.networks} == nets

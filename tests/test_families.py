"""Built-in family data against JEDEC JESD7A / JESD8 / JESD13-B and TTL handbook tables."""

from __future__ import annotations

import json

import pytest

from pullproof.cli import main
from pullproof.families import load_families
from pullproof.provenance import Origin, Status


@pytest.mark.parametrize(
    ("family", "vdd", "vih", "vil"),
    [
        # JEDEC JESD7A 74HC input levels (REFERENCES §3.5: from memory, corroborated)
        ("HC", 2.0, 1.5, 0.5),
        ("HC", 4.5, 3.15, 1.35),
        ("HC", 6.0, 4.2, 1.8),
        # JEDEC JESD7A 74HCT at 4.5–5.5 V (from memory, corroborated)
        ("HCT", 4.5, 2.0, 0.8),
        ("HCT", 5.5, 2.0, 0.8),
        # JEDEC JESD13-B buffered 4000B at 5/10/15 V (from memory, corroborated)
        ("4000B", 5.0, 3.5, 1.5),
        ("4000B", 10.0, 7.0, 3.0),
        ("4000B", 15.0, 11.0, 4.0),
        # JEDEC JESD8C.01 LVTTL/LVCMOS 3.3 V (from memory)
        ("LVCMOS33", 3.3, 2.0, 0.8),
        # JEDEC JESD8-5A 2.5 V (from memory)
        ("LVCMOS25", 2.5, 1.7, 0.7),
        # JEDEC JESD8-7A 1.8 V: 0.65/0.35 VDD (from memory)
        ("LVCMOS18", 1.8, 0.65 * 1.8, 0.35 * 1.8),
        # JEDEC JESD8-12A 1.2 V: 0.65/0.35 VDD (from memory)
        ("LVCMOS12", 1.2, 0.65 * 1.2, 0.35 * 1.2),
        # 74LS and standard 74 family limits, handbook tables (confirmed)
        ("LS", 4.75, 2.0, 0.8),
        ("74", 5.0, 2.0, 0.8),
    ],
)
def test_levels(family: str, vdd: float, vih: float, vil: float) -> None:
    at = load_families()[family].model().at(vdd)
    assert at.vih_min is not None and at.vil_max is not None
    assert at.vih_min.magnitude("V") == pytest.approx(vih, rel=1e-9)
    assert at.vil_max.magnitude("V") == pytest.approx(vil, rel=1e-9)


@pytest.mark.parametrize(
    ("family", "i_high", "i_low", "i_high_25c"),
    [
        ("HC", 1.0e-6, 1.0e-6, 0.1e-6),  # JESD7A ±1.0 µA over temp, ±0.1 µA at 25 °C (memory)
        ("HCT", 1.0e-6, 1.0e-6, 0.1e-6),  # JESD7A (from memory, corroborated)
        ("4000B", 1.0e-6, 1.0e-6, 0.1e-6),  # JESD13-B (from memory, corroborated)
        ("LS", 20e-6, 0.4e-3, None),  # 74LS IIH 20 µA, IIL −0.4 mA, handbook (confirmed)
        ("74", 40e-6, 1.6e-3, None),  # standard 74 IIH 40 µA, IIL −1.6 mA, handbook (confirmed)
    ],
)
def test_input_currents(family: str, i_high: float, i_low: float, i_high_25c: float | None) -> None:
    fam = load_families()[family]
    hot = fam.model().at(fam.supply[1])
    assert hot.i_high is not None and hot.i_low is not None
    assert hot.i_high.magnitude("A") == pytest.approx(i_high)
    assert hot.i_low.magnitude("A") == pytest.approx(i_low)  # stored as a magnitude
    if i_high_25c is not None:
        assert fam.i_high_25c.to("A").magnitude == pytest.approx(i_high_25c)


@pytest.mark.parametrize(
    ("family", "lo", "hi"),
    [
        ("HC", 2.0, 6.0),  # JESD7A (from memory)
        ("4000B", 3.0, 18.0),  # JESD13-B recommended 3–18 V (confirmed, secondary)
        ("LVCMOS18", 1.65, 1.95),  # JESD8-7A 1.8 V ± 0.15 V (confirmed, secondary)
        ("LVCMOS12", 1.1, 1.3),  # JESD8-12A 1.2 V ± 0.1 V (confirmed, secondary)
        ("LS", 4.75, 5.25),  # 74LS handbook (confirmed)
    ],
)
def test_supply(family: str, lo: float, hi: float) -> None:
    assert load_families()[family].supply == (lo, hi)


def test_hc_interpolates_between_tabulated_supplies() -> None:
    # JESD7A tabulates 2.0/4.5/6.0 V; between them we interpolate linearly (documented choice)
    at = load_families()["HC"].model().at(3.25)
    assert at.vih_min is not None
    assert at.vih_min.magnitude("V") == pytest.approx((1.5 + 3.15) / 2)
    assert "interpolated between 2 V and 4.5 V" in at.vih_min.source.reason


@pytest.mark.parametrize(
    ("family", "tolerant"),
    # 5 V tolerance: LVC and AHC inputs accept 5.5 V, HC does not (VCC + 0.5 V); common practice
    [("LVC", True), ("AHC", True), ("AHCT", True), ("HC", False), ("HCT", False), ("AC", False)],
)
def test_five_volt_tolerance(family: str, tolerant: bool) -> None:
    assert load_families()[family].model().five_volt_tolerant is tolerant


def test_schmitt_switching_points() -> None:
    # A Schmitt input is guaranteed high above VT+max: that becomes its V_IH,min
    at = load_families()["HC"].model(schmitt=True).at(4.5)
    assert at.vt_plus_max is not None and at.vih_min is not None
    assert at.vih_min.magnitude("V") == at.vt_plus_max.magnitude("V")
    assert at.max_transition is None  # no transition limit on Schmitt inputs


def test_provenance_names_standard_and_status() -> None:
    at = load_families()["HC"].model().at(4.5)
    assert at.vih_min is not None
    src = at.vih_min.source
    assert src.origin is Origin.FAMILY
    assert src.where == "family HC, JEDEC JESD7A"
    assert src.status is Status.FROM_MEMORY
    assert "check the datasheet of the part you fit" in src.reason
    ls = load_families()["LS"].model().at(5.0)
    assert ls.i_low is not None and ls.i_low.source.status is Status.CONFIRMED


def test_every_family_says_check_the_datasheet() -> None:
    for fam in load_families().values():
        assert "check the datasheet of the part you fit" in fam.note


def test_families_command_lists_every_family(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["families"]) == 0
    out = capsys.readouterr().out
    for name, fam in load_families().items():
        assert f"{name:9} {fam.title}" in out
        assert fam.standard in out


def test_families_command_json(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["families", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["schema"] == "pullproof.families/1"
    assert {f["name"] for f in doc["families"]} == set(load_families())


@pytest.mark.parametrize("family", ["LVCMOS33", "LVCMOS25", "LVCMOS18", "LVCMOS12"])
def test_jesd8_leakage_is_an_assumption(family: str) -> None:
    # No JESD8 input leakage figure could be confirmed (REFERENCES §3.1): the families carry
    # 10 µA, the UM10204 I/O limit (confirmed (secondary)), marked assumed, never as data.
    fam = load_families()[family]
    at = fam.model().at(fam.supply[0])
    assert at.i_high is not None and at.i_low is not None
    assert at.i_high.magnitude("A") == pytest.approx(10e-6)
    assert at.i_high.source.origin is Origin.ASSUMED
    assert at.i_low.source.origin is Origin.ASSUMED
    assert "UM10204" in at.i_high.source.reason
    assert at.vih_min is not None and at.vih_min.source.origin is Origin.FAMILY


def test_every_family_carries_input_currents_for_both_levels() -> None:
    for fam in load_families().values():
        assert fam.i_high is not None and fam.i_low is not None, fam.name


def test_families_command_flags_assumed_and_missing_numbers(
    capsys: pytest.CaptureFixture[str],
) -> None:
    assert main(["families"]) == 0
    text = capsys.readouterr().out
    block = text.split("LVCMOS33 ", 1)[1].split("\n\n", 1)[0]
    assert "ASSUMED (not in its standard): i_high, i_low" in block
    assert "MISSING: C_in" in block
    assert main(["families", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    by = {f["name"]: f for f in doc["families"]}
    assert by["LVCMOS33"]["assumed"] == ["i_high", "i_low"]
    assert by["HC"]["assumed"] == [] and by["HC"]["missing"] == []
    assert by["LS"]["missing"] == ["C_in"]


def test_an_input_model_is_evaluated_the_same_at_equal_supplies() -> None:
    # What a review's memo of InputModel.at rests on (the reference is at() itself): the
    # answer depends on the supply's value, not on the supply's source, which it carries as
    # given; the key keeps 5 V and 5.0 V apart (they print differently) and tells overrides
    # by their sources.
    from dataclasses import replace

    from pullproof.provenance import Provenance, Sourced
    from pullproof.units import Q_

    model = load_families()["HC"].model()
    here = Sourced(Q_(4.5, "V"), Provenance(Origin.DERIVED, "rail A", Status.USER))
    there = Sourced(Q_(4.5, "V"), Provenance(Origin.DERIVED, "rail B", Status.USER))
    a, b = model.at(here), model.at(there)
    assert model.at_key(here) == model.at_key(there)
    assert a.vdd is here and b.vdd is there
    assert replace(a, vdd=there) == b
    whole = Sourced(Q_(5, "V"), here.source)
    assert model.at_key(whole) != model.at_key(Sourced(Q_(5.0, "V"), here.source))
    mine = Sourced(Q_(2.0, "V"), Provenance(Origin.FIELD, "field on U1", Status.USER))
    yours = Sourced(Q_(2.0, "V"), Provenance(Origin.FIELD, "field on U2", Status.USER))
    key_1 = model.with_overrides({"vih_min": mine}).at_key(here)
    assert key_1 != model.with_overrides({"vih_min": yours}).at_key(here)

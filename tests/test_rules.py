"""The rules file: defaults with reasons, rails from names, positioned errors."""

from __future__ import annotations

from pathlib import Path

import pytest

from pullproof.errors import RulesError
from pullproof.provenance import Origin
from pullproof.rules import KEYS, load_rules


def _rules(tmp_path: Path, text: str) -> object:
    (tmp_path / "pullproof.toml").write_text(text, encoding="utf-8")
    return load_rules(tmp_path / "board.kicad_sch")


def test_defaults_without_a_file(tmp_path: Path) -> None:
    rules = load_rules(tmp_path / "board.kicad_sch")
    assert rules.file == "" and rules.series == "E24" and rules.policy == "centre"
    tol = rules.get("resistor.tolerance")
    assert tol.magnitude("") == 0.05
    # it stands in for the fitted resistor's tolerance: an assumption, not a project choice
    assert tol.source.origin is Origin.ASSUMED and tol.source.reason
    assert rules.get("margin").source.origin is Origin.DEFAULT


def test_every_key_has_a_reason() -> None:
    assert all(key.reason for key in KEYS.values())


@pytest.mark.parametrize(
    ("name", "volts"),
    # rail names as designers write them: common practice
    [("+5V", 5.0), ("+3V3", 3.3), ("3.3V", 3.3), ("VCC_1V8", 1.8), ("-12V", -12.0),
     ("+3.3VP", 3.3), ("VBUS", 5.0), ("/+12V", 12.0), ("V3P3", 3.3), ("+24V", 24.0)],
)  # fmt: skip
def test_rail_from_name(tmp_path: Path, name: str, volts: float) -> None:
    rail = load_rules(tmp_path / "x.kicad_sch").rail(name)
    assert rail is not None and rail.nominal is not None and not rail.ground
    assert rail.nominal.magnitude("V") == pytest.approx(volts)
    assert rail.v_min is not None and rail.v_max is not None
    # default rail tolerance 5 %
    assert rail.v_max.magnitude("V") - rail.v_min.magnitude("V") == pytest.approx(0.1 * abs(volts))


@pytest.mark.parametrize("name", ["GND", "GNDA", "GNDD", "VSS", "0V", "Earth", "/GND", "AGND"])
def test_grounds(tmp_path: Path, name: str) -> None:
    rail = load_rules(tmp_path / "x.kicad_sch").rail(name)
    assert rail is not None and rail.ground


def test_unnamed_supply_is_a_rail_without_voltage(tmp_path: Path) -> None:
    rail = load_rules(tmp_path / "x.kicad_sch").rail("VDD")
    assert rail is not None and rail.nominal is None
    assert load_rules(tmp_path / "x.kicad_sch").rail("/KEY_UP") is None


def test_rails_table_and_net_overrides(tmp_path: Path) -> None:
    rules = _rules(
        tmp_path,
        'series = "E96"\n[rails]\nVDD = { nominal = "3V3", tolerance = "2%" }\n'
        '[[net]]\nmatch = "*SDA*"\ni2c = "fast"\nbus_capacitance = "100pF"\n',
    )
    assert rules.series == "E96"
    vdd = rules.rail("VDD")
    assert vdd is not None and vdd.v_min is not None
    assert vdd.v_min.magnitude("V") == pytest.approx(3.3 * 0.98)
    net = rules.for_net("/I2C_SDA")
    assert net.i2c_mode == "fast"
    assert net.bus_capacitance is not None
    assert net.bus_capacitance.magnitude("F") == pytest.approx(100e-12)
    assert net.bus_capacitance.source.where == "rules key net.bus_capacitance (pullproof.toml:7)"
    assert rules.for_net("/KEY").i2c_mode == ""


def test_mains_patterns(tmp_path: Path) -> None:
    rules = load_rules(tmp_path / "x.kicad_sch")
    assert rules.is_mains("/MAINS_L") and not rules.is_mains("/KEY_UP")
    # A logic net that reports on mains is not itself a mains conductor.
    assert rules.is_mains("/PUMP_AC_L") and rules.is_mains("AC_N")
    assert not rules.is_mains("/MAINS_OK") and not rules.is_mains("/LINE_IN")


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ('series = "E24"\n[resistor]\ntolernce = "1%"\n',
         "pullproof.toml:3:1: unknown rules key 'resistor.tolernce'; "
         "did you mean 'resistor.tolerance'?"),
        ('seires = "E24"\n',
         "pullproof.toml:1:1: unknown rules key 'seires'; did you mean 'series'?"),
        ("series = E12\n", "pullproof.toml:1:10: malformed TOML: Invalid value"),
        ('margin = "5 %%"\n',
         "pullproof.toml:1:1: rules key 'margin': cannot read '5 %%'; "
         "expected a percentage such as 5% or ±1%"),
        ('series = "E7"\n',
         "pullproof.toml:1:1: rules key 'series': cannot read 'E7'; "
         "expected one of e3, e6, e12, e24, e48, e96, e192"),
        ('\n[[net]]\nmatch = "*X*"\nspeed = "fast"\n',
         "pullproof.toml:4:1: unknown rules key 'net.speed'"),
        ("derating = true\n",
         "pullproof.toml:1:1: rules key 'derating': write the value as text, e.g. \"5%\""),
        ('assume = "ttl"\n',
         "pullproof.toml:1:1: rules key 'assume': cannot read 'ttl'; "
         "expected one of cmos, lvttl, none"),
        ('\n[[net]]\nmatch = "J*"\ninput = "mystery"\n',
         "pullproof.toml:4:1: rules key 'net.input': cannot read 'mystery'; expected an input "
         "class or family: cmos, lvttl, AC, ACT, AHC, AHCT, LVC, LV, 4000B, HC, HCT, LVCMOS33, "
         "LVCMOS25, LVCMOS18, LVCMOS12, 74, LS"),
        ('\n[[net]]\nmatch = "J*"\ninput = "HC"\ninput_supply = "MOTOR_BOARD"\n',
         "pullproof.toml:5:1: rules key 'net.input_supply': 'MOTOR_BOARD' is neither a rail "
         'listed in [rails] nor a supply name such as "3V3" or "+5V"'),
        ('[rails]\nVBUS = { nominal = "5V", min = "5.1V" }\n',
         "pullproof.toml:2:1: rules key 'rails.VBUS': min and max must enclose the nominal "
         "voltage"),
        ('[rails]\nVRAM = { follows = "VCC", nominal = "5V" }\n',
         "pullproof.toml:2:1: rules key 'rails.VRAM': write { follows = \"RAIL\" } on its own"),
        ('[resistor]\npower = { "0604" = "0.1W" }\n',
         "pullproof.toml:2:1: rules key 'resistor.power': '0604' is not a chip size such as "
         "0603, nor array"),
    ],
)  # fmt: skip
def test_errors(tmp_path: Path, text: str, message: str) -> None:
    with pytest.raises(RulesError) as info:
        _rules(tmp_path, text)
    assert str(info.value) == f"{tmp_path}/{message}"


def test_explicit_missing_file(tmp_path: Path) -> None:
    with pytest.raises(RulesError, match="cannot read rules file"):
        load_rules(tmp_path / "x.kicad_sch", tmp_path / "nope.toml")


def test_net_capacitance_is_read_with_its_source(tmp_path: Path) -> None:
    (tmp_path / "pullproof.toml").write_text(
        '[[net]]\nmatch = "*FLOAT*"\ncapacitance = "300pF"\n', encoding="utf-8"
    )
    rules = load_rules(tmp_path / "x.kicad_sch")
    c = rules.for_net("/FLOAT_TANK").capacitance
    assert c is not None and c.magnitude("F") == pytest.approx(300e-12)
    assert c.source.where == "rules key net.capacitance (pullproof.toml:3)"
    assert rules.for_net("/KEY_UP").capacitance is None


def test_net_capacitance_needs_a_unit(tmp_path: Path) -> None:
    (tmp_path / "pullproof.toml").write_text(
        '[[net]]\nmatch = "*FLOAT*"\ncapacitance = "300"\n', encoding="utf-8"
    )
    with pytest.raises(RulesError) as info:
        load_rules(tmp_path / "x.kicad_sch")
    assert str(info.value) == (
        f"{tmp_path / 'pullproof.toml'}:3:1: rules key 'net.capacitance': cannot read '300'; "
        "expected a capacitance such as 100n, 4n7 or 100 nF"
    )


def test_assume_defaults_to_cmos_and_can_be_off(tmp_path: Path) -> None:
    assert _rules(tmp_path, "").assume == "cmos"
    assert _rules(tmp_path, 'assume = "none"\n').assume == "none"
    assert _rules(tmp_path, 'assume = "LVTTL"\n').with_assume("none").assume == "none"


def test_rails_with_a_range_or_following_another(tmp_path: Path) -> None:
    rules = _rules(
        tmp_path,
        '[rails]\nVCC = "5V"\nVBUS = { nominal = "5V", min = "4.4V", max = "5.25V" }\n'
        'VRAM = { follows = "VCC" }\nVAUX = { follows = "VNOWHERE" }\n',
    )
    vbus = rules.rail("VBUS")
    assert vbus is not None and vbus.v_min is not None and vbus.v_max is not None
    assert (vbus.v_min.magnitude("V"), vbus.v_max.magnitude("V")) == (4.4, 5.25)
    vram = rules.rail("VRAM")
    assert vram is not None and vram.follows == "VCC" and vram.v_min is not None
    assert vram.v_min.magnitude("V") == pytest.approx(4.75)  # VCC's 5 V − 5 % (the default)
    vaux = rules.rail("VAUX")
    assert vaux is not None and vaux.follows == "VNOWHERE" and vaux.v_min is None


def test_resistor_ratings_by_chip_size(tmp_path: Path) -> None:
    rules = _rules(
        tmp_path,
        '[resistor]\npower = { "0603" = "0.1W", "array" = "1/32W" }\nworking_voltage = "50V"\n',
    )
    p = rules.for_size("resistor.power", "0603")
    assert p is not None and p.magnitude("W") == pytest.approx(0.1)
    assert p.source.origin is Origin.RULES
    assert rules.for_size("resistor.power", "1206") is None  # the size's assumed rating applies
    array = rules.for_size("resistor.power", "array")
    assert array is not None and array.magnitude("W") == pytest.approx(1 / 32)
    wv = rules.for_size("resistor.working_voltage", "1206")
    assert wv is not None and wv.magnitude("V") == pytest.approx(50.0)


def test_assumed_defaults_say_what_they_stand_for(tmp_path: Path) -> None:
    rules = _rules(tmp_path, "")
    tol = rules.get("resistor.tolerance")
    assert tol.source.origin is Origin.ASSUMED
    assert tol.source.stands is not None
    assert (tol.source.stands.quantity, tol.source.stands.text) == ("tolerance", "5%")
    assert "resistor.tolerance" in tol.source.stands.fix


def test_glob_lists_match_as_fnmatch_does() -> None:
    # Reference: the standard library's fnmatch.fnmatchcase, one pattern at a time.
    import fnmatch
    import random

    from pullproof.rules import glob_any

    rng = random.Random(7)
    patterns = ("GND*", "*_GND", "0V", "[AB]?_L*", "*230VAC*", "MAINS_[!O]*", "V+", "[", "a*b*c")
    names = ["GND", "AGND", "X_GND", "0V", "A1_LINE", "C1_L", "P_230VAC_L", "MAINS_N", "MAINS_OK",
             "V+", "[", "abc", "aXbYc", "", "gnd"]  # fmt: skip
    alphabet = "AB01_GNDLVX+*[]!?abc"
    names += ["".join(rng.choice(alphabet) for _ in range(rng.randint(0, 8))) for _ in range(300)]
    for k in range(len(patterns) + 1):
        chosen = patterns[:k]
        match = glob_any(chosen)
        for name in names:
            assert match(name) == any(fnmatch.fnmatchcase(name, p) for p in chosen), (name, chosen)

"""Value parsing: IEC 60062 resistance codes, SI values as designers write them, typed errors."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import pytest
from pint.testing import assert_allclose as _pint_allclose

from pullproof.errors import ValueParseError
from pullproof.quantity import Qty
from pullproof.units import (
    Q_,
    parse_capacitance,
    parse_capacitor_text,
    parse_current,
    parse_element_value,
    parse_percent,
    parse_power,
    parse_resistance,
    parse_resistor_text,
    parse_tcr,
    parse_temperature,
    parse_time,
    parse_voltage,
    parse_voltage_ac,
)


def assert_allclose(actual: Any, expected: Any, **kw: Any) -> None:
    """pint's own comparison (the reference for units), on our values made pint quantities."""

    def as_pint(q: Any) -> Any:
        return q.pint() if isinstance(q, Qty) else q

    _pint_allclose(as_pint(actual), as_pint(expected), **kw)


Parser = Callable[..., Any]


@pytest.mark.parametrize(
    ("text", "ohms"),
    [
        # IEC 60062 letter-and-digit code; values from REFERENCES §2 (confirmed in IEC 60062
        # reproductions unless noted)
        ("R47", 0.47),  # IEC 60062, confirmed
        ("R10", 0.10),  # IEC 60062, confirmed
        ("4R7", 4.7),  # IEC 60062, confirmed
        ("1R2", 1.2),  # IEC 60062, confirmed
        ("18R", 18.0),  # IEC 60062, confirmed
        ("47R", 47.0),  # IEC 60062, derived from the same rule
        ("470R", 470.0),  # IEC 60062, confirmed
        ("1K0", 1000.0),  # IEC 60062, confirmed
        ("4K7", 4700.0),  # IEC 60062, confirmed
        ("4k7", 4700.0),  # lowercase k, common practice (confirmed in use)
        ("8K2", 8200.0),  # IEC 60062, confirmed
        ("47K", 47000.0),  # IEC 60062, confirmed
        ("47K3", 47300.0),  # IEC 60062, confirmed
        ("470K", 470000.0),  # IEC 60062, confirmed
        ("2M2", 2.2e6),  # IEC 60062, confirmed
        ("4M7", 4.7e6),  # IEC 60062, confirmed
        ("15M0", 15.0e6),  # IEC 60062, confirmed
        ("1G5", 1.5e9),  # IEC 60062, confirmed
        ("1G0", 1.0e9),  # IEC 60062, derived (G = 10^9 confirmed)
        ("1T0", 1.0e12),  # IEC 60062, derived (T = 10^12 confirmed)
        ("6L8", 0.0068),  # IEC 60062:2016 letter L = milliohm, confirmed
        ("0R", 0.0),  # zero-ohm link, common practice
        # SI forms, common practice
        ("47k", 47000.0),
        ("47kΩ", 47000.0),
        ("47 kΩ", 47000.0),
        ("47 kohm", 47000.0),
        ("4.7 kOhm", 4700.0),
        ("47000", 47000.0),
        ("1M", 1.0e6),
        ("470 Ω", 470.0),
        ("10 mΩ", 0.01),
    ],
)
def test_resistance_codes(text: str, ohms: float) -> None:
    assert_allclose(parse_resistance(text, part="R1"), Q_(ohms, "ohm"), rtol=1e-12)


@pytest.mark.parametrize(
    ("text", "ohms", "tol", "watts", "size"),
    [
        ("1R8J", 1.8, 0.05, None, ""),  # IEC 60062 / BS 1852 tolerance letter J = ±5 %, confirmed
        ("27KK", 27000.0, 0.10, None, ""),  # IEC 60062 letter K = ±10 %, confirmed
        ("10K0F", 10000.0, 0.01, None, ""),  # IEC 60062 letter F = ±1 %, confirmed
        ("2K2G", 2200.0, 0.02, None, ""),  # IEC 60062 letter G = ±2 %, confirmed
        ("1M0M", 1.0e6, 0.20, None, ""),  # IEC 60062 letter M = ±20 %, from memory
        ("100RB", 100.0, 0.001, None, ""),  # IEC 60062 letter B = ±0.1 %, from memory
        ("10k 1%", 10000.0, 0.01, None, ""),  # common practice
        ("10k ±0.1%", 10000.0, 0.001, None, ""),  # common practice
        ("10k/0.1W", 10000.0, None, 0.1, ""),  # common practice
        ("10k 1/4W", 10000.0, None, 0.25, ""),  # common practice
        ("10k 100mW", 10000.0, None, 0.1, ""),  # common practice
        ("100k 0603", 100000.0, None, None, "0603"),  # common practice
        ("4k7 5% 0805 1/8W", 4700.0, 0.05, 0.125, "0805"),  # common practice
    ],
)
def test_resistor_extras(
    text: str, ohms: float, tol: float | None, watts: float | None, size: str
) -> None:
    r = parse_resistor_text(text, part="R1")
    assert_allclose(r.ohms, Q_(ohms, "ohm"), rtol=1e-12)
    assert (r.tolerance is None) == (tol is None)
    if tol is not None:
        assert r.tolerance is not None
        assert r.tolerance.to("").magnitude == pytest.approx(tol)
    assert (r.power is None) == (watts is None)
    if watts is not None:
        assert_allclose(r.power, Q_(watts, "W"))
    assert r.size == size


@pytest.mark.parametrize(
    ("text", "ohms", "tol", "watts", "size"),
    [
        # spellings seen on real boards' Value fields
        ("10k/R0603", 10000.0, None, None, "0603"),  # size after "/", R prefix: common practice
        ("10k_0402", 10000.0, None, None, "0402"),  # size after "_": common practice
        ("4K7_C0402", 4700.0, None, None, "0402"),  # IEC 60062 code; C size prefix: common practice
        ("2.2k_1%", 2200.0, 0.01, None, ""),  # tolerance after "_": common practice
        ("49,9R", 49.9, None, None, ""),  # decimal comma (ISO 80000-1 §7.3.2), R = Ω (IEC 60062)
        ("4,7k", 4700.0, None, None, ""),  # decimal comma (ISO 80000-1 §7.3.2)
        ("10k, 1%", 10000.0, 0.01, None, ""),  # a comma before a space separates: common practice
        ("30mR/333mW", 0.030, None, 0.333, ""),  # m = 10^-3 (SI Brochure table 7), R = Ω
        ("49.9R 0.1%", 49.9, 0.001, None, ""),  # R as the ohm sign after a decimal: common practice
    ],
)
def test_board_spellings(
    text: str, ohms: float, tol: float | None, watts: float | None, size: str
) -> None:
    r = parse_resistor_text(text, part="R1")
    assert_allclose(r.ohms, Q_(ohms, "ohm"), rtol=1e-12)
    assert (r.tolerance is None) == (tol is None)
    if tol is not None:
        assert r.tolerance is not None
        assert r.tolerance.to("").magnitude == pytest.approx(tol)
    assert (r.power is None) == (watts is None)
    if watts is not None:
        assert_allclose(r.power, Q_(watts, "W"))
    assert r.size == size


@pytest.mark.parametrize(
    ("text", "farads", "volts", "dielectric", "size"),
    [
        ("470pF/50V", 470e-12, 50.0, "", ""),  # SI prefixes (SI Brochure table 7)
        ("100n/16V/X7R", 100e-9, 16.0, "X7R", ""),  # EIA-198 class code, from memory
        ("22pF 50V C0G 0402", 22e-12, 50.0, "C0G", "0402"),  # EIA-198 class code, from memory
        ("10µF 6V3", 10e-6, 6.3, "", ""),  # IEC 60062 letter as decimal marker (6V3)
        ("10u 0805", 10e-6, None, "", "0805"),  # common practice
        ("4n7", 4.7e-9, None, "", ""),  # IEC 60062 letter as decimal marker
    ],
)
def test_capacitor_values(
    text: str, farads: float, volts: float | None, dielectric: str, size: str
) -> None:
    c = parse_capacitor_text(text, part="C1")
    assert_allclose(c.farads, Q_(farads, "F"), rtol=1e-12)
    assert (c.voltage is None) == (volts is None)
    if volts is not None:
        assert_allclose(c.voltage, Q_(volts, "V"))
    assert (c.dielectric, c.size) == (dielectric, size)


@pytest.mark.parametrize(
    ("text", "ohms"),
    [
        ("10k", 10000.0),  # one element's value: IEC 60062 / SI, common practice
        ("4x10k", 10000.0),  # count × element value: common practice
        ("8 × 4K7", 4700.0),  # IEC 60062 code after a count: common practice
        ("CAT16 4x10K 5%", 10000.0),  # a part string holding one resistance: common practice
    ],
)
def test_array_values(text: str, ohms: float) -> None:
    assert_allclose(parse_element_value(text, part="RN1").ohms, Q_(ohms, "ohm"), rtol=1e-12)


@pytest.mark.parametrize("text", ["CAT16 10k 4k7", "4D03WGJ0103T5E", "R_Array", ""])
def test_array_value_not_guessed(text: str) -> None:
    # two resistances, or none, are never guessed
    with pytest.raises(ValueParseError, match="a resistor array's value such as 4x10k"):
        parse_element_value(text, part="RN1")


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("100nX", "then a rated voltage (50V), dielectric (X7R), tolerance (10%) or size (0603)"),
        ("100n 16V 25V", "with at most one voltage"),
        ("-1nF", "(not negative)"),
        ("100", "expected a capacitance such as 100n, 4n7 or 100 nF"),
    ],
)
def test_bad_capacitor_values(text: str, expected: str) -> None:
    with pytest.raises(ValueParseError) as info:
        parse_capacitor_text(text, part="C4")
    assert str(info.value).startswith(f"field 'Value' of C4: cannot read {text!r}; expected")
    assert expected in str(info.value)


def test_resistor_tcr() -> None:
    r = parse_resistor_text("10k 1% 100ppm/K", part="R1")
    assert_allclose(r.tcr, Q_(100e-6, "1/K"))


@pytest.mark.parametrize(
    ("parser", "text", "expected"),
    [
        (parse_current, "1uA", Q_(1e-6, "A")),
        (parse_current, "1\u00b5A", Q_(1e-6, "A")),  # MICRO SIGN
        (parse_current, "1\u03bcA", Q_(1e-6, "A")),  # GREEK SMALL LETTER MU
        (parse_current, "0.4mA", Q_(0.4e-3, "A")),
        (parse_current, "-0.4 mA", Q_(-0.4e-3, "A")),
        (parse_current, "20 µA", Q_(20e-6, "A")),
        (parse_voltage, "3V3", Q_(3.3, "V")),  # IEC 60062 letter as decimal marker
        (parse_voltage, "+5V", Q_(5.0, "V")),
        (parse_voltage, "1V8", Q_(1.8, "V")),  # IEC 60062 letter as decimal marker
        (parse_voltage, "12 V", Q_(12.0, "V")),
        (parse_voltage, "-12V", Q_(-12.0, "V")),
        (parse_voltage, "230VAC", Q_(230.0, "V")),
        (parse_voltage, "500mV", Q_(0.5, "V")),
        (parse_capacitance, "100n", Q_(100e-9, "F")),
        (parse_capacitance, "4n7", Q_(4.7e-9, "F")),  # IEC 60062 letter as decimal marker
        (parse_capacitance, "100 nF", Q_(100e-9, "F")),
        (parse_capacitance, "2p2", Q_(2.2e-12, "F")),  # IEC 60062 letter as decimal marker
        (parse_capacitance, "10µF", Q_(10e-6, "F")),
        (parse_time, "10ms", Q_(0.01, "s")),
        (parse_time, "1.5 s", Q_(1.5, "s")),
        (parse_time, "300ns", Q_(300e-9, "s")),
        (parse_percent, "5%", Q_(0.05, "")),
        (parse_percent, "±1 %", Q_(0.01, "")),
        (parse_tcr, "100ppm/K", Q_(100e-6, "1/K")),
        (parse_tcr, "50 ppm/°C", Q_(50e-6, "1/K")),
        (parse_power, "1/4W", Q_(0.25, "W")),
        (parse_power, "0.1 W", Q_(0.1, "W")),
        (parse_power, "100mW", Q_(0.1, "W")),
    ],
)
def test_other_quantities(parser: Parser, text: str, expected: Any) -> None:
    # unit arithmetic: common practice (SI prefixes)
    assert_allclose(parser(text, field="X", part="U1"), expected, rtol=1e-12)


def test_ac_voltage_flag() -> None:
    assert parse_voltage_ac("230VAC")[1] is True
    assert parse_voltage_ac("24 V DC")[1] is False
    assert parse_voltage_ac("5V")[1] is False


def test_temperature() -> None:
    assert parse_temperature("-40°C").to("degC").magnitude == -40.0
    assert parse_temperature("85 degC").to("degC").magnitude == 85.0


R_EXP = "expected a resistance such as 4k7, 47k, 4.7 kΩ, 470R, R47 or 47000"
R_THEN = ", then after the resistance: a tolerance (1%), power (0.1W), size (0603) or TCR"
I_EXP = "expected a current with its unit, such as 1µA, 0.4mA or -0.4 mA"
V_EXP = "expected a voltage with its unit, such as 3V3, +5V, 1.8 V or 230VAC"
C_EXP = "expected a capacitance such as 100n, 4n7 or 100 nF"
T_EXP = "expected a time with its unit, such as 10ms or 1.5 s"
PCT_EXP = "expected a percentage such as 5% or ±1%"
TCR_EXP = "expected a temperature coefficient such as 100ppm/K or 50 ppm/°C"
P_EXP = "expected a power such as 0.1W, 1/4W or 100mW"


@pytest.mark.parametrize(
    ("parser", "field", "part", "text", "expected"),
    [
        (parse_resistor_text, "Value", "R3", "10k5k", R_EXP),
        (parse_resistor_text, "Value", "R3", "abc", R_EXP),
        (parse_resistor_text, "Value", "R3", "1e999", R_EXP + " (the number is out of range)"),
        (parse_resistor_text, "Value", "R3", "nan", R_EXP),
        (parse_resistor_text, "Value", "R3", "", R_EXP),
        (parse_resistor_text, "Value", "R3", "-4k7", R_EXP),
        (parse_resistor_text, "Value", "R3", "47kF", R_EXP),
        (
            parse_resistor_text,
            "Value",
            "R3",
            "1m",
            R_EXP + " (lowercase m is milli: write M for megohm or mΩ)",
        ),
        (parse_resistor_text, "Value", "R3", "4k7k", R_EXP),
        (parse_resistor_text, "Value", "R3", "10k 1% 1%", R_EXP + " with at most one tolerance"),
        (
            parse_resistor_text,
            "Value",
            "R3",
            "10k 5 %%",
            R_EXP
            + ", then after the resistance: a tolerance (1%), power (0.1W), size (0603) or TCR",
        ),
        (parse_resistor_text, "Value", "R3", "10k 100%", PCT_EXP + " below 100 %"),
        (parse_resistor_text, "Value", "R3", "4.7.1k", R_EXP),
        (parse_resistor_text, "Value", "R3", "k47", R_EXP),
        (parse_resistor_text, "Value", "R3", "10 k 5", R_EXP + R_THEN),
        (parse_resistor_text, "Value", "R3", "1/0W", P_EXP + " above zero"),
        (parse_resistor_text, "Value", "R3", "47kΩΩ", R_EXP),
        (parse_resistor_text, "Value", "R3", "inf", R_EXP),
        (parse_resistor_text, "Value", "R3", "1e-999", R_EXP + " (the number is out of range)"),
        (parse_resistor_text, "Value", "R3", "4K7Z", R_EXP),
        (
            parse_resistor_text,
            "Value",
            "R3",
            "47 k Ω x",
            R_EXP
            + ", then after the resistance: a tolerance (1%), power (0.1W), size (0603) or TCR",
        ),
        (parse_resistor_text, "Value", "R3", "0x10", R_EXP),
        (parse_resistor_text, "Value", "R3", "+4k7", R_EXP),
        (parse_resistor_text, "Value", "R3", "R", R_EXP),
        (parse_resistor_text, "Value", "R3", "RR", R_EXP),
        (parse_resistor_text, "Value", "R3", "47uΩ", R_EXP),
        (parse_resistor_text, "Value", "R3", "--1", R_EXP),
        (parse_resistor_text, "Value", "R3", "4k7J", R_EXP),
        (parse_resistor_text, "Value", "R3", "10k 0W", P_EXP + " above zero"),
        (parse_resistor_text, "Value", "R3", "10k 0603 0805", R_EXP + " with at most one size"),
        (parse_resistor_text, "Value", "R3", "   ", R_EXP),
        (
            parse_resistor_text,
            "Value",
            "R3",
            "4,7,1k",
            R_EXP
            + ", then after the resistance: a tolerance (1%), power (0.1W), size (0603) or TCR",
        ),
        (parse_resistor_text, "Value", "R3", "10k_R9999", R_EXP + R_THEN),
        (
            parse_resistor_text,
            "Value",
            "R3",
            "10k 1e999%",
            PCT_EXP + " (the number is out of range)",
        ),
        (parse_current, "pullproof.i_high", "U2", "1u", I_EXP),
        (parse_current, "pullproof.i_high", "U2", "abc", I_EXP),
        (parse_current, "pullproof.i_high", "U2", "1mV", I_EXP),
        (parse_current, "pullproof.i_high", "U2", "1 A A", I_EXP),
        (parse_current, "pullproof.i_high", "U2", "0.4mA5", I_EXP),
        (
            parse_current,
            "pullproof.i_high",
            "U2",
            "1e999A",
            I_EXP + " (the number is out of range)",
        ),
        (parse_current, "pullproof.i_high", "U2", "", I_EXP),
        (parse_voltage, "pullproof.vih", "U2", "3V3V", V_EXP),
        (parse_voltage, "pullproof.vih", "U2", "5", V_EXP),
        (parse_voltage, "pullproof.vih", "U2", "V", V_EXP),
        (parse_voltage, "pullproof.vih", "U2", "3.3VV", V_EXP),
        (parse_voltage, "pullproof.vih", "U2", "5 mA", V_EXP),
        (parse_voltage, "pullproof.vih", "U2", "1V8V", V_EXP),
        (parse_voltage, "pullproof.vih", "U2", "", V_EXP),
        (parse_capacitance, "Value", "C4", "47kF", C_EXP),
        (parse_capacitance, "Value", "C4", "100", C_EXP),
        (parse_capacitance, "Value", "C4", "-1nF", C_EXP + " (not negative)"),
        (parse_capacitance, "Value", "C4", "4n7n", C_EXP),
        (parse_time, "pullproof.bounce", "SW1", "10", T_EXP),
        (parse_time, "pullproof.bounce", "SW1", "10mss", T_EXP),
        (parse_time, "pullproof.bounce", "SW1", "-1ms", T_EXP + " (not negative)"),
        (parse_percent, "Tolerance", "R3", "5 %%", PCT_EXP),
        (parse_percent, "Tolerance", "R3", "5", PCT_EXP),
        (parse_percent, "Tolerance", "R3", "%", PCT_EXP),
        (parse_percent, "Tolerance", "R3", "1e999%", PCT_EXP + " (the number is out of range)"),
        (parse_tcr, "TCR", "R3", "100", TCR_EXP),
        (parse_tcr, "TCR", "R3", "ppm", TCR_EXP),
        (parse_power, "Power", "R3", "0.1", P_EXP),
        (parse_power, "Power", "R3", "1/0W", P_EXP),
        (parse_power, "Power", "R3", "W", P_EXP),
    ],
)
def test_bad_values(parser: Parser, field: str, part: str, text: str, expected: str) -> None:
    with pytest.raises(ValueParseError) as info:
        parser(text, field=field, part=part)
    assert str(info.value) == f"field {field!r} of {part}: cannot read {text!r}; {expected}"
    assert info.value.field == field
    assert info.value.part == part
    assert info.value.text == text


def test_error_without_part_names_the_field() -> None:
    with pytest.raises(ValueParseError, match=r"^field 'Value': cannot read 'abc'; "):
        parse_resistance("abc")


# SI prefixes and their powers of ten (SI Brochure, 9th ed., table 7; IEC 60027-1).
@pytest.mark.parametrize(
    ("value", "unit", "sig", "text"),
    [
        (4700.0, "Ω", 3, "4.7 kΩ"),
        (1.35e6, "Ω", 3, "1.35 MΩ"),
        (1e-6, "A", 3, "1 µA"),
        (4.7e-9, "F", 3, "4.7 nF"),
        (999.97, "Ω", 3, "1 kΩ"),  # rounding carries into the next prefix
        (-0.4e-3, "A", 3, "−400 µA"),
        (0.0, "V", 3, "0 V"),
        (1770.33, "Ω", 4, "1.77 kΩ"),
        (float("inf"), "Ω", 3, "∞"),
        (float("nan"), "V", 3, "unknown"),
    ],
)
def test_format_si(value: float, unit: str, sig: int, text: str) -> None:
    from pullproof.units import format_si

    assert format_si(value, unit, sig=sig) == text
